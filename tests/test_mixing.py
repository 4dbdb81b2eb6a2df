"""Mixing lines: conservative mixing of two fluids with the pH from the acid-base balance, the
environment at a point of the line, pH changes that keep the gradient's ΔpH, and a mixing-line
map of the bundled network with its figure."""

from __future__ import annotations

import contextlib
import io
import math
import warnings

import numpy as np
import pytest

from tfa.analyses.jobs import changed_environment
from tfa.analyses.maps import condition_map
from tfa.conditions import Conditions
from tfa.network.inputs import resolve_inputs
from tfa.network.mixing_line import mixed_environment
from tfa.thermo.mixing import Fluid, alkalinity, mix, water_enthalpy, water_ion_product


@pytest.fixture(scope="module")
def bundled():
    return resolve_inputs()


def test_neutralisation_follows_the_hand_derivation():
    # no carbon: TA = [OH-] - [H+]; pH pKw-3 against pH 3 at 25 degC, I = 0 (hand derivation):
    # 1:1 -> TA = 0, pH = pKw/2; 3:1 -> TA = 0.5 mM, pH = pKw + log10(5e-4)
    pkw = water_ion_product(298.15)
    vent = Fluid("vent", 25.0, pkw - 3.0, 0.0, 2e-3, 0.0)
    sea = Fluid("sea", 25.0, 3.0, 0.0, 0.0, 0.0)
    assert mix(vent, sea, 0.5).ph == pytest.approx(pkw / 2, abs=1e-3)
    assert mix(vent, sea, 0.75).ph == pytest.approx(pkw + math.log10(5e-4), abs=1e-3)
    assert mix(vent, sea, 0.25).h2 == pytest.approx(0.5e-3)          # conservative total


def test_water_ion_product_against_pychnosz_at_100_C():
    # reference: pychnosz subcrt of H2O = H+ + OH- (SUPCRT92 water, HKF ions) at 100 degC, Psat
    import pychnosz

    with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        log_k = pychnosz.subcrt(["H2O", "H+", "OH-"], [-1, 1, 1], state=["liq", "aq", "aq"],
                                T=100).out["logK"].iloc[0]
    assert water_ion_product(373.15) == pytest.approx(-log_k, abs=0.05)


def test_mixture_reproduces_its_end_members_and_mixes_alkalinity(bundled):
    line = bundled.environment.mixing
    near_sea = mix(line.vent, line.seawater, 1e-9, 250.0)
    assert near_sea.ph == pytest.approx(line.seawater.ph, abs=1e-3)
    half = mix(line.vent, line.seawater, 0.5, 250.0)
    # the alkalinity of the mixture at its pH is the mixed alkalinity (conservative)
    def ta(f):
        c = Conditions.from_celsius(f.celsius, ph=f.ph, ionic_strength=f.ionic_strength, pressure=250.0)
        return alkalinity(f.ph, c, f.dic, f.sulfide, f.ammonia)
    assert ta(half) == pytest.approx(0.5 * ta(line.vent) + 0.5 * ta(line.seawater), rel=1e-6)
    assert half.celsius == pytest.approx(0.5 * (line.vent.celsius + line.seawater.celsius))
    by_heat = mix(line.vent, line.seawater, 0.5, 250.0, temperature="enthalpy")
    # heat balance with the heat capacity of water (4.18-4.25 kJ/kg/K from 10 to 110 degC):
    # within 1 degC of the linear rule
    assert by_heat.celsius == pytest.approx(half.celsius, abs=1.0)


def test_water_enthalpy_against_steam_tables():
    # saturated liquid water (IAPWS-IF97 steam tables, from memory): 419.1 kJ/kg at 100 degC,
    # 852.3 kJ/kg at 200 degC, relative to 0 degC (0.0 kJ/kg)
    assert water_enthalpy(100.0) == pytest.approx(419.1, abs=2.0)
    assert water_enthalpy(200.0) == pytest.approx(852.3, abs=5.0)


def test_the_demo_setting_is_a_point_of_its_mixing_line(bundled):
    env, mixture = mixed_environment(bundled.environment, bundled.model, 0.6)
    stated = bundled.environment
    assert env.conditions.celsius == pytest.approx(stated.conditions.celsius)
    assert env.conditions.ph == pytest.approx(stated.conditions.ph, abs=0.1)
    assert env.conditions.ionic_strength == pytest.approx(stated.conditions.ionic_strength)
    assert env.feed["h2"] == pytest.approx(stated.feed["h2"], rel=1e-3)
    assert mixture.dic == pytest.approx(stated.fluid["dissolved_inorganic_carbon"], rel=1e-3)


def test_a_ph_change_keeps_the_gradient_unless_asked(bundled):
    env = bundled.environment
    dph = env.conditions.ph - env.compartments["out"].ph
    moved = changed_environment(bundled.model, env, {"ph": 8.2})
    assert moved.conditions.ph - moved.compartments["out"].ph == pytest.approx(dph)
    kept = changed_environment(bundled.model, env, {"ph": 8.2}, hold_gradient=False)
    assert kept.compartments["out"].ph == env.compartments["out"].ph


def test_ph_override_keeps_the_gradient(bundled):
    env = bundled.environment
    moved = resolve_inputs(ph=6.5).environment
    assert moved.conditions.ph == 6.5
    # pH_out 5.5 -> 4.5 (hand derivation: dpH = 7.5 - 5.5 = 2 kept)
    assert moved.compartments["out"].ph == pytest.approx(env.compartments["out"].ph - 1.0)


@pytest.mark.slow
def test_mixing_line_map_of_the_bundled_network_and_its_figure(bundled, tmp_path):
    from tfa.report.maps import line_figure, write_line_figures

    result = condition_map(bundled.model, bundled.environment, ("mixing", [0.0, 0.6]), None,
                           ["native"], executor="serial", threshold=False, driving_force=True)
    frame = result.to_frame()
    assert list(frame["vent_fraction"]) == [0.0, 0.6]
    assert frame["error"].isna().all()
    # pure early ocean: no H2 (1 nM) and pH 5.5: infeasible; the demo setting (0.6): feasible
    assert list(frame["feasible"]) == [False, True]
    assert frame.loc[1, "pH"] == pytest.approx(7.56, abs=0.05)
    assert frame.loc[1, "driving_force_kJ_per_mol"] > 0 > frame.loc[0, "driving_force_kJ_per_mol"]
    figure = line_figure(frame, "vent_fraction", "native")
    panel = figure.axes[0]
    shown = sorted((float(x), float(y)) for collection in panel.collections
                   for x, y in np.asarray(collection.get_offsets()))
    assert shown == [(0.0, 0.0), (0.6, 1.0)]       # the figure shows no at 0, yes at 0.6
    paths = write_line_figures(frame, "vent_fraction", tmp_path)
    assert sorted(p.suffix for p in paths) == [".png", ".svg"]


@pytest.mark.slow
def test_tfa_map_along_the_mixing_line_writes_its_table_and_figure(tmp_path):
    import json
    import subprocess
    import sys

    out = tmp_path / "line"
    proc = subprocess.run([sys.executable, "-m", "tfa", "map", "--x", "mixing=0.6,1", "--modes",
                           "native", "--no-threshold", "--no-driving-force", "--out", str(out),
                           "--json"], capture_output=True, text=True, timeout=900)
    assert proc.returncode == 0, proc.stderr
    data = json.loads(proc.stdout)
    assert data["y"] is None and data["x"]["name"] == "mixing"
    rows = data["table"]
    assert [r["vent_fraction"] for r in rows] == [0.6, 1.0]
    assert [r["feasible"] for r in rows] == [True, False]
    assert rows[1]["pH"] == pytest.approx(10.38)           # the pure vent fluid
    assert (out / "map_native.png").is_file() and (out / "map_native.svg").is_file()
