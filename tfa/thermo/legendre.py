"""Alberty's Legendre transform at fixed pH, ionic strength and pMg.

The transformed standard Gibbs energy of formation of a species j (Alberty 2003, eq. 4.4-10,
with the magnesium term of eq. 4.9-1) is

.. math::

    \\Delta_f G'^\\circ_j = \\Delta_f G^\\circ_j
        + n_H(j)\\,RT\\ln 10\\;\\mathrm{pH}
        - n_{Mg}(j)\\,[\\Delta_f G^\\circ(\\mathrm{Mg^{2+}}) - RT\\ln 10\\;\\mathrm{pMg}]
        - RT\\alpha\\,(z_j^2 - n_H(j) - 4 n_{Mg}(j))\\,\\frac{\\sqrt{I}}{1 + B\\sqrt{I}}

with the extended Debye-Hueckel constant B = 1.6 kg^1/2 mol^-1/2 and RTalpha(T) from Alberty's
temperature polynomial. ΔfG°(H+) = 0 in every convention used here. The transform applies to every
species, whatever its state (aqueous, gas, liquid water): the nH term is the exchange of H+ with
the buffer, and the activity-coefficient term belongs to those H+ ions.

The transformed energy of a reactant (a sum of species that differ by H+ or Mg2+, a pseudoisomer
group) is

.. math::

    \\Delta_f G'^\\circ = -RT \\ln \\sum_j \\exp(-\\Delta_f G'^\\circ_j / RT)

and the equilibrium mole fraction of species j within its reactant is
r_j = exp((ΔfG'° − ΔfG'°_j)/RT).

Units: kJ/mol, K, mol/L (ionic strength, taken as molal), dimensionless pH and pMg.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003, chapters 3-4
    (extended Debye-Hueckel with B = 1.6; RTalpha(T) = 9.20483e-3 T - 1.28467e-5 T^2
    + 4.95199e-8 T^3 kJ kg^1/2 mol^-3/2, so alpha = 1.1758 kg^1/2 mol^-1/2 at 298.15 K).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ..constants import LN10, R

#: Extended Debye-Hueckel constant B of Alberty (2003), kg^1/2 mol^-1/2.
DEBYE_HUCKEL_B = 1.6
#: Coefficients of RTalpha(T) = a1 T + a2 T^2 + a3 T^3, kJ kg^1/2 mol^-3/2 (Alberty 2003).
RT_ALPHA_COEFFICIENTS = (9.20483e-3, -1.28467e-5, 4.95199e-8)


def rt_alpha(temperature: ArrayLike) -> np.ndarray | float:
    """RTalpha(T), the Debye-Hueckel slope times RT, in kJ kg^1/2 mol^-3/2.

    Equation: RTalpha = 9.20483e-3 T - 1.28467e-5 T^2 + 4.95199e-8 T^3 (T in K), fitted by
    Alberty (2003) to the temperature dependence of the Debye-Hueckel constant; valid 273-373 K
    and extrapolated (smoothly) above.

    Parameters
    ----------
    temperature : float or array
        Temperature, K.

    Returns
    -------
    float or ndarray
        RTalpha, kJ kg^1/2 mol^-3/2.

    References
    ----------
    [1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003, sect. 3.7.

    Examples
    --------
    alpha = RTalpha / RT is 1.1758 kg^1/2 mol^-1/2 at 298.15 K (Alberty 2003):

    >>> alpha = float(rt_alpha(298.15) / (R * 298.15))
    >>> round(alpha, 5), abs(alpha - 1.1758) < 5e-4
    (1.17585, True)
    >>> round(float(rt_alpha(298.15)), 4)
    2.9149
    """
    t = np.asarray(temperature, dtype=float)
    a1, a2, a3 = RT_ALPHA_COEFFICIENTS
    value = a1 * t + a2 * t**2 + a3 * t**3
    return float(value) if value.ndim == 0 else value


def debye_huckel_term(temperature: ArrayLike, ionic_strength: ArrayLike) -> np.ndarray | float:
    """RTalpha·√I/(1 + B√I), kJ/mol: the extended Debye-Hueckel term per unit of (z² − nH).

    Equation: RT ln γ(z) = −z² · RTalpha √I / (1 + 1.6 √I) (Alberty 2003, eq. 3.6-3).

    Examples
    --------
    At 25 °C and I = 0.25 mol/L the term is 0.81 kJ/mol, the difference of 1.62 kJ/mol between
    Alberty's (2003) ΔfG'° of water at I = 0 (−157.28) and at I = 0.25 (−155.66) being twice it:

    >>> round(float(debye_huckel_term(298.15, 0.25)), 3)
    0.81
    """
    i = np.asarray(ionic_strength, dtype=float)
    if np.any(i < 0):
        raise ValueError("ionic strength must be >= 0 mol/L")
    root = np.sqrt(i)
    value = rt_alpha(temperature) * root / (1.0 + DEBYE_HUCKEL_B * root)
    return float(value) if np.ndim(value) == 0 else value


def transformed_species_energy(
    gibbs: ArrayLike,
    charge: ArrayLike,
    n_h: ArrayLike,
    temperature: float,
    ph: float,
    ionic_strength: float,
    n_mg: ArrayLike = 0,
    pmg: float | None = None,
    gibbs_mg: float | None = None,
) -> np.ndarray:
    """Transformed standard Gibbs energy of formation ΔfG'°_j of species, kJ/mol.

    Equation (Alberty 2003, eqs. 4.4-10 and 4.9-1)::

        ΔfG'°j = ΔfG°j + nH RT ln10 pH − nMg (ΔfG°(Mg2+) − RT ln10 pMg)
                 − RTα (z² − nH − 4 nMg) √I / (1 + 1.6 √I)

    Parameters
    ----------
    gibbs : array
        ΔfG°_j of the species at the temperature (and pressure) wanted, I = 0, kJ/mol.
    charge, n_h, n_mg : array
        Charge z_j, number of H atoms, number of Mg atoms.
    temperature : float
        K.
    ph, ionic_strength : float
        pH and ionic strength (mol/L).
    pmg : float or None
        pMg; required when any n_mg is non-zero.
    gibbs_mg : float or None
        ΔfG°(Mg2+) at the same temperature, I = 0, kJ/mol (from the species data).

    Returns
    -------
    ndarray
        ΔfG'°_j, kJ/mol.

    Examples
    --------
    Water at pH 7, 25 °C, from ΔfG°(H2O, l) = −237.19 kJ/mol; Alberty (2003, Table 4.5 / BasicBiochemData)
    gives −157.28 kJ/mol at I = 0 and −155.66 kJ/mol at I = 0.25:

    >>> [round(float(transformed_species_energy(-237.19, 0, 2, 298.15, 7.0, i)[0]), 2) for i in (0.0, 0.25)]
    [-157.28, -155.66]
    """
    g = np.atleast_1d(np.asarray(gibbs, dtype=float))
    z = np.asarray(charge, dtype=float)
    nh = np.asarray(n_h, dtype=float)
    nmg = np.broadcast_to(np.asarray(n_mg, dtype=float), g.shape)
    rt = R * temperature
    dh = debye_huckel_term(temperature, ionic_strength)
    value = g + nh * rt * LN10 * ph - (z**2 - nh - 4.0 * nmg) * dh
    if np.any(nmg != 0):
        if pmg is None or gibbs_mg is None:
            raise ValueError("species with Mg need pMg and ΔfG°(Mg2+)")
        value = value - nmg * (gibbs_mg - rt * LN10 * pmg)
    return value


def reactant_energy(transformed: ArrayLike, temperature: float) -> float:
    """ΔfG'° of a reactant from the ΔfG'°_j of its species, kJ/mol.

    Equation: ΔfG'° = −RT ln Σ_j exp(−ΔfG'°_j / RT) (Alberty 2003, eq. 4.5-1), evaluated as a
    stable log-sum-exp.

    Examples
    --------
    Two equal species lower the reactant by RT ln 2 = 1.72 kJ/mol at 298.15 K:

    >>> round(reactant_energy([-100.0, -100.0], 298.15), 3)
    -101.718
    """
    g = np.asarray(transformed, dtype=float)
    if g.size == 0:
        raise ValueError("a reactant needs at least one species")
    rt = R * temperature
    x = -g / rt
    top = np.max(x)
    return float(-rt * (top + np.log(np.sum(np.exp(x - top)))))


def species_fractions(transformed: ArrayLike, temperature: float) -> np.ndarray:
    """Equilibrium mole fractions of the species of a reactant (speciation).

    Equation: r_j = exp((ΔfG'° − ΔfG'°_j)/RT) (Alberty 2003, eq. 4.5-6).

    Examples
    --------
    Phosphate at pH 7.2 ≈ its pKa2 is about half H2PO4- and half HPO4-2 (I = 0). With the
    species energies ΔfG°(H2PO4-) = −1137.3 and ΔfG°(HPO4-2) = −1096.1 kJ/mol (Wagman et al. 1982,
    NBS tables) the fraction of HPO4-2 at pH 7.2 is about 0.5:

    >>> g = transformed_species_energy([-1137.3, -1096.1], [-1, -2], [2, 1], 298.15, 7.2, 0.0)
    >>> round(float(species_fractions(g, 298.15)[1]), 1)
    0.5
    """
    g = np.asarray(transformed, dtype=float)
    return np.exp((reactant_energy(g, temperature) - g) / (R * temperature))
