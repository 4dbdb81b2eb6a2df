"""What the commands print: one JSON object (``--json``) or plain text, and nothing else on
standard output (solver banners are silenced)."""

from __future__ import annotations

import contextlib
import os
import sys
from typing import TYPE_CHECKING

from ..util.files import to_json

if TYPE_CHECKING:
    import pandas as pd


def print_json(obj) -> None:
    """Print one JSON object (NaN as null)."""
    sys.stdout.write(to_json(obj) + "\n")


def print_table(frame: "pd.DataFrame", float_format: str = "{:.2f}") -> None:
    """Print a table readably on the terminal."""
    from ..report.text import table_text

    sys.stdout.write(table_text(frame, float_format) + "\n")


class solver_output_silenced:
    """Context manager: while the analyses run, anything written to the process's standard output
    by compiled solver libraries (e.g. the banner a HiGHS instance prints when created) goes to
    /dev/null, so that stdout carries only the answer (and ``--json`` stays valid JSON)."""

    def __enter__(self) -> "solver_output_silenced":
        sys.stdout.flush()
        try:
            self._saved = os.dup(1)
        except OSError:  # no file descriptor 1 (embedded use): nothing to silence
            self._saved = None
            return self
        self._null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(self._null, 1)
        return self

    def __exit__(self, *exc) -> None:
        if self._saved is None:
            return
        sys.stdout.flush()
        os.dup2(self._saved, 1)
        os.close(self._saved)
        os.close(self._null)


class AsciiStream:
    """A text stream that writes :func:`tfa.vocabulary.ascii_text` of everything, for a console
    that cannot show Unicode (``PYTHONIOENCODING=ascii``, an old terminal)."""

    def __init__(self, stream) -> None:
        self._stream = stream

    def write(self, text: str) -> int:
        from ..vocabulary import ascii_text

        return self._stream.write(ascii_text(text))

    def __getattr__(self, name: str):
        return getattr(self._stream, name)


def _encodes_unicode(stream) -> bool:
    try:
        "ΔrG'° σ × ±".encode(getattr(stream, "encoding", None) or "ascii")
    except (UnicodeEncodeError, LookupError):
        return False
    return True


def prepare_streams() -> None:
    """Make standard output and error safe to write: a closed descriptor 1 or 2 is opened on
    /dev/null (so no file the run opens can take its place and receive solver banners), a
    missing ``sys.stdout`` writes nowhere, and a stream that cannot encode Unicode gets the
    ASCII spellings of every symbol."""
    for fd in (1, 2):
        try:
            os.fstat(fd)
        except OSError:
            null = os.open(os.devnull, os.O_WRONLY)
            if null != fd:
                os.dup2(null, fd)
                os.close(null)
    for name in ("stdout", "stderr"):
        stream = getattr(sys, name)
        if stream is None:
            setattr(sys, name, open(os.devnull, "w", encoding="utf-8"))  # noqa: SIM115
        elif not isinstance(stream, AsciiStream) and not _encodes_unicode(stream):
            setattr(sys, name, AsciiStream(stream))


def quiet_broken_pipe() -> None:
    """After a reader of standard output went away (``tfa ... | head -1``): point the
    descriptor at /dev/null so that Python's last flush does not complain."""
    with contextlib.suppress(OSError, ValueError):
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, sys.stdout.fileno())
        os.close(null)
