"""Steady-state flux ranges (tfa.problem.flux_ranges) against cobra's flux variability analysis
(Mahadevan & Schilling 2003, Metab. Eng. 5:264; cobra, Ebrahim et al. 2013, BMC Syst. Biol. 7:74)
on the E. coli core model bundled with cobra (Orth, Fleming & Palsson 2010, EcoSal Plus)."""

from __future__ import annotations

import numpy as np
import pytest

from tfa.problem.flux_ranges import flux_caps, steady_state_flux_ranges


def test_ranges_equal_cobra_flux_variability():
    import cobra
    from cobra.flux_analysis import flux_variability_analysis

    model = cobra.io.load_model("textbook")
    model.solver = "glpk"
    # the biomass reaction's lower bound is 0, so cobra's "objective >= 0 x optimum" row adds
    # nothing: both compute the ranges over all steady states within the flux bounds
    reference = flux_variability_analysis(model, fraction_of_optimum=0.0, processes=1)
    index = {m.id: i for i, m in enumerate(model.metabolites)}
    rows, cols, vals = [], [], []
    for j, r in enumerate(model.reactions):
        for m, c in r.metabolites.items():
            rows.append(index[m.id])
            cols.append(j)
            vals.append(c)
    lower = np.array([r.lower_bound for r in model.reactions])
    upper = np.array([r.upper_bound for r in model.reactions])
    lo, hi = steady_state_flux_ranges(np.array(rows), np.array(cols), np.array(vals),
                                      len(model.metabolites), lower, upper,
                                      np.arange(len(model.reactions)))
    ids = [r.id for r in model.reactions]
    assert lo == pytest.approx(reference.loc[ids, "minimum"].to_numpy(), abs=1e-6)
    assert hi == pytest.approx(reference.loc[ids, "maximum"].to_numpy(), abs=1e-6)
    # glucose uptake is capped at 10 (the model's exchange bound), so the transporter carries at
    # most 10; the ATP maintenance demand (lower bound 8.39) forces some uptake, so at least > 0
    j = ids.index("GLCpts")
    assert hi[j] == pytest.approx(10.0, abs=1e-6) and lo[j] > 0.1


def test_no_steady_state_gives_none():
    # feed -> A with at least 5, A -> out at most 2: no steady state; the caller keeps its bounds
    rows, cols, vals = np.array([0, 0]), np.array([0, 1]), np.array([1.0, -1.0])
    assert steady_state_flux_ranges(rows, cols, vals, 1, np.array([5.0, 0.0]), np.array([10.0, 2.0]),
                                    np.array([0, 1])) is None


def test_caps_never_below_the_range_and_never_above_the_bound():
    lo = np.array([-3.0, 0.0, -1e-12, 2.0])
    hi = np.array([4.0, 0.0, 1e-12, 2000.0])
    bound = np.full(4, 1000.0)
    fwd, bwd = flux_caps(lo, hi, bound, bound)
    reach_fwd = np.where(hi > 1e-9, hi, 0.0)      # ranges beyond solver noise (1e-9)
    reach_bwd = np.where(-lo > 1e-9, -lo, 0.0)
    assert np.all(fwd >= np.minimum(reach_fwd, bound)) and np.all(fwd <= bound)
    assert np.all(bwd >= np.minimum(reach_bwd, bound)) and np.all(bwd <= bound)
    # a range within solver noise of zero closes the direction
    assert fwd.tolist()[1:3] == [0.0, 0.0] and bwd.tolist()[1:3] == [0.0, 0.0]
    assert fwd[3] == 1000.0 and bwd[3] == 0.0
