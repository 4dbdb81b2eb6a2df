"""Where in its file a compound, a reaction or an environment key is written, so that an error
found after reading still names the file and the line.

A network read from our tables keeps the paths of its tables in ``model.notes``
(``compounds_path``, ``reactions_path``), one read from SBML or cobra JSON the path of its file
(``model_path``); :func:`locate` finds the line that defines an id. :func:`toml_line` finds the
line of a key in a section of an environment file, :func:`with_toml_line` puts it into a
message that names the file, the section and the key.
"""

from __future__ import annotations

import re
from pathlib import Path

import cobra

#: The notes of a model that hold the paths of its files.
PATH_NOTES = {"compound": "compounds_path", "reaction": "reactions_path"}


def _lines(path: Path) -> list[str]:
    try:
        return path.read_text(encoding="utf-8-sig").splitlines()
    except (OSError, UnicodeDecodeError):
        return []


def locate(model: cobra.Model, kind: str, ident: str) -> str:
    """``"path line N"`` of the row or element that defines compound or reaction ``ident``
    (``kind``: "compound" or "reaction"); the path alone when the line is not found; "" when
    the model keeps no path."""
    notes = model.notes or {}
    table = notes.get(PATH_NOTES[kind])
    if table:
        path = Path(table)
        delimiter = "," if path.suffix.lower() == ".csv" else "\t"
        for number, line in enumerate(_lines(path), start=1):
            if not line.lstrip().startswith("#") and line.split(delimiter, 1)[0].strip() == ident:
                return f"{path} line {number}"
        return str(path)
    source = notes.get("model_path")
    if not source:
        return ""
    path = Path(source)
    prefix = "M_" if kind == "compound" else "R_"
    wanted = (f'id="{prefix}{ident}"', f'id="{ident}"', f'"id": "{ident}"')
    for number, line in enumerate(_lines(path), start=1):
        if any(w in line for w in wanted):
            return f"{path} line {number}"
    return str(path)


def located(model: cobra.Model, kind: str, ident: str, message: str) -> str:
    """``message`` prefixed with where ``ident`` is defined (when that is known)."""
    where = locate(model, kind, ident)
    return f"{where}: {message}" if where else message


def toml_line(path: str | Path, section: str, key: str | None = None) -> int | None:
    """The line of ``key`` in ``[section]`` of a TOML file (of the section header when ``key``
    is None), or None.

    >>> import tempfile, os
    >>> with tempfile.NamedTemporaryFile("w", suffix=".toml", delete=False) as f:
    ...     _ = f.write("[feed]\\nh2 = 1e-3\\n\\n[demand]\\nreaction = 'x'\\n")
    >>> toml_line(f.name, "demand", "reaction"), toml_line(f.name, "feed")
    (5, 1)
    >>> os.unlink(f.name)
    """
    current = None
    key_re = re.compile(rf"""^\s*["']?{re.escape(key)}["']?\s*=""") if key else None
    for number, line in enumerate(_lines(Path(path)), start=1):
        header = re.match(r"^\s*\[([^\[\]]+)\]", line)
        if header:
            current = header.group(1).strip()
            if key is None and current == section:
                return number
            continue
        if key_re is not None and current == section and key_re.match(line):
            return number
    return None


#: How the conditions' messages name the keys of ``[conditions]``.
CONDITION_WORDS = {"temperature": "temperature_C", "pH": "pH", "ionic strength": "ionic_strength_M",
                   "pressure": "pressure_bar", "pMg": "pMg"}
_SECTION_KEY = re.compile(r"^(?P<path>.+?) \[(?P<section>[A-Za-z_]+)\](?: (?P<key>[^:]+?))?:")
_UNKNOWN_KEY = re.compile(r"^(?P<path>.+?): unknown key '(?P<key>[^']+)' in \[(?P<section>[^\]]+)\]")
_UNKNOWN_SECTION = re.compile(r"^(?P<path>.+?): unknown section \[(?P<section>[^\]]+)\]")


def with_toml_line(message: str, path: str | Path) -> str:
    """An environment error that names ``path`` with the section and key, with the line too.

    >>> import tempfile, os
    >>> with tempfile.NamedTemporaryFile("w", suffix=".toml", delete=False) as f:
    ...     _ = f.write("[conditions]\\ntemperature_C = 'hot'\\n")
    >>> with_toml_line(f"{f.name} [conditions] temperature_C: 'hot' is not a number", f.name) \\
    ...     == f"{f.name} line 2 [conditions] temperature_C: 'hot' is not a number"
    True
    >>> os.unlink(f.name)
    """
    text, path = str(message), str(path)
    if not text.startswith(path) or text.startswith(f"{path} line "):
        return text
    for pattern in (_SECTION_KEY, _UNKNOWN_KEY, _UNKNOWN_SECTION):
        match = pattern.match(text)
        if match and match.group("path") == path:
            key = match.groupdict().get("key")
            if key is None:   # "[conditions]: pH 15 is outside ...": the key the words name
                rest = text[match.end():].strip()
                key = next((k for word, k in CONDITION_WORDS.items() if rest.startswith(word)), None)
            line = toml_line(path, match.group("section"), key.strip() if key else None)
            if line is None and key:
                line = toml_line(path, match.group("section"))
            if line is not None:
                return f"{path} line {line}{text[len(path):]}"
    return text
