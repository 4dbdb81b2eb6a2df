"""Result tables written twice, as CSV and as JSON, so that both say the same thing.

:func:`write_table` writes ``<stem>.csv`` (UTF-8, header row, no index) and ``<stem>.json``
(a list of records, one object per row, NaN and infinities as ``null``), each atomically through
:mod:`tfa.util.files`. :func:`read_csv_table`, :func:`read_json_table` and
:func:`compare_table_files` read them back and list every cell where the two disagree.
"""

from __future__ import annotations

import json
import logging
import math
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import InputError
from ..util.files import to_json, write_text

logger = logging.getLogger(__name__)

#: Relative tolerance when numbers read back from CSV and JSON are compared.
COMPARE_RTOL = 1e-12


def _stem(path_stem: str | Path) -> Path:
    stem = Path(path_stem)
    if stem.suffix.lower() in (".csv", ".json"):
        stem = stem.with_suffix("")
    return stem


def _text_of_sequence(value: Any) -> Any:
    """Lists, tuples and arrays as text joined by "; " (the same in CSV and JSON)."""
    if isinstance(value, (list, tuple, np.ndarray)):
        return "; ".join(str(v) for v in value)
    return value


def _records(frame: pd.DataFrame) -> list[dict[str, Any]]:
    """Rows as plain dictionaries: numpy scalars to Python, NaN/NA/NaT to None."""
    records = []
    columns = [str(c) for c in frame.columns]
    for row in frame.itertuples(index=False, name=None):
        record = {}
        for column, value in zip(columns, row):
            if value is None or (not isinstance(value, (list, tuple, dict, np.ndarray))
                                 and pd.isna(value)):
                value = None
            elif isinstance(value, np.generic):
                value = value.item()
            if isinstance(value, float) and not math.isfinite(value):
                value = None
            value = _text_of_sequence(value)
            record[column] = value
        records.append(record)
    return records


def write_table(frame: pd.DataFrame, path_stem: str | Path) -> tuple[Path, Path]:
    """Write a table as ``<stem>.csv`` and ``<stem>.json``, each atomically.

    Parameters
    ----------
    frame : DataFrame
        The table; its index is not written (reset it first if it holds data). Column names
        must be unique. Cells holding lists are written as text joined by ``"; "``.
    path_stem : str or Path
        Path without suffix (``.csv``/``.json`` suffixes are dropped).

    Returns
    -------
    (Path, Path)
        The CSV and JSON paths.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> csv, js = write_table(pd.DataFrame({"a": [1.5, float("nan")], "b": ["x", "y"]}), d / "t")
    >>> print(js.read_text().replace(" ", "").replace("\\n", ""))
    [{"a":1.5,"b":"x"},{"a":null,"b":"y"}]
    >>> compare_table_files(csv, js)
    []
    """
    if not isinstance(frame, pd.DataFrame):
        raise InputError(f"write_table: expected a pandas DataFrame, got {type(frame).__name__}")
    names = [str(c) for c in frame.columns]
    if len(set(names)) != len(names):
        duplicated = sorted({n for n in names if names.count(n) > 1})
        raise InputError(f"write_table {path_stem}: duplicate column name(s) {', '.join(duplicated)};"
                         " rename them so every column is unique")
    stem = _stem(path_stem)
    records = _records(frame)
    out = frame.copy()
    out.columns = names
    for column in names:
        series = out[column]
        if series.dtype == object:
            out[column] = [_text_of_sequence(v) for v in series]
        elif pd.api.types.is_float_dtype(series.dtype):
            out[column] = series.replace([np.inf, -np.inf], np.nan)
    csv_text = out.to_csv(index=False, lineterminator="\n", na_rep="")
    csv_path = write_text(stem.with_name(stem.name + ".csv"), csv_text)
    json_path = write_text(stem.with_name(stem.name + ".json"), to_json(records) + "\n")
    logger.info("table written: %s (.csv, .json), %d rows", stem, len(frame))
    return csv_path, json_path


def read_csv_table(path: str | Path, as_text: bool = False) -> pd.DataFrame:
    """Read a CSV written by :func:`write_table`.

    With ``as_text`` every cell is kept as the text in the file (empty cells as ""); otherwise
    pandas infers the types and empty cells become NaN.
    """
    if as_text:
        return pd.read_csv(path, dtype=str, keep_default_na=False, na_values=[])
    return pd.read_csv(path, keep_default_na=False, na_values=[""])


def read_json_table(path: str | Path) -> pd.DataFrame:
    """Read a JSON written by :func:`write_table` (``null`` becomes NaN/None).

    Raises :class:`~tfa.errors.InputError` when the file is not a list of objects.
    """
    text = Path(path).read_text(encoding="utf-8")
    try:
        records = json.loads(text)
    except json.JSONDecodeError as err:
        raise InputError(f"{path}: not valid JSON (line {err.lineno}: {err.msg})") from err
    if not isinstance(records, list) or not all(isinstance(r, dict) for r in records):
        raise InputError(f"{path}: expected a JSON list of objects (one per row)")
    columns: dict[str, None] = {}
    for record in records:
        columns.update(dict.fromkeys(record))
    return pd.DataFrame.from_records(records, columns=list(columns))


def _cell_agrees(csv_text: str, value: Any, rtol: float) -> bool:
    """Whether the CSV text of a cell says the same as the JSON value of that cell."""
    if value is None or value == "":
        return csv_text == ""
    if isinstance(value, bool):
        return csv_text.strip().lower() == str(value).lower()
    if isinstance(value, (int, float)):
        try:
            number = float(csv_text)
        except ValueError:
            return False
        return number == value or math.isclose(number, value, rel_tol=rtol, abs_tol=0.0)
    return csv_text == str(value)


def compare_table_files(csv_path: str | Path, json_path: str | Path,
                        rtol: float = COMPARE_RTOL) -> list[str]:
    """Every disagreement between a CSV and a JSON written by :func:`write_table`.

    Column names and order, the number of rows and each cell are compared, the CSV read as
    text: a JSON number must parse from the CSV cell within ``rtol`` (relative); ``null`` (and
    "") only matches an empty cell; a boolean matches True/False in any case; text exactly.

    Returns
    -------
    list of str
        One line per difference; empty when the files agree.
    """
    csv_frame = read_csv_table(csv_path, as_text=True)
    text = Path(json_path).read_text(encoding="utf-8")
    try:
        records = json.loads(text)
    except json.JSONDecodeError as err:
        return [f"{json_path}: not valid JSON (line {err.lineno}: {err.msg})"]
    if not isinstance(records, list) or not all(isinstance(r, dict) for r in records):
        return [f"{json_path}: not a JSON list of objects"]
    problems: list[str] = []
    csv_columns = [str(c) for c in csv_frame.columns]
    json_columns = list(records[0].keys()) if records else csv_columns
    if csv_columns != json_columns:
        problems.append(f"columns differ: CSV {csv_columns} vs JSON {json_columns}")
        return problems
    if len(csv_frame) != len(records):
        problems.append(f"row counts differ: CSV {len(csv_frame)} vs JSON {len(records)}")
        return problems
    for row, record in enumerate(records):
        if list(record.keys()) != csv_columns:
            problems.append(f"row {row + 1}: JSON keys {list(record.keys())} differ from the "
                            "CSV header")
            continue
        for column in csv_columns:
            cell = csv_frame.iat[row, csv_columns.index(column)]
            if not _cell_agrees(cell, record[column], rtol):
                problems.append(f"row {row + 1}, column {column!r}: CSV {cell!r} vs JSON "
                                f"{record[column]!r}")
    return problems
