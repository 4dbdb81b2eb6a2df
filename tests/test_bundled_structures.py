"""Structures of the bundled network's compounds agree with the compounds table (RDKit)."""

from __future__ import annotations

import csv
from pathlib import Path

import pytest

from tfa.thermo.balance import parse_formula  # noqa: E402
from tfa.thermo.group_contribution import molecule_formula, parse_structure  # noqa: E402

COMPOUNDS = Path(__file__).resolve().parents[1] / "models" / "ancestral_core" / "compounds.tsv"


def _rows() -> list[dict]:
    if not COMPOUNDS.exists():
        pytest.skip(f"{COMPOUNDS} does not exist yet (bundled network not built)")
    with open(COMPOUNDS, newline="", encoding="utf-8") as handle:
        lines = [line for line in handle if not line.startswith("#")]  # comment lines on top
    rows = [r for r in csv.DictReader(lines, delimiter="\t") if (r.get("smiles") or "").strip()]
    if not rows:
        pytest.skip(f"{COMPOUNDS} has no 'smiles' entries yet")
    return rows


def test_every_structure_matches_formula_and_charge():
    problems = []
    for row in _rows():
        where = f"{COMPOUNDS.name}: compound {row.get('id')}"
        counts, charge = molecule_formula(parse_structure(row["smiles"], where))
        want, formula_charge = parse_formula(row["formula"], where)
        want_charge = int(float(row["charge"])) if (row.get("charge") or "").strip() else formula_charge
        if counts != want or charge != want_charge:
            problems.append(f"{row.get('id')}: SMILES gives {counts} {charge:+d}, table {want} {want_charge:+d}")
    assert not problems, "\n".join(problems)
