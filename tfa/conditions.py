"""Physical and chemical conditions of a setting: temperature, pH, ionic strength, pressure, pMg.

Temperature is held in kelvin; degrees Celsius only at the interface (:meth:`Conditions.from_celsius`,
:attr:`Conditions.celsius`). Impossible values raise :class:`~tfa.errors.ConditionsError`;
values that stretch a model past its usual range emit :class:`ModelRangeWarning`.

Ranges
------
- pH 0-14 (aqueous scale).
- Ionic strength 0-10 mol/L; the extended Debye-Hueckel equation of Alberty (2003) is
  recommended up to about 0.25-0.5 mol/L, so a warning is given above 0.5 mol/L (brines reach
  about 6 mol/L; nothing is read above 10).
- Temperature 0-300 degC: the species data are referenced to 25 degC and carried by a constant
  heat capacity; above 150 degC the constant-Cp integration departs from the HKF equations of
  state by several kJ/mol per reaction (measured in tests/test_thermo_hkf.py), hence a warning.
- Pressure 1-5000 bar when given (5000 bar: the range of the equations of state behind the
  species data, SUPCRT92, Johnson, Oelkers and Helgeson 1992); ``None`` means 1 bar with no
  pressure correction. The constant-volume pressure correction is checked against the HKF
  equations to 500 bar (tests/test_thermo_hkf.py); above 1000 bar a warning is given.
- Water must be liquid: the pressure (1 bar when none is given) must be at least the saturation
  pressure of water at the temperature (:mod:`tfa.water`), else the conditions are refused with
  the pressure needed (100-300 degC need 1.01-86 bar).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, replace

from .constants import CELSIUS_ZERO, R
from .errors import ConditionsError, InputError
from .util.numbers import read_number
from .water import saturation_pressure

#: Highest temperature the bundled species data are allowed to be carried to, degC.
MAX_CELSIUS = 300.0
#: Above this temperature constant-Cp integration is flagged as stretched, degC.
CONSTANT_CP_WARN_CELSIUS = 150.0
#: Above this ionic strength the extended Debye-Hueckel equation is flagged as stretched, mol/L.
DEBYE_HUCKEL_WARN_IONIC_STRENGTH = 0.5
#: Highest ionic strength read, mol/L.
MAX_IONIC_STRENGTH = 10.0
#: Highest pressure read, bar (the range of the SUPCRT92 equations of state), and the pressure
#: above which the constant-volume correction is flagged as stretched.
MAX_PRESSURE = 5000.0
CONSTANT_VOLUME_WARN_PRESSURE = 1000.0


class ModelRangeWarning(UserWarning):
    """A condition lies where a model of ``tfa`` is stretched beyond its usual range."""


@dataclass(frozen=True)
class Conditions:
    """Conditions of a setting.

    Parameters
    ----------
    temperature : float
        Temperature, K.
    ph : float
        pH (-log10 of the hydrogen-ion activity).
    ionic_strength : float
        Ionic strength, mol/L.
    pressure : float or None
        Pressure, bar. ``None`` = 1 bar and no pressure correction of species energies.
    pmg : float or None
        -log10 of the free Mg2+ activity; ``None`` = no Mg2+ binding considered.

    Examples
    --------
    >>> c = Conditions.from_celsius(70, ph=6.5, ionic_strength=0.2)
    >>> round(c.temperature, 2), round(c.celsius, 1)
    (343.15, 70.0)
    >>> round(c.RT, 4)   # kJ/mol
    2.8531
    """

    temperature: float = 298.15
    ph: float = 7.0
    ionic_strength: float = 0.0
    pressure: float | None = None
    pmg: float | None = None

    def __post_init__(self) -> None:
        def number(value, field, **bounds):
            try:
                return read_number(value, field, **bounds)
            except InputError as err:
                raise ConditionsError(str(err)) from None

        kelvin = number(self.temperature, "temperature", unit="K")
        celsius = kelvin - CELSIUS_ZERO
        if celsius < 0.0 or celsius > MAX_CELSIUS:
            raise ConditionsError(
                f"temperature {celsius:.2f} degC is outside 0-{MAX_CELSIUS:.0f} degC, the range the "
                "bundled species data can be carried to; give a temperature in that range"
            )
        ph = number(self.ph, "pH")
        if not 0.0 <= ph <= 14.0:
            raise ConditionsError(f"pH {ph} is outside 0-14; give a pH between 0 and 14")
        i = number(self.ionic_strength, "ionic strength", minimum=0.0,
                   maximum=MAX_IONIC_STRENGTH, unit="mol/L")
        p = None if self.pressure is None else number(self.pressure, "pressure", minimum=1.0,
                                                       maximum=MAX_PRESSURE, unit="bar")
        if self.pmg is not None:
            pmg = number(self.pmg, "pMg")
            if not 0.0 <= pmg <= 14.0:
                raise ConditionsError(f"pMg {pmg} is outside 0-14; give a pMg between 0 and 14")
            object.__setattr__(self, "pmg", pmg)
        for name, value in (("temperature", kelvin), ("ph", ph), ("ionic_strength", i),
                            ("pressure", p)):
            object.__setattr__(self, name, value)
        needed = saturation_pressure(celsius)
        if (1.0 if p is None else p) < needed:
            given = "no pressure (1 bar)" if p is None else f"{p:g} bar"
            raise ConditionsError(
                f"water boils at {celsius:.1f} degC below {needed:.3g} bar, and {given} was "
                f"given; give a pressure of at least {math.ceil(needed * 100) / 100:g} bar "
                "(e.g. --pressure or pressure_bar) so that water is liquid"
            )
        if p is not None and p > CONSTANT_VOLUME_WARN_PRESSURE:
            warnings.warn(
                f"{p:g} bar: the constant-volume pressure correction is stretched above "
                f"{CONSTANT_VOLUME_WARN_PRESSURE:g} bar (checked against the HKF equations to "
                "500 bar)", ModelRangeWarning, stacklevel=3)
        if celsius > CONSTANT_CP_WARN_CELSIUS:
            warnings.warn(
                f"{celsius:.0f} degC: constant-Cp integration from 25 degC is stretched above "
                f"{CONSTANT_CP_WARN_CELSIUS:.0f} degC (errors of several kJ/mol per reaction)",
                ModelRangeWarning,
                stacklevel=3,
            )
        if i > DEBYE_HUCKEL_WARN_IONIC_STRENGTH:
            warnings.warn(
                f"ionic strength {i} mol/L: the extended Debye-Hueckel equation is stretched above "
                f"{DEBYE_HUCKEL_WARN_IONIC_STRENGTH} mol/L",
                ModelRangeWarning,
                stacklevel=3,
            )

    @classmethod
    def from_celsius(
        cls,
        celsius: float = 25.0,
        ph: float = 7.0,
        ionic_strength: float = 0.0,
        pressure: float | None = None,
        pmg: float | None = None,
    ) -> "Conditions":
        """Build conditions from a temperature in degrees Celsius."""
        try:
            celsius = read_number(celsius, "temperature", minimum=-CELSIUS_ZERO, unit="degC")
        except InputError as err:
            raise ConditionsError(str(err)) from None
        return cls(celsius + CELSIUS_ZERO, ph, ionic_strength, pressure, pmg)

    @property
    def celsius(self) -> float:
        """Temperature in degrees Celsius."""
        return self.temperature - CELSIUS_ZERO

    @property
    def RT(self) -> float:  # noqa: N802 - the symbol of the trade
        """R*T in kJ/mol."""
        return R * self.temperature

    @property
    def pressure_bar(self) -> float:
        """Pressure in bar (1 bar when none is given)."""
        return 1.0 if self.pressure is None else self.pressure

    def with_(self, **changes) -> "Conditions":
        """A copy with some fields changed (``celsius=`` accepted for temperature)."""
        if "celsius" in changes:
            try:
                celsius = read_number(changes.pop("celsius"), "temperature", unit="degC")
            except InputError as err:
                raise ConditionsError(str(err)) from None
            changes["temperature"] = celsius + CELSIUS_ZERO
        return replace(self, **changes)

    def describe(self) -> str:
        """One line for reports, e.g. ``70.0 degC, pH 6.50, I = 0.20 mol/L, 1 bar``."""
        text = f"{self.celsius:.1f} degC, pH {self.ph:.2f}, I = {self.ionic_strength:.2f} mol/L"
        text += f", {self.pressure_bar:g} bar"
        if self.pmg is not None:
            text += f", pMg {self.pmg:.2f}"
        return text

    def to_dict(self) -> dict:
        """Plain dictionary for JSON output (temperature in both K and degC)."""
        return {
            "temperature_K": self.temperature,
            "temperature_C": self.celsius,
            "pH": self.ph,
            "ionic_strength_mol_per_L": self.ionic_strength,
            "pressure_bar": self.pressure_bar,
            "pMg": self.pmg,
        }


#: Keys of condition overrides (Python API, command line), each with the field it sets and its
#: unit; the spellings of an environment file are accepted too. A bare ``temperature`` is
#: refused: it does not say degC or K.
CONDITION_KEYS = {
    "celsius": "celsius", "temperature_C": "celsius", "temperature_K": "temperature",
    "ph": "ph", "pH": "ph",
    "ionic_strength": "ionic_strength", "ionic_strength_M": "ionic_strength",
    "pressure": "pressure", "pressure_bar": "pressure",
    "pmg": "pmg", "pMg": "pmg",
}


def condition_overrides(given, where: str = "conditions") -> dict:
    """Condition overrides checked and named as :meth:`Conditions.with_` takes them (None:
    keep the environment's value).

    >>> condition_overrides({"temperature_C": 80, "pH": 6.5, "pressure": None})
    {'celsius': 80.0, 'ph': 6.5}
    >>> condition_overrides({"temperature": 70})
    Traceback (most recent call last):
    ...
    tfa.errors.ConditionsError: conditions: 'temperature' does not say its unit; give celsius=70 (degC) or temperature_K=70 (K)
    """
    import difflib

    if given is None:
        return {}
    if not hasattr(given, "items"):
        raise ConditionsError(f"{where}: expected a dict such as {{'celsius': 70, 'ph': 7.5}}, got "
                              f"{type(given).__name__}")
    out: dict = {}
    for key, value in given.items():
        if key == "temperature":
            raise ConditionsError(f"{where}: 'temperature' does not say its unit; give celsius="
                                  f"{value!r} (degC) or temperature_K={value!r} (K)")
        if key not in CONDITION_KEYS:
            close = difflib.get_close_matches(str(key), list(CONDITION_KEYS), n=1, cutoff=0.4)
            hint = f"did you mean '{close[0]}'? " if close else ""
            raise ConditionsError(f"{where}: unknown key {key!r}; {hint}use "
                                  f"{', '.join(CONDITION_KEYS)}")
        if value is None:
            continue
        unit = {"celsius": "degC", "temperature": "K", "ionic_strength": "mol/L",
                "pressure": "bar"}.get(CONDITION_KEYS[key], "")
        try:
            out[CONDITION_KEYS[key]] = read_number(value, f"{where} {key}", unit=unit)
        except InputError as err:
            raise ConditionsError(str(err)) from None
    return out


@dataclass(frozen=True)
class Compartment:
    """The conditions of one compartment other than the cell: its pH, and optionally
    its ionic strength and pMg (the cell's when not given), and the membrane potential between
    the cell and it.

    Sign convention (the bioenergeticist's, Mitchell 1961, Nature 191:144,
    doi:10.1038/191144a0; Nicholls & Ferguson, Bioenergetics): ``membrane_potential_mV`` is
    Δψ = ψ(cell) − ψ(this compartment), in mV; a cell negative inside has Δψ < 0 (about −150 mV
    in growing bacteria, from memory). The cell itself is the compartment the environment's
    ``[conditions]`` describe, at ψ = 0.

    Parameters
    ----------
    id : str
        The compartment id of the network (``out``, ``e``, ``p`` ...).
    ph : float
        pH of the compartment.
    ionic_strength : float or None
        mol/L; None: the cell's.
    pmg : float or None
        None: the cell's.
    membrane_potential_mV : float
        Δψ = ψ(cell) − ψ(compartment), mV.

    Examples
    --------
    >>> out = Compartment("out", ph=5.5, membrane_potential_mV=-150)
    >>> cell = Conditions.from_celsius(70, ph=7.5, ionic_strength=0.25)
    >>> at = out.conditions(cell)
    >>> at.ph, at.ionic_strength, round(at.celsius, 1)
    (5.5, 0.25, 70.0)
    """

    id: str
    ph: float
    ionic_strength: float | None = None
    pmg: float | None = None
    membrane_potential_mV: float = 0.0
    name: str = ""

    def __post_init__(self) -> None:
        where = f"compartment {self.id}"
        try:
            ph = read_number(self.ph, f"{where} pH")
            psi = read_number(self.membrane_potential_mV, f"{where} membrane_potential_mV",
                              minimum=-1000.0, maximum=1000.0, unit="mV")
        except InputError as err:
            raise ConditionsError(str(err)) from None
        if not 0.0 <= ph <= 14.0:
            raise ConditionsError(f"{where}: pH {ph} is outside 0-14; give a pH between 0 and 14")
        object.__setattr__(self, "ph", ph)
        object.__setattr__(self, "membrane_potential_mV", psi)

    @property
    def membrane_potential_V(self) -> float:  # noqa: N802
        """Δψ = ψ(cell) − ψ(compartment), V."""
        return self.membrane_potential_mV / 1000.0

    def conditions(self, cell: Conditions) -> Conditions:
        """The compartment's conditions: the cell's temperature and pressure, its own pH (and
        ionic strength and pMg where given)."""
        return cell.with_(ph=self.ph,
                          ionic_strength=(cell.ionic_strength if self.ionic_strength is None
                                          else self.ionic_strength),
                          pmg=cell.pmg if self.pmg is None else self.pmg)

    def describe(self, cell: Conditions | None = None) -> str:
        """One line, e.g. ``out: pH 5.50, Δψ = -150 mV (ψ cell − ψ out)``."""
        text = f"{self.id}: pH {self.ph:.2f}"
        if self.ionic_strength is not None:
            text += f", I = {self.ionic_strength:.2f} mol/L"
        if self.pmg is not None:
            text += f", pMg {self.pmg:.2f}"
        text += f", Δψ = {self.membrane_potential_mV:g} mV (ψ cell − ψ {self.id})"
        return text
