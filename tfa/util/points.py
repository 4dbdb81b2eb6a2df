"""Run many independent points (draws of a robustness run, cells of a condition map) through one
function, serially, on a local process pool or on a Dask cluster, with a results file that
survives interruption.

Nothing scientific happens here. A *point* is a small JSON-able dict with a stable string
``"id"``; the *function* takes the point and returns a JSON-able dict. It must be a module-level
function (it is sent to other processes by reference) and must compute its answer from the point
alone, so that the result of a point is the same whichever executor runs it.

Results file (JSON lines, one object per line, appended by the coordinating process only)::

    {"format": "tfa-points/1", "header": {...}}                  first line: what the run is
    {"id": "p0003", "point": {...}, "result": {...}}              a finished point
    {"id": "p0007", "point": {...}, "error": "ValueError: ..."}   a point that failed

Each line is written, flushed and ``fsync``-ed as soon as its point completes, so a killed run
loses at most the line being written. On ``resume=True`` a torn last line is cut off, the ids
already present are skipped, and the run goes on where it stopped. SIGINT and SIGTERM stop the
submission of new points; points already running are waited for and written, then the run
returns with ``interrupted=True`` (a second signal aborts at once).

Executors
---------
- ``"serial"``: in this process, one point after the other;
- ``"pool"`` (default): a local process pool, ``workers`` processes (default: the usable cores);
- ``"dask"``: ``scheduler="local"`` starts a local Dask cluster with ``workers`` single-threaded
  worker processes (``dask_processes=False``: threads in this process); any other ``scheduler``
  is the address of a running Dask scheduler (``tcp://host:8786``).

Identical results everywhere: the pool forks this process, so its workers share everything,
including Python's string-hash seed. Dask workers are fresh interpreters; optlang's matrix
interface (used for HiGHS) orders columns by string hashes, so the last digits of a solution
can depend on ``PYTHONHASHSEED``. Workers of a local cluster get this process's
``PYTHONHASHSEED`` (Dask would give them one of its own, and replaces 0 by it); the ``tfa``
commands run with :data:`HASH_SEED`, and a Dask run warns when its workers hash differently
from this process (start remote workers with the same ``PYTHONHASHSEED``).

Workers build heavy objects (a network, a database) once per process through
:func:`worker_cache`, not once per point.
"""

from __future__ import annotations

import json
import logging
import os
import signal
import threading
import time
import traceback
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Mapping, Sequence

from ..errors import InputError
from .files import to_json, write_text

log = logging.getLogger(__name__)

#: Format tag on the first line of a results file.
FORMAT = "tfa-points/1"
#: Names of the executors.
EXECUTORS = ("serial", "pool", "dask")
#: PYTHONHASHSEED under which the ``tfa`` commands run (not 0, which Dask replaces).
HASH_SEED = "7"
#: Seconds to wait for a Dask scheduler named by its address.
SCHEDULER_TIMEOUT = 10.0

_CACHE: dict[tuple[Any, int], Any] = {}
_CACHE_LOCK = threading.Lock()


def worker_cache(key: Any, factory: Callable[[], Any]) -> Any:
    """The object built by ``factory()`` for ``key``, built once per process (and per thread,
    since solver objects must not be shared between threads) and reused by later points.

    >>> calls = []
    >>> a = worker_cache(("doc", 1), lambda: calls.append(1) or "model")
    >>> b = worker_cache(("doc", 1), lambda: calls.append(1) or "model")
    >>> a, b, len(calls)
    ('model', 'model', 1)
    """
    slot = (key, threading.get_ident())
    with _CACHE_LOCK:
        if slot in _CACHE:
            return _CACHE[slot]
    value = factory()
    with _CACHE_LOCK:
        return _CACHE.setdefault(slot, value)


def available_cores() -> int:
    """Number of cores this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - not Linux
        return max(1, os.cpu_count() or 1)


@dataclass
class RunSummary:
    """What a call of :func:`run_points` did.

    Attributes
    ----------
    path : results file
    total : number of points asked for
    already_done : points found finished in the file (resume) and skipped
    computed : points computed by this call (finished or failed)
    failed : ids of points that failed in this call
    interrupted : True when a signal stopped the run before every point was done
    seconds : wall time of this call
    executor : plain description, e.g. "pool (2 workers)"
    """

    path: Path
    total: int
    already_done: int
    computed: int
    failed: list[str] = field(default_factory=list)
    interrupted: bool = False
    seconds: float = 0.0
    executor: str = ""

    @property
    def complete(self) -> bool:
        """True when every point has a line in the file."""
        return not self.interrupted and self.already_done + self.computed == self.total

    @property
    def points_per_second(self) -> float:
        """Points computed by this call per second of wall time."""
        return self.computed / self.seconds if self.seconds > 0 else float("nan")


# ---------------------------------------------------------------------------------- the file
def _line(obj: Mapping[str, Any]) -> str:
    """One compact JSON line (NaN as null, keys sorted)."""
    return json.dumps(json.loads(to_json(obj)), sort_keys=True, separators=(",", ":"),
                      allow_nan=False)


def read_results(path: str | os.PathLike) -> tuple[dict, dict[str, dict]]:
    """(header, records by id) of a results file; a torn last line is ignored.

    When an id appears more than once, the last line wins (it cannot happen through
    :func:`run_points`; the check is for hand-edited files).
    """
    path = Path(path)
    header: dict = {}
    records: dict[str, dict] = {}
    if not path.exists():
        return header, records
    data = path.read_bytes()
    end = data.rfind(b"\n") + 1
    for number, raw in enumerate(data[:end].splitlines(), start=1):
        if not raw.strip():
            continue
        try:
            obj = json.loads(raw)
        except (json.JSONDecodeError, UnicodeDecodeError, RecursionError):
            log.warning("%s line %d is not JSON; it is skipped (its point is computed again)",
                        path, number)
            continue
        if isinstance(obj, dict) and "format" in obj and isinstance(obj.get("header"), dict):
            header = obj["header"]
        elif _well_formed(obj):
            records[str(obj["id"])] = obj
        else:
            log.warning("%s line %d is not a finished point; it is skipped (its point is "
                        "computed again)", path, number)
    if end < len(data):
        log.info("%s: last line is incomplete (interrupted write); it is ignored", path)
    return header, records


def _well_formed(obj: Any) -> bool:
    """A finished point's line: an id, its point, and a result (a dict) or an error (text)."""
    return (isinstance(obj, dict) and isinstance(obj.get("id"), str) and obj["id"] != ""
            and isinstance(obj.get("point"), dict)
            and (isinstance(obj.get("result"), dict) or isinstance(obj.get("error"), str)))


def _cut_torn_tail(path: Path) -> None:
    """Truncate the file after its last newline (a line torn by a kill)."""
    size = path.stat().st_size
    if size == 0:
        return
    with open(path, "rb+") as handle:
        data = handle.read()
        end = data.rfind(b"\n") + 1
        if end < size:
            handle.truncate(end)
            handle.flush()
            os.fsync(handle.fileno())


class _Appender:
    """Append JSON lines with flush + fsync each."""

    def __init__(self, path: Path) -> None:
        self.handle = open(path, "a", encoding="utf-8")

    def write(self, obj: Mapping[str, Any]) -> None:
        self.handle.write(_line(obj) + "\n")
        self.handle.flush()
        os.fsync(self.handle.fileno())

    def close(self) -> None:
        self.handle.close()


# ---------------------------------------------------------------------------------- workers
def call_point(function: Callable[[dict], Any], point: dict) -> dict:
    """Run ``function(point)`` and return ``{"result": ...}`` or ``{"error": "..."}``; never raises
    for an ordinary exception (the run goes on)."""
    try:
        return {"result": function(point)}
    except Exception as err:  # noqa: BLE001 - a failing point is recorded, not fatal
        where = traceback.extract_tb(err.__traceback__)
        at = f" (at {Path(where[-1].filename).name}:{where[-1].lineno})" if where else ""
        return {"error": f"{type(err).__name__}: {err}{at}"}


#: Seconds between two checks of a worker's watchdog that its coordinator is alive.
WATCHDOG_INTERVAL = 1.0
_PR_SET_PDEATHSIG = 1


def die_with_parent() -> None:
    """Make this worker process end when the process that started it dies, even by SIGKILL:
    the kernel's parent-death signal on Linux (``prctl(PR_SET_PDEATHSIG, SIGKILL)``) and, on
    every system, a watchdog thread that ends the process once its parent is gone (the parent
    id changes when a process is orphaned). A worker never outlives its coordinator by more
    than :data:`WATCHDOG_INTERVAL` seconds, nor holds its output pipes open."""
    parent = os.getppid()
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(_PR_SET_PDEATHSIG, int(signal.SIGKILL), 0, 0, 0)
    except (OSError, AttributeError):  # pragma: no cover - not Linux
        pass
    if os.getppid() != parent:  # the parent died before the signal was armed
        os._exit(1)

    def watch() -> None:
        while True:
            time.sleep(WATCHDOG_INTERVAL)
            if os.getppid() != parent:
                os._exit(1)

    threading.Thread(target=watch, name="tfa-parent-watchdog", daemon=True).start()


def worker_start() -> None:
    """Initializer of every worker process: it dies with its coordinator, and only the
    coordinator decides when to stop on Ctrl-C."""
    die_with_parent()
    signal.signal(signal.SIGINT, signal.SIG_IGN)


_ignore_sigint = worker_start  # the name earlier code and tests use


class _Serial:
    name = "serial"

    def __init__(self) -> None:
        self.workers = 1

    def submit(self, function, point):
        return call_point(function, point)  # done at once: the value itself

    def close(self) -> None:
        pass


class _Pool:
    def __init__(self, workers: int) -> None:
        import concurrent.futures as cf
        import multiprocessing

        self.workers = workers
        self.name = f"pool ({workers} workers)"
        context = multiprocessing.get_context("fork" if os.name == "posix" else "spawn")
        self._cf = cf
        self.executor = cf.ProcessPoolExecutor(max_workers=workers, mp_context=context,
                                               initializer=worker_start)

    def submit(self, function, point):
        return self.executor.submit(call_point, function, point)

    def wait(self, futures: list, timeout: float) -> list:
        done, _ = self._cf.wait(futures, timeout=timeout, return_when=self._cf.FIRST_COMPLETED)
        return list(done)

    def close(self) -> None:
        self.executor.shutdown(wait=True, cancel_futures=True)


class _Dask:
    def __init__(self, workers: int, scheduler: str, processes: bool) -> None:
        try:
            from distributed import Client, LocalCluster
        except ImportError as err:  # pragma: no cover - the cluster extra is missing
            raise InputError("the Dask executor needs the 'cluster' extra: pip install 'tfa[cluster]'") from err
        self.cluster = None
        if scheduler == "local":
            import dask

            # Dask gives its worker processes a PYTHONHASHSEED of its own (it replaces 0 too);
            # give them ours, set before they start
            seed = os.environ.get("PYTHONHASHSEED")
            settings = ({"distributed.nanny.pre-spawn-environ.PYTHONHASHSEED": seed}
                        if seed and seed != "0" else {})
            with dask.config.set(settings):
                self.cluster = LocalCluster(n_workers=workers, threads_per_worker=1,
                                            processes=processes, dashboard_address=None)
            self.client = Client(self.cluster)
            self.workers = workers
            self.name = f"dask local cluster ({workers} workers{'' if processes else ', threads'})"
        else:
            try:
                self.client = Client(scheduler, timeout=SCHEDULER_TIMEOUT)
            except Exception as err:  # noqa: BLE001 - Dask raises OSError, TimeoutError, ValueError ...
                reason = " ".join(str(err).split())[:160] or type(err).__name__
                raise InputError(f"cannot reach the Dask scheduler at {scheduler!r} ({reason}); "
                                 "check the address (tcp://HOST:PORT) or use --scheduler local"
                                 ) from None
            self.workers = max(1, sum(self.client.nthreads().values()))
            self.name = f"dask at {scheduler} ({self.workers} threads)"

        self._check_hash_seed()

    def _check_hash_seed(self) -> None:
        """Warn when the workers hash strings differently from this process: some solver
        interfaces order variables by string hashes, so the last digits of a solution (and the
        choice among equally good alternatives) could differ. Run everything with the same
        ``PYTHONHASHSEED`` (the ``tfa`` commands use 0) for identical results."""
        try:
            seen = set(self.client.run(_hash_probe).values())
        except Exception as err:  # noqa: BLE001 - a check only
            log.info("could not compare string hashing with the Dask workers: %s", err)
            return
        if seen != {_hash_probe()}:
            log.warning("the Dask workers hash strings differently from this process (set "
                        "PYTHONHASHSEED=0 for this process and the workers): results may differ "
                        "in the last digits from a serial or pool run")

    def submit(self, function, point):
        # pure=False: a point is computed exactly once per submission, never deduplicated away
        return self.client.submit(call_point, function, point, pure=False, key=f"tfa-point-{point['id']}-{time.time_ns()}")

    def wait(self, futures: list, timeout: float) -> list:
        deadline = time.monotonic() + timeout
        while True:
            done = [f for f in futures if f.done()]
            if done or time.monotonic() >= deadline:
                return done
            time.sleep(0.01)

    def close(self) -> None:
        self.client.close()
        if self.cluster is not None:
            self.cluster.close()


def _hash_probe() -> int:
    """A string hash: equal in two processes exactly when they share PYTHONHASHSEED."""
    return hash("tfa-hash-probe")


def _outcome(runner, future) -> dict:
    try:
        return future.result()
    except Exception as err:  # noqa: BLE001 - a worker died under this point
        return {"error": f"worker failed: {type(err).__name__}: {err}"}


# ---------------------------------------------------------------------------------- the run
class _Stop:
    """SIGINT/SIGTERM handler: first signal asks to stop, second aborts."""

    def __init__(self) -> None:
        self.requested = False
        self.previous: dict[int, Any] = {}

    def __enter__(self) -> "_Stop":
        if threading.current_thread() is threading.main_thread():
            for sig in (signal.SIGINT, signal.SIGTERM):
                self.previous[sig] = signal.signal(sig, self._handle)
        return self

    def _handle(self, signum, frame) -> None:
        if self.requested:
            raise KeyboardInterrupt
        self.requested = True
        log.warning("signal %d: no new points are started; running points are finished and written "
                    "(signal again to abort)", signum)

    def __exit__(self, *exc) -> None:
        for sig, handler in self.previous.items():
            signal.signal(sig, handler)


def _make_runner(executor: str, workers: int | None, scheduler: str | None, dask_processes: bool):
    if scheduler:
        executor = "dask"
    if executor not in EXECUTORS:
        raise InputError(f"unknown executor {executor!r}; use one of {', '.join(EXECUTORS)}")
    if workers is not None and workers < 1:
        raise InputError(f"workers must be at least 1, got {workers}")
    n = workers or available_cores()
    if executor == "serial":
        return _Serial()
    if executor == "pool":
        return _Pool(n)
    return _Dask(n, scheduler or "local", dask_processes)


def run_points(
    points: Sequence[Mapping[str, Any]],
    function: Callable[[dict], Any],
    results_path: str | os.PathLike,
    *,
    executor: str = "pool",
    workers: int | None = None,
    scheduler: str | None = None,
    dask_processes: bool = True,
    resume: bool = False,
    overwrite: bool = False,
    header: Mapping[str, Any] | None = None,
    progress: Callable[[int, int, dict], None] | None = None,
    max_in_flight: int | None = None,
) -> RunSummary:
    """Compute every point not yet in ``results_path`` and append each as it completes.

    Parameters
    ----------
    points : dicts, each with a unique ``"id"``
    function : module-level callable ``point -> JSON-able result``
    results_path : the JSON-lines results file
    executor : "serial", "pool" (default) or "dask" (implied by ``scheduler``)
    workers : processes (pool, local Dask cluster); default the usable cores
    scheduler : "local" or the address of a Dask scheduler
    dask_processes : local Dask cluster with worker processes (True) or threads (False)
    resume : continue an existing file (skip ids present in it)
    overwrite : start afresh when the file exists and ``resume`` is False
    header : what the run is (parameters); written on the first line and, on resume, compared
        with the file's, so a file is never continued with other parameters
    progress : called as ``progress(finished, total, record)`` after each line
    max_in_flight : points submitted and not yet finished (default 2 x workers). On a stop
        request nothing is cancelled: the points in flight are finished and written, so no
        computed point is lost and none is computed twice.

    Returns
    -------
    RunSummary
    """
    started = time.perf_counter()
    path = Path(results_path)
    ids = [str(p.get("id", "")) for p in points]
    if any(not i for i in ids):
        raise InputError("every point needs a non-empty 'id'")
    if len(set(ids)) != len(ids):
        dup = sorted({i for i in ids if ids.count(i) > 1})[:5]
        raise InputError(f"point ids must be unique; repeated: {', '.join(dup)}")
    header = dict(header or {})

    normal_header = json.loads(_line(header))
    done_ids: set[str] = set()
    if path.exists() and path.stat().st_size > 0:
        if resume:
            _cut_torn_tail(path)
            old_header, records = read_results(path)
            if old_header != normal_header:
                diff = sorted(k for k in set(old_header) | set(normal_header)
                              if old_header.get(k) != normal_header.get(k))
                raise InputError(f"{path}: the results file was written by a run with other settings "
                                 f"({', '.join(diff) or 'header'} differ); resume with the same settings, "
                                 "or write to another folder")
            done_ids = set(records) & set(ids)
        elif not overwrite:
            raise InputError(f"{path} already holds results; continue it with --resume, or remove it "
                             "(or pass --overwrite) to start again")
    todo = [dict(p) for p, i in zip(points, ids) if i not in done_ids]
    total = len(ids)
    summary = RunSummary(path, total, len(done_ids), 0)
    if not todo:
        summary.seconds = time.perf_counter() - started
        summary.executor = "none needed"
        return summary
    # the executor (a scheduler's address) is checked before anything is written
    runner = _make_runner(executor, workers, scheduler, dask_processes)
    try:
        if not done_ids and not (resume and path.exists() and path.stat().st_size > 0):
            write_text(path, _line({"format": FORMAT, "header": header}) + "\n")
        return _run(todo, function, path, runner, summary, progress, max_in_flight, started)
    finally:
        runner.close()


def _run(todo: list[dict], function, path: Path, runner, summary: RunSummary, progress,
         max_in_flight, started: float) -> RunSummary:
    """Compute the points ``todo`` on ``runner``, appending each line as it completes."""
    total = summary.total
    summary.executor = runner.name
    appender = _Appender(path)
    finished = summary.already_done

    def record(point: dict, outcome: dict) -> None:
        nonlocal finished
        line = {"id": point["id"], "point": point}
        line.update(outcome)
        appender.write(line)
        summary.computed += 1
        finished += 1
        if "error" in outcome:
            summary.failed.append(point["id"])
            log.warning("point %s failed: %s", point["id"], outcome["error"])
        if progress is not None:
            progress(finished, total, line)

    try:
        with _Stop() as stop:
            if isinstance(runner, _Serial):
                for point in todo:
                    if stop.requested:
                        break
                    record(point, runner.submit(function, point))
            else:
                limit = max_in_flight or 2 * runner.workers
                queue = list(reversed(todo))
                in_flight: dict[Any, dict] = {}
                while queue or in_flight:
                    while queue and not stop.requested and len(in_flight) < limit:
                        point = queue.pop()
                        in_flight[runner.submit(function, point)] = point
                    if not in_flight:
                        break
                    for future in runner.wait(list(in_flight), 0.2):
                        record(in_flight.pop(future), _outcome(runner, future))
            summary.interrupted = stop.requested and summary.computed < len(todo)
    finally:
        appender.close()
    summary.seconds = time.perf_counter() - started
    return summary


def grid_points(axes: Sequence[tuple[str, Sequence[Any]]], extra: Mapping[str, Any] | None = None,
                prefix: str = "p") -> list[dict]:
    """Points of a full grid over named axes, with stable ids from the grid indices.

    >>> [p["id"] for p in grid_points([("x", [1, 2]), ("y", [10, 20, 30])])]
    ['p0-0', 'p0-1', 'p0-2', 'p1-0', 'p1-1', 'p1-2']
    >>> grid_points([("x", [1.5])], {"mode": "native"})
    [{'id': 'p0', 'x': 1.5, 'mode': 'native'}]
    """
    import itertools

    names = [name for name, _ in axes]
    out = []
    for combo in itertools.product(*[list(enumerate(values)) for _, values in axes]):
        point = {"id": prefix + "-".join(str(i) for i, _ in combo)}
        point.update({name: value for name, (_, value) in zip(names, combo)})
        point.update(extra or {})
        out.append(point)
    return out


def run_and_read(points: list[dict], function, results_path, scratch_name: str, **run_options):
    """:func:`run_points` into ``results_path`` (or a temporary file named ``scratch_name`` when
    none is given), then read the finished lines back: ``(summary, {point id: line})``."""
    import tempfile

    with tempfile.TemporaryDirectory(prefix="tfa-points-") as scratch:
        path = Path(results_path) if results_path is not None else Path(scratch) / scratch_name
        summary = run_points(points, function, path, **run_options)
        _, lines = read_results(path)
    return summary, lines
