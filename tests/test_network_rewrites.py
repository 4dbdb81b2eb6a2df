"""The four modes: H2 in place of carriers, no ATP (strict and bare chemistry), native.

Expected stoichiometries are worked out by hand from textbook reactions (EC numbers beside them)
and the pH 7 reference species of Alberty (2003), Thermodynamics of Biochemical Reactions:
NADH 2- / NAD -, reduced ferredoxin as a two-electron unit Fd 2- / Fd 0 (Thauer et al. 1977,
Bacteriol. Rev. 41:100), ATP 4-, ADP 3-, AMP 2-, HPO4 2-, HP2O7 3-.
"""

from __future__ import annotations

from pathlib import Path

import cobra
import pytest

from tfa.errors import InputError
from tfa.modes import MODES
from tfa.network import apply_mode, balance_report, h2_only, native, no_atp_bare_chemistry, no_atp_strict
from tfa.network import read_network
from tfa.network.rewrites import hydrolysis_amounts

DATA = Path(__file__).parent / "data" / "mini_network"
CARRIERS = {"nad", "nadh", "fdox", "fdred"}
NUCLEOTIDES = {"atp", "adp", "amp", "ppi"}


@pytest.fixture()
def model() -> cobra.Model:
    m = read_network(DATA / "reactions.tsv")
    m.objective = "DM_mal"
    return m


def snapshot(model: cobra.Model) -> dict:
    """The model in full detail, order included."""
    return {
        "reactions": [(r.id, r.name, [(m.id, c) for m, c in r.metabolites.items()], r.bounds, dict(r.notes),
                       dict(r.annotation)) for r in model.reactions],
        "metabolites": [(m.id, m.name, m.formula, m.charge, m.compartment, dict(m.notes),
                         sorted(r.id for r in m.reactions)) for m in model.metabolites],
        "variables": sorted(v.name for v in model.variables),
        "constraints": sorted(c.name for c in model.constraints),
        "objective": str(model.objective.expression),
    }


def stoich(model: cobra.Model, rid: str) -> dict[str, float]:
    return {m.id: c for m, c in model.reactions.get_by_id(rid).metabolites.items()}


def test_h2_only_replaces_every_carrier_and_restores_exactly(model):
    before = snapshot(model)
    with h2_only(model) as summary:
        assert not CARRIERS & {m.id for m in model.metabolites}
        for reaction in model.reactions:
            assert not CARRIERS & {m.id for m in reaction.metabolites}
        # EC 1.1.1.27: pyruvate + NADH + H+ -> lactate + NAD+  becomes  pyruvate + H2 -> lactate
        assert stoich(model, "LDH") == {"pyr": -1, "h2": -1, "lac": 1}
        # EC 1.17.1.9: CO2 + NADH -> formate + NAD+  becomes  CO2 + H2 -> formate + H+
        assert stoich(model, "FDH") == {"co2": -1, "h2": -1, "for": 1, "h": 1}
        # ferredoxin-dependent: CO2 + Fd(red) + H+ -> formate + Fd(ox)  becomes the same
        assert stoich(model, "FDH_FD") == {"co2": -1, "h2": -1, "for": 1, "h": 1}
        # hydrogenases only regenerate carriers (H2 -> H2): removed
        assert "HYD" not in model.reactions and "FDRED" not in model.reactions
        assert set(summary.removed) == {"HYD", "FDRED"}
        assert "h2_only" in model.reactions.MDH.notes["rewritten"]
        assert model.reactions.MDH.bounds == (-500.0, 500.0)
        frame = balance_report(model).set_index("reaction")
        rewritten = [r for r in summary.rewritten if r not in summary.removed]
        assert sorted(rewritten) == ["FDH", "FDH_FD", "LDH", "MDH"]
        assert frame.loc[rewritten, "balanced"].all()
        assert (frame.loc[rewritten, "implicit_protons"] == 0).all()   # H+ explicit, as in the table
    assert snapshot(model) == before


def test_bare_chemistry_strips_nucleotides_and_restores_exactly(model):
    before = snapshot(model)
    with no_atp_bare_chemistry(model) as summary:
        assert not NUCLEOTIDES & {m.id for m in model.metabolites}
        for reaction in model.reactions:
            assert not NUCLEOTIDES & {m.id for m in reaction.metabolites}
        # EC 2.7.2.1: acetate + ATP -> acetyl-P + ADP, minus ATP + H2O -> ADP + Pi + H+
        assert stoich(model, "ACK") == {"ac": -1, "pi": -1, "h": -1, "actp": 1, "h2o": 1}
        # EC 4.1.1.49: oxaloacetate + ATP -> PEP + CO2 + ADP, minus the same hydrolysis
        assert stoich(model, "PPCK") == {"oaa": -1, "pi": -1, "h": -1, "pep": 1, "co2": 1, "h2o": 1}
        # EC 2.7.9.1: pyruvate + ATP + Pi -> PEP + AMP + PPi + H+, minus ATP + H2O -> AMP + PPi + H+
        assert stoich(model, "PPDK") == {"pyr": -1, "pi": -1, "pep": 1, "h2o": 1}
        # adenylate kinase (EC 2.7.4.3) and diphosphatase (EC 3.6.1.1) are pure interconversions
        assert {"ADK", "PPA", "EX_atp"} <= set(summary.removed)
        assert "ATP -> AMP + PPi" in model.reactions.PPDK.notes["rewritten"]
        frame = balance_report(model).set_index("reaction")
        assert frame["balanced"].all()
        assert model.reactions.PPCK.bounds == (0.0, 1000.0)
    assert snapshot(model) == before


def test_strict_blocks_every_nucleotide_reaction(model):
    before = snapshot(model)
    with no_atp_strict(model) as summary:
        blocked = {r.id for r in model.reactions if r.bounds == (0.0, 0.0)}
        assert blocked == {"ACK", "PPCK", "PPDK", "ADK", "PPA", "EX_atp"} == set(summary.blocked)
        assert model.reactions.LDH.bounds == (-1000.0, 1000.0)
        assert "needs adp, atp" in model.reactions.ACK.notes["rewritten"]
    assert snapshot(model) == before


def test_native_blocks_outside_supply_of_carriers_and_atp(model):
    before = snapshot(model)
    with native(model) as summary:
        assert summary.blocked == ["EX_atp"]
        assert model.reactions.EX_atp.bounds == (0.0, 0.0)
        assert model.reactions.EX_h2.bounds == (-1000.0, 1000.0)
    assert snapshot(model) == before


@pytest.mark.parametrize("mode", MODES)
def test_apply_mode_restores_and_solver_agrees(model, mode):
    from tfa.network.role_inference import missing_needs

    if missing_needs(model, MODES[mode].needs):   # e.g. a currency whose donor it lacks
        with pytest.raises(InputError):
            with apply_mode(model, mode):
                pass
        return
    before = snapshot(model)
    value_before = model.slim_optimize()
    with apply_mode(model, mode) as summary:
        assert summary.mode == mode
        model.slim_optimize()
    assert snapshot(model) == before
    assert model.slim_optimize() == pytest.approx(value_before)


def test_nested_modes_and_unknown_mode(model):
    before = snapshot(model)
    with h2_only(model), no_atp_bare_chemistry(model):
        assert not (CARRIERS | NUCLEOTIDES) & {m.id for m in model.metabolites}
        assert balance_report(model)["balanced"].all()
        nested = {r.id: r.build_reaction_string() for r in model.reactions}
    assert snapshot(model) == before
    # the combined mode of the registry is the same two rewrites, in the same order
    with apply_mode(model, "h2_bare") as summary:
        assert {r.id: r.build_reaction_string() for r in model.reactions} == nested
        assert summary.mode == "h2_bare" and summary.removed
    assert snapshot(model) == before
    with pytest.raises(InputError, match="no_atp_strict"):
        with apply_mode(model, "no_atp"):
            pass


def test_inconsistent_carrier_pair_is_refused(model):
    model.metabolites.nadh.notes = {**model.metabolites.nadh.notes, "role": "red:NAD:1"}
    model.metabolites.nad.notes = {**model.metabolites.nad.notes, "role": "ox:NAD:1"}
    with pytest.raises(InputError, match="differ by 2 electrons"):
        with h2_only(model):
            pass


@pytest.mark.parametrize("atp, adp, amp, ppi", [(-1, 1, 0, 0), (-1, 0, 1, 1), (-1, 0, 1, 0), (1, -1, 0, 0),
                                                (-1, -1, 2, 0), (0, 0, 0, 1), (-2, 1, 1, 1)])
def test_hydrolysis_amounts_cancel_every_nucleotide(atp, adp, amp, ppi):
    """Subtracting x1 H1 + ... + x4 H4 leaves no nucleotide (the linear system of the module text)."""
    x = hydrolysis_amounts(atp, adp, amp, ppi)
    assert atp + x["H1"] + x["H2"] == 0
    assert adp - x["H1"] + x["H3"] == 0
    assert amp - x["H2"] - x["H3"] == 0
    assert ppi - x["H2"] + x["H4"] == 0


def test_reaction_that_makes_adenine_nucleotide_is_removed():
    """A reaction creating AMP from nothing nucleotide-like cannot be stripped; it is removed."""
    m = read_network(DATA / "reactions.tsv")
    fake = cobra.Reaction("AMPSYN")
    fake.add_metabolites({m.metabolites.pyr: -1, m.metabolites.amp: 1})   # unbalanced on purpose
    m.add_reactions([fake])
    with no_atp_bare_chemistry(m) as summary:
        assert "AMPSYN" in summary.removed
    assert "AMPSYN" in m.reactions


def test_demand_with_atp_keeps_its_other_compounds(model):
    demand = cobra.Reaction("DM_mix", lower_bound=0.0)
    demand.add_metabolites({model.metabolites.mal: -1, model.metabolites.atp: -1})
    model.add_reactions([demand])
    before = snapshot(model)
    with no_atp_strict(model):
        assert stoich(model, "DM_mix") == {"mal": -1}
        assert model.reactions.DM_mix.bounds == (0.0, 1000.0)
    with native(model) as summary:
        assert "DM_mix" not in summary.blocked
    with no_atp_bare_chemistry(model):
        assert stoich(model, "DM_mix") == {"mal": -1}
    assert snapshot(model) == before


def test_bifurcating_hydrogenase_disappears_under_h2_only(model):
    """Electron-bifurcating [FeFe]-hydrogenase (EC 1.12.1.4): 2 H2 + NAD+ + Fd(ox) -> NADH +
    Fd(red) + 3 H+ (Schut & Adams 2009, J. Bacteriol. 191:4451; stoichiometry from memory); with
    both carriers replaced by H2 it is H2 -> H2 and must go."""
    met = model.metabolites
    bif = cobra.Reaction("HYDABC")
    bif.add_metabolites({met.h2: -2, met.nad: -1, met.fdox: -1, met.nadh: 1, met.fdred: 1, met.h: 3})
    model.add_reactions([bif])
    assert balance_report(model).set_index("reaction").loc["HYDABC", "implicit_protons"] == 0
    with h2_only(model) as summary:
        assert "HYDABC" in summary.removed


def solver_terms(model: cobra.Model, rid: str) -> dict[str, float]:
    """The reaction's column as the solver holds it (compound row -> coefficient; rows of
    compounds only)."""
    variable = model.solver.variables[rid]
    out = {}
    for row in model.solver.constraints:
        c = row.get_linear_coefficients([variable])[variable]
        if c and row.name in model.metabolites:
            out[row.name] = float(c)
    return out


@pytest.mark.parametrize("extra_rows", [False, True])
def test_batch_rewrite_keeps_solver_and_network_in_step(model, extra_rows):
    # the rewrites change the network in one batch (see tfa.network.rewrites); the solver must
    # hold the rewritten stoichiometry (EC 1.1.1.27 LDH: pyruvate + H2 -> lactate, worked out in
    # the test above), also when another problem has added its own rows and columns to the
    # solver, and everything must come back exactly, also when two rewrites are nested
    if extra_rows:
        extra = model.problem.Variable("extra_column", lb=0, ub=1)
        model.solver.add([extra])
        row = model.problem.Constraint(extra + model.reactions.LDH.forward_variable, ub=1000,
                                       name="extra_row")
        model.solver.add([row])
    before = snapshot(model)
    with h2_only(model):
        assert solver_terms(model, "LDH") == {"pyr": -1, "h2": -1, "lac": 1}
        assert solver_terms(model, "FDH") == stoich(model, "FDH")
        with no_atp_bare_chemistry(model):
            assert solver_terms(model, "ACK") == stoich(model, "ACK")
            assert solver_terms(model, "LDH") == {"pyr": -1, "h2": -1, "lac": 1}
            model.slim_optimize()
        assert "HYD" not in model.solver.variables
    assert snapshot(model) == before
    assert solver_terms(model, "LDH") == stoich(model, "LDH")
    if extra_rows:
        assert "extra_row" in model.solver.constraints and "extra_column" in model.solver.variables
