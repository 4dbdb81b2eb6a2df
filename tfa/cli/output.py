"""What the commands print: one JSON object (``--json``) or plain text, and nothing else on
standard output (solver banners are silenced)."""

from __future__ import annotations

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
