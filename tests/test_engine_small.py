"""Networks small enough to solve by hand; every expected value is derived beside its test.

Reference for every derivation: Delta_r G' = Delta_r G'deg + RT sum_i nu_i ln c_i
(R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley 2003, eq. 4.1-4), with
R = 8.314462618 J/(mol K) (CODATA 2018) and T = 298.15 K, so RT = 2.478957 kJ/mol; the
direction rule of thermodynamics-based flux analysis (Henry, Broadbelt & Hatzimanikatis 2007,
Biophys. J. 92:1792): a reaction carrying flux forward needs Delta_r G' <= -delta (delta = 0.1).
Both solvers (GLPK, HiGHS) run every test.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import (census, feasibility, h2_scan, h2_threshold, h2_threshold_by_bisection,  # noqa: E402
                          minimal_uphill_set, network_driving_force, pathway_driving_force, ranges)
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

RT = 8.314462618e-3 * 298.15  # kJ/mol (CODATA 2018 R)
DELTA = 0.1
SOLVERS = available_solvers()


def one_step(b_low: float, solver: str, dg0: float = 5.0):
    """A (fed at 1 mM) <=> B, B drained by a demand of 1; B in [b_low, 10 mM]."""
    return build_thermo_model({"R1": ("A <=> B", dg0, 1.0)},
                              {"A": (1e-3, 1e-3), "B": (b_low, 1e-2)},
                              exchanges={"A": (-10, 10)}, demand=("B", 1.0), solver=solver)


# Least Delta_r G' of A <=> B is 5 + RT ln(b_low / 1e-3); feasible iff that is <= -0.1, i.e.
# b_low <= 1e-3 exp(-5.1 / RT) = 1.2780e-4 mol/L.
B_LOW_LIMIT = 1e-3 * math.exp(-(5.0 + DELTA) / RT)


@pytest.mark.parametrize("solver", SOLVERS)
def test_one_reaction_feasible_exactly_when_bounds_allow_downhill(solver):
    assert B_LOW_LIMIT == pytest.approx(1.2780e-4, rel=1e-4)
    below = feasibility(one_step(B_LOW_LIMIT * 0.999, solver), ProblemOptions(solver=solver))
    assert below.feasible
    assert below.certificates and below.certificates[0].passed
    frame = below.to_frame().set_index("reaction")
    assert frame.loc["R1", "flux"] == pytest.approx(1.0)
    assert frame.loc["R1", "delta_g_kJ_per_mol"] <= -DELTA + 1e-6
    above = feasibility(one_step(B_LOW_LIMIT * 1.001, solver), ProblemOptions(solver=solver))
    assert not above.feasible
    # the diagnosis of the infeasible case is R1 itself
    assert above.diagnosis.sets == [["R1"]]
    assert "R1" in above.message


def chain(solver: str):
    """A (fed 1 mM) <=> B (dG'deg -10) ; B <=> C (dG'deg +30) ; C drained by a demand of 1.
    B, C in [1 uM, 10 mM]."""
    return build_thermo_model({"R1": ("A <=> B", -10.0, 1.0), "R2": ("B <=> C", 30.0, 1.0)},
                              {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2), "C": (1e-6, 1e-2)},
                              exchanges={"A": (-10, 10)}, demand=("C", 1.0), solver=solver)


@pytest.mark.parametrize("solver", SOLVERS)
def test_chain_minimal_uphill_set_is_the_uphill_step(solver):
    # R2: 30 + RT ln(C/B) >= 30 + RT ln(1e-6/1e-2) = 30 - 22.83 = 7.17 > 0 everywhere: uphill.
    # R1: -10 + RT ln(B/1e-3) <= -0.1 needs B <= 1e-3 exp(9.9/RT) = 0.054, so B = 10 mM is
    # allowed and R2's least uphill energy is 30 + RT ln(1e-6/1e-2) = 7.168 kJ/mol.
    tm = chain(solver)
    opts = ProblemOptions(solver=solver)
    assert not feasibility(tm, opts, diagnose=False).feasible
    result = minimal_uphill_set(tm, opts, alternatives=3)
    assert result.size == 1
    assert result.sets == [["R2"]]
    assert result.exhausted  # no other set of one reaction works
    expected = 30.0 + RT * math.log(1e-6 / 1e-2)
    assert expected == pytest.approx(7.168, abs=1e-3)
    assert result.uphill_by[0]["R2"] == pytest.approx(expected, abs=1e-6)
    assert all(c.passed for c in result.certificates)


def hydrogenation(solver: str):
    """H2 + X <=> XH2 with dG'deg = -10 kJ/mol; X in [1 uM, 10 mM], XH2 in [10 uM, 10 mM],
    XH2 drained by a demand of 1; H2 fed (its range is set by the analysis)."""
    return build_thermo_model({"HYD": ("H2 + X <=> XH2", -10.0, 1.0)},
                              {"H2": (1e-3, 1e-3), "X": (1e-6, 1e-2), "XH2": (1e-5, 1e-2)},
                              exchanges={"H2": (-10, 10), "X": (-10, 10)}, demand=("XH2", 1.0),
                              feed_ids={"H2": "H2"}, solver=solver)


# Feasible iff -10 + RT (ln XH2 - ln H2 - ln X) <= -0.1 for some allowed XH2, X, i.e.
# H2 >= XH2_min / (X_max K) with K = exp(-(dG'deg + delta)/RT) = exp(9.9/RT):
H2_THRESHOLD = 1e-5 / (1e-2 * math.exp(9.9 / RT))


@pytest.mark.parametrize("solver", SOLVERS)
def test_h2_threshold_matches_equilibrium_constant_and_bisection(solver):
    assert H2_THRESHOLD == pytest.approx(1.8434e-5, rel=1e-4)
    tm = hydrogenation(solver)
    opts = ProblemOptions(solver=solver)
    result = h2_threshold(tm, opts, h2_range=(1e-9, 1e-2))
    assert result.feasible
    assert result.threshold == pytest.approx(H2_THRESHOLD, rel=1e-6)
    assert result.certificates[0].passed
    bisected = h2_threshold_by_bisection(tm, opts, h2_range=(1e-9, 1e-2), relative_tolerance=1e-9)
    # each bisection step is a feasibility solve whose row tolerance (~1e-5 kJ/mol in g, i.e.
    # 4e-6 in ln[H2] at RT = 2.48) decides the boundary; agreement to 1e-5 relative is the most
    # that repeated yes/no solves can certify
    assert bisected == pytest.approx(result.threshold, rel=1e-5)
    assert bisected == pytest.approx(H2_THRESHOLD, rel=1e-5)


@pytest.mark.parametrize("solver", SOLVERS)
def test_h2_scan_feasibility_driving_force_and_uphill_size(solver):
    tm = hydrogenation(solver)
    levels = np.logspace(-9, -2, 8)
    scan = h2_scan(tm, levels, ProblemOptions(solver=solver)).to_frame()
    assert list(scan["feasible"]) == [bool(h >= H2_THRESHOLD) for h in levels]
    for _, row in scan.iterrows():
        # max-min driving force of the single step: B = -(-10 + RT ln(1e-5 / (1e-2 H2)))
        expected = -(-10.0 + RT * math.log(1e-5 / (1e-2 * row["h2_activity"])))
        assert row["driving_force_kJ_per_mol"] == pytest.approx(expected, abs=1e-6)
        assert row["uphill_set_size"] == (0 if row["feasible"] else 1)


@pytest.mark.parametrize("solver", SOLVERS)
def test_ranges_of_one_reaction(solver):
    # b_low = 1e-4: Delta_r G' = 5 + RT ln(B/1e-3) <= -0.1 with B >= 1e-4:
    # min = 5 + RT ln(0.1) = -0.7080, max = -0.1; B from 1e-4 to 1e-3 exp(-5.1/RT) = 1.278e-4.
    res = ranges(one_step(1e-4, solver), ProblemOptions(solver=solver))
    r = res.reactions.set_index("reaction").loc["R1"]
    assert r["delta_g_min_kJ_per_mol"] == pytest.approx(5 + RT * math.log(0.1), abs=1e-6)
    assert r["delta_g_max_kJ_per_mol"] == pytest.approx(-DELTA, abs=1e-6)
    c = res.compounds.set_index("compound").loc["B"]
    assert c["activity_min"] == pytest.approx(1e-4, rel=1e-6)
    assert c["activity_max"] == pytest.approx(B_LOW_LIMIT, rel=1e-6)
    assert len(res.tables()["ranges"]) == 1 and len(res.tables()["ranges_compounds"]) == 2


@pytest.mark.parametrize("solver", SOLVERS)
def test_driving_force_of_pathway_and_network(solver):
    # A <=> B forward with B >= 1e-4: B_mdf = -(5 + RT ln(1e-4/1e-3)) = 0.7080 kJ/mol
    tm = one_step(1e-4, solver)
    expected = -(5.0 + RT * math.log(0.1))
    lp = pathway_driving_force(tm, {"R1": 1}, ProblemOptions(solver=solver))
    assert lp.driving_force == pytest.approx(expected, abs=1e-6)
    assert lp.bottlenecks == ["R1"]
    milp = network_driving_force(tm, ProblemOptions(solver=solver))
    assert milp.driving_force == pytest.approx(expected, abs=1e-6)
    assert milp.certificates[0].passed


def test_census_one_reaction():
    # A <=> B: at 1 mM both, dG' = dG'deg = 5; at substrate:product 100:1 a substrate stands at
    # 1mM*10 and a product at 1mM/10, but A is fed and stays at its feed value (1 mM), so
    # dG' = 5 + RT ln(0.1) = 5 - 5.708 = -0.708 kJ/mol (Flamholz et al. 2012 reference states).
    res = census(one_step(1e-4, "glpk"), ratio=100.0)
    row = res.to_frame().set_index("reaction").loc["R1"]
    assert row["delta_g_1mM_kJ_per_mol"] == pytest.approx(5.0)
    assert row["delta_g_at_ratio_kJ_per_mol"] == pytest.approx(5.0 + RT * math.log(0.1), abs=1e-9)
    counts = res.counts()
    assert counts["exergonic_1mM"] == 0 and counts["exergonic_at_ratio"] == 1


@pytest.mark.parametrize("solver", SOLVERS)
def test_h2_scan_without_driving_force_reuses_patterns_and_agrees(solver):
    # feasibility alone (the previous level's certified pattern tried first as an LP) must give
    # the same yes/no as the analytic threshold H2 >= 1.8434e-5 at every level, high to low and
    # low to high
    tm = hydrogenation(solver)
    for levels in (np.logspace(-9, -2, 8), np.logspace(-2, -9, 8)):
        scan = h2_scan(tm, levels, ProblemOptions(solver=solver), with_driving_force=False,
                       with_uphill=False).to_frame()
        assert list(scan["feasible"]) == [bool(h >= H2_THRESHOLD) for h in levels]
        assert scan["driving_force_kJ_per_mol"].isna().all()


@pytest.mark.parametrize("solver", SOLVERS)
def test_uphill_set_of_a_feasible_network_is_empty_either_way(solver):
    # b_low = 1e-4 < 1.278e-4: A <=> B can run downhill, so no step needs driving; the
    # downhill-first shortcut and the plain minimisation must agree on size 0
    tm = one_step(1e-4, solver)
    for first in (True, False):
        result = minimal_uphill_set(tm, ProblemOptions(solver=solver), try_downhill_first=first)
        assert result.size == 0 and result.sets == [[]]
        assert result.certificates and all(c.passed for c in result.certificates)
