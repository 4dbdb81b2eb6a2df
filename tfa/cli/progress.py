"""A small progress display on stderr for the steps of a long command.

:class:`Progress` draws one line that it rewrites in place
(``[#####-----] 3/9 ranges: 40/276 extremes 12 s``) when stderr is a terminal; the steps report
progress at the grain of their real work (per level, per extreme, per draw), a background
thread keeps the elapsed time moving, and the bar appears only once the command has run for
:data:`SHOW_AFTER` seconds, so short commands print nothing. When stderr is not a terminal,
sparse plain lines are written instead (at most one per :data:`PLAIN_INTERVAL` seconds); with
``verbose`` every step and, at most every :data:`VERBOSE_INTERVAL` seconds, its progress is a
line of its own; with ``quiet`` nothing is shown. No dependency beyond the standard library.

Use it as the ``progress`` callback of :func:`tfa.assess` (``progress(label, done, total)``)
or around any slow call::

    with Progress(total=1, quiet=args.quiet, verbose=args.verbose) as bar:
        bar.step("ranges")
        result = ranges(tm)
"""

from __future__ import annotations

import math
import sys
import threading
import time
from typing import TextIO

#: A command must have been running this long (s) before anything is shown.
SHOW_AFTER = 2.0
#: Least seconds between two plain progress lines (stderr not a terminal).
PLAIN_INTERVAL = 10.0
#: Least seconds between two progress lines of the same step with ``verbose``.
VERBOSE_INTERVAL = 2.0
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
        self.plain = not quiet and not self.verbose and not self.interactive
        self.started = time.monotonic()
        self.step_started = self.started
        self._last_line = -math.inf
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
        now = time.monotonic()
        with self._lock:
            new_step = int(done) != self.done or not self.label
            self.label = label
            self.done = max(0, int(done))
            self.total = max(1, int(total), self.done)
            if new_step:
                self.step_started = now
        if self.verbose:
            if new_step or now - self._last_line >= VERBOSE_INTERVAL:
                self._line(f"[{self.done + 1}/{self.total}] {label} "
                           f"({now - self.started:.0f} s elapsed)")
        elif self.plain:
            if now - self.started >= SHOW_AFTER and now - self._last_line >= PLAIN_INTERVAL:
                self._line(f"[{self.done + 1}/{self.total}] {label} ({now - self.started:.0f} s)")
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

    def _line(self, text: str) -> None:
        self.stream.write(text + "\n")
        self.stream.flush()
        self._last_line = time.monotonic()

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
            if self._drawn or time.monotonic() - self.started >= SHOW_AFTER:
                self._draw()


