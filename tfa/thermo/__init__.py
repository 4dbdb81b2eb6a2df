"""Thermodynamics engine: species data, Legendre transforms, compounds, reaction energies.

Never imports cobra. Main entry point: :class:`ThermoDatabase`.
"""

from .audit import AuditEntry, AuditResult, audit
from .balance import BalanceReport
from .compounds import Compound, CompoundRegistry
from .database import FormationEnergy, ReactionEnergyResult, ThermoDatabase
from .literature import ReactionValue, load_reaction_values
from .potentials import CarrierCouple, load_potentials

__all__ = [
    "AuditEntry", "AuditResult", "audit", "BalanceReport", "Compound", "CompoundRegistry",
    "FormationEnergy", "ReactionEnergyResult", "ThermoDatabase", "ReactionValue",
    "load_reaction_values", "CarrierCouple", "load_potentials",
]
