"""Gas-aqueous partitioning computed from the species data themselves.

For a gas X, X(g) = X(aq) has the equilibrium constant

.. math::

    K_H(T, P) = \\frac{m_{X(aq)}}{p_X} = \\exp\\left(-\\frac{G_{aq}(T,P) - G_{gas}(T)}{RT}\\right)

in mol/kg/bar (standard states: 1 mol/kg ideal solution, ideal gas at 1 bar). In dilute water
1 mol/kg ≈ 1 mol/L (within 0.3 % up to 60 degC, 4 % at 100 degC from the density of water), and
``tfa`` uses mol/L for solutes, so K_H is reported in mol/L/bar. Activity coefficients of the
neutral gases are taken as 1. Because both G values come from the bundled data carried by
:mod:`tfa.thermo.temperature`, the solubility moves with temperature consistently with every
other reaction energy.

References
----------
[1] R. Sander, Atmos. Chem. Phys. 15 (2015) 4399-4981 (compilation of Henry's law constants;
    H2: about 7.8e-4 mol/L/bar at 25 degC, value from memory).
[2] E. L. Shock, H. C. Helgeson, D. A. Sverjensky, Geochim. Cosmochim. Acta 53 (1989) 2157-2183
    (aqueous H2, CO2, CH4, H2S, NH3 data); D. D. Wagman et al., J. Phys. Chem. Ref. Data 11
    (1982) Suppl. 2 (gases).
"""

from __future__ import annotations

import math

from ..constants import R
from ..errors import ConditionsError, InputError
from .species import Species
from .temperature import standard_gibbs


def _check_pair(gas: Species, aqueous: Species) -> None:
    if gas.state != "gas":
        raise InputError(f"species '{gas.id}' is not a gas (state {gas.state}); give the gas "
                         "species first, e.g. H2(g)")
    if aqueous.state != "aq":
        raise InputError(f"species '{aqueous.id}' is not aqueous (state {aqueous.state}); give "
                         "the dissolved species second, e.g. H2")
    if gas.formula != aqueous.formula or gas.charge != aqueous.charge:
        raise InputError(f"'{gas.id}' ({gas.formula}) and '{aqueous.id}' ({aqueous.formula}) are "
                         "not the same molecule; pair a gas with its own dissolved form")


def henry_constant(gas_species: Species, aqueous_species: Species, temperature: float,
                   pressure: float | None = None) -> float:
    """Henry's law constant K_H = c_aq / p_gas, mol/L/bar, from the species data.

    K_H = exp(−(G_aq(T,P) − G_gas(T)) / RT), molality taken as mol/L (dilute water).

    Parameters
    ----------
    gas_species, aqueous_species : Species
        The gas (state ``gas``) and its dissolved form (state ``aq``), same formula.
    temperature : float
        Temperature, K.
    pressure : float or None
        Pressure, bar; corrects the aqueous species with its V° (the gas standard state does not
        depend on pressure). ``None``: 1 bar.

    Returns
    -------
    float
        K_H in mol/L/bar.

    Examples
    --------
    H2 at 25 degC: Sander (2015) lists about 7.8e-4 mol/L/bar (from memory).

    >>> from tfa.thermo.species import load_species
    >>> sp = {s.id: s for s in load_species()}
    >>> f"{henry_constant(sp['H2(g)'], sp['H2'], 298.15):.2e}"
    '7.85e-04'
    """
    _check_pair(gas_species, aqueous_species)
    if not (math.isfinite(temperature) and temperature > 0):
        raise ConditionsError(f"temperature {temperature!r} K is not a positive number of kelvin")
    g_aq = standard_gibbs([aqueous_species], temperature, pressure)[0][0]
    g_gas = standard_gibbs([gas_species], temperature, None)[0][0]
    return math.exp(-(g_aq - g_gas) / (R * temperature))


def dissolved_from_partial_pressure(partial_pressure: float, gas_species: Species,
                                    aqueous_species: Species, temperature: float,
                                    pressure: float | None = None) -> float:
    """Dissolved concentration (mol/L) in equilibrium with a partial pressure (bar).

    c = K_H · p (Henry's law, ideal gas and ideal dilute solution).

    Examples
    --------
    >>> from tfa.thermo.species import load_species
    >>> sp = {s.id: s for s in load_species()}
    >>> f"{dissolved_from_partial_pressure(0.01, sp['H2(g)'], sp['H2'], 298.15):.2e}"
    '7.85e-06'
    """
    if not (math.isfinite(partial_pressure) and partial_pressure >= 0):
        raise InputError(f"partial pressure {partial_pressure!r} bar of {gas_species.id} must be "
                         "a number >= 0")
    return henry_constant(gas_species, aqueous_species, temperature, pressure) * partial_pressure


def partial_pressure_from_dissolved(concentration: float, gas_species: Species,
                                    aqueous_species: Species, temperature: float,
                                    pressure: float | None = None) -> float:
    """Partial pressure (bar) in equilibrium with a dissolved concentration (mol/L).

    p = c / K_H (Henry's law).

    Examples
    --------
    >>> from tfa.thermo.species import load_species
    >>> sp = {s.id: s for s in load_species()}
    >>> f"{partial_pressure_from_dissolved(7.85e-6, sp['H2(g)'], sp['H2'], 298.15):.3f}"
    '0.010'
    """
    if not (math.isfinite(concentration) and concentration >= 0):
        raise InputError(f"concentration {concentration!r} mol/L of {aqueous_species.id} must be "
                         "a number >= 0")
    return concentration / henry_constant(gas_species, aqueous_species, temperature, pressure)
