"""``tfa robustness`` and ``tfa map`` on the bundled network (small runs), and the robustness run
with σ = 0 against the deterministic answer of the feasibility analysis on the bundled network.

The deterministic reference is the engine's own feasibility analysis (tfa.analyses.feasibility),
itself checked against hand-solved networks and certified by tfa.verify; the check here is that
the robustness machinery (draws, workers, results file) changes nothing when every σ is 0.
"""

from __future__ import annotations

import json

import pytest

from tfa.cli import main


@pytest.fixture(scope="module")
def bundled():
    from tfa.network.bundled import load_bundled_network
    from tfa.network.environment import bundled_environment

    return load_bundled_network(), bundled_environment()


def test_zero_sigma_on_the_bundled_network_is_the_deterministic_answer(bundled):
    from tfa.analyses.feasibility import feasibility
    from tfa.analyses.robustness import robustness
    from tfa.network.energies import prepare

    model, env = bundled
    tm = prepare(model, env, "native")
    expected = feasibility(tm)
    result = robustness(model, env, n_draws=1, seed=1, modes=["native"], executor="serial",
                        sigma_scale=0.0, threshold=False)
    for record in result.records:
        assert record["error"] is None
        assert record["feasible"] == expected.feasible
        if not expected.feasible:
            assert record["uphill_set_size"] == expected.diagnosis.size
            assert record["uphill_set"] == sorted(expected.diagnosis.sets[0])


def test_map_command_writes_tables_and_heatmaps(tmp_path, capsys):
    out = tmp_path / "map"
    code = main(["map", "--x", "temperature=50,90", "--y", "ph=7.5", "--modes", "native", "--no-threshold",
                 "--no-driving-force", "--out", str(out), "--json", "-q"])
    assert code == 0
    payload = json.loads(capsys.readouterr().out)
    assert payload["x"] == {"name": "temperature", "values": [50.0, 90.0]}
    assert len(payload["table"]) == 2 and all(r["error"] is None for r in payload["table"])
    for name in ("map.jsonl", "map.csv", "map.json", "map_native.png", "map_native.svg"):
        assert (out / name).stat().st_size > 0
    # resuming a finished map computes nothing and gives the same table
    assert main(["map", "--x", "temperature=50,90", "--y", "ph=7.5", "--modes", "native", "--no-threshold",
                 "--no-driving-force", "--out", str(out), "--resume", "--json", "-q"]) == 0
    again = json.loads(capsys.readouterr().out)
    assert again["table"] == payload["table"]
    assert again["provenance"]["points_per_second"] == 0.0  # nothing computed again
    assert len((out / "map.jsonl").read_text().splitlines()) == 1 + 2  # header + two points


def test_robustness_command_json(tmp_path, capsys):
    code = main(["robustness", "--draws", "1", "--modes", "native", "--no-threshold",
                 "--sigma-scale", "0", "--out", str(tmp_path / "r"), "--json", "-q"])
    assert code == 0
    payload = json.loads(capsys.readouterr().out)
    row = payload["feasibility"][0]
    assert row["mode"] == "native" and row["draws"] == 1
    assert row["feasible_draws"] == (1 if row["deterministic_feasible"] else 0)
    assert (tmp_path / "r" / "robustness_uphill.csv").is_file()


@pytest.mark.parametrize("argv, message", [
    (["map", "--x", "salinity=1:2:3", "--y", "ph=7"], "NAME"),
    (["map", "--x", "ph=7,8", "--y", "ph=6"], "different"),
    (["robustness", "--resume"], "--out"),
    (["robustness", "--modes", "sideways"], "mode"),
    (["robustness", "--workers", "0"], "--workers"),
])
def test_bad_options_exit_2_with_a_message(argv, message, capsys):
    assert main(argv) == 2
    assert message in capsys.readouterr().err
