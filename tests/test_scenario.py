"""Scenario uncertainty (tfa.network.scenario, robustness with ``scenario``): the setting's
assumptions drawn from the ranges an environment file gives.

Hand-derived check on the bundled network: ATP is made from the proton gradient
(ATPS_GRAD, 4 H+ per ATP); each H+ entering from the outer fluid gains RT ln10 (pH_in − pH_out),
so a lower outer pH can only help (Mitchell 1961, doi:10.1038/191144a0; the bundled
environment.toml's own comment: at pH_out 5.5 the
4 H+ bring 52.6 kJ/mol and ATP is made, at 6.0 only 39.4 kJ/mol and none is). Drawing pH_out
uniform in [5, 6] (the outer compartment's pH): every feasible draw must have a lower outer pH than every infeasible one, and
holding pH_out at its central 5.5 (feasible) must give a probability at least as high.
"""

from __future__ import annotations

import dataclasses
import math

import pytest

from tfa.errors import NetworkFileError
from tfa.network.scenario import draw_changes, parse_scenario


def test_parse_and_draw_are_hand_checkable():
    spec = parse_scenario({"pH_feed.h_out": [5.0, 6.0], "temperature_C": {"normal": [70.0, 5.0]},
                           "feed.co2": [1e-3, 1e-1]})
    assert spec["feed.co2"].kind == "log_uniform" and spec["temperature_C"].kind == "normal"
    for i in range(20):
        values = draw_changes(spec, 3, i)
        assert 5.0 <= values["pH_feed.h_out"] <= 6.0
        assert 1e-3 <= values["feed.co2"] <= 1e-1
        assert 55.0 <= values["temperature_C"] <= 85.0       # cut at 3 sd
    held = draw_changes(spec, 3, 7, held=("temperature_C",))
    assert "temperature_C" not in held
    assert held["feed.co2"] == draw_changes(spec, 3, 7)["feed.co2"]   # the same draw 7
    for bad, message in (({"salinity": [1, 2]}, "unknown assumption"),
                         ({"pH": [7, 6]}, "low < high"),
                         ({"feed.co2": {"normal": [1e-2, 1e-3]}}, "range"),
                         ({"pH": {"uniform": [6, 7]}}, "normal")):
        with pytest.raises(NetworkFileError, match=message):
            parse_scenario(bad)


@pytest.fixture(scope="module")
def outer_ph_run():
    from tfa.analyses.robustness import robustness
    from tfa.network.bundled import load_bundled_network
    from tfa.network.environment import bundled_environment

    env = bundled_environment()
    env = dataclasses.replace(env, scenario=parse_scenario({"pH_compartment.out": [5.0, 6.0]}))
    return env, robustness(load_bundled_network(), env, n_draws=10, seed=18, modes=["native"],
                           executor="serial", threshold=False, scenario="assumptions",
                           time_limit=120)


def test_outer_ph_drawn_on_the_bundled_network_reports_what_it_carries(outer_ph_run):
    env, result = outer_ph_run
    draws = [r for r in result.records if r.get("variant") == "assumptions" and r["error"] is None]
    assert len(draws) == 10
    ph = {r["draw"]: draw_changes(env.scenario, 18, r["draw"])["pH_compartment.out"] for r in draws}
    feasible = [ph[r["draw"]] for r in draws if r["feasible"]]
    infeasible = [ph[r["draw"]] for r in draws if not r["feasible"]]
    assert feasible and infeasible, "pH_out in [5, 6] should cross the threshold (5.5 runs, 6.0 not)"
    assert max(feasible) < min(infeasible)                  # a lower outer pH only helps
    frame = result.assumption_frame()
    row = frame[frame["assumption"] == "pH_compartment.out"].iloc[0]
    assert row["probability_held_central"] == 1.0           # pH_out 5.5: the deterministic answer
    assert row["probability"] == pytest.approx(len(feasible) / 10)
    assert row["probability_change"] < 0
    assert "pH_compartment.out carries" in result.summary()
    assert math.isfinite(result.feasibility_frame().iloc[0]["interval_low"])
