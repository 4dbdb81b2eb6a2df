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
from ..errors import InputError
from ..thermo.status import BASIS_STATUS, STATUSES, needs_checking
from .compound_table import CompoundEnergyTable
from .energies import compound_energies, network_sources, reaction_energies
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
                    "status", "audit_flags", "pathway", "equation", "provenance"]


@dataclass
class ReactionCoverage:
    """Where one reaction's energy comes from. ``standard`` and ``uncertainty`` in kJ/mol (NaN: none).

    ``status`` says how far its data were checked (:mod:`tfa.thermo.status`); ``audit_flags``
    are the open audit disagreements (and failed class checks of estimates) that touch it.
    """

    reaction_id: str
    equation: str
    pathway: str
    source: str
    standard: float
    uncertainty: float
    provenance: str
    status: str = ""
    audit_flags: tuple[str, ...] = ()
    metabolites: tuple[str, ...] = ()


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
    table : CompoundEnergyTable or None
        The compound energies behind the rows (for :meth:`to_verify`).
    """

    network: str
    conditions: Conditions
    reactions: list[ReactionCoverage]
    environment_name: str = ""
    disagreements: list[dict] = field(default_factory=list)
    table: CompoundEnergyTable | None = field(default=None, repr=False)
    sources: dict = field(default_factory=dict, repr=False)

    def to_verify(self) -> pd.DataFrame:
        """The numbers to verify before publishing (:func:`numbers_to_verify`)."""
        if self.table is None:
            raise InputError("this coverage report was made without its compound energies; "
                             "build it with tfa.network.coverage.coverage()")
        return numbers_to_verify(self.table, self.reactions, self.sources)

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
        """One row per reaction: id, source, ΔrG'° (kJ/mol), σ, status, audit flags (joined by
        `` | ``), pathway, equation, provenance."""
        return pd.DataFrame([{
            "reaction": r.reaction_id, "source": r.source,
            "delta_g_standard_kJ_per_mol": r.standard, "sigma_kJ_per_mol": r.uncertainty,
            "status": r.status, "audit_flags": " | ".join(r.audit_flags),
            "pathway": r.pathway, "equation": r.equation, "provenance": r.provenance,
        } for r in self.reactions], columns=COVERAGE_COLUMNS)

    @property
    def status_counts(self) -> dict[str, int]:
        """Number of reactions per status (:data:`tfa.thermo.status.STATUSES`, zeros included)."""
        out = {s: 0 for s in STATUSES}
        for row in self.reactions:
            if row.status:
                out[row.status] += 1
        return out

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
            "status_counts": self.status_counts,
            "reactions": [{
                "reaction": r.reaction_id, "source": r.source,
                "delta_g_standard_kJ_per_mol": None if math.isnan(r.standard) else r.standard,
                "sigma_kJ_per_mol": None if math.isnan(r.uncertainty) else r.uncertainty,
                "status": r.status, "audit_flags": list(r.audit_flags),
                "pathway": r.pathway, "equation": r.equation, "provenance": r.provenance,
            } for r in self.reactions],
        }


def coverage_from_energies(model: cobra.Model, energies: Mapping[str, ReactionEnergy],
                           conditions: Conditions, environment_name: str = "",
                           table: CompoundEnergyTable | None = None,
                           demand: str | None = None) -> CoverageReport:
    """Coverage from reaction energies already computed (every internal reaction but the
    demand is listed; one missing from ``energies`` counts as "none")."""
    from .checks import is_boundary_reaction

    rows = []
    for reaction in model.reactions:
        if is_boundary_reaction(reaction) or reaction.id == demand:
            continue
        e = energies.get(reaction.id)
        equation = reaction.build_reaction_string()
        pathway = str((reaction.notes or {}).get("pathway") or reaction.subsystem or "")
        mets = tuple(m.id for m in reaction.metabolites)
        if e is None:
            rows.append(ReactionCoverage(reaction.id, equation, pathway, "none", math.nan, math.nan,
                                         "no energy computed", metabolites=mets))
        else:
            rows.append(ReactionCoverage(reaction.id, equation, pathway, e.source, e.standard,
                                         e.uncertainty, e.provenance, e.status, e.audit_flags, mets))
    disagreements = []
    if table is not None and table.reconciliation is not None:
        disagreements = [{"id": r.id, "residual_kJ_per_mol": r.residual,
                          "sigma_kJ_per_mol": r.sigma, "studentized": r.studentized,
                          "source_key": r.source_key}
                         for r in table.reconciliation.disagreements]
    return CoverageReport(model.id, conditions, rows, environment_name, disagreements, table)


def coverage(model: cobra.Model, environment, db=None, literature=None,
             estimate: bool = True) -> CoverageReport:
    """Coverage of ``model`` at the environment's conditions (the network as given, no rewrite;
    the environment's demand reaction is no reaction to give an energy).

    Parameters
    ----------
    model : cobra.Model
    environment : Environment or Conditions
    db : ThermoDatabase, optional
    literature : literature values, a path, or None (see :func:`tfa.network.energies.compound_energies`)
    estimate : bool
        Use group-contribution estimates for compounds still without data.
    """
    ions = getattr(environment, "ion_stoichiometry", None)
    with model:   # the reactions as the environment sets their ion stoichiometry (undone after)
        if ions:
            from .compartments import set_ion_stoichiometry

            set_ion_stoichiometry(model, ions, getattr(environment, "source", "") or "environment")
        table = compound_energies(model, environment, db, literature, estimate=estimate)
        demand = getattr(environment, "demand_reaction", None)
        energies = reaction_energies(model, table, demand)
        name = "" if isinstance(environment, Conditions) else str(getattr(environment, "name", "") or "")
        report = coverage_from_energies(model, energies, table.conditions, name, table, demand)
    report.sources = network_sources(model)
    return report


#: Columns of :func:`numbers_to_verify`.
VERIFY_COLUMNS = ("item", "kind", "status", "value", "sigma", "unit", "source", "citation",
                  "conditions", "note", "used_by")


def numbers_to_verify(table: CompoundEnergyTable, reactions, sources=None) -> pd.DataFrame:
    """The numbers a user should verify before publishing: every datum behind the network's
    energies that is recalled, common practice, estimated or touched by an open audit
    disagreement, with its source and the reactions that use it.

    One row per item, :data:`VERIFY_COLUMNS`:

    - ``reaction value``: a literature value of the network's own table that is recalled ("from
      memory") or common practice;
    - ``species correction``: species data re-anchored to a recalled value by the species-table
      generator (``scripts/make_species_table.py``), shift and anchors;
    - ``carrier potential``: a recalled reduction potential (ferredoxin and the like);
    - ``estimate``: a group-contribution estimate, with its groups;
    - ``audit disagreement``: an open disagreement of the data audit, or a failed class check of
      an estimate, and the reactions it touches.

    Parameters
    ----------
    table : CompoundEnergyTable
    reactions : sequence of ReactionCoverage
        The rows of the coverage report (reaction id, status, provenance, audit flags).
    sources : mapping, optional
        The network's own sources (key -> :class:`~tfa.thermo.species.Source`), besides those
        of the database.
    """
    db = table.database
    compounds = table.compounds
    rows: list[dict] = []
    known = {**db.sources, **(sources or {})}

    def citation(key: str) -> str:
        src = known.get(key)
        return "" if src is None else f"{src.authors} ({src.year}) {src.citation}".strip()

    def users(metabolites) -> str:
        wanted = set(metabolites)
        return ", ".join(r.reaction_id for r in reactions if wanted & set(r.metabolites))

    rec = table.reconciliation
    for value in table.literature:
        if not needs_checking(BASIS_STATUS[value.basis]):
            continue
        mets = [m for m in value.stoichiometry if m in compounds]
        rows.append({"item": value.id, "kind": "reaction value", "status": BASIS_STATUS[value.basis],
                     "value": value.delta_g_standard, "sigma": value.sigma, "unit": "kJ/mol",
                     "source": value.source_key, "citation": citation(value.source_key),
                     "conditions": value.conditions.describe()
                     + ("" if value.conditions.pmg is not None else ", no Mg2+"),
                     "note": value.note,
                     "used_by": users(m for m in mets if rec is not None and m in rec.unknowns)})
    seen: set[str] = set()
    for m, ce in compounds.items():
        if ce.source != "species" or not ce.key or ce.key in seen:
            continue
        seen.add(ce.key)
        compound = db.compound(ce.key)
        if compound.couple is not None:
            couple = compound.couple
            if couple.id in seen or not needs_checking(couple.status):
                continue
            seen.add(couple.id)
            pair = [x for x, c in compounds.items() if c.key in (couple.oxidised, couple.reduced)]
            rows.append({"item": couple.id, "kind": "carrier potential", "status": couple.status,
                         "value": couple.e0_prime, "sigma": couple.sigma, "unit": "V",
                         "source": couple.source, "citation": citation(couple.source),
                         "conditions": f"pH {couple.ph:g}, {couple.temperature_C:g} degC",
                         "note": couple.note, "used_by": users(pair)})
            continue
        corrected = [sp for sp in compound.species if "re-anchored" in sp.flag and sp.recalled]
        if corrected:
            sp = corrected[0]
            rows.append({"item": ce.key, "kind": "species correction",
                         "status": ce.status, "value": sp.shift, "sigma": math.nan,
                         "unit": "kJ/mol (shift of DfG)", "source": sp.anchor,
                         "citation": "; ".join(citation(k) for k in sp.anchor.split(";") if k),
                         "conditions": "25 degC", "note": sp.note,
                         "used_by": users(x for x, c in compounds.items() if c.key == ce.key)})
    for m, ce in compounds.items():
        if ce.source == "estimated":
            groups = ", ".join(f"{n} {g}" for g, n in ce.group_counts.items())
            rows.append({"item": m, "kind": "estimate", "status": ce.status, "value": ce.standard,
                         "sigma": ce.uncertainty, "unit": "kJ/mol (DfG' at the conditions)",
                         "source": "tfa group contribution", "citation": "",
                         "conditions": table.conditions.describe(),
                         "note": f"groups: {groups}" if groups else ce.provenance,
                         "used_by": users([m])})
    flagged: dict[str, list[str]] = {}
    for r in reactions:
        for flag in r.audit_flags:
            flagged.setdefault(flag, []).append(r.reaction_id)
    for flag, ids in flagged.items():
        head = flag.split(":")[1].split("(")[0].strip()
        rows.append({"item": head if flag.startswith("audit") else f"{head} (class check)",
                     "kind": "audit disagreement", "status": "", "value": math.nan,
                     "sigma": math.nan, "unit": "", "source": "", "citation": "",
                     "conditions": "", "note": flag, "used_by": ", ".join(ids)})
    return pd.DataFrame(rows, columns=list(VERIFY_COLUMNS))

