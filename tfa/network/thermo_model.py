"""The hand-over from the network layer to the optimisation layer: a cobra model with, for each
reaction, its transformed standard reaction energy at the environment, and for each compound its
log-concentration bounds.

Nothing here computes a Gibbs energy; the numbers are filled in by :mod:`tfa.network.energies`
from the thermodynamics engine. Units: kJ/mol; concentrations in mol/L (gases: partial pressure,
bar); ``log_bounds`` hold natural logarithms of those.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Iterable

import cobra

from ..conditions import Conditions

#: Where a reaction's energy comes from, from strongest to weakest.
ENERGY_SOURCES = ("species", "literature", "reconciled", "estimated", "placeholder", "none")


@dataclass
class ReactionEnergy:
    """Transformed standard Gibbs energy of one reaction at the environment's conditions.

    Attributes
    ----------
    reaction_id : str
        The cobra reaction id.
    standard : float
        Delta_r G'deg, kJ/mol, for the reaction as written (forward direction).
    uncertainty : float
        Standard uncertainty sigma of ``standard``, kJ/mol (> 0 unless exact by construction).
    source : str
        One of :data:`ENERGY_SOURCES`: the weakest kind of data that entered the value.
    provenance : str
        Plain words: which species, literature values or estimates, with source keys.
    compound_terms : dict
        Net stoichiometry over the thermodynamic compounds used (compound id -> coefficient),
        so uncertainties of shared compounds can be correlated (empty when not applicable).
    status : str
        How far the data behind the value were checked, the weakest of them
        (:data:`tfa.thermo.status.STATUSES`: reviewed species data, cited reaction value,
        reconciled, recalled value (from memory), common practice, estimated, unreviewed).
    audit_flags : tuple of str
        Open disagreements of the data audit that touch the reaction's compounds, and the
        class check of an estimate (:mod:`tfa.thermo.reaction_classes`).
    """

    reaction_id: str
    standard: float
    uncertainty: float
    source: str
    provenance: str = ""
    compound_terms: dict[str, float] = field(default_factory=dict)
    status: str = ""
    audit_flags: tuple[str, ...] = ()
    #: What ``standard`` refers to when the reaction crosses a membrane: each compound at its
    #: compartment's pH and electric potential (stated; "" for a reaction within the cell, whose
    #: reference is the usual one: 1 mol/L, gases 1 bar, at the environment's pH).
    standard_state: str = ""

    def __post_init__(self) -> None:
        if self.source not in ENERGY_SOURCES:
            raise ValueError(f"reaction {self.reaction_id}: unknown energy source {self.source!r}")


@dataclass
class ThermoModel:
    """A network ready for the optimisation layer.

    Attributes
    ----------
    model : cobra.Model
        The network (already rewritten for ``mode``); boundary reactions carry no energy.
    conditions : Conditions
        Temperature, pH, ionic strength, pressure of the environment.
    energies : dict[str, ReactionEnergy]
        Internal reactions with an energy. Internal reactions missing here have none
        (the optimisation layer leaves them free or blocks them, and reports them).
    log_bounds : dict[str, tuple[float, float]]
        Metabolite id -> (ln lower, ln upper) of its concentration (mol/L) or partial pressure
        (bar). A fixed (fed) compound has lower == upper.
    no_activity : set[str]
        Metabolite ids that never enter the activity term: H+ (fixed by pH) and water (activity 1).
    mode : str
        The mode the network was rewritten for (an id of :data:`tfa.modes.MODES`).
    environment_name : str
        Name of the environment, for reports.
    demand_id : str or None
        Id of the demand reaction whose lower bound expresses the required output.
    feed_ids : dict[str, str]
        Role -> metabolite id for the fed compounds ("H2", "CO2", "H2S", "phosphate", "ammonia").
    compound_table : object or None
        The per-compound energies behind ``energies`` (a
        :class:`tfa.network.compound_table.CompoundEnergyTable`), for coverage, correlated
        uncertainties and reports.
    all_energies : dict[str, ReactionEnergy]
        Every internal reaction's energy record, including those without a value (source
        "placeholder" or "none", standard NaN), for reports.
    log_rows : list of LogLinearBound
        Linear bounds on sums of ln c (carrier ratios, the phosphorylation-potential floor) of the
        environment's ``[cofactors]`` (:mod:`tfa.network.cofactors`).
    pools : list of PoolTotal
        Carrier pool totals (sum of the forms' concentrations below a total, mol/L).
    """

    model: cobra.Model
    conditions: Conditions
    energies: dict[str, ReactionEnergy]
    log_bounds: dict[str, tuple[float, float]]
    no_activity: set[str] = field(default_factory=set)
    mode: str = "native"
    environment_name: str = ""
    demand_id: str | None = None
    feed_ids: dict[str, str] = field(default_factory=dict)
    compound_table: object | None = None
    all_energies: dict[str, ReactionEnergy] = field(default_factory=dict)
    log_rows: list = field(default_factory=list)
    pools: list = field(default_factory=list)

    @property
    def RT(self) -> float:  # noqa: N802
        """R*T in kJ/mol at the model's temperature."""
        return self.conditions.RT

    def reaction_kinds(self) -> dict[str, str]:
        """Reaction id -> "internal", "exchange", "demand" or "sink"
        (:func:`tfa.network.checks.classify_reactions`; the demand reaction is never internal)."""
        from .checks import classify_reactions

        return classify_reactions(self.model, self.demand_id)

    def internal_reactions(self) -> list[cobra.Reaction]:
        """Reactions with compounds on both sides that are not the demand: the only reactions with
        a transformed Gibbs energy (exchanges, demands and sinks have none)."""
        kinds = self.reaction_kinds()
        return [r for r in self.model.reactions if kinds[r.id] == "internal"]

    def relax(self, reactions: Iterable[str]) -> "ThermoModel":
        """A copy without the energies of ``reactions``: they may then run either way, as if
        coupled to an energy source the network does not contain (what a minimal uphill set
        allows). The cobra model is shared, not copied."""
        drop = set(reactions)
        return replace(self, energies={k: v for k, v in self.energies.items() if k not in drop})
