"""Reaction-level literature values: ΔrG'° (and ΔrH'° where known) at stated T, pH, I and pMg,
each with its source (``tfa/data/reaction_values.csv``; sources in ``literature_sources.csv``).

They serve two purposes: the data audit (:mod:`tfa.thermo.audit`) compares the species data
against them, and reactions whose compounds lack species data can take them as reaction-level
values. Values recalled from a source without the exact table entry at hand say "from memory"
in their note.
"""

from __future__ import annotations

import csv
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from pathlib import Path

from ..conditions import Conditions
from ..errors import InputError
from ..equation import parse_equation

COLUMNS = ("id", "equation", "dg0_prime_kJ", "sigma_kJ", "dh0_prime_kJ", "temperature_C", "ph",
           "ionic_strength", "pmg", "source_key", "peer_reviewed", "note")


@dataclass(frozen=True)
class ReactionValue:
    """One literature value of a transformed reaction energy.

    Attributes
    ----------
    id, equation : str
    dg0_prime : float
        ΔrG'°, kJ/mol.
    sigma : float
        Standard uncertainty of ``dg0_prime``, kJ/mol.
    dh0_prime : float or None
        ΔrH'°, kJ/mol, where known.
    temperature_C, ph, ionic_strength : float
    pmg : float or None
    source : str
        Source key (see ``literature_sources.csv``).
    peer_reviewed : bool
    note : str
    """

    id: str
    equation: str
    dg0_prime: float
    sigma: float
    dh0_prime: float | None
    temperature_C: float
    ph: float
    ionic_strength: float
    pmg: float | None
    source: str
    peer_reviewed: bool
    note: str

    @property
    def conditions(self) -> Conditions:
        """The conditions the value refers to."""
        return Conditions.from_celsius(self.temperature_C, ph=self.ph,
                                       ionic_strength=self.ionic_strength, pmg=self.pmg)

    @property
    def from_memory(self) -> bool:
        return "from memory" in self.note.lower()


def _number(text: str, where: str, column: str, optional: bool = False) -> float | None:
    text = (text or "").strip()
    if not text:
        if optional:
            return None
        raise InputError(f"{where}: column {column} is empty; give a number")
    try:
        return float(text)
    except ValueError:
        raise InputError(f"{where}: column {column} holds '{text}', not a number") from None


def read_reaction_values(path: str | Path) -> list[ReactionValue]:
    """Read a table of reaction values (columns :data:`COLUMNS`).

    Raises
    ------
    InputError
        Missing columns, unreadable numbers or equations, repeated ids (file and line named).
    """
    path = Path(path)
    with path.open(newline="", encoding="utf-8") as handle:
        reader = csv.DictReader(handle)
        missing = [c for c in COLUMNS if c not in (reader.fieldnames or [])]
        if missing:
            raise InputError(f"{path}: missing column(s) {', '.join(missing)}; expected "
                             f"{', '.join(COLUMNS)}")
        values, seen = [], set()
        for line, row in enumerate(reader, start=2):
            where = f"{path.name} line {line}"
            rid = (row["id"] or "").strip()
            if not rid or rid in seen:
                raise InputError(f"{where}: id '{rid}' is empty or repeated; give each row its own id")
            seen.add(rid)
            parse_equation(row["equation"], where=where)
            flag = (row["peer_reviewed"] or "").strip().lower()
            if flag not in ("yes", "no"):
                raise InputError(f"{where}: peer_reviewed is '{row['peer_reviewed']}'; write yes or no")
            values.append(ReactionValue(
                id=rid, equation=row["equation"].strip(),
                dg0_prime=_number(row["dg0_prime_kJ"], where, "dg0_prime_kJ"),
                sigma=_number(row["sigma_kJ"], where, "sigma_kJ"),
                dh0_prime=_number(row["dh0_prime_kJ"], where, "dh0_prime_kJ", optional=True),
                temperature_C=_number(row["temperature_C"], where, "temperature_C"),
                ph=_number(row["ph"], where, "ph"),
                ionic_strength=_number(row["ionic_strength"], where, "ionic_strength"),
                pmg=_number(row["pmg"], where, "pmg", optional=True),
                source=(row["source_key"] or "").strip(), peer_reviewed=flag == "yes",
                note=(row["note"] or "").strip()))
    return values


@lru_cache(maxsize=1)
def load_reaction_values() -> tuple[ReactionValue, ...]:
    """The bundled literature values of ``tfa/data/reaction_values.csv``."""
    with resources.as_file(resources.files("tfa.data") / "reaction_values.csv") as path:
        return tuple(read_reaction_values(path))
