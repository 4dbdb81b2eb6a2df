"""Status of every energy and the audit flags that touch it, through every output.

Reference value of the checks: acetyl phosphate hydrolysis, -43.1 kJ/mol at pH 7, 25 degC
(Nelson & Cox 2008, Table 13-6; marked "from memory" in the input file); Thauer et al. 1977
(from memory) for the homolactic fermentation that the audit flags; the ferredoxin couple at
-420 mV (Thauer et al. 1977, from memory).
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from tiny_network import write_tiny_network  # noqa: E402

from tfa.cli import main  # noqa: E402
from tfa.conditions import Conditions  # noqa: E402
from tfa.network.coverage import VERIFY_COLUMNS, coverage  # noqa: E402
from tfa.network.io_table import read_network  # noqa: E402
from tfa.thermo.database import ThermoDatabase  # noqa: E402
from tfa.thermo.library import ReactionLibrary  # noqa: E402
from tfa.thermo.status import RECALLED, REVIEWED, STATUSES  # noqa: E402

RECALLED_TEXT = "recalled value (from memory)"


@pytest.fixture()
def folder(tmp_path: Path) -> Path:
    return write_tiny_network(tmp_path)


def test_a_value_from_memory_is_marked_so_in_every_output(folder, capsys):
    assert RECALLED == RECALLED_TEXT
    model = read_network(folder / "reactions.tsv", folder / "compounds.tsv")
    conditions = Conditions.from_celsius(25, ph=7, ionic_strength=0.25)
    # coverage table (and its CSV/JSON through to_frame / to_dict)
    report = coverage(model, conditions, literature=folder / "reaction_values.tsv")
    frame = report.to_frame().set_index("reaction")
    assert frame.loc["ACK", "status"] == RECALLED_TEXT
    assert frame.loc["ATPH", "status"] == "reviewed species data"
    assert {r["reaction"]: r["status"] for r in report.to_dict()["reactions"]}["ACK"] == RECALLED_TEXT
    # tfa inspect, text and JSON
    assert main(["inspect", str(folder / "reactions.tsv"), "--temperature", "25", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert {r["reaction"]: r["status"] for r in data["reactions"]}["ACK"] == RECALLED_TEXT
    assert main(["inspect", str(folder / "reactions.tsv"), "--temperature", "25"]) == 0
    text = capsys.readouterr().out
    assert RECALLED_TEXT in next(line for line in text.splitlines() if line.strip().startswith("ACK"))
    # tfa dg on the network's own data
    assert main(["dg", "actp + adp <=> ac + atp", "--network", str(folder), "--ionic-strength",
                 "0.25", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["status"] == RECALLED_TEXT
    # -43.1 against ATP hydrolysis of the species data (about -36): acetate kinase near -7
    assert data["delta_g_standard_kJ_per_mol"] == pytest.approx(-7.3, abs=2.5)
    # and the list of numbers to verify names it with its source
    listing = report.to_verify()
    assert list(listing.columns) == list(VERIFY_COLUMNS)
    row = listing.set_index("item").loc["actp_hydrolysis"]
    assert row["status"] == RECALLED_TEXT and row["source"] == "NC08"
    assert "Nelson" in row["citation"] and "ACK" in row["used_by"]


def test_tfa_inspect_to_verify_on_the_bundled_network(capsys):
    assert main(["inspect", "--to-verify", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    kinds = {row["kind"] for row in data["to_verify"]}
    assert {"reaction value", "species correction", "carrier potential", "estimate",
            "audit disagreement"} <= kinds
    items = {row["item"]: row for row in data["to_verify"]}
    # the ferredoxin potential (-420 mV, Thauer et al. 1977) is recalled
    assert items["ferredoxin"]["status"] == RECALLED_TEXT
    # the re-anchored species data the network uses
    assert items["pyrophosphate"]["kind"] == "species correction"
    assert "PPA" in items["pyrophosphate"]["used_by"]
    # estimates carry their groups
    assert items["alac"]["kind"] == "estimate" and "ketone" in items["alac"]["note"]


def test_library_energies_carry_status_and_audit_flags():
    library = ReactionLibrary.load()
    room = Conditions.from_celsius(25, ph=7, ionic_strength=0.25)
    methanogenesis = library.reaction_energy("4 H2(g) + CO2(g) <=> CH4(g) + 2 H2O", room)
    assert methanogenesis.status == REVIEWED and methanogenesis.audit_flags == ()
    # glucose -> 2 lactate: the audit's open disagreement with Thauer et al. 1977 touches it
    homolactic = library.reaction_energy("glucose <=> 2 lactate", room)
    assert homolactic.status == RECALLED_TEXT  # lactate is re-anchored to recalled values
    assert any(f.startswith("audit: homolactic") for f in homolactic.audit_flags)
    assert all(s in STATUSES for s in (methanogenesis.status, homolactic.status))


def test_network_reactions_carry_status_and_flags():
    import tfa
    from tfa.network.energies import compound_energies, reaction_energies

    model, environment = tfa.load_network(), tfa.load_environment()
    table = compound_energies(model, environment)
    energies = reaction_energies(model, table)
    assert all(e.status in STATUSES for e in energies.values())
    assert energies["HYD_NAD"].status == REVIEWED           # species data of LH06b and SHS89
    assert energies["HYD_FD"].status == RECALLED_TEXT       # the ferredoxin potential
    assert energies["KARI"].status == "estimated"
    # LDH uses lactate, which the homolactic disagreement touches
    assert any("homolactic" in f for f in energies["LDH"].audit_flags)
    # estimates record their groups, so that draws can correlate estimates sharing groups
    assert table.compounds["alac"].group_counts["ketone >C=O"] == 1
    assert table.compounds["dhiv"].group_counts["hydroxyl on sp3 carbon -OH"] == 2


def test_pmg_without_mg_species_warns(caplog):
    db = ThermoDatabase.load()
    result = db.reaction_energy("pyruvate + NADH <=> lactate + NAD",
                                Conditions.from_celsius(25, ph=7, ionic_strength=0.25, pmg=3))
    assert any("no Mg2+-binding species data" in f and "changes nothing" in f for f in result.flags)
    assert "no Mg2+-binding species data" in caplog.text
    # ATP has Mg species (LaRowe & Helgeson 2006): no such warning for ATP, but one for the
    # compounds of the reaction without them
    result = db.reaction_energy("ATP + H2O <=> ADP + phosphate",
                                Conditions.from_celsius(25, ph=7, ionic_strength=0.25, pmg=3))
    assert not any("no Mg2+-binding" in f for f in result.flags)


def test_ferredoxin_by_name_with_an_explanation_and_close_matches_by_similarity():
    db = ThermoDatabase.load()
    assert db.compound("Fd").id == db.compound("ferredoxin").id == "Fd_ox"
    assert db.compound("Fd2-").id == "Fd_red"
    result = db.reaction_energy("H2 + Fd <=> Fd2-", Conditions())
    assert any("name the oxidised form Fd_ox" in f for f in result.flags)
    # Thauer et al. 1977 (from memory): ferredoxin -420 mV against H2 at -414 mV (1 bar) is about
    # +1 kJ/mol with the gas; dissolved H2 at 1 M lies 17.7 kJ/mol higher
    gas = db.reaction_energy("H2(g) + Fd <=> Fd2-", Conditions()).standard
    assert gas == pytest.approx(-2 * 96.485 * (-0.420 + 0.414), abs=1.5)
    # "did you mean" ranks by similarity of names: sulphur -> sulfur first, not a phosphate
    from tfa.errors import UnknownCompoundError

    with pytest.raises(UnknownCompoundError) as err:
        db.compound("sulphurr")
    assert err.value.matches[0] == "S0"
    with pytest.raises(UnknownCompoundError) as err:
        db.compound("glucse")
    assert err.value.matches[0] == "glucose"


def test_carrier_sigma_grows_with_temperature_and_is_flagged():
    db = ThermoDatabase.load()
    at25 = db.formation_energy("Fd_red", Conditions.from_celsius(25))
    at70 = db.formation_energy("Fd_red", Conditions.from_celsius(70))
    # sigma(E) = sqrt(30^2 + (1 mV/K * 45 K)^2) = 54.1 mV; 2F * 54.1 mV = 10.44 kJ/mol
    assert at25.uncertainty == pytest.approx(2 * 96.485 * 0.030, abs=0.01)
    assert at70.uncertainty == pytest.approx(2 * 96.485 * 0.0541, abs=0.02)
    assert any("held at its 25 degC value" in f and "sigma widened" in f for f in at70.flags)
