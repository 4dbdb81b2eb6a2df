"""Totals of a fluid speciated at the setting: carbonic acid constants against
Plummer & Busenberg (1982) and against pychnosz (OBIGT with the HKF equations, a test reference
only), the fixed CO2(aq) of the bundled environment, and the ionic-strength check."""

from __future__ import annotations

import contextlib
import io
import math
import warnings

import pytest

from tfa.conditions import Conditions
from tfa.errors import NetworkFileError
from tfa.network.environment import Environment, bundled_environment
from tfa.network.fluid import FluidWarning
from tfa.network.inputs import resolve_inputs
from tfa.thermo.database import ThermoDatabase
from tfa.thermo.speciation import acid_constants, least_ionic_strength, speciate


@pytest.fixture(scope="module")
def db():
    return ThermoDatabase.load()


def test_carbonic_acid_constants_at_25_C_match_plummer_and_busenberg_1982(db):
    # Plummer & Busenberg 1982, Geochim. Cosmochim. Acta 46:1011, doi:10.1016/0016-7037(82)90056-4:
    # pK1 = 6.35, pK2 = 10.33 at 25 degC, I = 0
    pk1, pk2 = acid_constants(db, "CO2tot", Conditions.from_celsius(25.0))
    assert pk1 == pytest.approx(6.35, abs=0.05)
    assert pk2 == pytest.approx(10.33, abs=0.05)


def test_carbonic_acid_constants_at_70_C_match_pychnosz(db):
    # reference: pychnosz subcrt (OBIGT species with the HKF equations of state, 1 bar), computed
    # here; ours carry the species with a constant heat capacity. On 2026-12-02 pychnosz 1.5.3 gave
    # logK -6.2654 and -10.1040 at 70 degC.
    import pychnosz

    with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        k1 = pychnosz.subcrt(["CO2", "water", "HCO3-", "H+"], [-1, -1, 1, 1],
                             state=["aq", "liq", "aq", "aq"], T=70, P=1).out["logK"].iloc[0]
        k2 = pychnosz.subcrt(["HCO3-", "CO3-2", "H+"], [-1, 1, 1], T=70, P=1).out["logK"].iloc[0]
    pk1, pk2 = acid_constants(db, "CO2tot", Conditions.from_celsius(70.0, pressure=1.0))
    assert pk1 == pytest.approx(-k1, abs=0.05)
    assert pk2 == pytest.approx(-k2, abs=0.05)


def test_speciation_sums_to_the_total_and_follows_the_constants(db):
    c = Conditions.from_celsius(70.0, ph=7.5, ionic_strength=0.25, pressure=250.0)
    split = speciate(db, "CO2tot", 2e-2, c)
    assert sum(split.concentrations) == pytest.approx(2e-2, rel=1e-12)
    pk1, pk2 = split.pk
    # Henderson-Hasselbalch (hand derivation): [HCO3-]/[CO2] = 10^(pH - pK1)
    ratio = split.concentration("HCO3-") / split.concentration("CO2(aq)+H2O")
    assert math.log10(ratio) == pytest.approx(7.5 - pk1, abs=1e-9)
    ratio = split.concentration("CO3-2") / split.concentration("HCO3-")
    assert math.log10(ratio) == pytest.approx(7.5 - pk2, abs=1e-9)
    # 20 mM HCO3- (mostly) with its cations: about 0.02 mol/L
    assert least_ionic_strength([split]) == pytest.approx(0.0199, abs=5e-4)


def test_bundled_environment_fixes_co2aq_from_dic_at_its_ph():
    inputs = resolve_inputs()
    env = inputs.environment
    fixed = env.feed_metabolites(inputs.model)
    split = speciate(ThermoDatabase.load(), "CO2tot", env.fluid["dissolved_inorganic_carbon"],
                     env.conditions)
    assert fixed["co2"] == pytest.approx(split.concentration("CO2(aq)+H2O"), rel=1e-12)
    assert fixed["co2"] == pytest.approx(4.56e-4, rel=0.01)     # the value the file's comment states
    assert fixed["h2s"] == env.fluid["total_sulfide"] and fixed["nh4"] == env.fluid["total_ammonia"]
    # one pH unit down, ten times less bicarbonate per CO2(aq): the share follows the conditions
    lower = env.with_conditions(ph=6.5).feed_metabolites(inputs.model)["co2"]
    assert lower > 4 * fixed["co2"]


def _env(ionic_strength, **fluid):
    return {"conditions": {"temperature_C": 25.0, "pH": 8.0, "ionic_strength_M": ionic_strength},
            "demand": {"none": True}, "fluid": fluid}


def test_ionic_strength_below_what_the_ions_force_is_warned():
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        Environment.from_dict(_env(0.01, dissolved_inorganic_carbon_M=0.1), "low.toml")
    messages = [str(w.message) for w in caught if issubclass(w.category, FluidWarning)]
    # hand derivation from the speciation in the message: ½(97.6 + 4 x 0.686 + |-97.6 - 2 x 0.686|)
    # mM = 99.6 mM
    assert messages and "below the 0.0996 mol/L" in messages[0] and "HCO3- 97.6 mM" in messages[0]
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        Environment.from_dict(_env(0.25, dissolved_inorganic_carbon_M=0.01), "fine.toml")
    assert not [w for w in caught if issubclass(w.category, FluidWarning)]


def test_fluid_errors_name_the_key():
    with pytest.raises(NetworkFileError, match="did you mean 'total_sulfide_M'"):
        Environment.from_dict(_env(0.1, total_sulfide=1e-4), "x.toml")
    with pytest.raises(NetworkFileError, match="dissolved_inorganic_carbon_M"):
        Environment.from_dict(_env(0.1, dissolved_inorganic_carbon_M=-1.0), "x.toml")
    inputs = resolve_inputs()
    env = bundled_environment().with_feed(co2=1e-3)
    with pytest.raises(NetworkFileError, match="both name compound co2"):
        env.feed_metabolites(inputs.model)
