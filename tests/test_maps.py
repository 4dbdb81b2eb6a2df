"""Condition maps (tfa.analyses.maps) on a hand-solvable network (tests/robust_helpers.py).

Derivation of the expected values: with [XH2] = 1e-6 and [X] = 1e-2 mol/L (the best bounds),
R1 (H2 + X <=> XH2, ΔrG'° = 10 kJ/mol) has -ΔrG' = -10 + RT ln([H2] · 1e4); R2 is far downhill
(ΔrG'° = -20). Hence
- feasible exactly when -10 + RT ln([H2] · 1e4) >= δ = 0.1 kJ/mol;
- the H2 threshold is 1e-4 · exp((10 + δ)/RT) (analytic case of tfa.analyses.hydrogen);
- the max-min driving force (Noor et al. 2014, PLoS Comput. Biol. 10:e1003483) is
  B = min(-ΔrG'1, (-ΔrG'1 - ΔrG'2)/2) over the free ratio [X]/[XH2]; on this grid the first term
  is the smaller, so B = -10 + RT ln([H2] · 1e4), negative where infeasible.
RT = R·T with R = 8.314462618e-3 kJ/mol/K (CODATA 2018).
"""

from __future__ import annotations

import json
import math
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tfa.analyses.maps import axis_values, condition_map
from tfa.constants import CELSIUS_ZERO, R
from tfa.errors import InputError
from tfa.network.environment import Environment
from tfa.conditions import Conditions
from tfa.problem.options import DEFAULT_MIN_DRIVING_FORCE
from tfa.util.points import HASH_SEED, read_results

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
from robust_helpers import hand_prepare  # noqa: E402

ENV = Environment("hand", Conditions.from_celsius(25.0), feed={"h2": 1e-3})
X = ("temperature", [25.0, 60.0, 95.0])
Y = ("h2", [1e-3, 4e-3, 1e-2])


@pytest.fixture(autouse=True)
def _helpers_importable(monkeypatch):
    monkeypatch.setenv("PYTHONPATH", os.pathsep.join(filter(None, [str(HERE), os.environ.get("PYTHONPATH")])))


def _margin(celsius: float, h2: float) -> float:
    return -10.0 + R * (celsius + CELSIUS_ZERO) * math.log(h2 * 1e4)


def test_map_matches_the_hand_derivation():
    result = condition_map({}, ENV, X, Y, modes=["native"], executor="serial", prepare=hand_prepare)
    frame = result.to_frame()
    assert len(frame) == 9 and frame["error"].isna().all()
    for row in frame.itertuples():
        margin = _margin(row.temperature_C, row.h2_activity)
        assert row.feasible == (margin >= DEFAULT_MIN_DRIVING_FORCE)
        assert row.uphill_set_size == (0 if row.feasible else 1)
        assert row.driving_force_kJ_per_mol == pytest.approx(margin, abs=1e-6)
        rt = R * (row.temperature_C + CELSIUS_ZERO)
        assert row.h2_threshold == pytest.approx(1e-4 * math.exp((10.0 + DEFAULT_MIN_DRIVING_FORCE) / rt), rel=1e-6)
    assert 0 < frame["feasible"].sum() < 9  # both answers occur on this grid


AGREE = """
import sys, json
from robust_helpers import hand_prepare
from tfa.analyses.maps import condition_map
from tfa.conditions import Conditions
from tfa.network.environment import Environment
env = Environment("hand", Conditions.from_celsius(25.0), feed={"h2": 1e-3})
out = {}
for name, kwargs in [("serial", {"executor": "serial"}), ("pool", {"executor": "pool", "workers": 2}),
                     ("dask", {"scheduler": "local", "workers": 2})]:
    r = condition_map({}, env, ("temperature", [25.0, 95.0]), ("h2", [1e-3, 1e-2]), modes=["native"],
                      prepare=hand_prepare, threshold=False, **kwargs)
    out[name] = {"records": r.records, "executor": r.run.executor}
print(json.dumps(out))
"""


@pytest.mark.slow
def test_serial_pool_and_local_dask_agree():
    # The solver interface orders columns by string hashes, so every process runs with one
    # PYTHONHASHSEED, as the tfa commands do (see tfa.util.points). Values are compared exactly.
    env = dict(os.environ, PYTHONHASHSEED=HASH_SEED)
    done = subprocess.run([sys.executable, "-c", AGREE], capture_output=True, text=True, timeout=180, env=env)
    assert done.returncode == 0, done.stderr[-3000:]
    out = json.loads(done.stdout.strip().splitlines()[-1])
    serial = out["serial"]["records"]
    assert all(r["error"] is None for r in serial) and len(serial) == 4
    assert serial == out["pool"]["records"] == out["dask"]["records"]
    assert "dask" in out["dask"]["executor"] and "pool" in out["pool"]["executor"]
    assert "differently" not in done.stderr  # the workers shared the hash seed


def test_injected_failure_is_recorded_and_the_map_completes(tmp_path):
    path = tmp_path / "map.jsonl"
    result = condition_map({"fail_above_C": 80.0}, ENV, X, Y, modes=["native"], executor="pool",
                           workers=2, prepare=hand_prepare, results_path=path)
    frame = result.to_frame()
    failed = frame[frame["error"].notna()]
    assert sorted(failed["temperature_C"].unique()) == [95.0] and len(failed) == 3
    assert all("injected failure" in e for e in failed["error"])
    assert frame[frame["error"].isna()]["feasible"].notna().all()
    assert result.run.complete and len(result.run.failed) == 3
    _, records = read_results(path)
    assert len(records) == 9


SCRIPT = """
import sys, json
from robust_helpers import hand_prepare
from tfa.analyses.maps import condition_map
from tfa.conditions import Conditions
from tfa.network.environment import Environment
env = Environment("hand", Conditions.from_celsius(25.0), feed={"h2": 1e-3})
params = json.loads(sys.argv[1])
result = condition_map(params, env, ("temperature", [25.0, 45.0, 65.0, 85.0]), ("h2", [1e-3, 3e-3, 1e-2]),
                       modes=["native"], executor=sys.argv[3], workers=2, prepare=hand_prepare,
                       results_path=sys.argv[2], resume=len(sys.argv) > 4, threshold=False)
print(json.dumps({"interrupted": result.run.interrupted, "computed": result.run.computed}))
"""


@pytest.mark.slow
def test_map_stopped_by_a_signal_resumes_to_the_uninterrupted_result(tmp_path):
    env = dict(os.environ, PYTHONHASHSEED=HASH_SEED)  # three processes, one hash seed
    side = tmp_path / "prepared.log"
    params = {"sleep": 0.3, "log": str(side)}
    path = tmp_path / "map.jsonl"
    proc = subprocess.Popen([sys.executable, "-c", SCRIPT, json.dumps(params), str(path), "serial"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env)
    deadline = time.monotonic() + 90
    while time.monotonic() < deadline:
        if path.exists() and len(path.read_text().splitlines()) >= 4:  # header + 3 points
            break
        time.sleep(0.05)
    proc.send_signal(signal.SIGINT)
    out, err = proc.communicate(timeout=90)
    assert proc.returncode == 0, err
    first = json.loads(out.strip().splitlines()[-1])
    assert first["interrupted"] and 3 <= first["computed"] < 12
    resumed = subprocess.run([sys.executable, "-c", SCRIPT, json.dumps(params), str(path), "pool", "resume"],
                             capture_output=True, text=True, timeout=120, env=env)
    assert resumed.returncode == 0, resumed.stderr
    second = json.loads(resumed.stdout.strip().splitlines()[-1])
    assert not second["interrupted"] and first["computed"] + second["computed"] == 12
    computed = side.read_text().splitlines()
    assert len(computed) == len(set(computed)) == 12  # no point computed twice
    ids = [json.loads(line)["id"] for line in path.read_text().splitlines()[1:]]
    assert len(ids) == len(set(ids)) == 12

    straight = tmp_path / "straight.jsonl"
    done = subprocess.run([sys.executable, "-c", SCRIPT, json.dumps({}), str(straight), "serial"],
                          capture_output=True, text=True, timeout=120, env=env)
    assert done.returncode == 0, done.stderr
    results = {i: r["result"] for i, r in read_results(path)[1].items()}
    assert results == {i: r["result"] for i, r in read_results(straight)[1].items()}


def test_axis_parsing_and_refusals():
    assert axis_values("h2=1e-6:1e-2:9:log")[1][0] == 1e-6
    assert axis_values("ionic-strength=0,0.1")[0] == "ionic_strength"
    with pytest.raises(InputError, match="NAME"):
        axis_values("salinity=1:2:3")
    with pytest.raises(InputError, match="positive"):
        axis_values("h2=0:1e-2:3:log")
    with pytest.raises(InputError, match="differ"):
        condition_map({}, ENV, ("ph", [7.0]), ("ph", [8.0]), prepare=hand_prepare)


def test_heatmaps_are_written_as_png_and_svg(tmp_path):
    from tfa.report.maps import map_figure, write_map_figures

    result = condition_map({"fail_above_C": 80.0}, ENV, X, Y, modes=["native"], executor="serial",
                           prepare=hand_prepare)
    paths = write_map_figures(result.to_frame(), "temperature_C", "h2_activity", tmp_path)
    assert sorted(p.suffix for p in paths) == [".png", ".svg"]
    assert paths[0].read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" and paths[0].stat().st_size > 10_000
    assert "<svg" in paths[1].read_text()
    fig = map_figure(result.to_frame(), "temperature_C", "h2_activity", "native")
    texts = [t.get_text() for ax in fig.axes for t in ax.texts]
    # the feasibility panel writes yes/no in the cells: 3 feasible points at 25 and 60 degC
    feasible = result.to_frame()["feasible"]
    assert texts.count("yes") == int((feasible == True).sum())  # noqa: E712
    with pytest.raises(InputError, match="mode"):
        map_figure(result.to_frame(), "temperature_C", "h2_activity", "h2_only")


def test_map_reports_a_threshold_at_the_bottom_of_the_range_searched():
    # the hand network's threshold is 1e-4 exp((10 + delta)/RT) >= 5.9e-3 mol/L on this grid:
    # searched from 0.1 mol/L, every point is feasible already at the bottom of the range
    result = condition_map({}, ENV, X, Y, modes=["native"], executor="serial",
                           prepare=hand_prepare, driving_force=False, h2_range=(0.1, 1.0))
    frame = result.to_frame()
    assert list(frame["h2_threshold"]) == pytest.approx([0.1] * len(frame))
    assert frame["h2_at_range_floor"].all()
    assert f"bottom of the range searched at {len(frame)} point(s)" in result.summary()
    from tfa.report.maps import map_figure

    fig = map_figure(frame, "temperature_C", "h2_activity", "native")
    texts = [t.get_text() for ax in fig.axes for t in ax.texts]
    assert texts.count("≤-1.0") == len(frame)   # log10(0.1), marked as the range's floor
    assert any("bottom of the range searched" in ax.get_title() for ax in fig.axes)
