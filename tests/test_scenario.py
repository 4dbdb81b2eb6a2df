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


def test_h_per_atp_and_carrier_states_can_be_drawn():
    """H⁺ per ATP, the phosphorylation floor and a carrier pool's total are assumptions a
    scenario may draw (read, checked, applied)."""
    from tfa.network.environment import bundled_environment
    from tfa.network.scenario import apply_changes

    spec = parse_scenario({"ion_stoichiometry.ATPS_GRAD": [3.0, 5.0],
                           "phosphorylation_potential_min_kJ_per_mol": {"normal": [45.0, 3.0]},
                           "pool_total.ferredoxin": [1e-5, 1e-4]})
    assert spec["pool_total.ferredoxin"].kind == "log_uniform"
    env = apply_changes(bundled_environment(), {"ion_stoichiometry.ATPS_GRAD": 3.5,
                                                "phosphorylation_potential_min_kJ_per_mol": 40.0,
                                                "pool_total.ferredoxin": 2e-5})
    assert env.ion_stoichiometry["ATPS_GRAD"] == 3.5
    assert env.cofactors.phosphorylation_floor == 40.0
    assert {p.name: p.total for p in env.cofactors.pools}["ferredoxin"] == 2e-5
    for bad, message in (({"pool_total.ferredoxin": {"normal": [5e-5, 1e-5]}}, "log-uniform"),
                         ({"ion_stoichiometry.": [3, 5]}, "after the dot")):
        with pytest.raises(NetworkFileError, match=message):
            parse_scenario(bad)
    for changes, message in (({"ion_stoichiometry.PTA": 3.0}, "PTA has no entry"),
                             ({"pool_total.quinones": 1e-3}, "no pool of that name")):
        with pytest.raises(NetworkFileError, match=message):
            apply_changes(bundled_environment(), changes)


def test_one_proton_less_per_atp_costs_the_gradient_of_one_proton():
    """ATPS_GRAD with 3 instead of 4 H⁺ per ATP: ΔrG'° rises by RT ln10 (pH_in − pH_out) =
    8.314462618e-3 × 343.15 × 2.302585 × 2.0 = 13.14 kJ/mol at 70 °C (Mitchell 1961,
    doi:10.1038/191144a0; hand-derived, R from CODATA 2018), the energy one entering proton
    brings; the drawn stoichiometry reaches the prepared network."""
    from tfa.network.bundled import load_bundled_network
    from tfa.network.energies import prepare
    from tfa.network.environment import bundled_environment
    from tfa.network.scenario import apply_changes

    model, env = load_bundled_network(), bundled_environment()
    four = prepare(model, env, "native").energies["ATPS_GRAD"].standard
    three = prepare(model, apply_changes(env, {"ion_stoichiometry.ATPS_GRAD": 3.0}),
                    "native").energies["ATPS_GRAD"].standard
    expected = 8.314462618e-3 * 343.15 * math.log(10.0) * 2.0
    assert three - four == pytest.approx(expected, abs=0.01)
