"""Read and write networks as two plain tables: reactions and compounds (CSV or TSV).

Files
-----
``reactions.tsv`` columns (in this order when written)::

    id  equation  name  ec  pathway  energy_source  lower_bound  upper_bound  notes

``compounds.tsv`` columns::

    id  name  synonyms  formula  charge  thermo_key  conc_min  conc_max  role  smiles  compartment  notes

Tab-separated for ``.tsv``/``.tab``/``.txt``, comma-separated for ``.csv``. Lines whose first
non-blank character is ``#`` are comments; blank lines are skipped; line numbers in messages are
those of the file. Equations use the grammar of :mod:`tfa.equation` (``<=>`` reversible, ``->``
irreversible, one empty side for boundary reactions), over compound ids.

Where each column goes in the :class:`cobra.Model` (compartment ``c``, the cell, unless the
optional ``compartment`` column names another: e.g. ``out`` for the fluid outside the cell,
whose pH and membrane potential the environment gives):

- compound: ``id``, ``name``, ``formula`` (without a charge suffix), ``charge``; ``notes`` keys
  ``synonyms``, ``thermo_key``, ``conc_min``, ``conc_max``, ``role``, ``smiles``, ``notes``
  (only non-empty cells).
- reaction: ``id``, ``name``, bounds (from the arrow unless given: -1000/1000 or 0/1000),
  ``subsystem`` = pathway; ``notes`` keys ``name``, ``ec``, ``pathway``, ``energy_source``
  (``auto`` when empty), ``notes``; ``annotation['ec-code']`` = list of EC numbers.

Every reaction that is not a boundary reaction must balance (element and charge, reactant
convention of Alberty 2003, see :mod:`tfa.thermo.balance`) unless ``require_balanced=False``.
"""

from __future__ import annotations

import csv
import difflib
import io
import logging
import math
import re
from dataclasses import dataclass
from pathlib import Path

import cobra

from ..equation import format_equation, parse_equation
from ..errors import InputError, NetworkFileError
from ..thermo.balance import check_balance, parse_formula
from ..util.files import read_input_text, write_text
from ..util.numbers import MAX_ACTIVITY, MAX_FLUX, MIN_ACTIVITY, read_number
from .roles import parse_role

logger = logging.getLogger(__name__)

REACTION_COLUMNS = ("id", "equation", "name", "ec", "pathway", "energy_source", "lower_bound",
                    "upper_bound", "notes")
COMPOUND_COLUMNS = ("id", "name", "synonyms", "formula", "charge", "thermo_key", "conc_min",
                    "conc_max", "role", "smiles", "compartment", "notes")
REQUIRED_REACTION_COLUMNS = ("id", "equation")
REQUIRED_COMPOUND_COLUMNS = ("id", "formula", "charge")
#: Compound notes kept from the compounds table, in column order.
COMPOUND_NOTE_KEYS = ("synonyms", "thermo_key", "conc_min", "conc_max", "role", "smiles", "notes")
#: Reaction notes kept from the reactions table.
REACTION_NOTE_KEYS = ("name", "ec", "pathway", "energy_source", "notes")
#: The one compartment of a table network.
COMPARTMENT = "c"
#: Flux bound used for "unbounded" (flux units of the network).
DEFAULT_FLUX_BOUND = 1000.0
#: Longest line of a table, characters (a SMILES or a note rarely passes 1,000).
MAX_CELL_CHARS = 20_000

_ID_RE = re.compile(r"^[A-Za-z0-9_]+$")
_EC_RE = re.compile(r"^\d+\.(\d+|-)\.(\d+|-)\.(n?\d+|-)$")


@dataclass(frozen=True)
class TableRow:
    """One data row of a table: its 1-based line number in the file and its cells by column."""

    line: int
    cells: dict[str, str]


def delimiter_for(path: Path) -> str:
    """Tab for ``.tsv``/``.tab``/``.txt``, comma for ``.csv``; anything else is an error."""
    suffix = path.suffix.lower()
    if suffix in (".tsv", ".tab", ".txt"):
        return "\t"
    if suffix == ".csv":
        return ","
    raise NetworkFileError(f"{path}: unknown table format '{suffix}'; name the file .tsv (tab) or .csv (comma)")


def read_table(path: str | Path, required: tuple[str, ...], known: tuple[str, ...]) -> list[TableRow]:
    """Read a CSV/TSV table with ``#`` comment lines; check the header.

    Raises
    ------
    NetworkFileError
        Missing file, no header, a missing required column, a repeated column, a row with more
        cells than the header.
    """
    path = Path(path)
    if not path.exists():
        raise NetworkFileError(f"{path}: no such file; give the path of an existing table")
    delimiter = delimiter_for(path)
    try:
        text = read_input_text(path, "table")
    except InputError as exc:
        raise NetworkFileError(str(exc)) from None
    header: list[str] | None = None
    rows: list[TableRow] = []
    for number, raw in enumerate(text.splitlines(), start=1):
        if not raw.strip() or raw.lstrip().startswith("#"):
            continue
        if len(raw) > MAX_CELL_CHARS:
            raise NetworkFileError(f"{path} line {number}: the line has {len(raw):,} characters, more "
                                   f"than the {MAX_CELL_CHARS:,} a table line may have; shorten it")
        try:
            cells = next(csv.reader([raw], delimiter=delimiter))
        except (csv.Error, StopIteration) as exc:
            raise NetworkFileError(f"{path} line {number}: cannot be read as a table line ({exc}); "
                                   "check the quotes") from None
        if header is None:
            header = [c.strip().lower() for c in cells]
            missing = [c for c in required if c not in header]
            if missing:
                raise NetworkFileError(
                    f"{path} line {number}: missing column(s) {', '.join(missing)}; the header must "
                    f"name the columns, e.g. {_join(known, delimiter)}"
                )
            repeated = sorted({c for c in header if header.count(c) > 1 and c})
            if repeated:
                raise NetworkFileError(f"{path} line {number}: column(s) {', '.join(repeated)} appear twice; keep one")
            unknown = [c for c in header if c and c not in known]
            if unknown:
                logger.warning("%s: extra column(s) %s kept in notes", path, ", ".join(unknown))
            continue
        if len(cells) > len(header):
            extra = [c for c in cells[len(header):] if c.strip()]
            if extra:
                raise NetworkFileError(
                    f"{path} line {number}: {len(cells)} cells but the header has {len(header)} columns; "
                    "remove the extra cells or quote a cell that contains the separator"
                )
        row = {name: (cells[i].strip() if i < len(cells) else "") for i, name in enumerate(header) if name}
        rows.append(TableRow(number, row))
    if header is None:
        raise NetworkFileError(f"{path}: the table is empty; give a header line and one row per entry")
    return rows


def _join(columns: tuple[str, ...], delimiter: str) -> str:
    return "'" + ("<TAB>" if delimiter == "\t" else ",").join(columns) + "'"


def _number(text: str, where: str, column: str, integer: bool = False,
            **bounds: float) -> float | None:
    if text == "":
        return None
    try:
        return float(read_number(text, f"column '{column}'", where, integer=integer, **bounds))
    except InputError as exc:
        raise NetworkFileError(f"{exc} (or leave the cell empty)") from None


def default_compounds_path(reactions_path: Path) -> Path:
    """``compounds.tsv`` or ``compounds.csv`` beside the reactions file (the one that exists)."""
    folder = reactions_path.parent
    preferred = ".csv" if reactions_path.suffix.lower() == ".csv" else ".tsv"
    for suffix in (preferred, ".tsv", ".csv"):
        candidate = folder / f"compounds{suffix}"
        if candidate.is_file():
            return candidate
    raise NetworkFileError(
        f"{reactions_path}: no compounds table beside it ({folder / 'compounds.tsv'} or .csv); "
        "write one or give its path"
    )


def read_compounds(path: str | Path) -> list[cobra.Metabolite]:
    """Read a compounds table into metabolites (compartment ``c``), checking every cell."""
    path = Path(path)
    rows = read_table(path, REQUIRED_COMPOUND_COLUMNS, COMPOUND_COLUMNS)
    seen: dict[str, int] = {}
    metabolites: list[cobra.Metabolite] = []
    for row in rows:
        where = f"{path} line {row.line}"
        cells = row.cells
        cid = cells.get("id", "")
        if not cid:
            raise NetworkFileError(f"{where}, column 'id': empty id; give every compound an id")
        if not _ID_RE.match(cid):
            raise NetworkFileError(
                f"{where}, column 'id': '{cid}' is not a valid id; use letters, digits and '_' only "
                "(e.g. 'pyr', 'nadh', 'co2')"
            )
        if cid in seen:
            raise NetworkFileError(
                f"{where}, column 'id': compound '{cid}' is already defined on line {seen[cid]}; give "
                "each compound one row (rename or merge the duplicate)"
            )
        seen[cid] = row.line
        formula = cells.get("formula", "")
        if not formula:
            raise NetworkFileError(
                f"{where}, column 'formula': compound '{cid}' has no formula; give the formula of its "
                "reference species (pseudo-elements such as 'Fd' are allowed for carriers)"
            )
        try:
            counts, suffix_charge = parse_formula(formula, where=f"{where}, column 'formula'")
        except InputError as exc:
            raise NetworkFileError(str(exc)) from exc
        has_suffix = bool(re.search(r"[+-]\d*$", formula))
        charge_value = _number(cells.get("charge", ""), where, "charge", integer=True,
                               minimum=-100, maximum=100)
        if charge_value is None:
            if not has_suffix:
                raise NetworkFileError(
                    f"{where}, column 'charge': compound '{cid}' has no charge; write its charge "
                    "(0 for neutral compounds)"
                )
            charge_value = suffix_charge
        elif has_suffix and int(charge_value) != suffix_charge:
            raise NetworkFileError(
                f"{where}: formula '{formula}' says charge {suffix_charge:+d} but column 'charge' says "
                f"{int(charge_value):+d}; make them agree"
            )
        plain_formula = re.sub(r"[+-]\d*$", "", formula) if has_suffix else formula
        conc = {}
        for column in ("conc_min", "conc_max"):
            value = _number(cells.get(column, ""), where, column, maximum=MAX_ACTIVITY)
            if value is not None and value < MIN_ACTIVITY:
                raise NetworkFileError(
                    f"{where}, column '{column}': {cells[column]} is not a concentration; give a value "
                    f">= {MIN_ACTIVITY:g} in mol/L (gases: bar) or leave it empty for the "
                    "environment's default"
                )
            conc[column] = value
        if conc["conc_min"] is not None and conc["conc_max"] is not None and conc["conc_min"] > conc["conc_max"]:
            raise NetworkFileError(
                f"{where}: conc_min {cells['conc_min']} is above conc_max {cells['conc_max']}; swap them"
            )
        try:
            parse_role(cells.get("role", ""), where=f"{where}, column 'role'")
        except InputError as exc:
            raise NetworkFileError(str(exc)) from exc
        compartment = cells.get("compartment", "") or COMPARTMENT
        if not _ID_RE.match(compartment):
            raise NetworkFileError(
                f"{where}, column 'compartment': '{compartment}' is not a compartment id; use "
                f"letters, digits and '_' (e.g. 'c' for the cell, 'out' for the outer fluid) or "
                "leave it empty for the cell")
        met = cobra.Metabolite(cid, formula=plain_formula, name=cells.get("name", "") or cid,
                               charge=int(charge_value), compartment=compartment)
        notes = {key: cells[key] for key in COMPOUND_NOTE_KEYS if cells.get(key)}
        notes.update({k: v for k, v in cells.items() if k not in COMPOUND_COLUMNS and v})
        met.notes = notes
        metabolites.append(met)
    if not metabolites:
        raise NetworkFileError(f"{path}: no compounds; give one row per compound")
    return metabolites


def _close_matches(name: str, metabolites: list[cobra.Metabolite]) -> list[str]:
    """Ids of compounds whose id, name or synonym is close to ``name``."""
    lookup: dict[str, str] = {}
    for met in metabolites:
        lookup.setdefault(met.id.lower(), met.id)
        if met.name:
            lookup.setdefault(met.name.lower(), met.id)
        for synonym in (met.notes.get("synonyms") or "").split(";"):
            if synonym.strip():
                lookup.setdefault(synonym.strip().lower(), met.id)
    if name.lower() in lookup:
        return [lookup[name.lower()]]
    found: list[str] = []
    for key in difflib.get_close_matches(name.lower(), list(lookup), n=6, cutoff=0.6):
        if lookup[key] not in found:
            found.append(lookup[key])
    return found[:3]


def read_network(reactions_path: str | Path, compounds_path: str | Path | None = None,
                 require_balanced: bool = True, model_id: str | None = None) -> cobra.Model:
    """Read a network from a reactions table and a compounds table.

    Parameters
    ----------
    reactions_path : str or Path
        The reactions table (``.tsv`` or ``.csv``).
    compounds_path : str or Path, optional
        The compounds table; default ``compounds.tsv`` (or ``.csv``) beside the reactions table.
    require_balanced : bool
        Raise when an internal reaction does not balance (default). With ``False`` the network is
        read anyway; :func:`tfa.network.checks.balance_report` lists what is off.
    model_id : str, optional
        Id of the model; default the name of the folder of the reactions table.

    Returns
    -------
    cobra.Model

    Raises
    ------
    NetworkFileError
        Naming the file, the line, the column and how to fix it: missing column, malformed
        equation, unknown compound (with close matches), duplicated id, bad number, lower bound
        above upper bound, unbalanced reaction.
    """
    reactions_path = Path(reactions_path)
    compounds_path = Path(compounds_path) if compounds_path else default_compounds_path(reactions_path)
    metabolites = read_compounds(compounds_path)
    by_id = {m.id: m for m in metabolites}
    formulas = {m.id: (parse_formula(m.formula)[0], int(m.charge)) for m in metabolites}
    rows = read_table(reactions_path, REQUIRED_REACTION_COLUMNS, REACTION_COLUMNS)
    seen: dict[str, int] = {}
    reactions: list[cobra.Reaction] = []
    for row in rows:
        where = f"{reactions_path} line {row.line}"
        cells = row.cells
        rid = cells.get("id", "")
        if not rid:
            raise NetworkFileError(f"{where}, column 'id': empty id; give every reaction an id")
        if not _ID_RE.match(rid):
            raise NetworkFileError(
                f"{where}, column 'id': '{rid}' is not a valid id; use letters, digits and '_' only "
                "(e.g. 'PFOR', 'EX_h2')"
            )
        if rid in seen:
            raise NetworkFileError(
                f"{where}, column 'id': reaction '{rid}' is already defined on line {seen[rid]}; give "
                "each reaction its own id"
            )
        if rid in by_id:
            raise NetworkFileError(
                f"{where}, column 'id': '{rid}' is also a compound id; give the reaction another id"
            )
        seen[rid] = row.line
        try:
            parsed = parse_equation(cells.get("equation", ""), where=f"{where}, column 'equation'",
                                    allow_empty_side=True)
        except InputError as exc:
            raise NetworkFileError(str(exc)) from exc
        for term in parsed.reactants + parsed.products:
            if term.name not in by_id:
                matches = _close_matches(term.name, metabolites)
                hint = (f"did you mean {', '.join(repr(m) for m in matches)}?" if matches
                        else f"add it to {compounds_path.name}")
                raise NetworkFileError(
                    f"{where}, column 'equation', character {term.column}: unknown compound "
                    f"'{term.name}' (not an id in {compounds_path.name}); {hint}"
                )
        stoichiometry = parsed.stoichiometry()
        if not stoichiometry:
            raise NetworkFileError(f"{where}, column 'equation': '{parsed.text}' cancels to nothing; "
                                   "remove the reaction or fix the coefficients")
        boundary = not parsed.reactants or not parsed.products
        if require_balanced and not boundary:
            report = check_balance(stoichiometry, formulas)
            if not report.ok:
                raise NetworkFileError(
                    f"{where}: reaction '{rid}' ({parsed.text}) does not balance: {report.message}. Fix "
                    "the coefficients, add the missing compound (H2O, H+, a carrier) or correct a "
                    "formula in the compounds table"
                )
        lower = _number(cells.get("lower_bound", ""), where, "lower_bound", minimum=-MAX_FLUX,
                        maximum=MAX_FLUX)
        upper = _number(cells.get("upper_bound", ""), where, "upper_bound", minimum=-MAX_FLUX,
                        maximum=MAX_FLUX)
        if lower is None:
            lower = -DEFAULT_FLUX_BOUND if parsed.reversible else 0.0
        elif not parsed.reversible and lower < 0:
            raise NetworkFileError(
                f"{where}, column 'lower_bound': {cells['lower_bound']} lets the irreversible reaction "
                f"'{rid}' ('->') run backwards; use '<=>' or a lower bound >= 0"
            )
        if upper is None:
            upper = DEFAULT_FLUX_BOUND
        if lower > upper:
            raise NetworkFileError(
                f"{where}: lower_bound {lower:g} is above upper_bound {upper:g}; swap them"
            )
        ecs = [e.strip() for e in cells.get("ec", "").split(";") if e.strip()]
        for ec in ecs:
            if not _EC_RE.match(ec):
                raise NetworkFileError(
                    f"{where}, column 'ec': '{ec}' is not an EC number; write e.g. '1.2.7.1' (use '-' "
                    "for unknown digits, ';' between several numbers) or leave it empty"
                )
        reaction = cobra.Reaction(rid, name=cells.get("name", ""), subsystem=cells.get("pathway", ""),
                                  lower_bound=lower, upper_bound=upper)
        notes = {key: cells[key] for key in REACTION_NOTE_KEYS if cells.get(key)}
        if ecs:
            notes["ec"] = ";".join(ecs)
        notes["energy_source"] = cells.get("energy_source") or "auto"
        notes.update({k: v for k, v in cells.items() if k not in REACTION_COLUMNS and v})
        reaction.notes = notes
        if ecs:
            reaction.annotation["ec-code"] = list(ecs)
        reaction.add_metabolites({by_id[k]: v for k, v in stoichiometry.items()})
        reactions.append(reaction)
    if not reactions:
        raise NetworkFileError(f"{reactions_path}: no reactions; give one row per reaction")
    model = cobra.Model(model_id or _safe_id(reactions_path.resolve().parent.name or "network"))
    model.compartments = {COMPARTMENT: "cell", **{m.compartment: m.compartment for m in metabolites
                                                   if m.compartment != COMPARTMENT}}
    model.add_metabolites(metabolites)
    model.add_reactions(reactions)
    model.notes["reactions_path"] = str(reactions_path)   # where errors found later point to
    model.notes["compounds_path"] = str(compounds_path)
    literature = reaction_values_beside(reactions_path)
    if literature is not None:
        model.notes["reaction_values_path"] = str(literature)
    logger.info("read %d reactions and %d compounds from %s", len(reactions), len(metabolites), reactions_path)
    return model


def reaction_values_beside(reactions_path: str | Path) -> Path | None:
    """``reaction_values.tsv`` (or ``.csv``) in the folder of a reactions table, if present."""
    folder = Path(reactions_path).parent
    for name in ("reaction_values.tsv", "reaction_values.csv"):
        if (folder / name).is_file():
            return folder / name
    return None


def _safe_id(text: str) -> str:
    cleaned = re.sub(r"\W", "_", text)
    return cleaned if cleaned and not cleaned[0].isdigit() else f"net_{cleaned}"


def _clean_cell(value) -> str:
    if value is None:
        return ""
    if isinstance(value, float):
        if math.isnan(value):
            return ""
        return f"{value:g}" if value == int(value) else repr(value)
    return re.sub(r"[\t\r\n]+", " ", str(value))


def reaction_equation(reaction: cobra.Reaction) -> str:
    """The equation of a reaction over metabolite ids; ``->`` when it can only run forward.

    >>> r = cobra.Reaction("R1", lower_bound=0)
    >>> r.add_metabolites({cobra.Metabolite("a"): -1, cobra.Metabolite("b"): 2})
    >>> reaction_equation(r)
    'a -> 2 b'
    """
    arrow = "->" if reaction.lower_bound >= 0 and reaction.upper_bound > 0 else "<=>"
    return format_equation({m.id: c for m, c in reaction.metabolites.items()}, arrow)


def _format_bound(value: float) -> str:
    return f"{value:g}" if value == int(value) else repr(float(value))


def write_network(model: cobra.Model, folder: str | Path, fmt: str = "tsv") -> tuple[Path, Path]:
    """Write ``reactions.<fmt>`` and ``compounds.<fmt>`` into ``folder`` (atomically, each file).

    Every note written by :func:`read_network` goes back into its column, so a round trip keeps
    stoichiometry, bounds, names, formulas, charges and notes. Bounds are written only where
    they differ from what the arrow implies.

    Returns
    -------
    (reactions path, compounds path)
    """
    if fmt not in ("tsv", "csv"):
        raise InputError(f"table format '{fmt}' is not known; use 'tsv' or 'csv'")
    folder = Path(folder)
    delimiter = "\t" if fmt == "tsv" else ","
    cell = next((c for c in ("c",) if any(m.compartment == c for m in model.metabolites)),
                None)

    extra_met = _extra_keys((m.notes for m in model.metabolites), COMPOUND_COLUMNS)
    met_rows = [list(COMPOUND_COLUMNS) + extra_met]
    for met in model.metabolites:
        notes = met.notes or {}
        row = {"id": met.id, "name": met.name if met.name != met.id else "",
               "formula": met.formula or "", "charge": "" if met.charge is None else _format_bound(float(met.charge))}
        for key in COMPOUND_NOTE_KEYS:
            row[key] = notes.get(key, "")
        row["compartment"] = "" if met.compartment in (None, "", cell) else met.compartment
        for key in extra_met:
            row[key] = notes.get(key, "")
        met_rows.append([_clean_cell(row.get(c, "")) for c in met_rows[0]])

    extra_rxn = _extra_keys((r.notes for r in model.reactions), REACTION_COLUMNS)
    rxn_rows = [list(REACTION_COLUMNS) + extra_rxn]
    for reaction in model.reactions:
        notes = reaction.notes or {}
        equation = reaction_equation(reaction)
        forward_only = equation.find("->") >= 0 and "<=>" not in equation
        default_lower = 0.0 if forward_only else -DEFAULT_FLUX_BOUND
        ec = notes.get("ec") or _ec_from_annotation(reaction)
        row = {
            "id": reaction.id, "equation": equation, "name": reaction.name or "", "ec": ec,
            "pathway": notes.get("pathway") or reaction.subsystem or "",
            "energy_source": notes.get("energy_source", "auto"),
            "lower_bound": "" if reaction.lower_bound == default_lower else _format_bound(reaction.lower_bound),
            "upper_bound": "" if reaction.upper_bound == DEFAULT_FLUX_BOUND else _format_bound(reaction.upper_bound),
            "notes": notes.get("notes", ""),
        }
        for key in extra_rxn:
            row[key] = notes.get(key, "")
        rxn_rows.append([_clean_cell(row.get(c, "")) for c in rxn_rows[0]])

    reactions_path = folder / f"reactions.{fmt}"
    compounds_path = folder / f"compounds.{fmt}"
    write_text(compounds_path, _render(met_rows, delimiter, f"# compounds of network {model.id}"))
    write_text(reactions_path, _render(rxn_rows, delimiter, f"# reactions of network {model.id}"))
    logger.info("wrote %s and %s", reactions_path, compounds_path)
    return reactions_path, compounds_path


def _extra_keys(notes_iter, columns: tuple[str, ...]) -> list[str]:
    """Note keys that are not standard columns (kept as extra columns), in first-seen order."""
    own = set(columns) | set(COMPOUND_NOTE_KEYS) | set(REACTION_NOTE_KEYS)
    extra: list[str] = []
    for notes in notes_iter:
        for key in (notes or {}):
            if key not in own and key not in extra and _ID_RE.match(key.replace(" ", "_")):
                extra.append(key)
    return extra


def _ec_from_annotation(reaction: cobra.Reaction) -> str:
    value = (reaction.annotation or {}).get("ec-code", "")
    if isinstance(value, (list, tuple)):
        return ";".join(str(v) for v in value)
    return str(value)


def _render(rows: list[list[str]], delimiter: str, comment: str) -> str:
    buffer = io.StringIO()
    buffer.write(comment + "\n")
    writer = csv.writer(buffer, delimiter=delimiter, lineterminator="\n")
    writer.writerows(rows)
    return buffer.getvalue()
