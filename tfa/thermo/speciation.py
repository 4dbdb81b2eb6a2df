"""Acid-base speciation of a fluid's totals (dissolved inorganic carbon, total sulfide, total
ammonia) at a setting, from the species data, and the ionic strength the ions contribute.

The species of a reactant (CO2(aq) + H2O, HCO3-, CO3-2 for total CO2) differ by H+ only. Their
transformed energies at the setting (Alberty 2003, eq. 4.4-10; :mod:`tfa.thermo.legendre`,
extended Debye-Hueckel with B = 1.6) give the equilibrium fraction of each,
r_j = exp((ΔfG'° − ΔfG'°_j)/RT) (Alberty 2003, eq. 4.5-6), and the apparent acid constants: the
pH at which two neighbouring species (nH and nH − 1) are equally abundant,

    pK = (ΔfG'°_base − ΔfG'°_acid)|_(pH = 0) / (RT ln 10),

which at I = 0 is the thermodynamic pK of the species data (ΔrG° = RT ln10 pK). With the
species data at 25 °C, I = 0 this gives pK1 = 6.34 and pK2 = 10.33 of carbonic acid against
6.35 and 10.33 of Plummer & Busenberg (1982, Geochim. Cosmochim. Acta 46:1011,
doi:10.1016/0016-7037(82)90056-4) (tests/test_fluid.py).

Concentrations: the species of one reactant share its total, c_j = r_j c_total (mol/L, activity
coefficients folded into the transformed energies as everywhere in ``tfa``).

Ionic strength of given ions: I = ½ Σ c_i z_i² (mol/L). Ions need counter-ions of the opposite
charge; the least they add (monovalent counter-ions for the net charge) is ½ |Σ c_i z_i|, so the
ions given force I >= ½ (Σ c_i z_i² + |Σ c_i z_i|) (:func:`least_ionic_strength`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..conditions import Conditions
from ..constants import LN10
from .database import ThermoDatabase
from .legendre import transformed_species_energy
from .temperature import standard_gibbs

#: The totals a fluid may give, each with the database reactant that holds it.
TOTALS = {
    "dissolved_inorganic_carbon": "CO2tot",
    "total_sulfide": "H2S",
    "total_ammonia": "ammonia",
}


@dataclass(frozen=True)
class Speciation:
    """One total split into its species at a setting.

    Attributes
    ----------
    reactant : str
        The database reactant (e.g. ``CO2tot``).
    total : float
        mol/L.
    species : tuple of str
        Species ids (nH descending).
    charges : tuple of int
    concentrations : tuple of float
        mol/L, summing to ``total``.
    pk : tuple of float
        Apparent pK between neighbouring species (len(species) − 1 values).
    """

    reactant: str
    total: float
    species: tuple[str, ...]
    charges: tuple[int, ...]
    concentrations: tuple[float, ...]
    pk: tuple[float, ...]

    def concentration(self, species: str) -> float:
        """mol/L of one species."""
        return self.concentrations[self.species.index(species)]

    def charge_sum(self) -> float:
        """Σ c_j z_j, mol/L (negative for anions)."""
        return float(np.dot(self.concentrations, self.charges))

    def square_charge_sum(self) -> float:
        """Σ c_j z_j², mol/L."""
        return float(np.dot(self.concentrations, np.square(self.charges)))


def _members(db: ThermoDatabase, reactant: str):
    """Species of a reactant without Mg complexes, nH descending."""
    members = [s for s in db.compound(reactant).species if not s.n_mg]
    return sorted(members, key=lambda s: -s.n_h)


def _energies_at_ph0(db: ThermoDatabase, reactant: str, conditions: Conditions):
    members = _members(db, reactant)
    g, _ = standard_gibbs(members, conditions.temperature, conditions.pressure)
    at_zero = transformed_species_energy(g, [s.charge for s in members], [s.n_h for s in members],
                                         conditions.temperature, 0.0, conditions.ionic_strength)
    return members, np.asarray(at_zero, float)


def acid_constants(db: ThermoDatabase, reactant: str, conditions: Conditions) -> list[float]:
    """Apparent pK between neighbouring species of ``reactant`` (nH descending) at ``conditions``.

    Equation: pK = (ΔfG'°_base − ΔfG'°_acid at pH 0) / (RT ln 10) (Alberty 2003, sect. 4.5).

    Parameters
    ----------
    db : ThermoDatabase
    reactant : str
        Database reactant, e.g. ``"CO2tot"``.
    conditions : Conditions
        Temperature [K], pressure [bar], ionic strength [mol/L] (pH is not used).

    Returns
    -------
    list of float
        pK values, dimensionless.

    Examples
    --------
    Carbonic acid at 25 °C, I = 0: Plummer & Busenberg (1982) give pK1 = 6.35, pK2 = 10.33:

    >>> db = ThermoDatabase.load()
    >>> [round(k, 2) for k in acid_constants(db, "CO2tot", Conditions())]
    [6.34, 10.33]
    """
    members, g0 = _energies_at_ph0(db, reactant, conditions)
    out = []
    for acid, base, g_acid, g_base in zip(members, members[1:], g0, g0[1:]):
        if acid.n_h - base.n_h != 1:
            raise ValueError(f"{reactant}: species {acid.id} and {base.id} do not differ by one H+")
        out.append(float((g_base - g_acid) / (conditions.RT * LN10)))
    return out


def speciate(db: ThermoDatabase, reactant: str, total: float, conditions: Conditions) -> Speciation:
    """Split a total (mol/L) into its species at ``conditions`` (temperature, pH, ionic strength).

    Equation: c_j = r_j c_total with r_j = exp((ΔfG'° − ΔfG'°_j)/RT) (Alberty 2003, eq. 4.5-6).

    Examples
    --------
    2 mM dissolved inorganic carbon at 25 °C, pH 8.0, I = 0: with pK1 = 6.34 and pK2 = 10.33,
    CO2(aq) is 2 mM / (1 + 10^1.66 + 10^-0.67) = 0.043 mM (hand derivation):

    >>> s = speciate(ThermoDatabase.load(), "CO2tot", 2e-3, Conditions(ph=8.0))
    >>> round(s.concentration("CO2(aq)+H2O") * 1e3, 3)
    0.043
    """
    members, g0 = _energies_at_ph0(db, reactant, conditions)
    n_h = np.array([s.n_h for s in members], float)
    g = g0 + n_h * conditions.RT * LN10 * conditions.ph
    x = -g / conditions.RT
    weights = np.exp(x - np.max(x))
    fractions = weights / np.sum(weights)
    return Speciation(reactant, float(total), tuple(s.id for s in members),
                      tuple(int(s.charge) for s in members),
                      tuple(float(total * r) for r in fractions),
                      tuple(acid_constants(db, reactant, conditions)))


def least_ionic_strength(speciations) -> float:
    """The least ionic strength (mol/L) the given ions force: ½ (Σ c z² + |Σ c z|), their own
    share plus monovalent counter-ions for their net charge.

    >>> s = Speciation("X", 0.01, ("HA", "A-"), (0, -1), (0.0, 0.01), (5.0,))
    >>> least_ionic_strength([s])       # 10 mM of a monovalent anion with its cation: 0.01 M
    0.01
    """
    squares = sum(s.square_charge_sum() for s in speciations)
    net = sum(s.charge_sum() for s in speciations)
    return 0.5 * (squares + abs(net))
