"""Group-contribution estimates (tfa.thermo.group_contribution) checked against OBIGT values.

References used below:
- OBIGT database as carried by pychnosz (test reference only): Shock 1995 (Am. J. Sci. 295,
  496-580; key Sho95) for carboxylic acids, Kitadai 2014 (J. Mol. Evol. 78, 171-187; key Kit14)
  for glycine, Shock & Helgeson 1990 (Geochim. Cosmochim. Acta 54, 915-945; key SH90) and
  Plyasunov & Shock 2001 (Geochim. Cosmochim. Acta 65, 3879-3900; key PS01) for n-alkanes and
  1-alcohols.
- M. D. Jankowski et al., Biophys. J. 95 (2008) 1487-1499: group contribution reports standard
  errors of about 10 kJ/mol for DfG (from memory).
"""

from __future__ import annotations

import csv
import io
import json
import math
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

import pytest

from tfa.cli import main  # noqa: E402
from tfa.constants import CALORIE, LN10, R, T_REF  # noqa: E402
from tfa.thermo import estimates as est_mod  # noqa: E402
from tfa.thermo import group_contribution as gc  # noqa: E402
from tfa.thermo import groups  # noqa: E402
from tfa.thermo.balance import parse_formula  # noqa: E402


def _obigt_G(name: str) -> float:
    """DfG deg of an OBIGT aqueous organic species, kJ/mol, read from pychnosz's data files."""
    import pychnosz
    path = Path(pychnosz.__file__).parent / "data" / "extdata" / "OBIGT" / "organic_aq.csv"
    with open(path, newline="", encoding="utf-8") as handle:
        for row in csv.DictReader(handle):
            if row["name"] == name and row["state"] == "aq":
                value = float(row["G"])
                return value * CALORIE / 1000.0 if row["E_units"] == "cal" else value / 1000.0
    raise KeyError(name)


@pytest.fixture(scope="module")
def model() -> gc.GroupModel:
    return gc.fitted_model()


def test_leave_one_out_errors_within_bound(model):
    # Bound: published group-contribution methods reach standard errors of about 10 kJ/mol
    # (Jankowski et al. 2008, from memory). For normally distributed errors with sigma = 10 kJ/mol
    # the mean absolute error is 0.8 * 10 = 8 kJ/mol, so we require MAE < 8 kJ/mol and allow the
    # RMSE up to 12 kJ/mol for heavier tails. Measured (scripts/gc_crossval.py): MAE 5.4,
    # RMSE 7.9 kJ/mol over 485 species (homologous series included).
    cv = model.cross_validation()
    assert cv.n >= 450
    assert cv.mae < 8.0
    assert cv.rmse < 12.0
    # the statistics are those of the residuals themselves
    errors = [abs(r) for r in cv.residuals.values()]
    assert math.isclose(cv.mae, sum(errors) / len(errors))


def test_held_out_split_median_error_below_10(model):
    # Acceptance of the issue: on a held-out split the median absolute error is below 10 kJ/mol.
    held = gc.heldout_split(model, fraction=0.2, seed=20260)
    assert held.n >= 50
    assert held.median_abs < 10.0
    assert not set(held.residuals) & set(held.refused)


def test_left_out_organic_acid_reproduces_obigt():
    # Succinate(2-): OBIGT value from Shock 1995 (Sho95), -164.38 kcal/mol = -687.8 kJ/mol; the
    # model is refitted
    # without it and its relatives of the same acid so the value is a genuine prediction.
    left_out = {"succinate-2", "H-succinate", "succinic acid"}
    m = gc.GroupModel([s for s in gc.training_species() if s.id not in left_out])
    est = est_mod.estimate_species("[O-]C(=O)CCC(=O)[O-]", "succinate", model=m)
    reference = _obigt_G("succinate-2")
    assert reference == pytest.approx(-687.8, abs=0.1)
    assert abs(est.G - reference) < max(3 * est.sigma_G, 15.0)


def test_left_out_amino_acid_reproduces_obigt():
    # Glycine zwitterion: OBIGT value of Kitadai 2014 (Kit14); refitted without glycine's species.
    left_out = {"glycine", "glycinium", "glycinate"}
    m = gc.GroupModel([s for s in gc.training_species() if s.id not in left_out])
    est = est_mod.estimate_species("[NH3+]CC(=O)[O-]", "glycine", model=m)
    reference = _obigt_G("glycine")
    assert abs(est.G - reference) < max(3 * est.sigma_G, 15.0)


def test_ch2_increment_matches_obigt_homologous_series(model):
    # OBIGT n-alkanes (Shock & Helgeson 1990, SH90; hexane Plyasunov & Shock 2001, PS01),
    # 1-alcohols (PS01 propanol, SH90) and n-alkanoates (Shock 1995, Sho95): DfG deg of aqueous
    # species rises by about 8-9 kJ/mol per -CH2- (e.g. ethanol -180.9, 1-propanol -172.1
    # kJ/mol). The fitted -CH2- contribution must agree within 2 kJ/mol with the mean increment.
    series = [[f"{s}ane" for s in ("prop", "but", "pent", "hex", "hept", "oct")],
              [f"{s}anol" for s in ("prop", "but", "pent", "hex", "hept", "oct")],
              ["propanoate", "n-butanoate"] + [f"n-{s}anoate" for s in
                                              ("pent", "hex", "hept", "oct", "non", "dec")]]
    steps = [_obigt_G(b) - _obigt_G(a) for names in series for a, b in zip(names, names[1:])]
    increment = sum(steps) / len(steps)
    assert 6.0 < increment < 11.0
    fit = model.fits["G"]
    ch2 = float(fit.values[fit.columns.index("-CH2-")])
    assert abs(ch2 - increment) < 2.0
    # a genuine prediction: 1-butanol left out with its series neighbours' values kept
    m = gc.GroupModel([s for s in gc.training_species() if s.id != "butanol"])
    est = est_mod.estimate_species("CCCCO", "1-butanol", model=m)
    assert abs(est.G - _obigt_G("butanol")) < 3 * est.sigma_G


def test_uncovered_atom_is_refused_with_atom_named():
    # Acetyl phosphate: the acyl carbon of an acyl phosphate is covered by no group.
    with pytest.raises(gc.StructureError, match=r"no group covers atom 1 \(C of an acyl phosphate\)"):
        est_mod.estimate_species("CC(=O)OP(=O)([O-])[O-]", "acetyl phosphate")
    with pytest.raises(gc.StructureError, match=r"S"):
        gc.count_groups(gc.parse_structure("CS(=O)(=O)[O-]"), "methanesulfonate")


def test_group_without_training_data_is_refused():
    with pytest.raises(gc.StructureError, match="thioester"):
        est_mod.estimate_species("CC(=O)SCC", "S-ethyl thioacetate")


def test_unreadable_structure_is_an_input_error():
    from tfa.errors import InputError

    with pytest.raises(InputError, match="cannot read structure"):
        gc.parse_structure("C(((", "bad")


def test_structures_match_species_table():
    # Every bundled structure has the formula and charge of its species row in species.csv.
    rows = {r["species"]: r for r in csv.DictReader(
        io.StringIO((Path(gc.__file__).parents[1] / "data" / "species.csv").read_text(encoding="utf-8")))}
    structures = gc.load_structures()
    assert len(structures) >= 250
    for species, (smiles, _note) in structures.items():
        assert species in rows, f"{species} of species_structures.csv is not in species.csv"
        counts, charge = gc.molecule_formula(gc.parse_structure(smiles, species))
        want, _ = parse_formula(rows[species]["formula"])
        assert counts == want, species
        assert charge == int(float(rows[species]["charge"])), species


def test_training_excludes_unreviewed_and_listed_species(model):
    ids = {s.id for s in model.species}
    assert not ids & set(gc.EXCLUDED)
    assert all(s.source != "LDS+26" for s in model.species)


def test_carboxyl_pka_rule_agrees_with_obigt_pair():
    # pKa of acetic acid from the OBIGT energies of Shock 1995: (G(A-) - G(HA)) / (RT ln 10)
    # = 4.76; the rule (4.5) must lie within 0.5 of it, and the acid state made by the rule
    # from an acetate estimate must sit RT ln10 * 4.5 below it.
    pka = (_obigt_G("acetate") - _obigt_G("acetic acid")) / (R * T_REF * LN10)
    assert pka == pytest.approx(4.76, abs=0.05)
    rule = next(r for r in groups.PKA_RULES if r.name == "carboxylic acid")
    assert abs(rule.pkas[0] - pka) < 0.5
    est = est_mod.estimate_species("CC(=O)[O-]", "acetate")
    states = {z: g for _f, z, _h, g in est.protonation_states}
    assert states[0] - states[-1] == pytest.approx(-R * T_REF * LN10 * 4.5)


def test_uncertainty_grows_for_rare_groups(model):
    common = est_mod.estimate_species("OC(=O)CCC(=O)[O-]")
    rare = est_mod.estimate_species("CCC[S-]")   # thiolate: seen in fewer than 3 training species
    assert model.fits["G"].species_seen["thiolate -S-"] < gc.RARE_GROUP_SPECIES
    assert rare.sigma_G > common.sigma_G >= model.cross_validation().rmse


def test_estimated_species_records():
    est = est_mod.estimate_species("[NH3+]CC(=O)[O-]", "glycine")
    records = est_mod.estimated_species_records(est, "gly_test")
    assert [r.charge for r in records] == [-1, 0, 1]
    assert all(r.origin == "estimated" and r.source == gc.SOURCE_KEY for r in records)
    assert all(r.sigma_G == pytest.approx(est.sigma_G) for r in records)
    base = next(r for r in records if r.charge == 0)
    assert base.G == pytest.approx(est.G) and base.H is not None
    assert est_mod.provenance_text(est.sigma_G).startswith("estimated (group contribution, ± ")


def _run_cli(argv: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = main(argv)
    return code, out.getvalue(), err.getvalue()


def test_cli_estimate_json():
    code, out, _ = _run_cli(["estimate", "CC(=O)C(=O)[O-]", "--json"])
    assert code == 0
    data = json.loads(out)
    assert data["formula"] == "C3H3O3" and data["charge"] == -1
    assert data["groups"]["carboxylate -COO-"] == 1
    assert data["sigma_G_kJ"] > 0
    # OBIGT pyruvate (Canovas & Shock 2016, key CS16): estimate within 3 sigma
    assert abs(data["G_kJ"] - _obigt_G("pyruvate")) < 3 * data["sigma_G_kJ"]


def test_cli_estimate_by_name_and_text():
    code, out, _ = _run_cli(["estimate", "glycine"])
    assert code == 0
    assert "ammonium -NH3+" in out and "kJ/mol" in out


def test_cli_bad_input_exit_code_2():
    code, _, err = _run_cli(["estimate", "C((("])
    assert code == 2
    assert "neither a readable SMILES" in err
    code, _, err = _run_cli(["estimate", "CC(=O)SCC"])
    assert code == 2
    assert "thioester" in err
