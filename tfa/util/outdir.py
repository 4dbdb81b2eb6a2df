"""Output folders that always hold exactly one complete run.

Every command that writes files (``tfa assess``, the analysis commands with ``--out``,
``tfa robustness``, ``tfa map``) and :meth:`tfa.assessment.result.Assessment.write` go through
:class:`OutputFolder`:

1. **Checked up front** (:func:`check_output_folder`): a path that exists as a file, a parent
   that is a file, a read-only place, a name too long, or a folder that holds files ``tfa`` did
   not write (it carries no :data:`MARKER`) is refused with one message before anything is
   computed.
2. **Locked**: a lock file beside the folder (``.NAME.tfa-lock``, an advisory ``flock`` the
   kernel drops when the process dies) refuses a second writer of the same folder.
3. **Written aside, swapped in**: the new files go into ``.NAME.tfa-partial`` beside the folder;
   at the end that folder is exchanged with the old one in one atomic step (Linux
   ``renameat2(RENAME_EXCHANGE)``; elsewhere two renames, recovered on the next run) and the old
   one removed. An interruption, a failure or a full disk leave the previous result byte for
   byte as it was; a rerun with fewer analyses leaves no file of the earlier run.
4. **Leftovers cleaned**: the next run removes the partial folder of a killed run, or, for a run
   with a resumable results file (``journal``) continued with ``resume``, carries on in it.

Nothing here imports anything of ``tfa`` but the errors.
"""

from __future__ import annotations

import contextlib
import ctypes
import errno
import hashlib
import json
import os
import shutil
import signal
import threading
import time
from pathlib import Path
from typing import Iterator

from ..errors import InputError

#: File that marks a folder as written by ``tfa`` (only such a folder is ever replaced).
MARKER = ".tfa-output.json"
#: Format of the marker.
MARKER_FORMAT = "tfa-output/1"
#: Errors of the file system that mean "this output cannot be written" (reported as bad output
#: place, exit code 2), not a failure of the analysis.
WRITE_ERRNOS = (errno.ENOSPC, errno.EDQUOT, errno.EROFS, errno.EACCES, errno.EPERM, errno.EFBIG,
                errno.ENAMETOOLONG, errno.ENOTDIR, errno.EEXIST, errno.EISDIR)
_NAME_MAX = 255
_PATH_MAX = 4096
_RENAME_EXCHANGE = 2
_AT_FDCWD = -100

_HELD: dict[str, list] = {}
_HELD_LOCK = threading.Lock()


class OutputError(InputError):
    """The output folder cannot be used or written (exit code 2); nothing was changed there."""


def _side_name(target: Path, suffix: str) -> Path:
    """``.NAME.tfa-SUFFIX`` beside ``target`` (a hash of the name when that would be too long)."""
    name = f".{target.name}.tfa-{suffix}"
    if len(name.encode()) > _NAME_MAX:
        name = f".tfa-{suffix}-{hashlib.sha256(target.name.encode()).hexdigest()[:16]}"
    return target.parent / name


def _nearest_existing(path: Path) -> Path:
    for candidate in [path, *path.parents]:
        if os.path.lexists(candidate):
            return candidate
    return Path("/")


def is_tfa_output(folder: Path) -> bool:
    """True when ``folder`` is empty or carries the :data:`MARKER` of a ``tfa`` run."""
    try:
        entries = list(folder.iterdir())
    except OSError:
        return False
    return not entries or (folder / MARKER).is_file()


def check_output_folder(target: str | os.PathLike, option: str = "--out") -> Path:
    """The absolute output folder, or an :class:`OutputError` naming what is wrong with it.

    >>> check_output_folder("/proc/self/status/results")
    Traceback (most recent call last):
    ...
    tfa.util.outdir.OutputError: --out /proc/self/status/results: /proc/self/status is a file, not a folder; give a folder path
    """
    text = str(target).strip() if target is not None else ""
    if not text or "\x00" in text:
        raise OutputError(f"{option} {text!r}: give the path of a folder")
    path = Path(os.path.abspath(text))
    shown = f"{option} {text}"
    if len(str(path).encode()) + 32 > _PATH_MAX or any(
            len(part.encode()) > _NAME_MAX - 16 for part in path.parts):
        raise OutputError(f"{shown}: the path is too long for the file system; give a shorter one")
    if path == Path(path.anchor):
        raise OutputError(f"{shown}: the root folder cannot hold results; give a folder of its own")
    existing = _nearest_existing(path)
    if existing == path:
        if not path.is_dir():
            raise OutputError(f"{shown}: exists and is not a folder; give a folder path")
        if not is_tfa_output(path):
            raise OutputError(f"{shown}: the folder holds files that tfa did not write (no {MARKER}); "
                              "a result folder is replaced as a whole, so give a new or empty folder")
    elif not existing.is_dir():
        raise OutputError(f"{shown}: {existing} is a file, not a folder; give a folder path")
    writable_at = path.parent if existing == path else existing
    if not os.access(writable_at, os.W_OK | os.X_OK):
        raise OutputError(f"{shown}: {writable_at} is read-only; give a folder you can write to")
    return path


# ------------------------------------------------------------------ the lock
@contextlib.contextmanager
def output_lock(target: str | os.PathLike, option: str = "--out") -> Iterator[Path]:
    """Hold the lock of an output folder (re-entrant within this process): a second process
    asking for it gets an :class:`OutputError` at once."""
    import fcntl

    path = check_output_folder(target, option)
    lock_path = _side_name(path, "lock")
    key = str(lock_path)
    with _HELD_LOCK:
        if key in _HELD:
            _HELD[key][1] += 1
            held = True
        else:
            held = False
    if held:
        try:
            yield path
        finally:
            with _HELD_LOCK:
                _HELD[key][1] -= 1
        return
    _make_parent(path, option)
    while True:
        try:
            fd = os.open(lock_path, os.O_RDWR | os.O_CREAT, 0o644)
        except OSError as err:
            raise OutputError(f"{option} {target}: cannot create the lock file {lock_path.name} "
                              f"({err.strerror}); give a folder you can write to") from None
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            owner = os.pread(fd, 64, 0).decode(errors="replace").strip() or "?"
            os.close(fd)
            raise OutputError(f"{option} {target}: another tfa run (process {owner}) is writing this "
                              "folder; wait for it to end, or give another folder") from None
        # the file may have been removed by the holder that just released it: lock the new one
        try:
            same = os.fstat(fd).st_ino == os.stat(lock_path).st_ino
        except FileNotFoundError:
            same = False
        if same:
            break
        os.close(fd)
    os.ftruncate(fd, 0)
    os.pwrite(fd, str(os.getpid()).encode(), 0)
    with _HELD_LOCK:
        _HELD[key] = [fd, 1]
    try:
        yield path
    finally:
        with _HELD_LOCK:
            _HELD[key][1] -= 1
            last = _HELD[key][1] == 0
            if last:
                del _HELD[key]
        if last:
            with contextlib.suppress(OSError):
                os.unlink(lock_path)
            os.close(fd)


def _make_parent(path: Path, option: str) -> None:
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise OutputError(f"{option} {path}: cannot create {path.parent} ({err.strerror}); give a "
                          "folder you can write to") from None


# ------------------------------------------------------------------ the folder
class OutputFolder:
    """Write a run's files aside and swap them in at the end (see the module docstring).

    Parameters
    ----------
    target : path
        The output folder.
    option : str
        How the user named it (in messages).
    journal : str, optional
        File name of a resumable results file (``robustness.jsonl``): the partial folder of an
        interrupted run is kept for ``resume``.
    resume : bool
        Continue the journal: in the partial folder of an interrupted run, else in a copy of the
        finished run's.
    overwrite : bool
        Start afresh when a journal exists (else that is an error: resume or overwrite).
    command : str
        Recorded in the marker.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> out = pathlib.Path(tempfile.mkdtemp()) / "results"
    >>> with OutputFolder(out) as folder:
    ...     _ = (folder.staging / "a.txt").write_text("new run")
    >>> sorted(p.name for p in out.iterdir())
    ['.tfa-output.json', 'a.txt']
    """

    def __init__(self, target: str | os.PathLike, option: str = "--out", *,
                 journal: str | None = None, resume: bool = False, overwrite: bool = False,
                 command: str = "") -> None:
        self.option = option
        self.given = target
        self.journal = journal
        self.resume = resume
        self.overwrite = overwrite
        self.command = command
        self.target = check_output_folder(target, option)
        self.staging = _side_name(self.target, "partial")
        self.committed = False
        self.cancelled = False
        self._lock = None

    # ---------------------------------------------------------------- entering
    def __enter__(self) -> "OutputFolder":
        self._lock = output_lock(self.given, self.option)
        self._lock.__enter__()
        try:
            with self._write_errors():
                self._recover_swap()
                self._prepare_staging()
        except BaseException:
            self._lock.__exit__(None, None, None)
            raise
        return self

    def _recover_swap(self) -> None:
        """A run killed between the two renames of a swap (systems without an atomic exchange)
        left the old result under ``.NAME.tfa-old``: put it back, or remove it."""
        retired = _side_name(self.target, "old")
        if os.path.lexists(retired):
            if not os.path.lexists(self.target):
                os.rename(retired, self.target)
            else:
                shutil.rmtree(retired, ignore_errors=True)

    def _prepare_staging(self) -> None:
        staging, journal = self.staging, self.journal
        earlier = [p for p in ((staging / journal) if journal else None,
                               (self.target / journal) if journal else None)
                   if p is not None and p.is_file() and p.stat().st_size > 0]
        if journal and earlier and not (self.resume or self.overwrite):
            raise OutputError(f"{self.option} {self.given}: already holds results ({journal}); "
                              "continue them with --resume, or pass --overwrite to start again")
        # a partial folder with a marker is an old result swapped out by a run killed just
        # after its swap: never continued
        keep = bool(journal and self.resume and (staging / journal).is_file()
                    and not (staging / MARKER).exists())
        if os.path.lexists(staging) and not keep:
            _remove(staging)
        staging.mkdir(exist_ok=True)
        if journal and self.resume and not keep and (self.target / journal).is_file():
            shutil.copy2(self.target / journal, staging / journal)
        for leftover in staging.glob(".*.part"):
            leftover.unlink()

    # ---------------------------------------------------------------- leaving
    def commit(self) -> Path:
        """Swap the new files in (atomic where the system allows); the old ones are removed."""
        if self.committed:
            return self.target
        with self._write_errors():
            marker = {"format": MARKER_FORMAT, "command": self.command,
                      "written": time.strftime("%Y-%m-%dT%H:%M:%S%z")}
            (self.staging / MARKER).write_text(json.dumps(marker) + "\n", encoding="utf-8")
            _sync(self.staging)
            with _signals_held():
                if os.path.lexists(self.target):
                    if not _exchange(self.staging, self.target):
                        retired = _side_name(self.target, "old")
                        os.rename(self.target, retired)
                        os.rename(self.staging, self.target)
                        self.staging = retired
                    _sync(self.target.parent)
                    _remove(self.staging)
                else:
                    os.rename(self.staging, self.target)
                    _sync(self.target.parent)
        self.committed = True
        return self.target

    def keep_aside(self) -> None:
        """Do not swap in on leaving (an interrupted resumable run): the previous result stays,
        the partial folder waits for ``resume``."""
        self.cancelled = True

    def abandon(self) -> None:
        """Leave the previous result as it was; keep the partial folder only for a resume."""
        if self.committed:
            return
        journal = self.staging / self.journal if self.journal else None
        if journal is None or not journal.is_file() or journal.stat().st_size == 0:
            _remove(self.staging)

    def __exit__(self, kind, error, trace) -> None:
        try:
            if kind is None and not self.cancelled:
                self.commit()
            else:
                self.abandon()
        finally:
            self._lock.__exit__(None, None, None)
        if isinstance(error, OSError) and error.errno in WRITE_ERRNOS:
            raise self._as_output_error(error) from None

    @contextlib.contextmanager
    def _write_errors(self) -> Iterator[None]:
        try:
            yield
        except OSError as err:
            if err.errno in WRITE_ERRNOS:
                raise self._as_output_error(err) from None
            raise

    def _as_output_error(self, err: OSError) -> OutputError:
        return OutputError(f"{self.option} {self.given}: cannot write the results "
                           f"({err.strerror or err}); the folder was left as it was; free space or "
                           "give a folder you can write to")

    def path(self, name: str) -> Path:
        """Where a file of this run is written now (inside the staging folder)."""
        return self.staging / name


def _remove(path: Path) -> None:
    if path.is_dir() and not path.is_symlink():
        shutil.rmtree(path, ignore_errors=True)
    else:
        with contextlib.suppress(FileNotFoundError):
            path.unlink()


def _sync(folder: Path) -> None:
    """fsync a folder (its entries, after renames), where the system allows."""
    with contextlib.suppress(OSError):
        fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


def _exchange(a: Path, b: Path) -> bool:
    """Exchange two paths in one atomic step (Linux renameat2); False when not available."""
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    renameat2.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p,
                          ctypes.c_uint]
    if renameat2(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    code = ctypes.get_errno()
    if code in (errno.EINVAL, errno.ENOSYS, errno.EOPNOTSUPP):
        return False
    raise OSError(code, os.strerror(code), str(b))


@contextlib.contextmanager
def _signals_held() -> Iterator[None]:
    """SIGINT and SIGTERM wait until the swap is done (main thread only)."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    held = {signal.SIGINT, signal.SIGTERM}
    previous = signal.pthread_sigmask(signal.SIG_BLOCK, held)
    try:
        yield
    finally:
        signal.pthread_sigmask(signal.SIG_SETMASK, previous)
