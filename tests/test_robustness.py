"""Robustness under uncertain reaction energies (tfa.analyses.robustness) on a hand-solvable
network (tests/robust_helpers.py).

Expected values derived by hand:
- R1 (H2 + X <=> XH2) can run downhill exactly when ΔrG'°1 <= c with
  c = -δ - RT ln(1e-6 / (1e-3 · 1e-2)) = -0.1 + RT ln 10 = 5.608 kJ/mol at 25 °C (RT = 2.4790).
  With ΔrG'°1 ~ Normal(10, 4²) the probability of feasibility is Φ((5.608 − 10)/4) = Φ(−1.098)
  = 0.136 (standard normal table, e.g. Abramowitz & Stegun 1964, table 26.1).
- The H2 threshold with ΔrG'°1 = 10: [H2]min = [XH2]min / ([X]max K), K = exp(−(ΔrG'°1 + δ)/RT),
  i.e. 1e-4 · exp(10.1 / 2.4790) = 5.881e-3 mol/L (the analytic case stated in
  tfa.analyses.hydrogen).
"""

from __future__ import annotations

import math
import os
import sys
from pathlib import Path

import pytest

from tfa.analyses.feasibility import feasibility
from tfa.analyses.hydrogen import h2_threshold
from tfa.analyses.robustness import robustness, robustness_points
from tfa.conditions import Conditions
from tfa.constants import R
from tfa.errors import InputError
from tfa.problem.options import DEFAULT_MIN_DRIVING_FORCE, ProblemOptions

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
from robust_helpers import hand_prepare  # noqa: E402


@pytest.fixture(autouse=True)
def _helpers_importable(monkeypatch):
    monkeypatch.setenv("PYTHONPATH", os.pathsep.join(filter(None, [str(HERE), os.environ.get("PYTHONPATH")])))


def _phi(z: float) -> float:
    return 0.5 * (1.0 + math.erf(z / math.sqrt(2.0)))


def _deterministic(params: dict | None = None) -> dict:
    tm = hand_prepare(params, None, "native")
    feas = feasibility(tm, ProblemOptions())
    thr = h2_threshold(tm, ProblemOptions())
    size = 0 if feas.feasible else feas.diagnosis.size
    members = [] if feas.feasible else sorted(feas.diagnosis.sets[0])
    threshold = thr.threshold if math.isfinite(thr.threshold) else None
    return {"feasible": feas.feasible, "uphill_set_size": size, "uphill_set": members,
            "h2_threshold": threshold}


@pytest.mark.parametrize("params, scale", [({"sigma1": 0.0}, 1.0), (None, 0.0), ({"dg1": 2.0}, 0.0)])
def test_zero_sigma_reproduces_the_deterministic_answer_exactly(params, scale):
    expected = _deterministic(params)
    result = robustness(params, None, n_draws=4, seed=3, modes=["native"], executor="serial",
                        prepare=hand_prepare, sigma_scale=scale)
    for record in result.records:
        assert record["error"] is None
        got = {k: record[k] for k in expected}
        assert got == expected  # exact, floats included
    row = result.feasibility_frame().iloc[0]
    assert row["probability"] == (1.0 if expected["feasible"] else 0.0)
    assert row["standard_error"] == 0.0


def test_deterministic_threshold_matches_the_analytic_value():
    rt = R * Conditions().temperature
    expected = 1e-4 * math.exp((10.0 + DEFAULT_MIN_DRIVING_FORCE) / rt)
    assert expected == pytest.approx(5.881e-3, rel=1e-3)
    result = robustness(None, None, n_draws=1, seed=0, modes=["native"], executor="serial",
                        prepare=hand_prepare, sigma_scale=0.0)
    assert result.threshold_frame().iloc[0]["h2_threshold"] == pytest.approx(expected, rel=1e-6)


def test_feasibility_probability_matches_the_normal_distribution():
    rt = R * Conditions().temperature
    cut = -DEFAULT_MIN_DRIVING_FORCE - rt * math.log(1e-6 / (1e-3 * 1e-2))
    p = _phi((cut - 10.0) / 4.0)
    assert p == pytest.approx(0.136, abs=0.002)
    n = 160
    result = robustness(None, None, n_draws=n, seed=20240607, modes=["native"], executor="serial",
                        prepare=hand_prepare, threshold=False)
    row = result.feasibility_frame().iloc[0]
    assert row["draws"] == n and row["failed_draws"] == 0
    se = math.sqrt(p * (1 - p) / n)
    assert abs(row["probability"] - p) < 4 * se
    assert row["standard_error"] == pytest.approx(math.sqrt(row["probability"] * (1 - row["probability"]) / n))
    # R1 is the only step that can be uphill: in the set exactly when the draw is infeasible
    uphill = result.uphill_frame()
    assert list(uphill["reaction"]) == ["R1"]
    assert uphill.iloc[0]["frequency"] == pytest.approx(1.0 - row["probability"])


def test_same_seed_same_results_serial_and_pool(tmp_path):
    kwargs = dict(n_draws=6, seed=11, modes=["native", "h2_only"], prepare=hand_prepare)
    serial = robustness(None, None, executor="serial", **kwargs)
    pool = robustness(None, None, executor="pool", workers=2, results_path=tmp_path / "r.jsonl", **kwargs)
    assert serial.records == pool.records
    # both modes see the same draws of the same reactions here, so the same answers
    native = [r["feasible"] for r in serial.records if r["mode"] == "native"]
    assert native == [r["feasible"] for r in serial.records if r["mode"] == "h2_only"]
    thresholds = {r["h2_threshold"] for r in serial.records}
    assert len(thresholds) > 2  # the draws really differ


def test_threshold_quantiles_follow_the_draws():
    result = robustness(None, None, n_draws=30, seed=5, modes=["native"], executor="serial",
                        prepare=hand_prepare)
    frame = result.threshold_frame().iloc[0]
    values = sorted(r["h2_threshold"] for r in result.records
                    if r["draw"] != "mean" and r["h2_threshold"] is not None)
    assert frame["draws"] == len(values) and frame["never_feasible"] == 30 - len(values)
    assert (values[0] <= frame["h2_threshold_q05"] <= frame["h2_threshold_q50"]
            <= frame["h2_threshold_q95"] <= values[-1])
    # threshold below 1e-2 (top of the search range) exactly when ΔrG'°1 allows it
    assert 0 < len(values) < 30


def test_bad_arguments_are_refused():
    with pytest.raises(InputError, match="draws"):
        robustness(None, None, n_draws=0, prepare=hand_prepare)
    with pytest.raises(InputError, match="mode"):
        robustness(None, None, n_draws=1, modes=["sideways"], prepare=hand_prepare)
    with pytest.raises(InputError, match="sigma_scale"):
        robustness(None, None, n_draws=1, sigma_scale=-1, prepare=hand_prepare)
    assert [p["id"] for p in robustness_points(1, 0, ["native", "h2_only"])] == [
        "native/mean", "native/d00000", "h2_only/mean", "h2_only/d00000"]


def test_threshold_at_the_bottom_of_the_range_searched_is_reported_as_such():
    # the hand network's threshold is 5.881e-3 mol/L (above); searched from 1e-2 it is feasible
    # already at the bottom, so the answer is the range's floor and says so
    result = robustness(None, None, n_draws=1, seed=0, modes=["native"], executor="serial",
                        prepare=hand_prepare, sigma_scale=0.0, h2_range=(1e-2, 1e-1))
    row = result.threshold_frame().iloc[0]
    assert row["h2_threshold"] == pytest.approx(1e-2)
    assert row["h2_at_range_floor"] == True and row["at_range_floor_draws"] == 1  # noqa: E712
    assert "bottom of the range searched in 1 of 1 draws and with the mean" in result.summary()
    # the default range finds the threshold itself, not at the floor
    inside = robustness(None, None, n_draws=1, seed=0, modes=["native"], executor="serial",
                        prepare=hand_prepare, sigma_scale=0.0)
    assert inside.threshold_frame().iloc[0]["h2_at_range_floor"] == False  # noqa: E712
    assert "bottom of the range" not in inside.summary()
