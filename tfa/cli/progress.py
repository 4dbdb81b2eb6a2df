"""A small progress display on stderr for the steps of a long command.

:class:`Progress` draws one line that it rewrites in place (``[#####-----] 3/9 H2 scan 12 s``)
when stderr is a terminal; a background thread keeps the elapsed time moving during a long
step, and the bar appears only once a step has run for :data:`SHOW_AFTER` seconds, so short
commands print nothing. With ``verbose`` every step is logged as a line of its own instead
(also when stderr is not a terminal); with ``quiet`` nothing is shown. No dependency beyond the
standard library.

Use it as the ``progress`` callback of :func:`tfa.api.assess` (``progress(step, done,
total)``) or around any slow call::

    with Progress(total=1, quiet=args.quiet, verbose=args.verbose) as bar:
        bar.step("ranges")
        result = ranges(tm)
"""

from __future__ import annotations

import sys
import threading
import time
from typing import TextIO

#: A step must have been running this long (s) before the bar is drawn.
SHOW_AFTER = 2.0
#: Seconds between redraws of the elapsed time.
TICK = 0.5
#: Width of the bar in characters.
BAR_WIDTH = 24


class Progress:
    """Progress of a command made of ``total`` steps, drawn on stderr.

    Parameters
    ----------
    total : int
        Number of steps (may be raised later through :meth:`__call__`).
    quiet : bool
        Show nothing.
    verbose : bool
        One line per step (``[3/9] H2 scan``), even when stderr is not a terminal.
    stream : file, optional
        Where to draw (default ``sys.stderr``).
    """

    def __init__(self, total: int = 1, quiet: bool = False, verbose: bool = False,
                 stream: TextIO | None = None) -> None:
        self.total = max(1, int(total))
        self.done = 0
        self.label = ""
        self.quiet = quiet
        self.verbose = verbose and not quiet
        self.stream = stream if stream is not None else sys.stderr
        isatty = getattr(self.stream, "isatty", None)
        self.interactive = bool(isatty and isatty()) and not quiet and not self.verbose
        self.started = time.monotonic()
        self.step_started = self.started
        self._drawn = False
        self._lock = threading.Lock()
        self._stop = threading.Event()
        self._thread: threading.Thread | None = None

    # ------------------------------------------------------------------ public

    def step(self, label: str) -> None:
        """Start the next step (the previous one counts as done)."""
        self(label, self.done + (1 if self.label else 0), self.total)

    def __call__(self, label: str, done: int, total: int) -> None:
        """Callback form: ``label`` is running, ``done`` of ``total`` steps are finished."""
        with self._lock:
            self.label = label
            self.done = max(0, int(done))
            self.total = max(1, int(total), self.done)
            self.step_started = time.monotonic()
        if self.verbose:
            self.stream.write(f"[{self.done + 1}/{self.total}] {label} "
                              f"({time.monotonic() - self.started:.0f} s elapsed)\n")
            self.stream.flush()
        elif self.interactive:
            self._ensure_thread()
            if self._drawn:
                self._draw()

    def close(self) -> None:
        """Stop the ticker and clear the bar line."""
        self._stop.set()
        if self._thread is not None:
            self._thread.join(timeout=2 * TICK)
            self._thread = None
        with self._lock:
            if self._drawn:
                self.stream.write("\r\033[K")
                self.stream.flush()
                self._drawn = False

    def __enter__(self) -> "Progress":
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    # ----------------------------------------------------------------- drawing

    def line(self) -> str:
        """The text of the bar as it would be drawn now.

        >>> p = Progress(total=4, quiet=True)
        >>> p("H2 scan", 2, 4)
        >>> p.line().startswith("[############------------] 2/4 H2 scan")
        True
        """
        filled = int(round(BAR_WIDTH * self.done / self.total))
        elapsed = time.monotonic() - self.started
        return (f"[{'#' * filled}{'-' * (BAR_WIDTH - filled)}] {self.done}/{self.total} "
                f"{self.label} {elapsed:.0f} s")

    def _draw(self) -> None:
        with self._lock:
            text = self.line()
            self.stream.write("\r\033[K" + text[:200])
            self.stream.flush()
            self._drawn = True

    def _ensure_thread(self) -> None:
        if self._thread is None:
            self._thread = threading.Thread(target=self._tick, name="tfa-progress", daemon=True)
            self._thread.start()

    def _tick(self) -> None:
        while not self._stop.wait(TICK):
            if self._drawn or time.monotonic() - self.step_started >= SHOW_AFTER:
                self._draw()


def progress_for(args, total: int = 1) -> Progress:
    """A :class:`Progress` configured from the ``--quiet``/``--verbose`` options of ``args``."""
    return Progress(total=total, quiet=bool(getattr(args, "quiet", False)),
                    verbose=bool(getattr(args, "verbose", False)))
