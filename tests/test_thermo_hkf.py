"""Constant-Cp integration of species energies against the HKF equations of state.

References
----------
- HKF equations of state: Shock & Helgeson (1988) Geochim. Cosmochim. Acta 52:2009 and later
  OBIGT sources, evaluated by pychnosz's ``subcrt`` (OBIGT via pychnosz, at Psat).
- Tolerances 0.1 / 0.5 / 1.5 kJ/mol at 25 / 60 / 100 degC: the design notes (docs/design) states
  about 0.5 kJ/mol per reaction at 80 degC for constant Cp.
- Carbonic acid pK1: Plummer & Busenberg (1982) Geochim. Cosmochim. Acta 46:1011, eq. for log K1.
- H2 solubility 7.8e-4 mol/L/bar at 25 degC: Sander (2015) Atmos. Chem. Phys. 15:4399
  (value from memory).
- Water at 80 degC: pychnosz ``subcrt('H2O')`` (SUPCRT92 water model, Johnson et al. 1992).
"""

from __future__ import annotations

import contextlib
import importlib.util
import io
import math
import sys
import warnings
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from tfa.constants import CELSIUS_ZERO, LN10, R
from tfa.errors import ConditionsError, InputError
from tfa.thermo.gases import (dissolved_from_partial_pressure, henry_constant,
                              partial_pressure_from_dissolved)
from tfa.thermo.species import load_species
from tfa.thermo.temperature import (IntegrationFlag, SpeciesArrays, species_gibbs,
                                    species_gibbs_flagged, standard_gibbs)

import pychnosz  # noqa: E402 - the test reference (a test dependency)

_SCRIPT = Path(__file__).resolve().parents[1] / "scripts" / "hkf_drift.py"
_spec = importlib.util.spec_from_file_location("tfa_hkf_drift", _SCRIPT)
drift = sys.modules.setdefault("tfa_hkf_drift", importlib.util.module_from_spec(_spec))
_spec.loader.exec_module(drift)

ACCEPTANCE = [r for r in drift.REACTIONS if r.acceptance]


@pytest.fixture(scope="module")
def sp():
    return {s.id: s for s in load_species()}


def test_acceptance_set_is_broad():
    assert len(ACCEPTANCE) >= 10
    labels = " ".join(r.label for r in ACCEPTANCE)
    for needle in ("CH4 + 2 H2O", "formate", "ATP-4", "NH4+", "HS-", "H2(g) = H2(aq)",
                   "CO2(g) = CO2(aq)", "lactate", "succinate", "glycin"):
        assert needle in labels


@pytest.mark.parametrize("reaction", ACCEPTANCE, ids=[r.label for r in ACCEPTANCE])
def test_reaction_gibbs_matches_hkf(reaction, sp):
    """ΔrG° from the bundled table, constant Cp, vs HKF (Shock & Helgeson 1988; OBIGT via pychnosz)."""
    temps = sorted(drift.TOLERANCES)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        hkf = drift.hkf_reaction_gibbs(reaction, temps, sp)
    for t, ref in zip(temps, hkf):
        ours = drift.tfa_reaction_gibbs(reaction, t, sp)
        assert abs(ours - ref) <= drift.TOLERANCES[t], f"{reaction.label} at {t} degC: " \
            f"tfa {ours:.3f}, HKF {ref:.3f} kJ/mol"


def test_constant_enthalpy_is_worse_than_constant_cp(sp):
    """the design notes (docs/design): constant ΔH errs by several kJ/mol at 80 degC where constant Cp stays ~0.5."""
    reaction = drift.REACTIONS[0]                   # 4 H2 + CO2 = CH4 + 2 H2O
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = drift.hkf_reaction_gibbs(reaction, [80.0], sp)[0]
    cp_err = abs(drift.tfa_reaction_gibbs(reaction, 80.0, sp) - ref)
    dh_err = abs(drift.tfa_reaction_gibbs(reaction, 80.0, sp, constant_enthalpy=True) - ref)
    assert cp_err < 0.5 < dh_err


def test_carbonic_acid_pk1_plummer_busenberg(sp):
    """pK1 of HCO3- + H+ = CO2(aq) + H2O vs Plummer & Busenberg (1982), 0.03 log units."""
    for celsius in (25.0, 50.0, 75.0, 100.0):
        t = celsius + CELSIUS_ZERO
        g, flags = standard_gibbs([sp["CO2"], sp["H2O(l)"], sp["HCO3-"]], t)
        assert not flags.any()
        pk1 = -(g[0] + g[1] - g[2]) / (R * t * LN10)
        log_k1 = (-356.3094 - 0.06091964 * t + 21834.37 / t + 126.8339 * math.log10(t)
                  - 1684915 / t**2)
        assert pk1 == pytest.approx(-log_k1, abs=0.03), celsius


def test_water_at_80C_against_pychnosz(sp):
    with contextlib.redirect_stdout(io.StringIO()):
        ref = pychnosz.subcrt("H2O", T=80, P="Psat").out["G"].iloc[0] / 1000.0
    ours = species_gibbs(sp["H2O(l)"], 80.0 + CELSIUS_ZERO)
    assert ours == pytest.approx(ref, abs=0.5)


def test_h2_henry_constant_sander(sp):
    """H2: 7.8e-4 mol/L/bar at 25 degC (Sander 2015, from memory), within 5 %."""
    kh = henry_constant(sp["H2(g)"], sp["H2"], 298.15)
    assert kh == pytest.approx(7.8e-4, rel=0.05)


def test_co2_henry_constant_sander(sp):
    """CO2: 3.3e-2 mol/L/bar at 25 degC (Sander 2015, from memory), within 5 %."""
    assert henry_constant(sp["CO2(g)"], sp["CO2"], 298.15) == pytest.approx(3.3e-2, rel=0.05)


def test_h2_solubility_falls_then_rises_like_hkf(sp):
    """The H2 Henry constant moves with T as the HKF model does (pychnosz), within 5 %."""
    for celsius in (60.0, 100.0):
        with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
            warnings.simplefilter("ignore")
            log_k = pychnosz.subcrt(["hydrogen", "H2"], [-1, 1], state=["gas", "aq"],
                                    T=celsius, P="Psat").out["logK"].iloc[0]
        ours = henry_constant(sp["H2(g)"], sp["H2"], celsius + CELSIUS_ZERO)
        assert ours == pytest.approx(10 ** log_k, rel=0.05)


def test_henry_round_trip_and_errors(sp):
    c = dissolved_from_partial_pressure(0.2, sp["CO2(g)"], sp["CO2"], 343.15)
    assert partial_pressure_from_dissolved(c, sp["CO2(g)"], sp["CO2"], 343.15) == pytest.approx(0.2)
    with pytest.raises(InputError, match="not the same molecule"):
        henry_constant(sp["H2(g)"], sp["CO2"], 298.15)
    with pytest.raises(InputError, match="not a gas"):
        henry_constant(sp["H2"], sp["H2"], 298.15)
    with pytest.raises(InputError):
        dissolved_from_partial_pressure(-1.0, sp["H2(g)"], sp["H2"], 298.15)


def test_reference_temperature_returns_table_values(sp):
    species = list(sp.values())
    values, flags = standard_gibbs(species, 298.15)
    assert np.allclose(values, [s.G for s in species], atol=1e-12)
    assert not flags.any(), "every bundled species has S and Cp"


def test_fallback_flags_and_equations(sp):
    h2 = sp["H2"]
    t = 353.15
    no_cp = replace(h2, Cp=None)
    no_s = replace(h2, S=None)
    no_v = replace(h2, V=None)
    g, flags = standard_gibbs([h2, no_cp, no_s, no_v], t, 100.0)
    assert list(flags) == [0, IntegrationFlag.NO_CP, IntegrationFlag.NO_S, IntegrationFlag.NO_V]
    # constant ΔH: G(T) = G(Tr) - S (T - Tr)
    assert g[1] == pytest.approx(h2.G - h2.S / 1000 * (t - 298.15) + h2.V * 99 * 1e-4)
    # no S: G constant (plus the pressure term)
    assert g[2] == pytest.approx(h2.G + h2.V * 99 * 1e-4)
    # no V: no pressure term
    assert g[3] == pytest.approx(standard_gibbs([h2], t)[0][0])
    assert IntegrationFlag(int(flags[1])).describe() == ["no Cp: constant enthalpy assumed from 25 degC"]
    value, flag = species_gibbs_flagged(no_cp, t)
    assert flag == IntegrationFlag.NO_CP and value == pytest.approx(g[1] - h2.V * 99 * 1e-4)


def test_pressure_term_against_hkf(sp):
    """V°(P - 1 bar) for HCO3- + H+ = CO2 + H2O at 25 degC, 500 bar vs HKF within 0.3 kJ/mol."""
    reaction = {"HCO3-": -1, "H+": -1, "CO2": 1, "H2O(l)": 1}
    ids = list(reaction)
    g, _ = standard_gibbs([sp[i] for i in ids], 298.15, 500.0)
    ours = float(np.dot([reaction[i] for i in ids], g))
    with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = pychnosz.subcrt(["HCO3-", "H+", "CO2", "water"], [-1, -1, 1, 1],
                              state=["aq", "aq", "aq", "liq"], T=25, P=500).out["G"].iloc[0] / 1000
    assert ours == pytest.approx(ref, abs=0.3)


def test_arrays_input_and_bad_conditions(sp):
    arrays = SpeciesArrays.from_species([sp["H2"], sp["CO2"]])
    a, _ = standard_gibbs(arrays, 333.15)
    b, _ = standard_gibbs([sp["H2"], sp["CO2"]], 333.15)
    assert np.array_equal(a, b) and len(arrays) == 2
    with pytest.raises(ConditionsError):
        standard_gibbs([sp["H2"]], -5.0)
    with pytest.raises(ConditionsError):
        standard_gibbs([sp["H2"]], 300.0, pressure=float("nan"))
