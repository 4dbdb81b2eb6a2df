"""Reaction-level literature values: ΔrG'° (and ΔrH'° where known) at stated T, pH, I and pMg,
each with its source (``tfa/data/reaction_values.csv``; sources in ``literature_sources.csv``).

They serve two purposes: the data audit (:mod:`tfa.thermo.audit`) compares the species data
against them, and compounds without species data (acetyl-CoA, the THF carriers, the sugar
phosphates, ...) take their energies from them (:mod:`tfa.thermo.library`).

Every value states the conditions of its measurement: temperature, pH, ionic strength and pMg
(``none``: measured, or taken, without Mg2+). Column ``basis`` says how far it was checked:
``checked`` (against the printed source), ``from memory`` (recalled, not checked against the
printed table) or ``common practice`` (a rule of thumb or an analogy, no measurement of its
own); without the column, a note that says "from memory" or "common practice" decides. Column
``anchors`` names the reactants of the species table that the table's generator re-anchored to
this value (``scripts/make_species_table.py``): such a value is no independent check of them.
"""

from __future__ import annotations

import csv
import logging
import math
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from pathlib import Path

import pandas as pd

from ..conditions import Conditions
from ..constants import T_REF
from ..errors import InputError
from ..equation import parse_equation

logger = logging.getLogger(__name__)

COLUMNS = ("id", "equation", "delta_g_standard_kJ_per_mol", "sigma_kJ_per_mol",
           "delta_h_standard_kJ_per_mol", "temperature_C", "ph", "ionic_strength", "pmg",
           "source_key", "peer_reviewed", "note")
#: Older spellings of the value columns, still read (with a warning) for one release.
OLD_COLUMN_NAMES = {"dg0_prime_kJ": "delta_g_standard_kJ_per_mol", "sigma_kJ": "sigma_kJ_per_mol",
                    "dh0_prime_kJ": "delta_h_standard_kJ_per_mol"}


def renamed_columns(names: list[str], where: str) -> list[str]:
    """A header with the old spellings of :data:`OLD_COLUMN_NAMES` replaced (logged once).

    >>> renamed_columns(["id", "dg0_prime_kJ"], "values.tsv")
    ['id', 'delta_g_standard_kJ_per_mol']
    """
    old = [n for n in names if n in OLD_COLUMN_NAMES]
    if old:
        logger.warning("%s: column(s) %s are old spellings; rename them to %s", where,
                       ", ".join(old), ", ".join(OLD_COLUMN_NAMES[n] for n in old))
    return [OLD_COLUMN_NAMES.get(n, n) for n in names]
#: Optional columns (the bundled table has both).
OPTIONAL_COLUMNS = ("basis", "anchors")
#: How a value was checked, strongest first.
BASES = ("checked", "from memory", "common practice")
#: Words of the ``pmg`` column meaning "no Mg2+" (an empty cell means the same).
NO_MAGNESIUM = ("", "none", "no", "no mg", "inf")


def value_basis(note: str, given: str = "") -> str:
    """The basis of a value: ``given`` when it is one of :data:`BASES`, else read from the note.

    >>> value_basis("K about 3 (NIST compilation; from memory)"), value_basis("", "checked")
    ('from memory', 'checked')
    >>> value_basis("taken equal to its homologue: common practice")
    'common practice'
    """
    given = (given or "").strip().lower()
    if given:
        if given not in BASES:
            raise InputError(f"basis '{given}' unknown; write one of {', '.join(BASES)}")
        return given
    text = (note or "").lower()
    if "common practice" in text:
        return "common practice"
    if "from memory" in text:
        return "from memory"
    return "checked"


def parse_pmg(text: str, where: str) -> float | None:
    """pMg of a reaction-value row: a number, or ``none`` (empty) for no Mg2+.

    >>> parse_pmg("3", "x"), parse_pmg("none", "x")
    (3.0, None)
    """
    text = str(text or "").strip()
    if text.lower() in NO_MAGNESIUM:
        return None
    try:
        return float(text)
    except ValueError:
        raise InputError(f"{where}: column pmg holds '{text}'; give a number or 'none' "
                         "(measured without Mg2+)") from None


@dataclass(frozen=True)
class ReactionValue:
    """One literature value of a transformed reaction energy.

    Attributes
    ----------
    id, equation : str
    delta_g_standard : float
        ΔrG'°, kJ/mol.
    sigma : float
        Standard uncertainty of ``delta_g_standard``, kJ/mol.
    delta_h_standard : float or None
        ΔrH'°, kJ/mol, where known.
    temperature_C, ph, ionic_strength : float
    pmg : float or None
        pMg of the measurement; None: no Mg2+.
    source : str
        Source key (see ``literature_sources.csv``).
    peer_reviewed : bool
    note : str
    basis : str
        One of :data:`BASES`.
    anchors : tuple of str
        Reactants of the species table re-anchored to this value.
    """

    id: str
    equation: str
    delta_g_standard: float
    sigma: float
    delta_h_standard: float | None
    temperature_C: float
    ph: float
    ionic_strength: float
    pmg: float | None
    source: str
    peer_reviewed: bool
    note: str
    basis: str = "checked"
    anchors: tuple[str, ...] = ()

    @property
    def conditions(self) -> Conditions:
        """The conditions the value refers to."""
        return Conditions.from_celsius(self.temperature_C, ph=self.ph,
                                       ionic_strength=self.ionic_strength, pmg=self.pmg)

    @property
    def from_memory(self) -> bool:
        """True when the value is recalled, not checked against its printed source."""
        return self.basis == "from memory"


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
        reader.fieldnames = renamed_columns(list(reader.fieldnames or []), str(path))
        missing = [c for c in COLUMNS if c not in reader.fieldnames]
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
                delta_g_standard=_number(row["delta_g_standard_kJ_per_mol"], where,
                                         "delta_g_standard_kJ_per_mol"),
                sigma=_number(row["sigma_kJ_per_mol"], where, "sigma_kJ_per_mol"),
                delta_h_standard=_number(row["delta_h_standard_kJ_per_mol"], where,
                                         "delta_h_standard_kJ_per_mol", optional=True),
                temperature_C=_number(row["temperature_C"], where, "temperature_C"),
                ph=_number(row["ph"], where, "ph"),
                ionic_strength=_number(row["ionic_strength"], where, "ionic_strength"),
                pmg=parse_pmg(row["pmg"], where),
                source=(row["source_key"] or "").strip(), peer_reviewed=flag == "yes",
                note=(row["note"] or "").strip(),
                basis=value_basis(row.get("note") or "", row.get("basis") or ""),
                anchors=tuple(a.strip() for a in (row.get("anchors") or "").split(";") if a.strip())))
    return values


@lru_cache(maxsize=1)
def load_reaction_values() -> tuple[ReactionValue, ...]:
    """The bundled literature values of ``tfa/data/reaction_values.csv``."""
    with resources.as_file(resources.files("tfa.data") / "reaction_values.csv") as path:
        return tuple(read_reaction_values(path))


@dataclass(frozen=True)
class LiteratureValue:
    """One reaction-level literature value.

    Attributes
    ----------
    id : str
        Identifier of the value (e.g. ``lit_citrate_lyase``).
    stoichiometry : dict
        Compound id -> net coefficient (negative consumed).
    delta_g_standard : float
        ΔrG'°, kJ/mol, at ``conditions``.
    sigma : float
        Standard uncertainty of ``delta_g_standard``, kJ/mol (> 0).
    conditions : Conditions
        Temperature, pH, ionic strength (and pMg) the value refers to.
    delta_h_standard : float or None
        ΔrH'°, kJ/mol, when the source gives it.
    source_key : str
        Key of the source in the sources table.
    peer_reviewed : bool
        Whether the source is peer reviewed.
    note : str
        Free text.
    basis : str
        ``checked``, ``from memory`` or ``common practice`` (:data:`tfa.thermo.literature.BASES`).
    """

    id: str
    stoichiometry: dict[str, float]
    delta_g_standard: float
    sigma: float
    conditions: Conditions
    delta_h_standard: float | None = None
    source_key: str = ""
    peer_reviewed: bool = True
    note: str = ""
    basis: str = "checked"

    def __post_init__(self) -> None:
        if not (math.isfinite(self.delta_g_standard) and math.isfinite(self.sigma) and self.sigma > 0):
            raise InputError(
                f"literature value {self.id}: ΔrG'° {self.delta_g_standard} and σ {self.sigma} must be finite "
                "numbers with σ > 0 kJ/mol; give the standard uncertainty of the value"
            )

    def at_reference_temperature(self) -> float:
        """ΔrG'° carried to 298.15 K, kJ/mol.

        Equation (Gibbs-Helmholtz with constant ΔrH'°, Alberty 2003, eq. 3.2-7 in integrated form):
        ΔrG'°(T2) = ΔrG'°(T1)·T2/T1 + ΔrH'°·(1 − T2/T1); without ΔrH'° the value is taken as
        independent of temperature (ΔrS'° = 0).

        Examples
        --------
        A value of −10 kJ/mol at 310.15 K with ΔrH'° = +20 kJ/mol (ΔrS'° = +96.7 J/mol/K) is
        −8.84 kJ/mol at 298.15 K: −10·298.15/310.15 + 20·(1 − 298.15/310.15).

        >>> v = LiteratureValue("x", {"a": -1, "b": 1}, -10.0, 1.0,
        ...                     Conditions.from_celsius(37.0), delta_h_standard=20.0)
        >>> round(v.at_reference_temperature(), 2)
        -8.84
        """
        t1 = self.conditions.temperature
        if self.delta_h_standard is None or abs(t1 - T_REF) < 1e-9:
            return self.delta_g_standard
        ratio = T_REF / t1
        return self.delta_g_standard * ratio + self.delta_h_standard * (1.0 - ratio)

    def entropy(self) -> float:
        """ΔrS'°, kJ/mol/K: (ΔrH'° − ΔrG'°)/T when ΔrH'° is given, else 0 (the approximation)."""
        if self.delta_h_standard is None:
            return 0.0
        return (self.delta_h_standard - self.delta_g_standard) / self.conditions.temperature


def read_literature_values(path, where: str | None = None) -> list[LiteratureValue]:
    """Read a reaction-values table (TSV or CSV, ``#`` comment lines allowed).

    Columns: ``id, equation, delta_g_standard_kJ_per_mol, sigma_kJ_per_mol,
    delta_h_standard_kJ_per_mol, temperature_C, ph, ionic_strength, pmg, source_key,
    peer_reviewed, note`` (the old spellings of :data:`tfa.thermo.literature.OLD_COLUMN_NAMES`
    are read with a warning). Equations use the grammar of :mod:`tfa.equation`. Errors name the
    file and line.
    """
    from io import StringIO

    from ..util.files import read_input_text

    where = where or str(path)
    sep = "\t" if str(path).endswith(".tsv") else ","
    text = read_input_text(path, "reaction-values table")   # a regular file; BOM accepted
    lines = text.splitlines()
    comment_lines = 0
    while comment_lines < len(lines) and lines[comment_lines].lstrip().startswith("#"):
        comment_lines += 1
    try:
        frame = pd.read_csv(StringIO(text), sep=sep, skiprows=comment_lines, dtype=str,
                            keep_default_na=False)
    except (pd.errors.ParserError, pd.errors.EmptyDataError) as err:
        raise InputError(f"{where}: cannot read the reaction-values table ({err})") from err
    frame.columns = renamed_columns([str(c) for c in frame.columns], where)
    required = ["id", "equation", "delta_g_standard_kJ_per_mol", "sigma_kJ_per_mol",
                "temperature_C", "ph", "ionic_strength"]
    missing = [c for c in required if c not in frame.columns]
    if missing:
        raise InputError(f"{where}: missing column(s) {', '.join(missing)}; the header must hold "
                         "id, equation, delta_g_standard_kJ_per_mol, sigma_kJ_per_mol, "
                         "delta_h_standard_kJ_per_mol, temperature_C, ph, ionic_strength, pmg, "
                         "source_key, peer_reviewed, note")
    out = []
    for i, row in frame.iterrows():
        line = f"{where} line {i + 2 + comment_lines}"

        def number(column: str, optional: bool = False) -> float | None:
            text = str(row.get(column, "")).strip()
            if not text:
                if optional:
                    return None
                raise InputError(f"{line}: column {column} is empty; give a number")
            try:
                float(text)
            except ValueError:
                raise InputError(f"{line}: column {column} holds '{text}', not a number") from None
            from ..util.numbers import read_number

            return read_number(text, f"column {column}", line)

        eq = parse_equation(row["equation"], where=line)
        conditions = Conditions.from_celsius(number("temperature_C"), ph=number("ph"),
                                             ionic_strength=number("ionic_strength"),
                                             pmg=parse_pmg(row.get("pmg", ""), line))
        reviewed = str(row.get("peer_reviewed", "yes")).strip().lower() not in ("no", "false", "0", "n")
        note = str(row.get("note", "")).strip()
        out.append(LiteratureValue(
            id=str(row["id"]).strip(), stoichiometry=eq.stoichiometry(),
            delta_g_standard=number("delta_g_standard_kJ_per_mol"),
            sigma=number("sigma_kJ_per_mol"), conditions=conditions,
            delta_h_standard=number("delta_h_standard_kJ_per_mol", optional=True),
            source_key=str(row.get("source_key", "")).strip(), peer_reviewed=reviewed,
            note=note, basis=value_basis(note, str(row.get("basis", "")))))
    return out
