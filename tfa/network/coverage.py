"""Coverage of a network by thermodynamic data: where each reaction's energy comes from.

Per internal reaction: the kind of source (``species`` data, a ``literature`` reaction value it
restates, ``reconciled`` from several literature values, ``estimated`` by group contribution,
``placeholder`` or ``none``), ΔrG'° at the environment, its σ and the provenance text; then counts
and fractions per kind and the list of reactions without reviewed species data or a cited
literature value (species data, a value it restates, or a combination of cited values). The
rules that assign a source are those of :mod:`tfa.network.energies`.

Nothing here computes an energy; it reads the :class:`~tfa.network.thermo_model.ReactionEnergy`
records made by :mod:`tfa.network.energies`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Mapping

import cobra
import pandas as pd

from ..conditions import Conditions
from .energies import CompoundEnergyTable, compound_energies, reaction_energies
from .thermo_model import ENERGY_SOURCES, ReactionEnergy

#: Sources that count as "reviewed species data or a cited reaction-level value". A reconciled
#: energy is made only of reviewed species data and cited, peer-reviewed literature values (a
#: combination of several of them, e.g. phosphotransacetylase = acetyl-CoA hydrolysis − acetyl
#: phosphate hydrolysis), so it counts; estimates and placeholders do not. The report keeps the
#: split between the three kinds.
REVIEWED_OR_CITED = ("species", "literature", "reconciled")
#: Sources with a number (the others have none).
WITH_VALUE = ("species", "literature", "reconciled", "estimated")
#: Columns of the coverage table (one row per internal reaction).
COVERAGE_COLUMNS = ["reaction", "source", "delta_g_standard_kJ_per_mol", "sigma_kJ_per_mol",
                    "pathway", "equation", "provenance"]


@dataclass
class ReactionCoverage:
    """Where one reaction's energy comes from. ``standard`` and ``uncertainty`` in kJ/mol (NaN: none)."""

    reaction_id: str
    equation: str
    pathway: str
    source: str
    standard: float
    uncertainty: float
    provenance: str


@dataclass
class CoverageReport:
    """Coverage of a network's internal reactions at one set of conditions.

    Attributes
    ----------
    network : str
        Model id.
    conditions : Conditions
    reactions : list of ReactionCoverage
        Every internal reaction, in model order.
    environment_name : str
    disagreements : list of dict
        Literature values that disagree with the rest at 3σ (from the reconciliation).
    """

    network: str
    conditions: Conditions
    reactions: list[ReactionCoverage]
    environment_name: str = ""
    disagreements: list[dict] = field(default_factory=list)

    @property
    def counts(self) -> dict[str, int]:
        """Number of reactions per source kind (every kind listed, zeros included)."""
        out = {kind: 0 for kind in ENERGY_SOURCES}
        for row in self.reactions:
            out[row.source] = out.get(row.source, 0) + 1
        return out

    @property
    def total(self) -> int:
        return len(self.reactions)

    @property
    def fractions(self) -> dict[str, float]:
        """Fraction of reactions per source kind (0 for an empty network)."""
        n = self.total
        return {k: (v / n if n else 0.0) for k, v in self.counts.items()}

    @property
    def reviewed_or_cited_fraction(self) -> float:
        """Fraction of reactions whose ΔrG'° comes from reviewed species data or cited values
        (sources in :data:`REVIEWED_OR_CITED`: species, literature, reconciled)."""
        n = self.total
        return sum(self.counts[k] for k in REVIEWED_OR_CITED) / n if n else 0.0

    @property
    def with_value_fraction(self) -> float:
        """Fraction of reactions that have a ΔrG'° at all (any source but placeholder/none)."""
        n = self.total
        return sum(self.counts[k] for k in WITH_VALUE) / n if n else 0.0

    def without_reviewed_data(self) -> list[ReactionCoverage]:
        """Reactions whose energy is not from reviewed species data or a cited literature value."""
        return [r for r in self.reactions if r.source not in REVIEWED_OR_CITED]

    def to_frame(self) -> pd.DataFrame:
        """One row per reaction: id, source, ΔrG'° (kJ/mol), σ, pathway, equation, provenance."""
        return pd.DataFrame([{
            "reaction": r.reaction_id, "source": r.source,
            "delta_g_standard_kJ_per_mol": r.standard, "sigma_kJ_per_mol": r.uncertainty,
            "pathway": r.pathway, "equation": r.equation, "provenance": r.provenance,
        } for r in self.reactions], columns=COVERAGE_COLUMNS)

    def counts_frame(self) -> pd.DataFrame:
        """One row per source kind: count and fraction."""
        counts, fractions = self.counts, self.fractions
        return pd.DataFrame({"source": list(counts), "reactions": list(counts.values()),
                             "fraction": [fractions[k] for k in counts]})

    def to_dict(self) -> dict:
        """Plain dictionary for JSON output."""
        return {
            "network": self.network,
            "environment": self.environment_name,
            "conditions": self.conditions.to_dict(),
            "internal_reactions": self.total,
            "counts": self.counts,
            "fractions": self.fractions,
            "reviewed_or_cited_fraction": self.reviewed_or_cited_fraction,
            "with_value_fraction": self.with_value_fraction,
            "without_reviewed_data": [r.reaction_id for r in self.without_reviewed_data()],
            "disagreements": self.disagreements,
            "reactions": [{
                "reaction": r.reaction_id, "source": r.source,
                "delta_g_standard_kJ_per_mol": None if math.isnan(r.standard) else r.standard,
                "sigma_kJ_per_mol": None if math.isnan(r.uncertainty) else r.uncertainty,
                "pathway": r.pathway, "equation": r.equation, "provenance": r.provenance,
            } for r in self.reactions],
        }


def coverage_from_energies(model: cobra.Model, energies: Mapping[str, ReactionEnergy],
                           conditions: Conditions, environment_name: str = "",
                           table: CompoundEnergyTable | None = None) -> CoverageReport:
    """Coverage from reaction energies already computed (every internal reaction is listed;
    one missing from ``energies`` counts as "none")."""
    from .checks import is_boundary_reaction

    rows = []
    for reaction in model.reactions:
        if is_boundary_reaction(reaction):
            continue
        e = energies.get(reaction.id)
        equation = reaction.build_reaction_string()
        pathway = str((reaction.notes or {}).get("pathway") or reaction.subsystem or "")
        if e is None:
            rows.append(ReactionCoverage(reaction.id, equation, pathway, "none", math.nan, math.nan,
                                         "no energy computed"))
        else:
            rows.append(ReactionCoverage(reaction.id, equation, pathway, e.source, e.standard,
                                         e.uncertainty, e.provenance))
    disagreements = []
    if table is not None and table.reconciliation is not None:
        disagreements = [{"id": r.id, "residual_kJ_per_mol": r.residual,
                          "sigma_kJ_per_mol": r.sigma, "studentized": r.studentized,
                          "source_key": r.source_key}
                         for r in table.reconciliation.disagreements]
    return CoverageReport(model.id, conditions, rows, environment_name, disagreements)


def coverage(model: cobra.Model, environment, db=None, literature=None,
             estimate: bool = True) -> CoverageReport:
    """Coverage of ``model`` at the environment's conditions (the network as given, no rewrite).

    Parameters
    ----------
    model : cobra.Model
    environment : Environment or Conditions
    db : ThermoDatabase, optional
    literature : literature values, a path, or None (see :func:`tfa.network.energies.compound_energies`)
    estimate : bool
        Use group-contribution estimates for compounds still without data.
    """
    table = compound_energies(model, environment, db, literature, estimate=estimate)
    energies = reaction_energies(model, table)
    name = "" if isinstance(environment, Conditions) else str(getattr(environment, "name", "") or "")
    return coverage_from_energies(model, energies, table.conditions, name, table)
