"""Environment files: reading, validation with file/key-named errors, copies for scans, and the
mapping of feed, bounds, demand and outlets onto a network."""

from __future__ import annotations

from pathlib import Path

import pytest

from tfa.errors import ConditionsError, NetworkFileError
from tfa.network import Environment, read_network
from tfa.network.bundled import bundled_folder

DATA = Path(__file__).parent / "data" / "mini_network"

EXAMPLE = """
[environment]
name = "Kestrel Ridge vent field"
description = "Invented demo setting for tests"
[conditions]
temperature_C = 70.0
pH = 7.0
ionic_strength_M = 0.25
pressure_bar = 250.0
[feed]
H2 = 1.0e-3
CO2 = 1.0e-2
phosphate = 1.0e-3
[bounds]
default = [1.0e-6, 1.0e-2]
lac = [1.0e-5, 1.0e-3]
atp = [1.0e-4, 1.0e-2]
[demand]
reaction = "DM_mal"
flux = 0.01
[outlets]
allowed = ["ac"]
"""


def write(tmp_path: Path, text: str) -> Path:
    path = tmp_path / "environment.toml"
    path.write_text(text)
    return path


def test_read_example(tmp_path):
    env = Environment.from_toml(write(tmp_path, EXAMPLE))
    assert env.name == "Kestrel Ridge vent field"
    # 70 degC = 343.15 K (SI definition of the Celsius scale)
    assert env.conditions.temperature == pytest.approx(343.15)
    assert (env.conditions.ph, env.conditions.ionic_strength, env.conditions.pressure) == (7.0, 0.25, 250.0)
    assert env.conditions.pmg is None
    assert env.feed == {"H2": 1e-3, "CO2": 1e-2, "phosphate": 1e-3}
    assert env.default_bounds == (1e-6, 1e-2) and env.bounds["lac"] == (1e-5, 1e-3)
    assert env.demand == ("DM_mal", 0.01)
    assert env.outlets == ("ac",)


@pytest.mark.parametrize(
    "old, new, expected",
    [
        ("pH = 7.0", "ph = 7.0", ["unknown key 'ph' in [conditions]", "did you mean 'pH'"]),
        ("[outlets]", "[outlet]", ["unknown section [outlet]", "outlets"]),
        ("H2 = 1.0e-3", "H2 = -1.0e-3", ["[feed] H2", "give a value > 0"]),
        ("lac = [1.0e-5, 1.0e-3]", "lac = [1.0e-3, 1.0e-5]", ["[bounds] lac", "swap them"]),
        ("lac = [1.0e-5, 1.0e-3]", "lac = 1.0e-5", ["[bounds] lac", "give two numbers"]),
        ("ionic_strength_M = 0.25\n", "", ["'ionic_strength_M' is missing"]),
        ("flux = 0.01", "flux = \"a lot\"", ["[demand] flux", "not a number"]),
        ("H2 = 1.0e-3", "H2 = 1.0e-3 +", ["not valid TOML", "line"]),
    ],
)
def test_bad_files_name_file_and_key(tmp_path, old, new, expected):
    assert old in EXAMPLE
    path = write(tmp_path, EXAMPLE.replace(old, new))
    with pytest.raises(NetworkFileError) as info:
        Environment.from_toml(path)
    assert str(path) in str(info.value)
    for text in expected:
        assert text in str(info.value)


def test_impossible_conditions_are_conditions_errors(tmp_path):
    path = write(tmp_path, EXAMPLE.replace("temperature_C = 70.0", "temperature_C = 420.0"))
    with pytest.raises(ConditionsError, match=r"environment.toml line \d+ \[conditions\].*420"):
        Environment.from_toml(path)


def test_copies_for_scans_leave_the_original(tmp_path):
    env = Environment.from_toml(write(tmp_path, EXAMPLE))
    hot = env.with_conditions(celsius=90.0, ph=6.5)
    assert hot.conditions.temperature == pytest.approx(363.15) and hot.conditions.ph == 6.5
    assert env.conditions.temperature == pytest.approx(343.15)
    lean = env.with_feed({"H2": 1e-6})
    assert lean.feed["H2"] == 1e-6 and env.feed["H2"] == 1e-3
    assert "H2" not in env.without_feed("H2").feed
    with pytest.raises(NetworkFileError):
        env.with_feed(H2=0.0)
    with pytest.raises(ConditionsError):
        env.with_conditions(celsius=500.0)


def test_bounds_precedence_and_exchanges_on_a_network(tmp_path):
    env = Environment.from_toml(write(tmp_path, EXAMPLE))
    model = read_network(DATA / "reactions.tsv")
    fed = env.feed_metabolites(model)            # thermo keys H2, CO2, phosphate -> network ids
    assert fed == {"h2": 1e-3, "co2": 1e-2, "pi": 1e-3}
    bounds = env.metabolite_bounds(model)
    assert bounds["h2"] == (1e-3, 1e-3)          # fed: fixed
    assert bounds["lac"] == (1e-5, 1e-3)         # environment entry
    assert bounds["for"] == (1e-6, 0.05)         # compounds table conc_min/conc_max
    assert bounds["atp"] == (1e-4, 1e-2)
    assert bounds["pyr"] == (1e-6, 1e-2)         # default
    assert "h2o" not in bounds and "h" not in bounds
    exchanges = env.exchange_bounds(model)
    assert exchanges["EX_h2"] == (-1000.0, 1000.0) and exchanges["EX_h2o"] == (-1000.0, 1000.0)
    assert exchanges["EX_ac"] == (0.0, 1000.0)   # outlet: export only
    assert exchanges["EX_atp"] == (0.0, 0.0)     # not fed: closed
    assert exchanges["DM_mal"] == (0.01, 1000.0)
    with model:
        env.apply_exchange_bounds(model)
        assert model.reactions.DM_mal.lower_bound == 0.01
    assert model.reactions.DM_mal.lower_bound == 0.0


def test_unknown_feed_or_demand_is_named(tmp_path):
    model = read_network(DATA / "reactions.tsv")
    env = Environment.from_toml(write(tmp_path, EXAMPLE.replace("H2 = 1.0e-3", "H2S = 1.0e-4")))
    with pytest.raises(NetworkFileError, match="'H2S' is not a compound"):
        env.feed_metabolites(model)
    env = Environment.from_toml(write(tmp_path, EXAMPLE.replace('"DM_mal"', '"DM_mall"')))
    with pytest.raises(NetworkFileError, match="did you mean 'DM_mal'"):
        env.exchange_bounds(model)


def _bundled_environment_exists() -> bool:
    try:
        return (bundled_folder() / "environment.toml").is_file()
    except NetworkFileError:
        return False


@pytest.mark.skipif(not _bundled_environment_exists(),
                    reason="models/ancestral_core/environment.toml not written yet (another engineer's task)")
def test_bundled_environment_reads():
    from tfa.network import bundled_environment, load_bundled_network

    env = bundled_environment()
    model = load_bundled_network()
    assert env.name == "Kestrel Ridge vent field"
    fed = {model.metabolites.get_by_id(i).notes.get("thermo_key") for i in env.feed_metabolites(model)}
    assert {"H2", "CO2"} <= fed
    assert env.demand_reaction in model.reactions
    assert set(env.metabolite_bounds(model)) <= {m.id for m in model.metabolites}


def test_outlet_missing_from_network_is_ignored(tmp_path, caplog):
    model = read_network(DATA / "reactions.tsv")
    env = Environment.from_toml(write(tmp_path, EXAMPLE.replace('allowed = ["ac"]', 'allowed = ["ac", "ch4"]')))
    exchanges = env.exchange_bounds(model)
    assert exchanges["EX_ac"] == (0.0, 1000.0)
    assert "outlet 'ch4' ignored" in caplog.text
