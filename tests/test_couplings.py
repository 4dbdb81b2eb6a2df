"""The fewest energy-coupled steps (tfa.analyses.couplings) on hand-built networks with
hand-derived answers, and the coupling-choice rewrite on a small network with formulas.

The chain A -> B -> C -> D (25 degC, RT = 2.479 kJ/mol; every compound between 1 uM and 10 mM,
A fed at 10 mM) has three steps that may each run coupled to ATP hydrolysis (ATP 5 mM, ADP
0.5 mM, Pi 5 mM fixed; ΔrG'° of the hydrolysis -30 kJ/mol, a round number near the textbook
-30.5 kJ/mol of Nelson & Cox, Lehninger Principles of Biochemistry, 5th ed., Table 13-6, from
memory) or bare. Bare energies: A -> B -20, B -> C +40, C -> D -20 kJ/mol. The widest
concentration ratio, 10 mM / 1 uM, brings RT ln 1e4 = 22.8 kJ/mol, so B -> C cannot run bare
(+40 - 22.8 > 0) and can run coupled (+10 - 22.8 < 0), and the other two run bare: exactly
one coupling, that of B -> C, is needed (hand derivation).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402
from tfa.analyses.couplings import coupling_answers, coupling_tables, fewest_couplings  # noqa: E402

HYDROLYSIS = -30.0
BOUNDS = {m: (1e-6, 1e-2) for m in "BCD"} | {"A": (1e-2, 1e-2), "atp": (5e-3, 5e-3),
                                            "adp": (5e-4, 5e-4), "pi": (5e-3, 5e-3)}
EXCHANGES = {"A": (-100, 0), "atp": (-100, 100), "adp": (-100, 100), "pi": (-100, 100)}


def _chain(extra: dict | None = None):
    reactions = {}
    for rid, (s, p, bare) in {"R1": ("A", "B", -20.0), "R2": ("B", "C", 40.0),
                              "R3": ("C", "D", -20.0)}.items():
        reactions[rid] = (f"{s} + atp -> {p} + adp + pi", bare + HYDROLYSIS, 0.0)
        reactions[rid + "__bare"] = (f"{s} -> {p}", bare, 0.0)
    reactions.update(extra or {})
    tm = build_thermo_model(reactions, BOUNDS, EXCHANGES, demand=("D", 1.0), solver="highs")
    for r in tm.model.reactions:
        if r.id.endswith("__bare"):
            coupled = r.id[: -len("__bare")]
            bonds = 2.0 if coupled == "R2alt" else 1.0
            r.notes = {"bare_of": coupled, "bonds": bonds}
    return tm


def test_exactly_one_of_three_couplings_is_needed():
    result = fewest_couplings(_chain(), alternatives=3)
    assert result.feasible
    assert result.size == 1
    assert result.sets == [["R2"]]           # hand derivation (module text)
    assert result.exhausted                 # no other single coupling does it
    assert result.verification["status"] == "proven"
    assert result.certificates and all(c.passed for c in result.certificates)
    # independent of the MILP's coupling rows: the set re-solved on its own network
    assert "re-solved on its own network" in result.verification["check"]
    assert "bare, no coupling rows): certified" in result.verification["check"]
    rows = result.to_frame()
    assert list(rows["reaction"]) == ["R2"]
    # coupling energy of B -> C: ΔrG'°(bare) - ΔrG'°(coupled) = 40 - 10 = +30 kJ/mol
    assert rows["coupling_energy_kJ_per_mol"].iloc[0] == pytest.approx(30.0)


def test_alternatives_are_listed_in_a_stable_order():
    # a second enzyme for B -> C spending two ATP (bare +40, coupled +40 - 60 = -20)
    extra = {"R2alt": ("B + 2 atp -> C + 2 adp + 2 pi", 40.0 + 2 * HYDROLYSIS, 0.0),
             "R2alt__bare": ("B -> C", 40.0, 0.0)}
    tm = _chain(extra)
    result = fewest_couplings(tm, alternatives=5)
    assert result.sets == [["R2"], ["R2alt"]]    # both of size one, sorted by id
    assert result.exhausted
    # least coupling energy: R2 pays 30 kJ per unit of flux, R2alt 60 (two hydrolyses)
    cheapest = fewest_couplings(tm, objective="energy", alternatives=1)
    assert cheapest.sets == [["R2"]]
    assert cheapest.energies[0] == pytest.approx(30.0, rel=1e-6)   # flux 1 x 30 kJ/mol


def test_no_coupling_when_bare_chemistry_suffices():
    # B -> C bare at -5 kJ/mol: every step runs bare, no coupling is needed
    tm = _chain()
    tm.energies["R2__bare"].standard = -5.0
    tm.energies["R2"].standard = -35.0
    result = fewest_couplings(tm)
    assert result.size == 0 and result.sets == [[]]


def test_per_precursor_and_tables():
    # demand D and B together; B alone needs no coupling, D needs R2's
    tm = _chain()
    demand = tm.model.reactions.get_by_id(tm.demand_id)
    demand.add_metabolites({tm.model.metabolites.B: -1.0})
    answers = coupling_answers(tm, alternatives=2)
    by = {a.precursor: a for a in answers}
    assert by["B"].size == 0 and by["D"].sets == [["R2"]] and by["(whole demand)"].size == 1
    tables = coupling_tables(answers)
    assert set(tables["coupling_counts"]["precursor"]) == {"(whole demand)", "B", "D"}


def test_infeasible_when_no_choice_helps():
    # B -> C uphill even coupled: bare +80, coupled +50 > 22.8 kJ/mol
    tm = _chain()
    tm.energies["R2__bare"].standard = 80.0
    tm.energies["R2"].standard = 50.0
    result = fewest_couplings(tm)
    assert not result.feasible and "infeasible" in result.message


def test_bundled_amino_acids_need_formate_activation_alone():
    """Glycine, alanine, aspartate, glutamate and serine from H2 + CO2 at the demo setting: the
    one indispensable ATP step is formate activation (formate-tetrahydrofolate ligase, FTHFS),
    the ATP coming from the proton-gradient ATP synthase. Expected from the pathway logic of the
    acetyl-CoA pathway (Fuchs 2011, Annu. Rev. Microbiol. 65:631: the methyl branch spends one
    ATP at formyl-THF synthetase; from memory); the ATP-free detour (formate reduced to
    formaldehyde) runs about 21 kJ/mol uphill (README of the bundled network)."""
    from tfa.network.energies import prepare
    from tfa.network.inputs import load_environment, load_network
    from tfa.problem.builder import ProblemOptions

    model, env = load_network(), load_environment()
    demand = model.reactions.get_by_id(env.demand_reaction)
    keep = {"gly", "ala", "asp", "glu", "ser"}
    demand.add_metabolites({m: -c for m, c in demand.metabolites.items() if m.id not in keep})
    tm = prepare(model, env, "coupling_choice")
    result = fewest_couplings(tm, ProblemOptions(solver="highs"), alternatives=3)
    assert result.sets == [["FTHFS"]]
    assert result.exhausted and result.verification["status"] == "proven"
    assert result.made_by[0] == ["ATPS_GRAD"]
    # the coupling adds the ATP hydrolysis energy at the setting: +40.0 kJ/mol (README: ΔrG'° =
    # +40.0 kJ/mol for ADP + Pi -> ATP + H2O at the setting)
    assert result.pairs["FTHFS"].coupling_energy == pytest.approx(40.0, abs=0.1)
