"""Network tables, SBML and cobra JSON: round trips, error messages, balance checks.

Stoichiometries of tests/data/mini_network are textbook reactions under their EC numbers; the
formulas and charges are the reference species at pH 7 used by R. A. Alberty, Thermodynamics of
Biochemical Reactions (Wiley, 2003) (e.g. ATP4-, ADP3-, HPO4 2-, NAD-, NADH 2-).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import cobra
import pytest

from tfa.errors import NetworkFileError, UnbalancedReactionError
from tfa.network import (balance_report, load_network, read_network, require_balanced_network, save_network,
                         write_network)
from tfa.network.io_sbml import read_cobra_json, read_sbml, write_cobra_json, write_sbml

DATA = Path(__file__).parent / "data" / "mini_network"


def model_fingerprint(model: cobra.Model) -> dict:
    """Everything a round trip must keep, in comparable form."""
    return {
        "reactions": [
            (r.id, r.name, sorted((m.id, c) for m, c in r.metabolites.items()), r.lower_bound, r.upper_bound,
             dict(r.notes), {k: list(v) if isinstance(v, (list, tuple)) else v for k, v in r.annotation.items()
                             if k != "sbo"})
            for r in model.reactions
        ],
        "metabolites": [
            (m.id, m.name, m.formula, int(m.charge), dict(m.notes)) for m in model.metabolites
        ],
    }


@pytest.fixture()
def mini(tmp_path: Path) -> Path:
    folder = tmp_path / "mini"
    shutil.copytree(DATA, folder)
    return folder


def test_read_mini_network_columns_land_in_cobra_objects():
    model = read_network(DATA / "reactions.tsv")
    assert len(model.reactions) == 19 and len(model.metabolites) == 21
    assert model.compartments == {"c": "cell"}
    ldh = model.reactions.LDH
    # L-lactate dehydrogenase, EC 1.1.1.27: pyruvate + NADH + H+ -> L-lactate + NAD+
    assert {m.id: c for m, c in ldh.metabolites.items()} == {"pyr": -1, "nadh": -1, "h": -1, "lac": 1, "nad": 1}
    assert ldh.bounds == (-1000.0, 1000.0)
    assert ldh.notes == {"name": "L-lactate dehydrogenase", "ec": "1.1.1.27", "pathway": "test",
                         "energy_source": "auto"}
    assert ldh.annotation["ec-code"] == ["1.1.1.27"]
    assert model.reactions.PPCK.bounds == (0.0, 1000.0)          # '->'
    assert model.reactions.MDH.bounds == (-500.0, 500.0)         # explicit bounds
    assert model.reactions.EX_ac.bounds == (0.0, 1000.0)         # outlet: export only
    atp = model.metabolites.atp
    assert (atp.formula, atp.charge) == ("C10H12N5O13P3", -4)
    assert atp.notes["conc_min"] == "1e-4" and atp.notes["role"] == "atp"
    assert model.metabolites.fdred.formula == "Fd" and model.metabolites.fdred.charge == -2
    assert model.metabolites.pi.notes["synonyms"] == "orthophosphate;Pi"


def test_table_sbml_table_round_trip_keeps_everything(tmp_path: Path):
    original = read_network(DATA / "reactions.tsv")
    write_network(original, tmp_path / "tables1")
    from_tables = read_network(tmp_path / "tables1" / "reactions.tsv")
    assert model_fingerprint(from_tables) == model_fingerprint(original)

    write_sbml(from_tables, tmp_path / "net.xml")
    from_sbml = read_sbml(tmp_path / "net.xml")
    assert model_fingerprint(from_sbml) == model_fingerprint(original)
    # notes holding XML-special characters survive the SBML notes block
    assert from_sbml.metabolites.atp.notes["notes"] == "nucleotide & friends <check>"

    write_network(from_sbml, tmp_path / "tables2")
    again = read_network(tmp_path / "tables2" / "reactions.tsv")
    assert model_fingerprint(again) == model_fingerprint(original)
    for name in ("reactions.tsv", "compounds.tsv"):   # same text apart from the comment line
        first = (tmp_path / "tables1" / name).read_text().splitlines()[1:]
        assert (tmp_path / "tables2" / name).read_text().splitlines()[1:] == first


def test_cobra_json_and_csv_round_trips(tmp_path: Path):
    original = read_network(DATA / "reactions.tsv")
    write_cobra_json(original, tmp_path / "net.json")
    assert model_fingerprint(read_cobra_json(tmp_path / "net.json")) == model_fingerprint(original)
    save_network(original, tmp_path / "csv" / "reactions.csv")
    assert (tmp_path / "csv" / "compounds.csv").is_file()
    assert model_fingerprint(load_network(tmp_path / "csv" / "reactions.csv")) == model_fingerprint(original)
    assert model_fingerprint(load_network(tmp_path / "csv")) == model_fingerprint(original)


def _replace_line(path: Path, start: str, new: str | None) -> int:
    """Replace (or with None: duplicate) the line starting with ``start``; return its 1-based number."""
    lines = path.read_text().splitlines()
    for i, line in enumerate(lines):
        if line.startswith(start):
            if new is None:
                lines.insert(i + 1, line)
                number = i + 2
            else:
                lines[i] = new
                number = i + 1
            path.write_text("\n".join(lines) + "\n")
            return number
    raise AssertionError(f"no line starting with {start!r}")


def _convert(src: Path, dst: Path) -> None:
    """Read then write: an error in the input must leave nothing written."""
    write_network(load_network(src), dst)


@pytest.mark.parametrize(
    "file, start, new, expected",
    [
        ("reactions.tsv", "LDH\t", "LDH\tpyr + nadh + h <=> lac + nad <=> x\tL-lactate dehydrogenase",
         ["more than one arrow", "column 'equation'", "column 30"]),
        ("reactions.tsv", "LDH\t", "LDH\tpyr + nadhh + h <=> lac + nad\tL-lactate dehydrogenase",
         ["unknown compound 'nadhh'", "did you mean 'nadh'"]),
        ("reactions.tsv", "LDH\t", "LDH\tpyr + h <=> lac\tL-lactate dehydrogenase",
         ["does not balance", "charge is off", "LDH"]),
        ("reactions.tsv", "ACK\t", "ACK\tac + atp <=> actp + adp + h2o\tacetate kinase",
         ["does not balance", "O is off by +1"]),
        ("reactions.tsv", "MDH\t", None, ["reaction 'MDH' is already defined on line"]),
        ("compounds.tsv", "pyr\t", None, ["compound 'pyr' is already defined on line"]),
        ("compounds.tsv", "pyr\t", "pyr\tpyruvate\t\tC3H3O3\tminus one", ["column 'charge'", "not an integer"]),
        ("reactions.tsv", "MDH\t", "MDH\toaa + nadh + h <=> mal + nad\tx\t\t\t\t500\t-500",
         ["lower_bound 500 is above upper_bound -500", "swap"]),
        ("reactions.tsv", "id\t", "id\tformula\tname", ["missing column(s) equation"]),
    ],
)
def test_bad_input_names_file_line_and_fix(mini: Path, tmp_path: Path, file, start, new, expected):
    number = _replace_line(mini / file, start, new)
    out = tmp_path / "out"
    with pytest.raises(NetworkFileError) as info:
        _convert(mini / "reactions.tsv", out)
    message = str(info.value)
    assert f"{mini / file} line {number}" in message
    for text in expected:
        assert text in message
    assert not out.exists()


def test_balance_report_reactant_convention():
    """ATP + H2O -> ADP + Pi with the pH 7 reference species releases one H+ to the buffer
    (ATP4- + H2O -> ADP3- + HPO4 2- + H+; Alberty 2003, ch. 4); without water O and H are off."""
    model = read_network(DATA / "reactions.tsv")
    met = model.metabolites
    hydrolysis = cobra.Reaction("ATPASE")
    hydrolysis.add_metabolites({met.atp: -1, met.h2o: -1, met.adp: 1, met.pi: 1})
    broken = cobra.Reaction("BROKEN")
    broken.add_metabolites({met.atp: -1, met.adp: 1, met.pi: 1})
    model.add_reactions([hydrolysis, broken])
    frame = balance_report(model).set_index("reaction")
    assert frame.loc["ATPASE", "balanced"] and frame.loc["ATPASE", "implicit_protons"] == 1.0
    assert not frame.loc["BROKEN", "balanced"]
    assert "O:+1" in frame.loc["BROKEN", "element_residuals"]
    assert frame.drop(index=["BROKEN"])["balanced"].all()
    assert "EX_h2" not in frame.index
    with pytest.raises(UnbalancedReactionError, match="BROKEN"):
        require_balanced_network(model, "mini")


def test_unbalanced_network_can_be_read_for_inspection(mini: Path):
    _replace_line(mini / "reactions.tsv", "LDH\t", "LDH\tpyr + h <=> lac\tL-lactate dehydrogenase")
    model = read_network(mini / "reactions.tsv", require_balanced=False)
    frame = balance_report(model).set_index("reaction")
    assert not frame.loc["LDH", "balanced"]
    assert frame["balanced"].sum() == len(frame) - 1


def _bundled_tables_exist() -> bool:
    from tfa.errors import NetworkFileError
    from tfa.network.bundled import bundled_folder

    try:
        return (bundled_folder() / "reactions.tsv").is_file()
    except NetworkFileError:
        return False


@pytest.mark.skipif(not _bundled_tables_exist(), reason="models/ancestral_core/ not written yet")
def test_bundled_network_round_trips_through_sbml(tmp_path: Path):
    from tfa.network import load_bundled_network

    original = load_bundled_network()
    assert balance_report(original)["balanced"].all()
    write_sbml(original, tmp_path / "core.xml")
    write_network(read_sbml(tmp_path / "core.xml"), tmp_path / "tables")
    assert model_fingerprint(read_network(tmp_path / "tables" / "reactions.tsv")) == model_fingerprint(original)
