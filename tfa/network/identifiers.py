"""Which compound of our thermodynamic data each metabolite of a network is, from its annotations.

A metabolite's ``thermo_key`` note (written by hand, or a column of our compounds table) says it
directly. Without one, the identifiers in its annotation (InChIKey, ChEBI, KEGG, MetaNetX, BiGG;
cobra's annotation keys ``inchi_key``/``inchikey``, ``chebi``, ``kegg.compound``,
``metanetx.chemical``, ``bigg.metabolite``) are looked up in the bundled cross-reference table
``tfa/data/cross_references.csv`` (made by ``scripts/make_cross_references.py`` from our own
compound tables and the models cobra ships; its header states the sources and their licences).
For SBML and cobra JSON, a metabolite id in the BiGG style (``pyr_c``: the id, an underscore and
a compartment) is the last resort. A small table of the user's own (``identifiers.tsv``:
``compound``, ``thermo_key``, optional ``note``; an empty ``thermo_key`` means "leave it
without data") overrides all of it.

Every match keeps its evidence: ``given`` (the note), ``your table``, then the table's own
evidence of the identifier used, strongest first: ``structure`` (InChIKey with stereo equal),
``structure, stereo not compared`` (connectivity only, safe for the enantiomer), ``name``; a
match found only through the metabolite id says so (``BiGG-style id``). Identifiers that point
to two compounds with equal evidence leave the metabolite unmatched (``ambiguous``).

A metabolite still without a compound but with a structure (``smiles`` or ``inchi`` in its
annotation or notes) keeps it in ``notes['smiles']``, so it gets a group-contribution estimate.
"""

from __future__ import annotations

import csv
import difflib
import re
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from pathlib import Path

import cobra
import pandas as pd

from ..errors import NetworkFileError, UnknownCompoundError
from .io_table import read_table

#: File name of a user's table of identifiers, beside the network file.
IDENTIFIERS_FILES = ("identifiers.tsv", "identifiers.csv")
#: cobra annotation keys -> namespaces of the cross-reference table, in the order they are read.
ANNOTATION_KEYS = (("inchi_key", "inchikey"), ("inchikey", "inchikey"), ("chebi", "chebi"),
                   ("kegg.compound", "kegg"), ("metanetx.chemical", "metanetx"),
                   ("bigg.metabolite", "bigg"))
#: Evidence of a match, strongest first.
EVIDENCE = ("given", "your table", "structure", "structure, stereo not compared", "name",
            "BiGG-style id")
#: Statuses of a metabolite's match.
MATCHED, GIVEN, OVERRIDE, AMBIGUOUS, UNMATCHED = "matched", "given", "your table", "ambiguous", "none"
#: Columns of the mapping table (one row per metabolite).
MAPPING_COLUMNS = ["compound", "status", "thermo_key", "evidence", "via"]
#: A compartment suffix of a BiGG-style metabolite id (``pyr_c``, ``h_e``, ``atp_c0``).
_COMPARTMENT = re.compile(r"_[a-z][a-z0-9]?$")


@dataclass(frozen=True)
class MetaboliteMatch:
    """How one metabolite was matched to a compound of the thermodynamic data.

    ``thermo_key`` is empty when it was not; ``via`` names the identifier, the note or the line
    of the user's table that decided it.
    """

    metabolite: str
    status: str
    thermo_key: str = ""
    evidence: str = ""
    via: str = ""


@dataclass
class IdentifierMapping:
    """Every metabolite's match, in model order."""

    matches: list[MetaboliteMatch] = field(default_factory=list)
    overrides_path: Path | None = None

    def to_frame(self) -> pd.DataFrame:
        """One row per metabolite: ``compound``, ``status``, ``thermo_key``, ``evidence``, ``via``."""
        return pd.DataFrame([{"compound": m.metabolite, "status": m.status,
                              "thermo_key": m.thermo_key, "evidence": m.evidence, "via": m.via}
                             for m in self.matches], columns=MAPPING_COLUMNS)

    def counts(self) -> dict[str, int]:
        """Metabolites per evidence (matched ones) and per status (the others)."""
        out: dict[str, int] = {}
        for m in self.matches:
            key = m.evidence if m.thermo_key else m.status
            out[key] = out.get(key, 0) + 1
        return out

    @property
    def found(self) -> bool:
        """Whether any metabolite was matched through its identifiers (not given by hand)."""
        return any(m.status in (MATCHED, OVERRIDE) for m in self.matches)


@lru_cache(maxsize=1)
def cross_references() -> dict[tuple[str, str], tuple[str, str]]:
    """(namespace, identifier) -> (compound id, evidence) of the bundled cross-reference table.

    InChIKeys are held by their first two blocks (connectivity and stereo; the third block is
    the protonation state).
    """
    with resources.files("tfa.data").joinpath("cross_references.csv").open(
            newline="", encoding="utf-8") as handle:
        rows = csv.DictReader(line for line in handle if not line.startswith("#"))
        return {(r["namespace"], _normalised(r["namespace"], r["identifier"])):
                (r["compound"], r["evidence"]) for r in rows}


def _normalised(namespace: str, identifier: str) -> str:
    """An identifier as the table holds it (``CHEBI:15361``, ``C00022``, first 25 characters of
    an InChIKey).

    >>> _normalised("chebi", "15361"), _normalised("inchikey", "LCTONWCANYUPML-UHFFFAOYSA-M")
    ('CHEBI:15361', 'LCTONWCANYUPML-UHFFFAOYSA')
    """
    text = str(identifier).strip()
    text = text.rsplit("/", 1)[-1] if "identifiers.org" in text else text
    if namespace == "chebi":
        text = text.upper()
        return text if text.startswith("CHEBI:") else f"CHEBI:{text}"
    if namespace == "inchikey":
        return text.upper().removeprefix("INCHIKEY=")[:25]
    if namespace == "kegg":
        return text.upper()
    return text


def bigg_style_id(metabolite_id: str) -> str:
    """The metabolite id without its compartment suffix.

    >>> bigg_style_id("glc__D_e"), bigg_style_id("M_pyr_c"), bigg_style_id("atp")
    ('glc__D', 'pyr', 'atp')
    """
    text = metabolite_id[2:] if metabolite_id.startswith("M_") else metabolite_id
    return _COMPARTMENT.sub("", text)


def _annotation_values(metabolite: cobra.Metabolite, key: str) -> list[str]:
    value = (metabolite.annotation or {}).get(key)
    if value is None:
        return []
    return [value] if isinstance(value, str) else [str(v) for v in value]


def structure_of(metabolite: cobra.Metabolite) -> str:
    """A SMILES or InChI from the metabolite's notes or annotation ("" when it has none)."""
    notes = metabolite.notes or {}
    for text in (notes.get("smiles"), notes.get("inchi"), *_annotation_values(metabolite, "smiles"),
                 *_annotation_values(metabolite, "inchi")):
        if text and str(text).strip():
            return str(text).strip()
    return ""


def match_by_identifiers(metabolite: cobra.Metabolite, use_id: bool = True) -> MetaboliteMatch:
    """The compound the metabolite's annotation (or, with ``use_id``, its id) names."""
    table = cross_references()
    found: dict[str, list[tuple[int, str]]] = {}
    for key, namespace in ANNOTATION_KEYS:
        for value in _annotation_values(metabolite, key):
            hit = table.get((namespace, _normalised(namespace, value)))
            if hit is not None:
                found.setdefault(hit[0], []).append((EVIDENCE.index(hit[1]),
                                                     f"{namespace} {value}"))
    if not found and use_id:
        ident = bigg_style_id(metabolite.id)
        hit = table.get(("bigg", ident))
        if hit is not None:
            return MetaboliteMatch(metabolite.id, MATCHED, hit[0], EVIDENCE[-1], f"id {ident}")
    if not found:
        return MetaboliteMatch(metabolite.id, UNMATCHED)
    ranked = sorted(((min(h)[0], -len(h), cid) for cid, h in found.items()))
    best = ranked[0]
    if len(ranked) > 1 and ranked[1][:2] == best[:2]:
        names = ", ".join(sorted(cid for rank, n, cid in ranked if (rank, n) == best[:2]))
        return MetaboliteMatch(metabolite.id, AMBIGUOUS, "", EVIDENCE[best[0]],
                               f"identifiers name {names}")
    rank, via = min(found[best[2]])
    return MetaboliteMatch(metabolite.id, MATCHED, best[2], EVIDENCE[rank], via)


def read_identifier_table(path: str | Path, model: cobra.Model, database) -> dict[str, tuple[str, str]]:
    """A user's table of identifiers: metabolite id -> (compound id or "", "path line N").

    Raises
    ------
    NetworkFileError
        A metabolite that is not in the network or a ``thermo_key`` not in the thermodynamic
        data (with the file, the line and close matches).
    """
    path = Path(path)
    out: dict[str, tuple[str, str]] = {}
    for row in read_table(path, ("compound", "thermo_key"), ("compound", "thermo_key", "note")):
        where = f"{path} line {row.line}"
        met_id, key = row.cells.get("compound", ""), row.cells.get("thermo_key", "")
        if met_id not in model.metabolites:
            close = difflib.get_close_matches(met_id, [m.id for m in model.metabolites], n=3)
            hint = f"did you mean {', '.join(repr(c) for c in close)}?" if close else \
                "use a metabolite id of the network"
            raise NetworkFileError(f"{where}, column 'compound': '{met_id}' is not a compound of "
                                   f"network {model.id}; {hint}")
        if key:
            try:
                key = database.compound(key).id
            except UnknownCompoundError as err:
                raise NetworkFileError(f"{where}, column 'thermo_key': {err}") from err
        out[met_id] = (key, where)
    return out


def identifier_table_beside(network_path: str | Path | None) -> Path | None:
    """``identifiers.tsv`` (or ``.csv``) in the folder of a network file, when there is one."""
    if network_path is None:
        return None
    path = Path(network_path)
    folder = path if path.is_dir() else path.parent
    for name in IDENTIFIERS_FILES:
        if (folder / name).is_file():
            return folder / name
    return None


def map_identifiers(model: cobra.Model, database, overrides: str | Path | None = None,
                    use_ids: bool = True) -> IdentifierMapping:
    """Give every metabolite without a ``thermo_key`` the compound its identifiers name.

    Writes ``notes['thermo_key']`` and ``notes['thermo_key_evidence']`` of each metabolite
    matched, ``notes['smiles']`` of an unmatched one with a structure in its annotation.

    Parameters
    ----------
    model : cobra.Model
    database : ThermoDatabase
        For the user's table (names become compound ids).
    overrides : path, optional
        The user's table (see the module text).
    use_ids : bool
        Fall back on BiGG-style metabolite ids (SBML and cobra JSON; not our own tables).
    """
    own = read_identifier_table(overrides, model, database) if overrides else {}
    mapping = IdentifierMapping(overrides_path=Path(overrides) if overrides else None)
    for met in model.metabolites:
        notes = dict(met.notes or {})
        given = str(notes.get("thermo_key") or "").strip()
        if met.id in own:
            key, where = own[met.id]
            match = MetaboliteMatch(met.id, OVERRIDE if key else UNMATCHED, key,
                                    EVIDENCE[1] if key else "", where)
        elif given:
            match = MetaboliteMatch(met.id, GIVEN, given, EVIDENCE[0], "thermo_key note")
        else:
            match = match_by_identifiers(met, use_ids)
        if match.thermo_key and match.status != GIVEN:
            notes["thermo_key"] = match.thermo_key
            notes["thermo_key_evidence"] = f"{match.evidence} ({match.via})"
        elif match.status != GIVEN:
            notes.pop("thermo_key", None)
            structure = structure_of(met)
            if structure and not notes.get("smiles"):
                notes["smiles"] = structure
        met.notes = notes
        mapping.matches.append(match)
    return mapping


def find_metabolite(model: cobra.Model, name: str) -> cobra.Metabolite | None:
    """The metabolite called ``name``: its id, else (any case) its id, name, a synonym or its
    ``thermo_key``; None when none or several are."""
    if name in model.metabolites:
        return model.metabolites.get_by_id(name)
    wanted = " ".join(str(name).split()).lower()
    found = []
    for met in model.metabolites:
        notes = met.notes or {}
        names = {met.id, met.name or "", str(notes.get("thermo_key") or "")}
        names |= {x for x in str(notes.get("synonyms") or "").split(";")}
        if wanted in {" ".join(n.split()).lower() for n in names if n.strip()}:
            found.append(met)
    return found[0] if len(found) == 1 else None
