"""Intervals, sequential stopping and extension of robustness runs (tfa.analyses.robustness,
``tfa robustness``).

References: the Wilson score interval (E. B. Wilson, J. Am. Stat. Assoc. 22 (1927) 209-212,
doi:10.1080/01621459.1927.10502953); its value for 81 of 263 from Newcombe (1998), Stat. Med.
17:857, table I (from memory); 0 of n by hand: the upper end is z²/(n + z²).
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import pytest

from tfa.analyses.robustness import robustness, wilson_interval
from tfa.cli import main

sys.path.insert(0, str(Path(__file__).resolve().parent))
from robust_helpers import hand_prepare  # noqa: E402


def test_wilson_interval_hand_values():
    z2 = 1.959963984540054 ** 2
    for n in (4, 10, 50):
        low, high = wilson_interval(0, n)
        assert low == 0.0 and high == pytest.approx(z2 / (n + z2), rel=1e-12)
        low, high = wilson_interval(n, n)            # symmetric: n of n
        assert high == 1.0 and low == pytest.approx(n / (n + z2), rel=1e-12)
    assert wilson_interval(81, 263) == pytest.approx((0.2553, 0.3662), abs=5e-5)
    assert all(math.isnan(x) for x in wilson_interval(0, 0))


def test_sequential_stopping_stops_at_the_width_and_says_so():
    # dg1 = -60: every draw feasible (σ 4); 0 failures of n: width z²/(n+z²) <= 0.3 from n = 9,
    # so the batches of 5 stop at 10 draws, well before the budget of 100
    result = robustness({"dg1": -60.0}, None, n_draws=100, seed=1, modes=["native"],
                        executor="serial", threshold=False, prepare=hand_prepare,
                        interval_width=0.3, batch=5)
    row = result.feasibility_frame().iloc[0]
    assert row["draws"] == 10 and row["feasible_draws"] == 10
    assert row["interval_high"] - row["interval_low"] <= 0.3
    assert "interval width" in result.stopped_by
    # a width no budget reaches: stopped by the budget, which is said too
    capped = robustness({"dg1": -60.0}, None, n_draws=10, seed=1, modes=["native"],
                        executor="serial", threshold=False, prepare=hand_prepare,
                        interval_width=0.01, batch=5)
    assert capped.n_draws == 10 and "budget" in capped.stopped_by
    assert "interval" in capped.summary()


def test_resume_extends_50_draws_to_100_and_keeps_the_first_50_byte_identical(
        mini_folder, tmp_path, capsys):
    out = tmp_path / "run"
    common = [str(mini_folder), "--modes", "native", "--no-threshold", "--interval-width", "0",
              "--out", str(out), "--json", "-q"]
    assert main(["robustness", "--draws", "50", *common]) == 0
    first = json.loads(capsys.readouterr().out)
    lines_50 = (out / "robustness.jsonl").read_bytes().splitlines()
    draws_50 = (out / "robustness_draws.csv").read_bytes().splitlines()
    assert first["feasibility"][0]["draws"] == 50
    assert "interval_low" in first["feasibility"][0]

    assert main(["robustness", "--draws", "100", "--resume", *common]) == 0
    second = json.loads(capsys.readouterr().out)
    lines_100 = (out / "robustness.jsonl").read_bytes().splitlines()
    draws_100 = (out / "robustness_draws.csv").read_bytes().splitlines()
    assert second["feasibility"][0]["draws"] == 100
    assert len(lines_100) == len(lines_50) + 50
    assert lines_100[:len(lines_50)] == lines_50              # header, mean and draws 0-49
    assert draws_100[:len(draws_50)] == draws_50             # the table's first 50 draws too
