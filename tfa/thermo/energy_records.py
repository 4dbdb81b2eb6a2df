"""What the thermodynamic database returns: the transformed formation energy of a compound and
the energy of a reaction, each with its uncertainty, sources, provenance, status and flags
(:class:`FormationEnergy`, :class:`ReactionEnergyResult`), and the status of a species.

Units: kJ/mol.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..conditions import Conditions
from .balance import BalanceReport
from .species import Species
from .status import ESTIMATED, RECALLED, RECONCILED, REVIEWED, UNREVIEWED

@dataclass(frozen=True)
class FormationEnergy:
    """Transformed standard Gibbs energy of formation of one compound at given conditions.

    Attributes
    ----------
    compound : str
        Compound id.
    value : float
        ΔfG'°, kJ/mol.
    uncertainty : float
        Standard uncertainty, kJ/mol.
    provenance : str
        Plain words: species used (with their fractions) or carrier potential, and sources.
    sources : tuple of str
        Source keys that entered.
    flags : tuple of str
        Fallbacks and caveats (constant ΔH, unreviewed data, held potentials, ...).
    species : tuple of str
        Species ids used.
    fractions : tuple of float
        Equilibrium fraction of each species within the reactant.
    status : str
        How far the data were checked (:mod:`tfa.thermo.status`): the weakest of its species.
    """

    compound: str
    value: float
    uncertainty: float
    provenance: str
    sources: tuple[str, ...] = ()
    flags: tuple[str, ...] = ()
    species: tuple[str, ...] = ()
    fractions: tuple[float, ...] = ()
    status: str = REVIEWED


@dataclass(frozen=True)
class ReactionEnergyResult:
    """Transformed reaction energies of one reaction at given conditions.

    Attributes
    ----------
    equation : str
        The reaction as written over compound ids.
    stoichiometry : dict
        Compound id -> net coefficient (negative consumed).
    standard : float
        ΔrG'°, kJ/mol.
    actual : float
        ΔrG' at the given activities, kJ/mol.
    uncertainty : float
        Standard uncertainty of both (the activity term is exact), kJ/mol.
    balance : BalanceReport
    sources : tuple of str
        Source keys of every datum that entered.
    provenance : tuple of str
        One line per compound.
    flags : tuple of str
        Fallbacks, defaulted activities, unreviewed data.
    activities : dict
        Compound id -> activity used in ΔrG' (water and H+ excluded).
    conditions : Conditions
    compounds : dict
        Compound id -> its :class:`FormationEnergy`.
    status : str
        The weakest status of the data that entered (:mod:`tfa.thermo.status`).
    audit_flags : tuple of str
        Open disagreements of the data audit that touch a compound of the reaction
        (:mod:`tfa.thermo.audit`; filled by :class:`tfa.thermo.library.ReactionLibrary`).
    """

    equation: str
    stoichiometry: dict[str, float]
    standard: float
    actual: float
    uncertainty: float
    balance: BalanceReport
    sources: tuple[str, ...]
    provenance: tuple[str, ...]
    flags: tuple[str, ...]
    activities: dict[str, float]
    conditions: Conditions
    compounds: dict[str, FormationEnergy] = field(default_factory=dict)
    status: str = REVIEWED
    audit_flags: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        """Plain dictionary for JSON output (energies in kJ/mol)."""
        return {
            "equation": self.equation,
            "stoichiometry": dict(self.stoichiometry),
            "delta_g_standard_kJ_per_mol": self.standard,
            "delta_g_kJ_per_mol": self.actual,
            "sigma_kJ_per_mol": self.uncertainty,
            "balanced": self.balance.ok,
            "balance": self.balance.to_dict(),
            "sources": list(self.sources),
            "provenance": list(self.provenance),
            "flags": list(self.flags),
            "status": self.status,
            "audit_flags": list(self.audit_flags),
            "activities": dict(self.activities),
            "conditions": self.conditions.to_dict(),
            "formation_energies": {
                cid: {"formation_delta_g_standard_kJ_per_mol": fe.value,
                      "sigma_kJ_per_mol": fe.uncertainty, "species": list(fe.species),
                      "fractions": list(fe.fractions), "sources": list(fe.sources),
                      "status": fe.status}
                for cid, fe in self.compounds.items()
            },
        }


def species_status(species: Species, reviewed: bool) -> str:
    """Status of one species (:mod:`tfa.thermo.status`): unreviewed source, estimate,
    reconciled record, data re-anchored to a recalled value, or reviewed data as published.

    >>> from tfa.thermo.species import load_species
    >>> sp = {s.id: s for s in load_species()}
    >>> species_status(sp["acetate"], True), species_status(sp["lactate"], True)
    ('reviewed species data', 'recalled value (from memory)')
    """
    if not reviewed:
        return UNREVIEWED
    if species.origin == "estimated":
        return ESTIMATED
    if species.origin == "reconciled":
        return RECONCILED
    return RECALLED if species.recalled else REVIEWED
