"""``tfa inspect``: balance status, coverage counts and every reaction with ΔrG'° and source.

Reference for the checked number: acetyl phosphate hydrolysis, ΔrG'° = −43.1 kJ/mol at pH 7,
25 °C (Nelson & Cox, Lehninger Principles of Biochemistry, 5th ed., 2008, Table 13-6; from
memory), combined with ATP hydrolysis from the species data (OBIGT via the database): acetate
kinase must come out as −43.1 − ΔrG'°(ATP hydrolysis) at the environment (ΔrS'° = 0
approximation of the literature value, see tfa.thermo.reconcile).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from tfa.cli import main
from tfa.conditions import Conditions
from tfa.thermo.database import ThermoDatabase


def _tiny_network_tables():
    """The tiny network of tests/test_network_energies.py (one definition for both files)."""
    import importlib.util

    spec = importlib.util.spec_from_file_location(
        "_tiny_network", Path(__file__).with_name("test_network_energies.py"))
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module.COMPOUNDS, module.REACTIONS, module.VALUES


COMPOUNDS, REACTIONS, VALUES = _tiny_network_tables()

ENVIRONMENT = """[environment]
name = "Kestrel Ridge vent field"
description = "Invented demo setting (test copy)"
[conditions]
temperature_C = 70.0
pH = 7.0
ionic_strength_M = 0.25
[feed]
H2 = 1.0e-3
phosphate = 1.0e-3
[bounds]
default = [1.0e-6, 1.0e-2]
[demand]
reaction = "DM_pyr"
flux = 0.01
[outlets]
allowed = ["ac"]
"""


@pytest.fixture()
def folder(tmp_path: Path) -> Path:
    (tmp_path / "compounds.tsv").write_text(COMPOUNDS)
    (tmp_path / "reactions.tsv").write_text(REACTIONS)
    (tmp_path / "reaction_values.tsv").write_text(VALUES)
    (tmp_path / "environment.toml").write_text(ENVIRONMENT)
    return tmp_path


def test_text_output(folder, capsys):
    assert main(["inspect", str(folder / "reactions.tsv"), "--no-estimates"]) == 0
    out = capsys.readouterr().out
    assert "balance      all 4 internal reactions balance" in out
    assert "Kestrel Ridge vent field" in out and "70.0 degC" in out
    assert "species 1 (25%), literature 1 (25%), placeholder 1 (25%), none 1 (25%)" in out
    assert "LDH (placeholder), XR (none)" in out


def test_json_output_carries_the_hand_value(folder, capsys):
    assert main(["inspect", str(folder), "--json", "--no-estimates"]) == 0
    payload = json.loads(capsys.readouterr().out)
    rows = {r["reaction"]: r for r in payload["reactions"]}
    assert set(rows) == {"ACK", "ATPH", "LDH", "XR"}
    assert payload["counts"]["literature"] == 1 and payload["internal_reactions"] == 4
    assert payload["reviewed_or_cited_fraction"] == pytest.approx(0.5)
    vent = Conditions.from_celsius(70.0, ph=7.0, ionic_strength=0.25)
    atp = ThermoDatabase.load().reaction_energy("ATP + H2O <=> ADP + phosphate", vent).standard
    assert rows["ACK"]["delta_g_standard_kJ_per_mol"] == pytest.approx(-43.1 - atp, abs=0.05)
    assert rows["XR"]["delta_g_standard_kJ_per_mol"] is None and rows["XR"]["source"] == "none"
    assert payload["balance"] == {"internal_reactions": 4, "balanced": 4, "unbalanced": []}


def test_condition_options_override_the_environment(folder, capsys):
    assert main(["inspect", str(folder), "--json", "--no-estimates", "--temperature", "25"]) == 0
    payload = json.loads(capsys.readouterr().out)
    assert payload["conditions"]["temperature_C"] == pytest.approx(25.0)
    ack = next(r for r in payload["reactions"] if r["reaction"] == "ACK")
    room = Conditions(298.15, 7.0, 0.25)
    atp = ThermoDatabase.load().reaction_energy("ATP + H2O <=> ADP + phosphate", room).standard
    assert ack["delta_g_standard_kJ_per_mol"] == pytest.approx(-43.1 - atp, abs=1e-6)


def test_unbalanced_reaction_is_reported_marked_and_an_error(folder, capsys):
    # the analyses refuse an unbalanced reaction, so the checker does too (exit 2, the same
    # message), after reporting the whole network with the reaction marked and without energy
    text = (folder / "reactions.tsv").read_text().replace("xac <=> ac + h", "xac + h2o <=> ac + h")  # O off by one
    (folder / "reactions.tsv").write_text(text)
    assert main(["inspect", str(folder / "reactions.tsv"), "--no-estimates"]) == 2
    captured = capsys.readouterr()
    assert "1 of 4 internal reactions do not balance" in captured.out and "XR:" in captured.out
    row = next(line for line in captured.out.splitlines() if line.strip().startswith("XR "))
    assert " NO " in row and "—" in row
    assert "reactions.tsv line 5: reaction 'XR'" in captured.err
    # the hint names the residual and the fix in the right direction: one water too many
    assert "O is off by -1" in captured.err and "remove it there" in captured.err
    assert main(["feasible", str(folder / "reactions.tsv")]) == 2
    assert captured.err.split("error: ")[1] == capsys.readouterr().err.split("error: ")[1]


def test_bad_input_exits_2_with_file_and_line(folder, capsys):
    lines = (folder / "reactions.tsv").read_text().splitlines()
    lines[2] = lines[2].replace("atp + h2o -> adp + pi + h", "atp + h2o -> -> adp")
    (folder / "reactions.tsv").write_text("\n".join(lines) + "\n")
    before = sorted(p.name for p in folder.iterdir())
    assert main(["inspect", str(folder / "reactions.tsv")]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    assert "reactions.tsv line 3" in captured.err
    assert sorted(p.name for p in folder.iterdir()) == before   # nothing written


def test_missing_file_and_bad_environment(folder, tmp_path, capsys):
    assert main(["inspect", str(tmp_path / "nope.tsv")]) == 2
    assert "no such file" in capsys.readouterr().err
    bad = folder / "bad.toml"
    bad.write_text(ENVIRONMENT.replace("temperature_C = 70.0", "temperature_C = hot"))
    assert main(["inspect", str(folder), "--environment", str(bad)]) == 2
    assert "bad.toml" in capsys.readouterr().err


def test_bundled_network_without_argument(capsys):
    from tfa.network.bundled import bundled_folder

    try:
        folder = bundled_folder()
    except Exception:
        pytest.skip("bundled network not present yet (models/ancestral_core)")
    if not (folder / "reactions.tsv").is_file():
        pytest.skip("bundled network not present yet (models/ancestral_core/reactions.tsv)")
    assert main(["inspect", "--json"]) == 0
    payload = json.loads(capsys.readouterr().out)
    assert payload["environment"] == "Kestrel Ridge vent field"
    assert payload["internal_reactions"] == len(payload["reactions"]) > 0
    for row in payload["reactions"]:
        assert row["delta_g_standard_kJ_per_mol"] is None or math.isfinite(row["delta_g_standard_kJ_per_mol"])
        assert row["delta_g_standard_kJ_per_mol"] != 0.0 or row["source"] in ("species", "literature", "reconciled")
