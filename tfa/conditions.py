"""Physical and chemical conditions of a setting: temperature, pH, ionic strength, pressure, pMg.

Temperature is held in kelvin; degrees Celsius only at the interface (:meth:`Conditions.from_celsius`,
:attr:`Conditions.celsius`). Impossible values raise :class:`~tfa.errors.ConditionsError`;
values that stretch a model past its usual range emit :class:`ModelRangeWarning`.

Ranges
------
- pH 0-14 (aqueous scale).
- Ionic strength >= 0 mol/L; the extended Debye-Hueckel equation of Alberty (2003) is
  recommended up to about 0.25-0.5 mol/L, so a warning is given above 0.5 mol/L.
- Temperature 0-300 degC: the species data are referenced to 25 degC and carried by a constant
  heat capacity; above 150 degC the constant-Cp integration departs from the HKF equations of
  state by several kJ/mol per reaction (measured in tests/test_thermo_hkf.py), hence a warning.
- Pressure >= 1 bar when given; ``None`` means 1 bar with no pressure correction.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, replace

from .constants import CELSIUS_ZERO, R
from .errors import ConditionsError

#: Highest temperature the bundled species data are allowed to be carried to, degC.
MAX_CELSIUS = 300.0
#: Above this temperature constant-Cp integration is flagged as stretched, degC.
CONSTANT_CP_WARN_CELSIUS = 150.0
#: Above this ionic strength the extended Debye-Hueckel equation is flagged as stretched, mol/L.
DEBYE_HUCKEL_WARN_IONIC_STRENGTH = 0.5


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
        t, ph, i, p = self.temperature, self.ph, self.ionic_strength, self.pressure
        for name, value in (("temperature", t), ("pH", ph), ("ionic strength", i)):
            if value is None or not math.isfinite(float(value)):
                raise ConditionsError(f"{name} must be a finite number, got {value!r}")
        celsius = t - CELSIUS_ZERO
        if celsius < 0.0 or celsius > MAX_CELSIUS:
            raise ConditionsError(
                f"temperature {celsius:.2f} degC is outside 0-{MAX_CELSIUS:.0f} degC, the range the "
                "bundled species data can be carried to; give a temperature in that range"
            )
        if not 0.0 <= ph <= 14.0:
            raise ConditionsError(f"pH {ph} is outside 0-14; give a pH between 0 and 14")
        if i < 0.0:
            raise ConditionsError(f"ionic strength {i} mol/L is negative; give a value >= 0")
        if p is not None and (not math.isfinite(float(p)) or p < 1.0):
            raise ConditionsError(f"pressure {p} bar is below 1 bar; give a pressure >= 1 bar or none")
        if self.pmg is not None and not (0.0 <= self.pmg <= 14.0):
            raise ConditionsError(f"pMg {self.pmg} is outside 0-14; give a pMg between 0 and 14")
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
        if celsius is None or not math.isfinite(float(celsius)):
            raise ConditionsError(f"temperature must be a finite number of degC, got {celsius!r}")
        return cls(float(celsius) + CELSIUS_ZERO, float(ph), float(ionic_strength),
                   None if pressure is None else float(pressure),
                   None if pmg is None else float(pmg))

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
            changes["temperature"] = float(changes.pop("celsius")) + CELSIUS_ZERO
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
