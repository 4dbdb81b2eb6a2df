"""Energy currencies and combined modes (tfa.modes, tfa.network.currency_rewrites,
tfa.analyses.currencies).

The hand-rewritten network: hexokinase (EC 2.7.1.1) glucose + ATP -> glucose 6-phosphate + ADP +
H+ with acetate kinase (EC 2.7.2.1) regenerating ATP from fed acetyl phosphate. In the
acetyl-phosphate currency the pair becomes glucose + acetyl phosphate -> glucose 6-phosphate +
acetate + H+ (written by hand below) and acetate kinase disappears. Energies: acetyl phosphate
hydrolysis -43.1 and glucose 6-phosphate hydrolysis -13.8 kJ/mol at 25 degC, pH 7 (D. L. Nelson,
M. M. Cox, Lehninger Principles of Biochemistry, 5th ed., 2008, Table 13-6; from memory), so
ΔrG'° = -43.1 + 13.8 = -29.3 kJ/mol for the rewritten step, and with glucose and acetyl phosphate
fed at 1 mM and the products at their least 1 uM its ΔrG' = -29.3 + RT ln(1e-6 x 1e-6 / (1e-3 x
1e-3)) = -29.3 - 34.25 = -63.55 kJ/mol (RT = 2.4790 kJ/mol at 25 degC): the max-min driving force
of both copies (hand derivation).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from tfa.errors import InputError
from tfa.modes import get_mode, parse_modes
COMPOUNDS = """id\tname\tsynonyms\tformula\tcharge\tthermo_key\tconc_min\tconc_max\trole\tsmiles\tnotes
h2o\twater\t\tH2O\t0\tH2O\t\t\twater\t\t
h\tproton\t\tH\t1\tH+\t\t\tproton\t\t
pi\tphosphate\t\tHO4P\t-2\tphosphate\t\t\tphosphate\t\t
atp\tATP\t\tC10H12N5O13P3\t-4\tATP\t\t\tatp\t\t
adp\tADP\t\tC10H12N5O10P2\t-3\tADP\t\t\tadp\t\t
ac\tacetate\t\tC2H3O2\t-1\tacetate\t\t\t\t\t
actp\tacetyl phosphate\t\tC2H3O5P\t-2\t\t\t\t\tCC(=O)OP(=O)([O-])[O-]\t
glc\tglucose\t\tC6H12O6\t0\tglucose\t\t\t\t\t
g6p\tglucose 6-phosphate\t\tC6H11O9P\t-2\tglucose 6-phosphate\t\t\t\t\t
"""
VALUES = """id\tequation\tdelta_g_standard_kJ_per_mol\tsigma_kJ_per_mol\tdelta_h_standard_kJ_per_mol\ttemperature_C\tph\tionic_strength\tpmg\tsource_key\tpeer_reviewed\tnote
actp_hydrolysis\tactp + h2o <=> ac + pi + h\t-43.1\t2.0\t\t25\t7\t0.25\t\tNC08\tyes\tLehninger Table 13-6, from memory
g6p_hydrolysis\tg6p + h2o <=> glc + pi\t-13.8\t2.0\t\t25\t7\t0.25\t\tNC08\tyes\tLehninger Table 13-6, from memory
"""
ENV = """[environment]
name = "currency test"
[conditions]
temperature_C = 25.0
pH = 7.0
ionic_strength_M = 0.25
[feed]
glc = 1.0e-3
actp = 1.0e-3
pi = 1.0e-3
[bounds]
default = [1.0e-6, 1.0e-2]
[outlets]
allowed = ["ac"]
[demand]
reaction = "DM_g6p"
flux = 1.0
"""
HEAD = "id\tequation\tname\tec\tpathway\tenergy_source\tlower_bound\tupper_bound\tnotes\n"
COMMON = ("EX_glc\tglc <=> \t\t\tboundary\t\t\t\t\nEX_actp\tactp <=> \t\t\tboundary\t\t\t\t\n"
          "EX_ac\tac <=> \t\t\tboundary\t\t\t\t\nEX_pi\tpi <=> \t\t\tboundary\t\t\t\t\n"
          "EX_h\th <=> \t\t\tboundary\t\t\t\t\nEX_h2o\th2o <=> \t\t\tboundary\t\t\t\t\n"
          "DM_g6p\tg6p -> \t\t\tdemand\t\t\t\t\n")
ORIGINAL = HEAD + ("GK\tglc + atp -> g6p + adp + h\thexokinase\t2.7.1.1\ttest\tauto\t\t\t\n"
                   "ACK\tactp + adp <=> ac + atp\tacetate kinase\t2.7.2.1\ttest\tauto\t\t\t\n") + COMMON
BY_HAND = HEAD + ("GK\tglc + actp -> g6p + ac + h\thexokinase (acetyl phosphate)\t\ttest\tauto\t\t\t\n") + COMMON


def _write(folder: Path, reactions: str) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    compounds = COMPOUNDS if "atp" in reactions else "\n".join(
        line for line in COMPOUNDS.splitlines() if not line.startswith(("atp\t", "adp\t"))) + "\n"
    (folder / "compounds.tsv").write_text(compounds)
    (folder / "reactions.tsv").write_text(reactions)
    (folder / "reaction_values.tsv").write_text(VALUES)
    (folder / "environment.toml").write_text(ENV)
    return folder


def _prepared(folder: Path, mode: str):
    from tfa.network.energies import prepare
    from tfa.network.inputs import resolve_inputs

    inputs = resolve_inputs(folder)
    return prepare(inputs.model, inputs.environment, mode, literature=inputs.literature_path)


def test_acetyl_phosphate_currency_equals_the_hand_rewritten_network(tmp_path):
    from tfa.analyses.driving_force import network_driving_force

    rewritten = _prepared(_write(tmp_path / "original", ORIGINAL), "acetyl_phosphate")
    by_hand = _prepared(_write(tmp_path / "by_hand", BY_HAND), "native")
    assert "ACK" not in rewritten.model.reactions
    assert {m.id for m in rewritten.model.metabolites} == {m.id for m in by_hand.model.metabolites}
    stoich = {m.id: c for m, c in rewritten.model.reactions.GK.metabolites.items()}
    assert stoich == {m.id: c for m, c in by_hand.model.reactions.GK.metabolites.items()}
    assert rewritten.energies["GK"].standard == pytest.approx(by_hand.energies["GK"].standard, abs=1e-9)
    assert rewritten.energies["GK"].standard == pytest.approx(-29.3, abs=0.05)   # hand value
    mdf_rewritten = network_driving_force(rewritten).driving_force
    mdf_by_hand = network_driving_force(by_hand).driving_force
    rt = 8.314462618e-3 * 298.15
    assert mdf_rewritten == pytest.approx(mdf_by_hand, abs=1e-6)
    assert mdf_rewritten == pytest.approx(29.3 - rt * math.log(1e-6), abs=0.1)   # 63.55


def test_a_currency_the_network_lacks_is_named(tmp_path):
    # thioester: glucose + acetyl-CoA ... needs CoA: not in this network -> not applicable words
    from tfa.network.currency_rewrites import missing_currency
    from tfa.network.inputs import resolve_inputs

    model = resolve_inputs(_write(tmp_path / "original", ORIGINAL)).model
    assert "acetyl-CoA" in missing_currency(model, "thioester")
    assert missing_currency(model, "acetyl_phosphate") == ""


def test_combined_modes_and_refusals():
    assert get_mode(parse_modes("h2_only+thioester")[0]).rewrites == (
        "carriers_to_h2", "currency_thioester")
    assert get_mode(parse_modes("native+pyrophosphate")[0]).rewrites == (
        "cofactors_internal", "currency_pyrophosphate")
    for nonsense, words in (("no_atp_strict+acetyl_phosphate", "ATP is treated two ways"),
                            ("acetyl_phosphate+thioester", "ATP is treated two ways"),
                            ("native+h2_only", "carriers cannot be both kept internal"),
                            ("no_atp_bare+coupling_choice", "ATP is treated two ways"),
                            ("h2_only+nonsense", "unknown mode")):
        with pytest.raises(InputError, match=words):
            parse_modes(nonsense)


def test_h2_without_atp_runs_on_the_bundled_network_per_precursor():
    """H2 in place of the carriers and every ATP step blocked (the geochemical analogue): the
    whole demand is impossible (UTP and CTP carry ATP-made phosphoanhydrides), and per precursor
    the answer is given for every compound of the demand."""
    from tfa.analyses.feasibility import feasibility
    from tfa.analyses.precursor_demand import demand_precursors, precursor_verdicts
    from tfa.network.energies import prepare
    from tfa.network.inputs import load_environment, load_network
    from tfa.problem.builder import ProblemOptions

    tm = prepare(load_network(), load_environment(), "h2_no_atp")
    options = ProblemOptions(solver="highs")
    whole = feasibility(tm, options, diagnose=False)
    assert not whole.feasible
    verdicts = precursor_verdicts(tm, options)
    assert set(verdicts) == set(demand_precursors(tm)) and len(verdicts) == 17
    assert all(v is not None for v in verdicts.values())


def _two_precursors():
    """A fed at 1 mM; R1 A -> P1 (-10 kJ/mol), R2 A -> P2 (+20 kJ/mol); the demand draws P1 and
    P2; P1, P2 between 1 uM and 10 mM (25 degC, hand-built). By hand: P1 is made downhill;
    P2 is not, since at its least 1 uM R2 still has ΔrG' = 20 + RT ln(1e-6 / 1e-3) = +2.87 kJ/mol
    (RT = 2.479 kJ/mol; Alberty 2003, eq. 4.1-4)."""
    import sys

    sys.path.insert(0, str(Path(__file__).parent))
    from engine_networks import build_thermo_model

    tm = build_thermo_model({"R1": ("A -> P1", -10.0, 1.0), "R2": ("A -> P2", 20.0, 1.0)},
                            {"A": (1e-3, 1e-3), "P1": (1e-6, 1e-2), "P2": (1e-6, 1e-2)},
                            {"A": (-100, 0)}, demand=("P1", 1.0), solver="highs")
    tm.model.reactions.DM_P1.add_metabolites({tm.model.metabolites.P2: -1.0})
    return tm


def test_precursor_verdicts_by_hand_and_known_verdicts_are_not_solved_again(monkeypatch):
    import importlib

    from tfa.analyses.precursor_demand import known_verdicts, precursor_verdicts
    from tfa.analyses.precursors import precursor_verdicts as full_verdicts

    tm = _two_precursors()
    assert precursor_verdicts(tm) == {"P1": True, "P2": False}
    # the per-precursor verdicts of the assessment ask the same question: same answers
    full = full_verdicts(tm)
    assert {v.compound: v.verdict for v in full.verdicts} == {"P1": "downhill", "P2": "uphill"}
    assert known_verdicts(full.verdicts) == {"P1": True, "P2": False}
    # a verdict given is taken as it is (None: "undetermined" here, to see it is not re-solved);
    # only the other precursor is solved, once
    asked = []
    feasibility_module = importlib.import_module("tfa.analyses.feasibility")
    original = feasibility_module.feasibility

    def counted(model, *args, **kwargs):
        asked.append(model.model.reactions.get_by_id(model.demand_id).reaction)
        return original(model, *args, **kwargs)

    monkeypatch.setattr(feasibility_module, "feasibility", counted)
    assert precursor_verdicts(tm, known={"P2": None}) == {"P1": True, "P2": None}
    assert len(asked) == 1 and "P2" not in asked[0]
    asked.clear()
    assert precursor_verdicts(tm, known=known_verdicts(full.verdicts)) == {"P1": True, "P2": False}
    assert asked == []
