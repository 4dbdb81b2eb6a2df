"""Standard Gibbs energy of species at temperature T and pressure P.

Each species is carried from the reference state (298.15 K, 1 bar) with a constant heat
capacity and, when a pressure is given, a constant molar volume:

.. math::

    G(T, P) = G(T_r) - S(T_r)\\,(T - T_r) + C_p\\,[(T - T_r) - T \\ln(T/T_r)] + V (P - P_r)

with :math:`T_r` = 298.15 K, :math:`P_r` = 1 bar, G in kJ/mol, S and Cp in J/(mol K)
(divided by 1000), V in cm3/mol (1 cm3 bar = 0.1 J = 1e-4 kJ). The energies are OBIGT's
"apparent" Gibbs energies of formation (the elements are held at their 298.15 K values), so
they are meaningful in balanced reactions, where the elements cancel.

Fallbacks, reported per species through :class:`IntegrationFlag`:

- ``NO_CP``: Cp° missing, Cp taken as 0, i.e. constant ΔH (Gibbs-Helmholtz with constant
  enthalpy and entropy): G(T) = G(Tr) − S(Tr)(T − Tr).
- ``NO_S``: S° missing. S could be derived from G, H and the entropies of the elements, but the
  runtime carries no element entropies, so G is taken as constant in T (no Cp term either).
- ``NO_V``: a pressure was given but V° is missing: no pressure correction.

Gases: their standard state is the ideal gas at 1 bar at every pressure, so V° = 0 (as in OBIGT)
and the pressure enters only through the partial pressure, never here.

References
----------
[1] J. P. Amend, E. L. Shock, FEMS Microbiol. Rev. 25 (2001) 175-243 (constant-Cp integration
    of standard Gibbs energies; apparent Gibbs energy convention).
[2] E. L. Shock, H. C. Helgeson, Geochim. Cosmochim. Acta 52 (1988) 2009-2036 (standard molal
    properties of aqueous species; the HKF equations this integration approximates).
[3] L. N. Plummer, E. Busenberg, Geochim. Cosmochim. Acta 46 (1982) 1011-1040 (first dissociation
    constant of carbonic acid, used in the example).
"""

from __future__ import annotations

import enum
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..constants import CM3_BAR_IN_KJ, P_REF, T_REF
from ..errors import ConditionsError
from .species import Species


class IntegrationFlag(enum.IntFlag):
    """What was missing when a species was carried to T and P (combinable bits)."""

    NONE = 0
    #: No Cp°: constant ΔH (Cp = 0) used.
    NO_CP = 1
    #: No S°: G taken as constant in temperature.
    NO_S = 2
    #: Pressure given but no V°: no pressure correction.
    NO_V = 4

    def describe(self) -> list[str]:
        """Plain-language notes for reports, one per set bit."""
        notes = []
        if self & IntegrationFlag.NO_CP:
            notes.append("no Cp: constant enthalpy assumed from 25 degC")
        if self & IntegrationFlag.NO_S:
            notes.append("no S: G taken as constant in temperature")
        if self & IntegrationFlag.NO_V:
            notes.append("no V: pressure correction skipped")
        return notes


@dataclass(frozen=True)
class SpeciesArrays:
    """Standard properties of many species as numpy arrays (NaN where missing).

    Units: G kJ/mol, S and Cp J/(mol K), V cm3/mol.
    """

    ids: tuple[str, ...]
    G: np.ndarray
    S: np.ndarray
    Cp: np.ndarray
    V: np.ndarray

    @classmethod
    def from_species(cls, species: Sequence[Species]) -> "SpeciesArrays":
        """Collect the properties of ``species`` into arrays."""
        def col(attr: str) -> np.ndarray:
            return np.array([np.nan if getattr(s, attr) is None else float(getattr(s, attr))
                             for s in species], dtype=float)

        return cls(tuple(s.id for s in species), col("G"), col("S"), col("Cp"), col("V"))

    def __len__(self) -> int:
        return len(self.ids)


def _check_conditions(temperature: float, pressure: float | None) -> None:
    if not (isinstance(temperature, (int, float, np.floating)) and math.isfinite(temperature)
            and temperature > 0.0):
        raise ConditionsError(f"temperature {temperature!r} K is not a positive number of kelvin")
    if pressure is not None and not (math.isfinite(pressure) and pressure > 0.0):
        raise ConditionsError(f"pressure {pressure!r} bar is not a positive number of bar")


def standard_gibbs(
    species: Sequence[Species] | SpeciesArrays,
    temperature: float,
    pressure: float | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """Standard Gibbs energies of formation of many species at T (and P), constant Cp° and V°.

    .. math::

        G(T,P) = G(T_r) - S(T_r)(T - T_r) + C_p[(T - T_r) - T\\ln(T/T_r)] + V(P - P_r)

    Parameters
    ----------
    species : sequence of Species or SpeciesArrays
        The species (G kJ/mol, S and Cp J/(mol K), V cm3/mol at 298.15 K, 1 bar).
    temperature : float
        Temperature, K.
    pressure : float or None
        Pressure, bar. ``None``: no pressure correction (1 bar).

    Returns
    -------
    values : numpy.ndarray
        G(T, P) of each species, kJ/mol (apparent Gibbs energy of formation).
    flags : numpy.ndarray of int
        :class:`IntegrationFlag` bits per species (0 = full data used).

    References
    ----------
    Amend & Shock (2001) FEMS Microbiol. Rev. 25:175 (constant-Cp form); the design notes (docs/design), thermodynamic conventions.

    Examples
    --------
    First dissociation constant of carbonic acid, HCO3- + H+ = CO2(aq) + H2O, from the bundled
    OBIGT data. Plummer & Busenberg (1982) give pK1 = 6.352 at 25 degC and 6.427 at 100 degC:

    >>> import math
    >>> from tfa.thermo.species import load_species
    >>> from tfa.constants import R, LN10
    >>> sp = {s.id: s for s in load_species()}
    >>> def pk1(T):
    ...     g, flags = standard_gibbs([sp["CO2"], sp["H2O(l)"], sp["HCO3-"]], T)
    ...     return float(-(g[0] + g[1] - g[2]) / (R * T * LN10))
    >>> f"{pk1(298.15):.3f} {pk1(373.15):.3f}"
    '6.345 6.405'
    >>> abs(pk1(298.15) - 6.352) < 0.01 and abs(pk1(373.15) - 6.427) < 0.03
    True
    >>> standard_gibbs([sp["H2"]], 298.15)[0].round(3)   # Shock et al. (1989): 4236 cal/mol
    array([17.723])
    """
    _check_conditions(temperature, pressure)
    arrays = species if isinstance(species, SpeciesArrays) else SpeciesArrays.from_species(species)
    t, tr = float(temperature), T_REF
    no_s = np.isnan(arrays.S)
    no_cp = np.isnan(arrays.Cp) & ~no_s
    s_kj = np.where(no_s, 0.0, arrays.S) / 1000.0
    cp_kj = np.where(np.isnan(arrays.Cp) | no_s, 0.0, arrays.Cp) / 1000.0
    values = arrays.G - s_kj * (t - tr) + cp_kj * ((t - tr) - t * math.log(t / tr))
    flags = np.where(no_cp, int(IntegrationFlag.NO_CP), 0) | np.where(no_s, int(IntegrationFlag.NO_S), 0)
    if pressure is not None:
        no_v = np.isnan(arrays.V)
        values = values + np.where(no_v, 0.0, arrays.V) * (float(pressure) - P_REF) * CM3_BAR_IN_KJ
        flags = flags | np.where(no_v, int(IntegrationFlag.NO_V), 0)
    return values, flags.astype(int)


def species_gibbs(species: Species, temperature: float, pressure: float | None = None) -> float:
    """Standard Gibbs energy of formation of one species at T (K) and P (bar), kJ/mol.

    Scalar form of :func:`standard_gibbs` (same equation, units and fallbacks; use
    :func:`species_gibbs_flagged` to also get the :class:`IntegrationFlag`).

    Examples
    --------
    Pressure term: V°(H2O, l) = 18.07 cm3/mol gives +18.07 * 99 * 1e-4 = 0.179 kJ/mol at 100 bar.

    >>> from tfa.thermo.species import load_species
    >>> water = next(s for s in load_species() if s.id == "H2O(l)")
    >>> round(species_gibbs(water, 298.15, 100.0) - species_gibbs(water, 298.15), 3)
    0.179
    """
    return species_gibbs_flagged(species, temperature, pressure)[0]


def species_gibbs_flagged(species: Species, temperature: float,
                          pressure: float | None = None) -> tuple[float, IntegrationFlag]:
    """Like :func:`species_gibbs`, also returning the :class:`IntegrationFlag` of the species."""
    values, flags = standard_gibbs([species], temperature, pressure)
    return float(values[0]), IntegrationFlag(int(flags[0]))
