"""SBML and cobra JSON through cobra, keeping the notes and annotations of our tables.

cobra writes each note as ``<p>key: value</p>`` in the SBML notes without escaping, so a value
holding ``<`` or ``&`` (free-text notes, some SMILES) would break the XML; values are escaped
before writing and unescaped after reading. Numeric-looking note values come back as text, as
they went in. ``annotation['ec-code']`` is kept as a list.

Every file is written to a temporary name and renamed (:mod:`tfa.util.files`). Every file read
passes the input gate first (a regular file of sane size). A ``reaction_values_path`` note of a
network file names a file relative to that file's folder and is refused when it leaves it
(:func:`tfa.util.files.confined_file`); when written, the note is made relative to the new file's
folder, or left out when the values lie elsewhere.
"""

from __future__ import annotations

import html
import logging
from pathlib import Path

import cobra
from cobra.io import load_json_model, read_sbml_model, save_json_model, write_sbml_model

from ..errors import InputError, NetworkFileError
from ..util.files import atomic_path, check_input_file, confined_file
from .io_table import read_network, write_network

logger = logging.getLogger(__name__)

SBML_SUFFIXES = (".xml", ".sbml")
JSON_SUFFIXES = (".json",)
TABLE_SUFFIXES = (".tsv", ".csv", ".tab", ".txt")
#: The model note that names the network's own table of reaction values.
VALUES_NOTE = "reaction_values_path"


def _objects(model: cobra.Model):
    yield model
    yield from model.metabolites
    yield from model.reactions


def write_sbml(model: cobra.Model, path: str | Path) -> Path:
    """Write SBML (level 3, fbc) atomically, notes escaped so any text survives."""
    path = Path(path)
    saved = [(obj, obj.notes) for obj in _objects(model)]
    try:
        for obj, notes in saved:
            obj.notes = {key: html.escape(str(value), quote=False) for key, value in (notes or {}).items()}
        _portable_values_note(model, path, saved[0][1])
        with atomic_path(path) as tmp:
            write_sbml_model(model, str(tmp))
    finally:
        for obj, notes in saved:
            obj.notes = notes
    logger.info("wrote SBML %s", path)
    return path


def _portable_values_note(model: cobra.Model, path: Path, notes: dict | None) -> None:
    """The values note as written into ``path``: relative to its folder, or left out."""
    value = (notes or {}).get(VALUES_NOTE)
    if not value:
        return
    model.notes = dict(model.notes)
    try:
        model.notes[VALUES_NOTE] = str(Path(value).resolve().relative_to(path.parent.resolve()))
    except ValueError:
        del model.notes[VALUES_NOTE]
        logger.info("%s: the reaction values (%s) lie outside its folder; the note is left out",
                    path, value)


def _checked(path: str | Path, what: str) -> Path:
    path = Path(path)
    if not path.exists():
        raise NetworkFileError(f"{path}: no such file; give the path of {what}")
    try:
        return check_input_file(path, what)
    except InputError as exc:
        raise NetworkFileError(str(exc)) from None


def read_sbml(path: str | Path) -> cobra.Model:
    """Read SBML through cobra; note values are unescaped, ``ec-code`` made a list."""
    path = _checked(path, "an SBML file")
    try:
        model = read_sbml_model(str(path))
    except Exception as exc:  # cobra raises its own CobraSBMLError and IOError variants
        raise NetworkFileError(f"{path}: cannot read SBML ({_first_line(exc)}); check that it is "
                               "valid SBML level 2 or 3") from None
    _normalise(model, path)
    model.notes["model_path"] = str(path)   # where errors found later point to
    return model


def _first_line(exc: Exception) -> str:
    text = str(exc).strip().splitlines()
    return (text[0][:200] if text else type(exc).__name__)


def write_cobra_json(model: cobra.Model, path: str | Path) -> Path:
    """Write cobra's JSON format atomically."""
    path = Path(path)
    notes = model.notes
    try:
        _portable_values_note(model, path, notes)
        with atomic_path(path) as tmp:
            save_json_model(model, str(tmp), pretty=True)
    finally:
        model.notes = notes
    logger.info("wrote JSON model %s", path)
    return path


def read_cobra_json(path: str | Path) -> cobra.Model:
    """Read cobra's JSON format."""
    path = _checked(path, "a cobra JSON model")
    try:
        model = load_json_model(str(path))
    except Exception as exc:  # JSON and schema errors
        raise NetworkFileError(f"{path}: cannot read the cobra JSON model ({_first_line(exc)}); "
                               "check the file") from None
    _normalise(model, path)
    model.notes["model_path"] = str(path)
    return model


def _normalise(model: cobra.Model, path: Path) -> None:
    for obj in _objects(model):
        obj.notes = {key: html.unescape(str(value)) for key, value in (obj.notes or {}).items()}
    note = model.notes.get(VALUES_NOTE)
    if note:
        try:
            model.notes[VALUES_NOTE] = str(confined_file(note, path.parent, "reaction values",
                                                         f"{path} note {VALUES_NOTE}"))
        except InputError as exc:
            raise NetworkFileError(str(exc)) from None
    for reaction in model.reactions:
        ec = (reaction.annotation or {}).get("ec-code")
        if isinstance(ec, str):
            reaction.annotation["ec-code"] = [ec]


def load_network(path: str | Path, compounds_path: str | Path | None = None,
                 require_balanced: bool = True) -> cobra.Model:
    """Read a network by file type: a reactions table (``.tsv``/``.csv``), SBML or cobra JSON.

    A folder means ``reactions.tsv`` (or ``.csv``) inside it.
    """
    path = Path(path)
    if path.is_dir():
        for name in ("reactions.tsv", "reactions.csv"):
            if (path / name).is_file():
                return read_network(path / name, compounds_path, require_balanced=require_balanced)
        raise NetworkFileError(f"{path}: folder without reactions.tsv or reactions.csv; give a network file")
    suffix = path.suffix.lower()
    if suffix in TABLE_SUFFIXES:
        return read_network(path, compounds_path, require_balanced=require_balanced)
    if suffix in SBML_SUFFIXES:
        return read_sbml(path)
    if suffix in JSON_SUFFIXES:
        return read_cobra_json(path)
    raise NetworkFileError(
        f"{path}: unknown network format '{suffix}'; use a reactions table (.tsv, .csv), SBML (.xml) "
        "or cobra JSON (.json)"
    )


def save_network(model: cobra.Model, path: str | Path) -> Path:
    """Write a network by file type: a folder (tables), ``.xml``/``.sbml`` or ``.json``."""
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix in SBML_SUFFIXES:
        return write_sbml(model, path)
    if suffix in JSON_SUFFIXES:
        return write_cobra_json(model, path)
    if suffix in (".tsv", ".csv"):
        return write_network(model, path.parent, fmt=suffix[1:])[0]
    if suffix == "":
        return write_network(model, path)[0]
    raise NetworkFileError(f"{path}: unknown network format '{suffix}'; use a folder, .xml or .json")
