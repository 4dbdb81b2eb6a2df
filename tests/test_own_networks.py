"""A researcher's own network, first time right: the formats' example assessed from the document
alone, the starter network the new command writes, cobra's textbook model through its
annotations without an environment, and the one checker against the analyses on broken inputs.

Published values checked (transformed standard reaction energies at pH 7 near 25 °C; textbook
tables carry σ of about 3 kJ/mol, the spread between textbooks, docs/internals.md):
malate dehydrogenase +29.7 and fumarase −3.8 kJ/mol (D. L. Nelson, M. M. Cox, Lehninger
Principles of Biochemistry, 5th ed., 2008, Table 16-1; from memory); ATP hydrolysis without Mg2+
−36.0 kJ/mol (R. A. Alberty, Thermodynamics of Biochemical Reactions, 2003; from memory). The
textbook model is cobra's own (``cobra.io.load_model("textbook")``, the E. coli core model of
Orth et al. 2010, shipped with cobra).
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from tfa.cli import main

ROOT = Path(__file__).resolve().parents[1]
FORMATS = ROOT / "docs" / "formats.md"
FILES = ("compounds.csv", "reactions.csv", "environment.toml")


def example_blocks() -> dict[str, str]:
    """File name -> text of the example's fenced blocks of docs/formats.md."""
    text = FORMATS.read_text(encoding="utf-8")
    return {m.group(1): m.group(2) for m in re.finditer(r"```\w+ file=(\S+)\n(.*?)```", text, re.S)}


def _lines_of(out: str, start: str) -> str:
    return next(line for line in out.splitlines() if line.startswith(start))


# ------------------------------------------------------------------ the documented example
def test_the_formats_example_alone_builds_a_network_that_is_assessed(tmp_path):
    import tfa

    blocks = example_blocks()
    assert sorted(blocks) == sorted(FILES)
    for name, text in blocks.items():
        (tmp_path / name).write_text(text, encoding="utf-8")
    result = tfa.assess(tmp_path, draws=0, skip=["ranges", "h2_scan"])
    summary = result.summary()
    # the network has no ATP: those modes are not applicable, never a verdict
    assert "runs without ATP: not applicable (no ATP in this network)" in summary
    assert result.summary_data()["feasible"]["no_atp_strict"] is None
    assert "runs as given: yes" in summary
    assert "runs with H2 in place of the carriers: yes" in summary
    assert result.h2_threshold.feasible and 1e-8 < result.h2_threshold.threshold < 1e-4
    # fumarate hydratase of the example against Nelson & Cox (2008), Table 16-1: fumarate + H2O
    # -> malate -3.8 kJ/mol at pH 7, 25 degC (from memory); the example's FUM is the reverse
    from tfa.network.reaction_in_network import network_reaction_energy
    from tfa.conditions import Conditions

    fum = network_reaction_energy(result.network, Conditions.from_celsius(25, ph=7.0,
                                                                          ionic_strength=0.25),
                                  "mal <=> fum + h2o")
    assert fum.standard == pytest.approx(3.8, abs=3.0)


def test_the_new_command_writes_the_example_and_it_runs(tmp_path, capsys):
    folder = tmp_path / "mine"
    assert main(["new-network", str(folder)]) == 0
    assert "tfa inspect" in capsys.readouterr().out
    assert {p.name: p.read_text(encoding="utf-8") for p in folder.iterdir()} == example_blocks()
    assert main(["new-network", str(folder)]) == 2            # nothing is overwritten
    assert "already holds" in capsys.readouterr().err
    assert main(["inspect", str(folder)]) == 0
    out = capsys.readouterr().out
    # the roles table: found (declared here) and missing, with the modes that need them (combined
    # modes another test asked for, "a+b", may follow in the same process)
    assert re.search(r"^\s*h2\s+h2\s+declared\s+h2_only, h2_bare, h2_no_atp\b", out, re.M)
    assert re.search(r"^\s*atp\s+none\s+missing\s+no_atp_strict, no_atp_bare, h2_bare, h2_no_atp, "
                     r"acetyl_phosphate, thioester, pyrophosphate, polyphosphate, coupling_choice\b", out, re.M)
    assert main(["feasible", str(folder), "-q"]) == 0
    out = capsys.readouterr().out
    assert _lines_of(out, "runs as given") == "runs as given: yes [certified]"
    assert "runs without ATP: not applicable (no ATP in this network)" in out


# ------------------------------------------------------------------ cobra's textbook model
@pytest.fixture(scope="module")
def textbook_sbml(tmp_path_factory) -> Path:
    """cobra's textbook model written to SBML as cobra writes it: annotations, no notes."""
    import cobra

    model = cobra.io.load_model("textbook")
    assert not any((m.notes or {}).get("thermo_key") for m in model.metabolites)
    path = tmp_path_factory.mktemp("textbook") / "e_coli_core.xml"
    cobra.io.write_sbml_model(model, str(path))
    return path


def test_textbook_sbml_gets_energies_through_its_annotations(textbook_sbml, capsys):
    """Goal: at least 80 % of the internal reactions (exchanges and the biomass demand left
    out) get an energy with no hand-written note. Measured: 63 of 74 (85.1 %)."""
    assert main(["inspect", str(textbook_sbml), "--json"]) == 0
    payload = json.loads(capsys.readouterr().out)
    rows = {r["reaction"]: r for r in payload["reactions"]}
    assert "Biomass_Ecoli_core" not in rows and not any(r.startswith("EX_") for r in rows)
    with_energy = [r for r in rows.values() if r["delta_g_standard_kJ_per_mol"] is not None]
    fraction = len(with_energy) / len(rows)
    print(f"\ntextbook model: {len(with_energy)} of {len(rows)} internal reactions get an energy "
          f"through annotations ({100 * fraction:.1f} %)")
    assert fraction >= 0.80, (len(with_energy), len(rows))
    assert all(m["status"] != "given" for m in payload["identifiers"])     # no note was used
    # species data reached through ChEBI/KEGG/BiGG annotations, against published values
    # (25 degC, pH 7, I = 0.1 mol/L of the neutral default; see the module docstring)
    assert rows["MDH"]["delta_g_standard_kJ_per_mol"] == pytest.approx(29.7, abs=3.0)
    assert rows["FUM"]["delta_g_standard_kJ_per_mol"] == pytest.approx(-3.8, abs=3.0)
    assert rows["ATPM"]["delta_g_standard_kJ_per_mol"] == pytest.approx(-36.0, abs=3.0)
    roles = {r["role"]: r for r in payload["roles"]}
    assert roles["atp"]["compounds"] == "atp_c" and roles["h2"]["compounds"] == "none"
    assert payload["not_applicable"]["h2_only"].startswith("no H2 in this network")


def test_textbook_cobra_json_is_matched_as_its_sbml(textbook_sbml, tmp_path, capsys):
    import cobra

    path = tmp_path / "e_coli_core.json"
    cobra.io.save_json_model(cobra.io.load_model("textbook"), str(path))
    energies = {}
    for model in (textbook_sbml, path):
        assert main(["inspect", str(model), "--json"]) == 0
        payload = json.loads(capsys.readouterr().out)
        energies[model.suffix] = {r["reaction"]: r["delta_g_standard_kJ_per_mol"]
                                  for r in payload["reactions"]}
    assert energies[".json"] == pytest.approx(energies[".xml"], nan_ok=True)


def test_textbook_sbml_without_environment_says_so_and_what_does_not_apply(textbook_sbml, capsys):
    assert main(["feasible", str(textbook_sbml)]) == 0
    captured = capsys.readouterr()
    lines = captured.out.splitlines()
    assert lines[0].startswith("network e_coli_core at neutral default (25.0 degC, pH 7.00")
    assert lines[1].startswith("no environment given for e_coli_core: a neutral default")
    assert "demand Biomass_Ecoli_core >= 0.01" in lines[1]
    assert ("runs with H2 in place of the carriers: not applicable (no H2 in this network; name "
            "the H2 compound with --h2 ID)") in captured.out
    native = _lines_of(captured.out, "runs with the ATP its own reactions make")
    assert native.startswith("runs with the ATP its own reactions make: yes [certified] "
                             "(thermodynamically "
                             "constrained: 63 of 74 reactions; the rest unconstrained)")
    assert "without an energy (unconstrained in every mode): 11 of 74 reactions" in captured.out
    # warnings once, as one short table, one line each, no file paths; -q prints none
    assert "compartment(s) e have no stated pH" in captured.err
    assert "Traceback" not in captured.err and ".py:" not in captured.err
    assert main(["feasible", str(textbook_sbml), "--modes", "native", "-q"]) == 0
    assert capsys.readouterr().err == ""


def test_model_range_warning_is_one_line_and_quiet_silences_it(capsys):
    # 300 degC is beyond the constant-Cp range of the species data (common practice: the
    # integration from 25 degC is stretched above 150 degC); 100 bar keeps water liquid (its
    # saturation pressure at 300 degC is 85.9 bar, Wagner & Pruss 2002, doi:10.1063/1.1461829)
    assert main(["dg", "H2 + CO2tot <=> formate + H2O", "--temperature", "300", "--pressure", "100"]) == 0
    err = capsys.readouterr().err
    assert "300 degC: constant-Cp integration" in err and ".py" not in err and "warn(" not in err
    assert main(["dg", "H2 + CO2tot <=> formate + H2O", "--temperature", "300", "--pressure", "100", "-q"]) == 0
    assert capsys.readouterr().err == ""
    assert main(["dg", "H2 + CO2tot <=> formate + H2O", "--temperature", "300", "--pressure", "100", "-v"]) == 0
    err = capsys.readouterr().err      # --verbose: every warning in full, still one line each
    assert "warnings:\n  300 degC: constant-Cp integration from 25 degC is stretched above 150 degC" in err


# ------------------------------------------------------------------ one checker
#: (file, line that starts with (None: a new file), its replacement, words of the message; a
#: word "(at line N)" when the message rightly points at another line of the file).
BROKEN = [
    ("reactions.csv", "ME,", "ME,pyr + co2 + nadhh <=> mal + nad,x,,,,,", ["unknown compound 'nadhh'"]),
    ("reactions.csv", "FRD,", "FUM,fum + nadh + h -> succ + nad,x,,,,,", ["already defined on line 4"]),
    ("compounds.csv", "fum,", "mal,fumarate,C4H2O4,-2,fumarate,,,,,", ["already defined on line 7"]),
    ("reactions.csv", "FUM,", "FUM,mal <=> fum,x,,,,,", ["does not balance", "O is off by -1",
                                                        "add 1 H2O to the products"]),
    ("reactions.csv", "HYD,", "HYD,2 h2 + nad <=> nadh + h,x,,,,,", ["does not balance",
                                                                     "1 H2 too many"]),
    ("reactions.csv", "FUM,", "FUM,mal <=> fum + h2o,x,,,5,1,", ["lower_bound 5 is above upper_bound 1"]),
    ("reactions.csv", "FRD,", "FRD,fum + nadh + h -> succ + nad,x,,,-10,,", ["irreversible reaction 'FRD'"]),
    ("reactions.csv", "FRD,", "FRD,fum + nadh + h -> succ + nad,x,1.3.1,,,,", ["'1.3.1' is not an EC number"]),
    ("reactions.csv", "FUM,", "FUM,mal <=> fum <=> h2o,x,,,,,", ["more than one arrow"]),
    ("reactions.csv", "id,", "id,formula,name,ec,pathway,lower_bound,upper_bound,notes",
     ["missing column(s) equation"]),
    ("reactions.csv", "FUM,", "fum,mal <=> fum + h2o,x,,,,,", ["'fum' is also a compound id"]),
    ("compounds.csv", "pyr,", "pyr,pyruvate,C3H3O3,minus one,pyruvate,,,,,", ["not an integer"]),
    ("compounds.csv", "pyr,", "pyr,pyruvate,C3H3O3-,-2,pyruvate,,,,,", ["make them agree"]),
    ("compounds.csv", "succ,", "succ,succinate,C4H4O4,-2,succinate,,1 uM,1e-3,,", ["'1 uM' is not"]),
    ("compounds.csv", "succ,", "succ,succinate,C4H4O4,-2,succinate,,1e-3,1e-6,,", ["swap them"]),
    ("compounds.csv", "pyr,", "pyr,pyruvate,C3H3O3,-1,pyruvate,reductant,,,,",
     ["role 'reductant' is not understood"]),
    ("compounds.csv", "pyr,", "pyr,pyruvate,C3H3O3,-1,pyruvate,water,,,,",
     ["all have role 'water'"]),
    ("compounds.csv", "nadh,", "nadh,NADH,C21H27N7O14P2,-2,NADH,,1e-6,1e-2,,",
     ["carrier pair 'NAD' needs exactly one 'red:NAD:N' compound", "(at line 10)"]),
    ("compounds.csv", "nadh,", "nadh,NADH,C21H27N7O14P2,-2,NADH,red:NAD:1,1e-6,1e-2,,",
     ["give both forms the same N"]),
    ("compounds.csv", "pyr,", "pyr,pyruvate,C3H3O3,-1,pyruvic,,,,,",
     ["thermo_key 'pyruvic' is not in the thermodynamic database"]),
    ("compounds.csv", "mal,", "mal,L-malate,C4H4O5,-2,malate,,0.5,,,", ["bounds [0.5, 0.01]",
                                                                        "are empty"]),
    ("environment.toml", "pyr =", "pyruvat = 1.0e-4", ["[feed] pyruvat",
                                                       "'pyruvat' is not a compound"]),
    ("environment.toml", "reaction =", 'reaction = "DM_suc"', ["'DM_suc' is not a reaction",
                                                               "did you mean 'DM_succ'"]),
    ("environment.toml", "pyr =", "fum = 1.0e-4", ["compound fum is fed", "no exchange"]),
    ("environment.toml", "temperature_C", 'temperature_C = "hot"', ["'hot' is not a number"]),
    ("environment.toml", "[outlets]", "[outlet]", ["unknown section [outlet]"]),
    ("environment.toml", "default =", "default = [1.0e-2, 1.0e-6]", ["swap them"]),
    ("environment.toml", "pH =", "pH = 15.0", ["[conditions]", "15"]),
    ("environment.toml", "h2 =", "h2 = 0.0", ["is not a concentration"]),
    ("identifiers.csv", None, "compound,thermo_key\nmalate,malate", ["'malate' is not a compound",
                                                                    "did you mean 'mal'"]),
    ("identifiers.csv", None, "compound,thermo_key\nmal,malat", ["column 'thermo_key'",
                                                                "unknown compound 'malat'"]),
]


def _break(folder: Path, file: str, start: str | None, new: str) -> int:
    """Apply one breakage; returns the line number it sits on."""
    path = folder / file
    if start is None:
        path.write_text(new + "\n", encoding="utf-8")
        return 2
    lines = path.read_text(encoding="utf-8").splitlines()
    number = next(k for k, line in enumerate(lines) if line.startswith(start))
    lines[number] = new
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return number + 1


def _error(stderr: str, command: str) -> list[str]:
    return [line.split(": error: ", 1)[1] for line in stderr.splitlines()
            if line.startswith(f"tfa {command}: error: ")]


def test_inspect_finds_every_input_error_feasible_finds_with_the_same_message(tmp_path, capsys):
    """Over 31 broken inputs (duplicate ids, unknown compounds, unbalanced reactions, bad
    bounds, bad units, missing and contradictory roles, bad environments and identifier tables):
    the same exit code from both, and feasible's message among inspect's, naming the file and
    its line; never a traceback."""
    from tfa.network.bundled import write_starter_network

    assert len(BROKEN) >= 25
    for k, (file, start, new, words) in enumerate(BROKEN):
        folder = tmp_path / f"case{k}"
        write_starter_network(folder)
        line = _break(folder, file, start, new)
        codes, errors = {}, {}
        for command in ("feasible", "inspect"):
            codes[command] = main([command, str(folder), "-q"])
            captured = capsys.readouterr()
            assert "Traceback" not in captured.err + captured.out, (k, command)
            errors[command] = _error(captured.err, command)
        assert codes == {"feasible": 2, "inspect": 2}, (k, file, new, codes, errors)
        message = errors["feasible"][0]
        assert message in errors["inspect"], (k, message, errors["inspect"])
        elsewhere = [w for w in words if w.startswith("(at line ")]
        assert str(folder / file) in message, (k, message)
        assert elsewhere or re.search(rf"\bline {line}\b", message), (k, message)
        for word in words:
            if word.startswith("(at line "):    # the error points at the other line named
                assert re.search(rf"\bline {word[9:-1]}\b", message), (k, message)
                continue
            assert word in message, (k, word, message)


# ------------------------------------------------------------------ estimates everywhere
@pytest.mark.parametrize("name, where", [("prpp", "compound 'prpp' of network ancestral_core"),
                                         ("orotate", "compound 'orot' of network ancestral_core"),
                                         ("CC(=O)C(=O)[O-]", "structure given")])
def test_estimate_takes_any_compound_of_the_bundled_network_and_a_smiles(name, where, capsys):
    assert main(["estimate", name, "--json"]) == 0
    payload = json.loads(capsys.readouterr().out)
    assert payload["resolved_from"] == where
    # the same structure estimated directly: the command adds nothing of its own
    from tfa.thermo.estimates import estimate_species

    assert payload["G_kJ"] == pytest.approx(estimate_species(payload["smiles"]).G, abs=1e-9)


def test_estimate_of_a_compound_of_ones_own_network(textbook_sbml, capsys):
    # atp_c has no structure in the SBML; its annotation names ATP, whose species have one
    assert main(["estimate", "atp_c", "--network", str(textbook_sbml)]) == 0
    out = capsys.readouterr().out
    assert out.startswith("atp_c  (compound 'atp_c' of network e_coli_core, thermo key ATP")
    for section in ("groups:", "ionisable sites (pKa rules):"):
        body = out.split(section + "\n")[1].splitlines()
        listed = [line.split(None, 1)[1] for line in
                  body[:next(k for k, line in enumerate(body) if not line.startswith("  "))]]
        assert listed and len(listed) == len(set(listed)), section   # each once, with its count
    assert main(["estimate", "pyruvat"]) == 2
    assert "did you mean pyruvate" in capsys.readouterr().err


# ------------------------------------------------------------------ --demand and --h2
def test_demand_and_h2_named_on_the_command_line(tmp_path, capsys):
    from tfa.network.bundled import write_starter_network

    write_starter_network(tmp_path)
    env = tmp_path / "environment.toml"
    env.write_text(re.sub(r'\[demand\]\nreaction = "DM_succ"\nflux = [^\n]*\n', "[demand]\nnone = true\n",
                          env.read_text()))
    assert main(["feasible", str(tmp_path), "-q"]) == 0       # no demand: nothing to ask
    out = capsys.readouterr().out
    assert "runs as given: not applicable (no demand reaction; name one with --demand ID" in out
    assert main(["feasible", str(tmp_path), "-q", "--demand", "DM_succ"]) == 0
    assert _lines_of(capsys.readouterr().out, "runs as given") == "runs as given: yes [certified]"
    assert main(["feasible", str(tmp_path), "--demand", "DM_suc"]) == 2
    assert "--demand DM_suc: not a reaction of network" in capsys.readouterr().err
    assert main(["feasible", str(tmp_path), "--h2", "h22"]) == 2
    assert "did you mean 'h2'" in capsys.readouterr().err
    assert main(["feasible", str(tmp_path), "--h2", "co2"]) == 2   # h2 is declared H2 already
    assert "compound h2 is declared H2" in capsys.readouterr().err
    # an H2 compound that neither a role nor a thermo key names: only --h2 makes it H2
    compounds = tmp_path / "compounds.csv"
    compounds.write_text(compounds.read_text().replace("h2,hydrogen (dissolved),H2,0,H2,h2,",
                                                       "h2,hydrogen (dissolved),H2,0,,,"))
    assert main(["feasible", str(tmp_path), "-q", "--demand", "DM_succ"]) == 0
    assert "runs with H2 in place of the carriers: not applicable (no H2 in this network" in \
        capsys.readouterr().out
    assert main(["feasible", str(tmp_path), "-q", "--demand", "DM_succ", "--h2", "h2"]) == 0
    out = capsys.readouterr().out
    assert _lines_of(out, "runs with H2 in place of the carriers").startswith(
        "runs with H2 in place of the carriers: ")
    assert "not applicable" not in _lines_of(out, "runs with H2 in place of the carriers")
