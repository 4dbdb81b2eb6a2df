"""Shared fixtures: one assessment of the bundled network with the default settings, run once per
test session and used by every test that checks the whole job (the README's numbers, the files,
the vocabulary of the columns, the report in a browser, the progress display)."""

from __future__ import annotations

import io
import time
from dataclasses import dataclass, field
from pathlib import Path

import pytest


class TerminalRecorder(io.StringIO):
    """A stand-in for a terminal on stderr: says it is a TTY and records every write with the
    time it was made, so a test can replay what a user would have seen."""

    def __init__(self) -> None:
        super().__init__()
        self.writes: list[tuple[float, str]] = []

    def isatty(self) -> bool:
        return True

    def write(self, text: str) -> int:
        self.writes.append((time.monotonic(), text))
        return super().write(text)


class SolveCounter:
    """Marks, while active, every solve of the thermodynamic problem (the searches of
    :class:`tfa.problem.search.PointSearch`) in a :class:`TerminalRecorder`'s record: the number
    of writes made before it, so a test can count the solves behind each progress line (the work
    a line stands for, measured without a clock)."""

    METHODS = ("solve", "solve_with_pattern", "solve_fixed")

    def __init__(self, terminal: TerminalRecorder) -> None:
        self.terminal = terminal
        self.marks: list[int] = []
        self._saved: dict = {}

    def __enter__(self) -> "SolveCounter":
        from tfa.problem.search import PointSearch

        for name in self.METHODS:
            original = getattr(PointSearch, name)
            self._saved[name] = original

            def counted(problem, *args, _original=original, **kwargs):
                self.marks.append(len(self.terminal.writes))
                return _original(problem, *args, **kwargs)

            setattr(PointSearch, name, counted)
        return self

    def __exit__(self, *exc) -> None:
        from tfa.problem.search import PointSearch

        for name, original in self._saved.items():
            setattr(PointSearch, name, original)


@dataclass
class BundledRun:
    """The default assessment of the bundled network: the result object, its output folder and
    what its progress display drew."""

    result: object
    out: Path
    terminal: TerminalRecorder
    solves: SolveCounter
    seconds: float
    files: list[Path] = field(default_factory=list)


@pytest.fixture(scope="session")
def bundled_run(tmp_path_factory) -> BundledRun:
    """``tfa.assess()`` on the bundled network with every default, written to a folder, its
    progress drawn on a recorded terminal (the same display ``tfa assess`` uses)."""
    import tfa
    from tfa.cli.progress import Progress

    out = tmp_path_factory.mktemp("bundled") / "tfa-results"
    terminal = TerminalRecorder()
    started = time.monotonic()
    with SolveCounter(terminal) as solves, Progress(stream=terminal) as bar:
        result = tfa.assess(out=out, progress=bar)
    return BundledRun(result, out, terminal, solves, time.monotonic() - started,
                      sorted(out.iterdir()))


#: A setting for tests/data/mini_network (textbook reactions; invented demo values): the small
#: network the hardening tests run whole commands on in a few seconds.
MINI_ENVIRONMENT = """\
[environment]
name = "mini test setting"
[conditions]
temperature_C = 25.0
pH = 7.0
ionic_strength_M = 0.1
[feed]
h2 = 1.0e-3
co2 = 1.0e-2
pi = 1.0e-3
[bounds]
default = [1.0e-6, 1.0e-2]
[demand]
reaction = "DM_mal"
flux = 0.01
[outlets]
allowed = ["ac"]
"""


@pytest.fixture()
def mini_folder(tmp_path) -> Path:
    """A copy of tests/data/mini_network with an environment.toml beside it."""
    import shutil

    folder = tmp_path / "mini"
    shutil.copytree(Path(__file__).parent / "data" / "mini_network", folder)
    (folder / "environment.toml").write_text(MINI_ENVIRONMENT, encoding="utf-8")
    return folder
