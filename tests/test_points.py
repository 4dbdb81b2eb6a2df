"""Execution of independent points (tfa.util.points): same results serially, on a process pool and
on a local Dask cluster; resumable after a signal with no point computed twice; a failing point
recorded while the run goes on; a torn last line ignored.

No science here: the point function (tests/points_helpers.py) draws one seeded normal number per
point, so equality across executors checks that results depend on the point alone.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tfa.errors import InputError
from tfa.util.points import grid_points, read_results, run_points

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import points_helpers  # noqa: E402


@pytest.fixture(autouse=True)
def _helpers_importable(monkeypatch):
    """Worker processes (pool, Dask) import points_helpers by name."""
    monkeypatch.setenv("PYTHONPATH", os.pathsep.join(filter(None, [str(HERE), os.environ.get("PYTHONPATH")])))


def _points(n_x=3, n_y=4, **extra):
    grid = grid_points([("x", [float(i) for i in range(n_x)]), ("y", [10.0 * j for j in range(n_y)])],
                       extra={"seed": 42, **extra})
    return [dict(p, index=k) for k, p in enumerate(grid)]


def _results(path) -> dict:
    header, records = read_results(path)
    return {i: r.get("result", r.get("error")) for i, r in records.items()}


def _side_log(path) -> list[str]:
    if not Path(path).exists():
        return []
    return [line.split()[0] for line in Path(path).read_text().splitlines() if line.strip()]


def test_serial_pool_and_dask_give_identical_results(tmp_path):
    points = _points()
    serial = run_points(points, points_helpers.draw_point, tmp_path / "serial.jsonl", executor="serial")
    pool = run_points(points, points_helpers.draw_point, tmp_path / "pool.jsonl", executor="pool", workers=2)
    dask_threads = run_points(points, points_helpers.draw_point, tmp_path / "dask_t.jsonl",
                              scheduler="local", workers=2, dask_processes=False)
    assert serial.complete and pool.complete and dask_threads.complete
    reference = _results(tmp_path / "serial.jsonl")
    assert len(reference) == len(points)
    assert _results(tmp_path / "pool.jsonl") == reference
    assert _results(tmp_path / "dask_t.jsonl") == reference
    # values really differ between points (the check could fail)
    assert len({r["value"] for r in reference.values()}) == len(points)


def test_local_dask_cluster_with_worker_processes(tmp_path):
    points = _points(2, 2)
    run_points(points, points_helpers.draw_point, tmp_path / "serial.jsonl", executor="serial")
    summary = run_points(points, points_helpers.draw_point, tmp_path / "dask.jsonl", scheduler="local",
                         workers=2, dask_processes=True)
    assert summary.complete and "dask" in summary.executor
    assert _results(tmp_path / "dask.jsonl") == _results(tmp_path / "serial.jsonl")


def test_injected_failure_is_recorded_and_run_completes(tmp_path):
    points = _points()
    points[5]["fail"] = True
    for executor in ("serial", "pool"):
        path = tmp_path / f"{executor}.jsonl"
        summary = run_points(points, points_helpers.draw_point, path, executor=executor, workers=2)
        assert summary.complete
        assert summary.failed == [points[5]["id"]]
        _, records = read_results(path)
        assert len(records) == len(points)
        assert "injected failure" in records[points[5]["id"]]["error"]
        assert all("result" in r for i, r in records.items() if i != points[5]["id"])


SCRIPT = """
import sys
from tfa.util.points import run_points
import points_helpers, json
points = json.loads(sys.argv[1])
summary = run_points(points, points_helpers.draw_point, sys.argv[2], executor=sys.argv[3], workers=2)
print(json.dumps({"interrupted": summary.interrupted, "computed": summary.computed}))
"""


@pytest.mark.parametrize("executor", ["serial", "pool"])
def test_interrupted_run_resumes_to_the_uninterrupted_result(tmp_path, executor):
    side = tmp_path / "computed.log"
    points = _points(4, 5, sleep=0.15, log=str(side))
    path = tmp_path / "run.jsonl"
    proc = subprocess.Popen([sys.executable, "-c", SCRIPT, json.dumps(points), str(path), executor],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline:
        if path.exists() and len(path.read_text().splitlines()) >= 5:  # header + 4 points
            break
        time.sleep(0.05)
    proc.send_signal(signal.SIGTERM)
    out, err = proc.communicate(timeout=60)
    assert proc.returncode == 0, err
    first = json.loads(out.strip().splitlines()[-1])
    assert first["interrupted"] is True
    assert 4 <= first["computed"] < len(points)
    # every point computed so far is in the file: nothing computed was lost
    assert sorted(_side_log(side)) == sorted(read_results(path)[1])

    resumed = run_points(points, points_helpers.draw_point, path, executor=executor, workers=2, resume=True)
    assert resumed.complete and resumed.already_done == first["computed"]
    computed = _side_log(side)
    assert sorted(computed) == sorted(p["id"] for p in points)  # each point computed exactly once
    ids_in_file = [json.loads(line)["id"] for line in path.read_text().splitlines()[1:]]
    assert len(ids_in_file) == len(set(ids_in_file)) == len(points)

    straight = tmp_path / "straight.jsonl"
    run_points([dict(p, log="") for p in points], points_helpers.draw_point, straight, executor="serial")
    strip = {i: r["result"] for i, r in read_results(path)[1].items()}
    assert strip == {i: r["result"] for i, r in read_results(straight)[1].items()}


def test_torn_last_line_is_ignored_and_cut_on_resume(tmp_path):
    points = _points(2, 2)
    path = tmp_path / "run.jsonl"
    run_points(points[:2], points_helpers.draw_point, path, executor="serial")
    with open(path, "a") as handle:
        handle.write('{"id": "p1-0", "point": {"x": 1.0')  # a kill during the write
    assert sorted(read_results(path)[1]) == sorted(p["id"] for p in points[:2])
    summary = run_points(points, points_helpers.draw_point, path, executor="serial", resume=True)
    assert summary.already_done == 2 and summary.computed == 2
    lines = path.read_text().splitlines()
    assert all(json.loads(line) for line in lines)  # every line is whole JSON now
    assert len(lines) == 1 + len(points)


def test_existing_file_is_not_overwritten_and_header_must_match(tmp_path):
    points = _points(1, 2)
    path = tmp_path / "run.jsonl"
    run_points(points, points_helpers.draw_point, path, executor="serial", header={"seed": 1})
    with pytest.raises(InputError, match="--resume"):
        run_points(points, points_helpers.draw_point, path, executor="serial", header={"seed": 1})
    with pytest.raises(InputError, match="other settings"):
        run_points(points, points_helpers.draw_point, path, executor="serial", header={"seed": 2},
                   resume=True)
    again = run_points(points, points_helpers.draw_point, path, executor="serial", header={"seed": 1},
                       resume=True)
    assert again.computed == 0 and again.complete


def test_bad_points_are_refused(tmp_path):
    with pytest.raises(InputError, match="unique"):
        run_points([{"id": "a"}, {"id": "a"}], points_helpers.draw_point, tmp_path / "r.jsonl")
    with pytest.raises(InputError, match="executor"):
        run_points([{"id": "a"}], points_helpers.draw_point, tmp_path / "r2.jsonl", executor="gpu")
