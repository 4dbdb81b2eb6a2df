"""Warnings of a command, collected while it runs and printed once, at the end, as one short table
on standard error: each distinct warning once, warnings of one kind (the same sentence about
another reaction or compound) in one row with their count. ``--verbose`` lists every warning in
full; ``--quiet`` prints none. Python warnings (the model-range warnings of the conditions, for
instance) become one line each, without file names or source lines.
"""

from __future__ import annotations

import contextlib
import logging
import sys
import warnings
from typing import Iterator, TextIO

#: Characters of a warning shown in the short table.
WIDTH = 110
#: Logger that Python warnings are routed to.
PYTHON_WARNINGS = "tfa.warnings"


class WarningCollector(logging.Handler):
    """A logging handler that keeps every warning record (distinct messages, in order)."""

    def __init__(self) -> None:
        super().__init__(logging.WARNING)
        self.messages: dict[str, str] = {}

    def emit(self, record: logging.LogRecord) -> None:
        if record.levelno != logging.WARNING:
            return
        text = " ".join(record.getMessage().split())
        self.messages.setdefault(text, str(record.msg))

    def rows(self) -> list[tuple[int, str]]:
        """(count, text) per kind of warning: the first message of its kind (cut to
        :data:`WIDTH` when it stands for others) and how many distinct messages of that kind
        there were."""
        kinds: dict[str, list[str]] = {}
        for text, template in self.messages.items():
            kinds.setdefault(template, []).append(text)
        out = []
        for texts in kinds.values():
            first = texts[0] if len(texts) == 1 or len(texts[0]) <= WIDTH else \
                texts[0][: WIDTH - 1] + "…"
            out.append((len(texts), first + (f" (and {len(texts) - 1} more like it)"
                                             if len(texts) > 1 else "")))
        return out

    def text(self, verbose: bool) -> str:
        """The table (or, verbose, every warning in full); "" when there was none."""
        if not self.messages:
            return ""
        if verbose:
            return "warnings:\n" + "".join(f"  {t}\n" for t in self.messages)
        lines = [f"warnings ({len(self.messages)}; --verbose lists each in full):",
                 "  count  warning"]
        lines += [f"  {count:5d}  {text}" for count, text in self.rows()]
        return "\n".join(lines) + "\n"


def _one_line(message, category, filename, lineno, file=None, line=None) -> None:
    """``warnings.showwarning`` in one line, through logging: no file name, no source line."""
    # the text is its own template: distinct Python warnings are distinct kinds in the table
    logging.getLogger(PYTHON_WARNINGS).warning(str(message))


@contextlib.contextmanager
def collected_warnings(quiet: bool = False, verbose: bool = False,
                       stream: TextIO | None = None) -> Iterator[WarningCollector]:
    """Collect the warnings of the enclosed run and print them at its end (see the module)."""
    from ..conditions import ModelRangeWarning

    collector = WarningCollector()
    root = logging.getLogger()
    root.addHandler(collector)
    saved = warnings.showwarning
    try:
        with warnings.catch_warnings():   # every command shows its own model-range warnings
            warnings.filterwarnings("default", category=ModelRangeWarning)
            warnings.showwarning = _one_line
            yield collector
    finally:
        warnings.showwarning = saved
        root.removeHandler(collector)
        if not quiet:
            (stream or sys.stderr).write(collector.text(verbose))


class BelowWarnings(logging.Filter):
    """Let through what is not a warning (the collector prints those)."""

    def filter(self, record: logging.LogRecord) -> bool:
        return record.levelno != logging.WARNING
