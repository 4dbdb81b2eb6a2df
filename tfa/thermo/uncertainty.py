"""Standard uncertainty of transformed formation energies and of reaction energies.

Model (stated values are common practice for evaluated thermochemical tables unless a source is
named; they are the project's choice, not measurements):

- Species data at 298.15 K, σ0 by kind of species: liquid water 0.1 kJ/mol (CODATA key values are
  known to about 0.04 kJ/mol; Cox, Wagman & Medvedev 1989), gases and solids 0.3 kJ/mol,
  aqueous species with at most one carbon atom 0.5 kJ/mol, larger aqueous (organic) species
  1.0 kJ/mol; species from an unreviewed source 15 kJ/mol. A species that carries its own
  ``sigma_G`` (reconciled or estimated species) uses that value. The hydrogen ion is zero by
  convention and has σ = 0.
- Temperature: integration from 298.15 K with a constant heat capacity ignores dCp/dT, whose error
  grows as (T − Tr)²: s·(ΔT/55 K)² per species, added in quadrature to σ0, with s = 0.09 kJ/mol
  for constant Cp° and s = 0.5 kJ/mol where Cp° is missing (constant-ΔH fallback).

Calibration (``scripts/calibrate_sigma.py``; docs/internals.md, "Uncertainty calibration"): the
two temperature coefficients are the 95th percentiles of the drift of the constant-Cp (and
constant-ΔH) integration from the HKF equations of state over 27 reactions at 40-150 °C
(162 comparisons each: 0.083 and 0.47 kJ/mol), so that about 95 % of the drifts lie within 2σ;
the earlier 0.3 and 2.5 kJ/mol covered 100 %, about four times the actual drift at 150 °C. The
unreviewed σ is the value at which 95 % of the audit checks that use the unreviewed source lie
within 2σ (their median error is 8.5 kJ/mol, the largest 30 kJ/mol). The σ0 of reviewed data
are kept: with them, and σ 3 kJ/mol for values recalled from textbook tables, all 56
independent checks of the data audit at 25 °C lie within 2σ (95th percentile of |z|: 1.6).
- A reactant made of several species (pseudoisomers) takes the fraction-weighted sum
  σ = Σ r_j σ_j (the species of one reactant share their data, so they are treated as fully
  correlated).
- A reaction: σ = sqrt(Σ ν_i² σ_i²) over its compounds, taken as independent (Henry et al. 2007
  propagate group-contribution errors the same way).

References
----------
[1] C. S. Henry, L. J. Broadbelt, V. Hatzimanikatis, Biophys. J. 92 (2007) 1792-1805.
[2] J. D. Cox, D. D. Wagman, V. A. Medvedev, CODATA Key Values for Thermodynamics, Hemisphere, 1989.
"""

from __future__ import annotations

import math
from typing import Iterable

import numpy as np

from ..constants import T_REF

#: σ0 of liquid water, kJ/mol.
SIGMA_WATER = 0.1
#: σ0 of a gas species, kJ/mol.
SIGMA_GAS = 0.3
#: σ0 of an aqueous species with at most one C atom, kJ/mol.
SIGMA_AQUEOUS_SMALL = 0.5
#: σ0 of an aqueous species with two or more C atoms, kJ/mol.
SIGMA_AQUEOUS_ORGANIC = 1.0
#: σ0 of a species from an unreviewed source, kJ/mol (calibrated, module docstring).
SIGMA_UNREVIEWED = 15.0
#: σ0 of a solid phase (an element in its reference state, e.g. rhombic sulfur), kJ/mol.
SIGMA_SOLID = 0.3
#: Temperature span at which the temperature terms below are stated, K.
DELTA_T_CALIBRATION = 55.0
#: Temperature term of constant-Cp integration at DELTA_T_CALIBRATION, kJ/mol per species
#: (calibrated on HKF, module docstring).
SIGMA_CONSTANT_CP = 0.09
#: Temperature term of the constant-ΔH fallback at DELTA_T_CALIBRATION, kJ/mol per species
#: (calibrated on HKF, module docstring).
SIGMA_CONSTANT_H = 0.5


def base_sigma(state: str, carbon_atoms: int, reviewed: bool = True, own_sigma: float | None = None) -> float:
    """σ0 of a species' ΔfG° at 298.15 K, kJ/mol (model in the module docstring).

    Examples
    --------
    >>> base_sigma("aq", 3), base_sigma("gas", 1), base_sigma("aq", 2, reviewed=False)
    (1.0, 0.3, 15.0)
    >>> base_sigma("aq", 3, own_sigma=4.2)
    4.2
    """
    if own_sigma is not None and math.isfinite(own_sigma) and own_sigma > 0:
        return float(own_sigma)
    if not reviewed:
        return SIGMA_UNREVIEWED
    if state == "liq":
        return SIGMA_WATER
    if state == "gas":
        return SIGMA_GAS
    if state == "cr":
        return SIGMA_SOLID
    return SIGMA_AQUEOUS_SMALL if carbon_atoms <= 1 else SIGMA_AQUEOUS_ORGANIC


def is_conventional_zero(species) -> bool:
    """True for the aqueous hydrogen ion, whose ΔfG°, ΔfH°, S° and Cp° are zero at every
    temperature by the convention of aqueous thermodynamics (Alberty 2003, sec. 3.1): its energy
    carries no uncertainty (the protons of an outer fluid included).

    >>> from types import SimpleNamespace as S
    >>> is_conventional_zero(S(formula="H", charge=1, G=0.0)), is_conventional_zero(S(formula="H2", charge=0, G=17.7))
    (True, False)
    """
    return str(species.formula) in ("H", "H+") and int(species.charge) == 1 and float(species.G) == 0.0


def temperature_sigma(temperature: float, constant_cp: bool) -> float:
    """Added σ from carrying a species from 298.15 K to ``temperature`` (K), kJ/mol.

    Equation: σ_T = s·((T − 298.15)/55 K)², s = 0.09 kJ/mol with Cp°, 0.5 kJ/mol without
    (constant ΔH); calibrated against HKF (module docstring).

    Examples
    --------
    >>> temperature_sigma(298.15, True), temperature_sigma(353.15, True), temperature_sigma(353.15, False)
    (0.0, 0.09, 0.5)
    """
    scale = SIGMA_CONSTANT_CP if constant_cp else SIGMA_CONSTANT_H
    return scale * ((temperature - T_REF) / DELTA_T_CALIBRATION) ** 2


def species_sigma(base: float, temperature: float, constant_cp: bool) -> float:
    """σ of one species at ``temperature``: sqrt(σ0² + σ_T²), kJ/mol.

    >>> round(species_sigma(1.0, 353.15, False), 3)
    1.118
    """
    return math.hypot(base, temperature_sigma(temperature, constant_cp))


def reactant_sigma(fractions: Iterable[float], sigmas: Iterable[float]) -> float:
    """σ of a reactant from its species: Σ r_j σ_j (species of a reactant fully correlated).

    >>> reactant_sigma([0.25, 0.75], [1.0, 2.0])
    1.75
    """
    r = np.asarray(list(fractions), dtype=float)
    s = np.asarray(list(sigmas), dtype=float)
    return float(np.sum(r * s))


def reaction_sigma(coefficients: Iterable[float], sigmas: Iterable[float]) -> float:
    """σ of a reaction energy: sqrt(Σ ν_i² σ_i²) over independent compounds, kJ/mol.

    Example: 4 H2(g) + CO2(g) ⇌ CH4(g) + 2 H2O(l) with σ(gas) = 0.3 and σ(water) = 0.1 kJ/mol:

    >>> round(reaction_sigma([-4, -1, 1, 2], [0.3, 0.3, 0.3, 0.1]), 3)
    1.288
    """
    nu = np.asarray(list(coefficients), dtype=float)
    s = np.asarray(list(sigmas), dtype=float)
    return float(np.sqrt(np.sum((nu * s) ** 2)))
