"""Conservative mixing of two fluids (vent fluid and seawater) and the pH of the mixture from the
acid-base balance.

A mixture with a share ``f`` of vent fluid (0: seawater, 1: vent fluid) holds, per litre,

- the totals mixed linearly: H2, dissolved inorganic carbon, total sulfide, total ammonia, the
  ionic strength and the total alkalinity
  TA = [HCO3-] + 2[CO3--] + [HS-] + [NH3] + [OH-] − [H+]  (mol/L; Dickson 1981, Deep-Sea Res.
  28A:609, without borate, phosphate and silicate), each conservative because it is a charge
  balance of ions that mixing does not create or destroy (common practice in marine chemistry);
- the temperature, linear in f (equal heat capacities per volume; ``"linear"``) or by an
  enthalpy balance, h_mix = f h_vent + (1 − f) h_sea with h(T) of liquid water
  (``"enthalpy"``; :func:`water_enthalpy`);
- the pH that makes TA(pH) of the mixed totals at the mixed temperature and ionic strength equal
  to the mixed TA (bisection; TA rises monotonically with pH).

The species shares come from the species data (:func:`tfa.thermo.speciation.speciate`); [OH-]
from the ion product of water, pKw(T) = 4470.99/T − 6.0875 + 0.01706 T (Harned & Robinson 1940,
Trans. Faraday Soc. 36:973; coefficients from memory, checked in the tests against pKw 14.00 at
25 °C and pychnosz at 100 °C; the species data hold no OH-), with the activity coefficients of H+
and OH- by the extended Debye-Hueckel equation (:func:`tfa.thermo.legendre.debye_huckel_term`).
Densities are taken as equal (volumes add).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from ..conditions import Conditions
from ..errors import InputError
from .legendre import debye_huckel_term
from .speciation import speciate

#: How the temperature of a mixture is found.
TEMPERATURE_RULES = ("linear", "enthalpy")


@dataclass(frozen=True)
class Fluid:
    """One fluid: temperature [degC], pH, ionic strength [mol/L] and totals [mol/L].

    ``h2`` is dissolved H2; ``dic`` dissolved inorganic carbon; ``sulfide`` total sulfide;
    ``ammonia`` total ammonia (None: not given, so not mixed).
    """

    name: str
    celsius: float
    ph: float
    ionic_strength: float
    h2: float
    dic: float
    sulfide: float = 0.0
    ammonia: float | None = None


def water_ion_product(temperature: float) -> float:
    """pKw of water at ``temperature`` [K], I = 0, 1 bar.

    Equation: pKw = 4470.99/T − 6.0875 + 0.01706 T (Harned & Robinson 1940; coefficients from
    memory). Meant for 0-150 °C.

    >>> round(water_ion_product(298.15), 3)     # 14.00 at 25 degC (CRC Handbook)
    13.995
    """
    return 4470.99 / temperature - 6.0875 + 0.01706 * temperature


def alkalinity(ph: float, conditions: Conditions, dic: float, sulfide: float = 0.0,
               ammonia: float | None = None, db=None) -> float:
    """Total alkalinity TA (mol/L) of totals at ``conditions`` (temperature, ionic strength;
    its pH is replaced by ``ph``).

    Equation: TA = [HCO3-] + 2[CO3--] + [HS-] + [NH3] + [OH-] − [H+], with
    [OH-] = 10^(pH − pKw)/γ(OH-), [H+] = 10^(−pH)/γ(H+), RT ln γ = −z² RTα √I/(1 + 1.6 √I).

    Examples
    --------
    No carbon, sulfide or ammonia at 25 °C, I = 0: pH = pKw − 3 holds 1 mM OH- (hand derivation):

    >>> round(alkalinity(water_ion_product(298.15) - 3.0, Conditions(), 0.0) * 1e3, 6)
    1.0
    """
    from .database import ThermoDatabase

    db = db or ThermoDatabase.load()
    c = conditions.with_(ph=ph)
    total = 0.0
    if dic > 0:
        s = speciate(db, "CO2tot", dic, c)
        total += s.concentration("HCO3-") + 2.0 * s.concentration("CO3-2")
    if sulfide > 0:
        s = speciate(db, "H2S", sulfide, c)
        total += sum(x for x, z in zip(s.concentrations, s.charges) if z == -1)
    if ammonia:
        s = speciate(db, "ammonia", ammonia, c)
        total += sum(x for x, z in zip(s.concentrations, s.charges) if z == 0)
    gamma = math.exp(-debye_huckel_term(c.temperature, c.ionic_strength) / c.RT)
    hydroxide = 10.0 ** (ph - water_ion_product(c.temperature)) / gamma
    proton = 10.0 ** (-ph) / gamma
    return total + hydroxide - proton


def water_enthalpy(celsius: float) -> float:
    """Enthalpy of liquid water relative to 0 °C, kJ/kg, at saturation pressure.

    Equation: the integral of the isobaric heat capacity of liquid water, tabulated every 20 °C
    (kJ/kg/K; Wagner & Pruss 2002 IAPWS-95 at saturation, from memory: 4.22 at 0 °C, 4.18 at
    20-60 °C, 4.19 at 80 °C, 4.22 at 100 °C, 4.25 at 120 °C, 4.30 at 140 °C, 4.34 at 160 °C,
    4.40 at 180 °C, 4.50 at 200 °C, 4.66 at 240 °C, 4.87 at 260 °C, 5.25 at 280 °C, 5.75 at 300 °C),
    by the trapezoid rule. Pressure changes it by less than 1 % below 300 °C at 250 bar.

    >>> round(water_enthalpy(100.0), 0)          # steam tables: 419.1 kJ/kg at 100 degC
    419.0
    """
    table = ((0, 4.22), (20, 4.18), (40, 4.18), (60, 4.18), (80, 4.19), (100, 4.22),
             (120, 4.25), (140, 4.30), (160, 4.34), (180, 4.40), (200, 4.50), (220, 4.57),
             (240, 4.66), (260, 4.87), (280, 5.25), (300, 5.75))
    if not 0.0 <= celsius <= 300.0:
        raise InputError(f"water enthalpy: {celsius:g} degC is outside 0-300 degC")
    h = 0.0
    for (t0, c0), (t1, c1) in zip(table, table[1:]):
        if celsius <= t0:
            break
        top = min(celsius, t1)
        c_top = c0 + (c1 - c0) * (top - t0) / (t1 - t0)
        h += 0.5 * (c0 + c_top) * (top - t0)
    return h


def _temperature(vent: Fluid, sea: Fluid, fraction: float, rule: str) -> float:
    if rule == "linear":
        return fraction * vent.celsius + (1.0 - fraction) * sea.celsius
    target = fraction * water_enthalpy(vent.celsius) + (1.0 - fraction) * water_enthalpy(sea.celsius)
    lo, hi = min(vent.celsius, sea.celsius), max(vent.celsius, sea.celsius)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if water_enthalpy(mid) < target else (lo, mid)
    return 0.5 * (lo + hi)


def solve_ph(target: float, conditions: Conditions, dic: float, sulfide: float,
             ammonia: float | None, db=None) -> float:
    """The pH (0-14) at which :func:`alkalinity` equals ``target`` (mol/L), by bisection."""
    lo, hi = 0.0, 14.0
    if not alkalinity(lo, conditions, dic, sulfide, ammonia, db) <= target <= \
            alkalinity(hi, conditions, dic, sulfide, ammonia, db):
        raise InputError(f"mixing: no pH between 0 and 14 gives the mixed alkalinity {target:.3g} mol/L")
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if alkalinity(mid, conditions, dic, sulfide, ammonia, db) < target:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def mix(vent: Fluid, sea: Fluid, fraction: float, pressure: float | None = None,
        temperature: str = "linear", db=None) -> Fluid:
    """The mixture with a share ``fraction`` (0-1) of ``vent`` in ``sea``.

    Parameters
    ----------
    vent, sea : Fluid
    fraction : float
        Volume share of vent fluid, 0-1 (dimensionless).
    pressure : float or None
        bar (the same for both fluids and the mixture).
    temperature : str
        "linear" or "enthalpy" (see the module docstring).

    Returns
    -------
    Fluid
        Named ``mixture f=<fraction>``.

    Examples
    --------
    Equal parts of water at pH pKw − 3 and pH 3 (25 °C, I = 0, no carbon): the alkalinities +1 and
    −1 mM cancel, so the mixture is neutral, pH = pKw/2 = 6.997 (hand derivation); with 3/4 vent
    fluid TA = 0.5 mM of OH-, pH = pKw + log10(5e-4) = 13.995 - 3.301 = 10.694:

    >>> pkw = water_ion_product(298.15)
    >>> v = Fluid("vent", 25.0, pkw - 3.0, 0.0, 0.0, 0.0)
    >>> s = Fluid("sea", 25.0, 3.0, 0.0, 0.0, 0.0)
    >>> round(mix(v, s, 0.5).ph, 3), round(mix(v, s, 0.75).ph, 3)
    (6.997, 10.694)
    """
    if not 0.0 <= fraction <= 1.0:
        raise InputError(f"mixing fraction {fraction:g} is outside 0-1 (the share of vent fluid)")
    if temperature not in TEMPERATURE_RULES:
        raise InputError(f"mixing temperature rule {temperature!r}; use {' or '.join(TEMPERATURE_RULES)}")
    if fraction in (0.0, 1.0):
        end = vent if fraction == 1.0 else sea
        return replace(end, name=f"mixture f={fraction:g}")

    def conditions(fluid: Fluid) -> Conditions:
        return Conditions.from_celsius(fluid.celsius, ph=fluid.ph, ionic_strength=fluid.ionic_strength,
                                       pressure=pressure)

    def blend(a, b):
        return fraction * a + (1.0 - fraction) * b

    ammonia = None
    if vent.ammonia is not None or sea.ammonia is not None:
        ammonia = blend(vent.ammonia or 0.0, sea.ammonia or 0.0)
    ta = blend(alkalinity(vent.ph, conditions(vent), vent.dic, vent.sulfide, vent.ammonia, db),
               alkalinity(sea.ph, conditions(sea), sea.dic, sea.sulfide, sea.ammonia, db))
    celsius = _temperature(vent, sea, fraction, temperature)
    ionic_strength = blend(vent.ionic_strength, sea.ionic_strength)
    dic, sulfide = blend(vent.dic, sea.dic), blend(vent.sulfide, sea.sulfide)
    base = Conditions.from_celsius(celsius, ph=7.0, ionic_strength=ionic_strength, pressure=pressure)
    ph = solve_ph(ta, base, dic, sulfide, ammonia, db)
    return Fluid(f"mixture f={fraction:g}", celsius, ph, ionic_strength, blend(vent.h2, sea.h2), dic,
                 sulfide, ammonia)
