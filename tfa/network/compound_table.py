"""The energies of every compound of a network at one set of conditions, and the rules by which
they sum to the energy of any reaction over them (:class:`CompoundEnergyTable`, built by
:func:`tfa.network.energies.compound_energies`; the rules are stated in that module's text).

Units: kJ/mol.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from ..conditions import Conditions
from ..errors import InputError
from ..thermo.database import ThermoDatabase
from ..thermo.literature import LiteratureValue
from ..thermo.reconcile import Reconciliation
from ..thermo.status import ESTIMATED, combined_value_status, weakest
from .thermo_model import ReactionEnergy

@dataclass
class CompoundEnergy:
    """ΔfG'° of one network compound at the environment.

    ``standard`` is NaN when ``source`` is "placeholder" or "none". ``key`` is the compound id in
    the (extended) thermodynamic database; ``estimate_key`` the id of its estimate, if any.
    For a reconciled compound inside an unidentified moiety ``standard`` is the minimum-norm
    value, usable only in identified combinations (``identified`` False).

    ``status`` says how far the data behind it were checked (:mod:`tfa.thermo.status`);
    ``audit_flags`` are the open disagreements of the data audit that touch it (the library's,
    :mod:`tfa.thermo.audit`, for species data; the network's own reaction values, left out one at
    a time, for reconciled compounds). ``group_counts`` holds the groups of a group-contribution
    estimate (group name -> count), so that draws can correlate estimates that share groups.
    """

    metabolite: str
    source: str
    standard: float
    uncertainty: float
    provenance: str
    key: str | None = None
    estimate_key: str | None = None
    sources: tuple[str, ...] = ()
    flags: tuple[str, ...] = ()
    identified: bool = True
    smiles: str = ""
    status: str = ""
    audit_flags: tuple[str, ...] = ()
    group_counts: dict[str, int] = field(default_factory=dict)
    #: Its compartment ("" or the cell's: the environment's conditions), the conditions of that
    #: compartment (None: the cell's) and the electrochemical offset added to ``standard``
    #: (:func:`tfa.thermo.membrane.electrochemical_offset`, kJ/mol; 0 in the cell).
    compartment: str = ""
    at: Conditions | None = None
    offset: float = 0.0


@dataclass
class CompoundEnergyTable:
    """Energies of every compound of a network at one set of conditions.

    Built by :func:`compound_energies`; :meth:`reaction_energy` sums them for any stoichiometry
    over metabolite ids.
    """

    conditions: Conditions
    compounds: dict[str, CompoundEnergy]
    database: ThermoDatabase
    reconciliation: Reconciliation | None = None
    literature: tuple[LiteratureValue, ...] = ()
    skipped_values: dict[str, str] = field(default_factory=dict)
    #: Compartment id -> :class:`tfa.conditions.Compartment` of the environment.
    compartments: dict = field(default_factory=dict)

    # ----------------------------------------------------------------------------------------
    def reaction_energy(self, reaction_id: str, stoichiometry: Mapping[str, float],
                        energy_source: str = "auto") -> ReactionEnergy:
        """ΔrG'° of a reaction given as metabolite id -> coefficient (see the module rules).

        Returns a :class:`ReactionEnergy` whose ``standard`` is NaN (source "placeholder" or
        "none") when the data do not determine it; never zero by default.
        """
        net = {m: float(n) for m, n in stoichiometry.items() if abs(float(n)) > 1e-12}
        missing = [m for m in net if m not in self.compounds]
        if missing:
            raise InputError(f"reaction {reaction_id}: compound(s) {', '.join(missing)} not in the "
                             "network's compound energies; rebuild them after changing the network")
        known = {m: n for m, n in net.items() if self.compounds[m].source == "species"}
        other = {m: n for m, n in net.items() if m not in known}
        value = 0.0
        variance = 0.0
        terms: dict[str, float] = {}
        sources: list[str] = []
        parts: list[str] = []
        # species part, netted per database compound (as the database does for a reaction)
        # (a compound in two compartments is two terms of value, one of error: its σ cancels)
        by_key: dict[tuple, float] = {}
        for m, n in known.items():
            place = (self.compounds[m].key, self.compounds[m].compartment)
            by_key[place] = by_key.get(place, 0.0) + n
        key_energy = {(self.compounds[m].key, self.compounds[m].compartment): self.compounds[m]
                      for m in known}
        statuses: list[str] = []
        for place, n in by_key.items():
            if abs(n) < 1e-12:
                continue
            ce = key_energy[place]
            value += n * ce.standard
            terms[place[0]] = terms.get(place[0], 0.0) + n
            extend_unique(sources, ce.sources)
            statuses.append(ce.status)
        for key, n in terms.items():
            sigma_key = next(ce.uncertainty for (k, _), ce in key_energy.items() if k == key)
            variance += (n * sigma_key) ** 2
        if known:
            parts.append("species data: " + ", ".join(sorted({self.compounds[m].key for m in known})))
            held = [f for m in known for f in self.compounds[m].flags if f.startswith("E'°")
                    and "held" in f]
            parts.extend(dict.fromkeys(held))
        source = "species"
        audit_flags: list[str] = []
        for m in net:
            extend_unique(audit_flags, self.compounds[m].audit_flags)
        if other:
            result = self._unknown_part(reaction_id, other, energy_source)
            if result is None:
                blockers = self._blockers(other)
                kind = "placeholder" if blockers and all(self.compounds[m].smiles for m in blockers) else "none"
                why = self._why_unresolved(other, blockers)
                return ReactionEnergy(reaction_id, math.nan, math.nan, kind,
                                      f"no energy: {why}" + (f"; {parts[0]}" if parts else ""),
                                      {}, "", tuple(audit_flags))
            u_value, u_variance, u_source, u_terms, u_sources, u_text, u_status = result
            value += u_value
            variance += u_variance
            for k, v in u_terms.items():
                terms[k] = terms.get(k, 0.0) + v
            extend_unique(sources, u_sources)
            parts.insert(0, u_text)
            source = u_source
            statuses.append(u_status)
        sigma = math.sqrt(max(variance, 0.0))
        provenance = "; ".join(parts)
        if sources:
            provenance += f" [{', '.join(sources)}]"
        return ReactionEnergy(reaction_id, float(value), sigma, source, provenance, terms,
                              weakest(statuses), tuple(audit_flags))

    def value_status(self, value_ids: Sequence[str]) -> str:
        """Status of an energy made of these network reaction values (:mod:`tfa.thermo.status`)."""
        basis = {v.id: v.basis for v in self.literature}
        return combined_value_status(basis.get(i, "checked") for i in value_ids)

    def _unknown_part(self, reaction_id: str, other: dict[str, float], energy_source: str):
        """(value, variance, source, terms, sources, text, status) of the compounds without
        species data, or None when they are not determined."""
        rec = self.reconciliation
        reconciled = {m: n for m, n in other.items() if self.compounds[m].source == "reconciled"}
        rest = {m: n for m, n in other.items() if m not in reconciled}
        if reconciled and rec is not None and rec.identified(reconciled) and all(
                self.compounds[m].source == "estimated" for m in rest):
            value, variance, terms, sources = 0.0, 0.0, {}, []
            g_ref, s_ref = rec.reaction_energy(reconciled)
            t_sigma = rec.temperature_sigma(reconciled, self.conditions.temperature)
            for m, n in reconciled.items():
                value += n * self.compounds[m].standard
                terms[self.compounds[m].key] = terms.get(self.compounds[m].key, 0.0) + n
            variance += s_ref ** 2 + t_sigma ** 2
            ids = rec.value_ids(reconciled)
            extend_unique(sources, rec.source_keys(reconciled))
            label = "reconciled"
            if not rest and self._restates_one_value(reconciled, energy_source):
                label = "literature"
            status = self.value_status(ids)
            text = (f"{label} ({', '.join(sorted(reconciled))} from literature value(s) "
                    f"{', '.join(ids)}; ±{s_ref:.2f} kJ/mol at 25 degC")
            if t_sigma > 0:
                text += f", ±{t_sigma:.2f} kJ/mol for temperature"
            text += f"; {status})"
            if rest:
                e_value, e_var, e_terms, e_sources = self._estimated_sum(rest)
                value += e_value
                variance += e_var
                terms.update(e_terms)
                extend_unique(sources, e_sources)
                text += f"; estimated: {', '.join(sorted(rest))}"
                label = "estimated"
                status = ESTIMATED
            return value, variance, label, terms, sources, text, status
        if all(self.compounds[m].estimate_key for m in other):
            e_value, e_var, e_terms, e_sources = self._estimated_sum(other)
            return e_value, e_var, "estimated", e_terms, e_sources, (
                f"estimated (group contribution: {', '.join(sorted(other))})"), ESTIMATED
        return None

    def _estimated_sum(self, stoich: Mapping[str, float]):
        value, variance, terms, sources = 0.0, 0.0, {}, []
        for m, n in stoich.items():
            ce = self.compounds[m]
            key = ce.estimate_key
            fe = self.database.formation_energy(key, ce.at or self.conditions)
            value += n * (fe.value + ce.offset)
            variance += (n * fe.uncertainty) ** 2
            terms[key] = terms.get(key, 0.0) + n
            extend_unique(sources, fe.sources)
        return value, variance, terms, sources

    def _restates_one_value(self, reconciled: Mapping[str, float], energy_source: str) -> bool:
        """True when the unknown stoichiometry is a multiple of one literature value's."""
        rec = self.reconciliation
        v = rec.vector(reconciled)
        candidates = rec.values
        if energy_source and energy_source != "auto":
            candidates = tuple(x for x in rec.values if x.id == energy_source) or candidates
        for value in candidates:
            row = rec.vector(value.stoichiometry)
            norm_v, norm_r = np.linalg.norm(v), np.linalg.norm(row)
            if norm_r == 0 or norm_v == 0:
                continue
            if abs(abs(float(v @ row)) - norm_v * norm_r) <= 1e-9 * norm_v * norm_r:
                return True
        return False

    def _blockers(self, other: Mapping[str, float]) -> list[str]:
        """Compounds that keep a reaction from having an energy."""
        out = [m for m in other if self.compounds[m].source in ("placeholder", "none")]
        reconciled = {m: n for m, n in other.items() if self.compounds[m].source == "reconciled"}
        rec = self.reconciliation
        if reconciled and (rec is None or not rec.identified(reconciled)):
            out += [m for m in reconciled if not self.compounds[m].estimate_key]
        return out

    def _why_unresolved(self, other: Mapping[str, float], blockers: Sequence[str]) -> str:
        reasons = []
        for m in blockers:
            ce = self.compounds[m]
            if ce.source == "reconciled":
                reasons.append(f"{m} is reconciled, but the literature values do not fix this "
                               "combination of its conserved moiety, and it has no estimate")
            else:
                reasons.append(f"{m}: {ce.provenance}")
        return "; ".join(reasons) or "compounds without data"

    # ----------------------------------------------------------------------------------------
    def to_frame(self) -> pd.DataFrame:
        """One row per compound: source, ΔfG'° (kJ/mol), σ, identified, status, audit flags,
        provenance."""
        return pd.DataFrame([{
            "compound": c.metabolite, "source": c.source,
            "formation_delta_g_standard_kJ_per_mol": c.standard,
            "sigma_kJ_per_mol": c.uncertainty, "identified": c.identified, "key": c.key,
            "status": c.status, "audit_flags": " | ".join(c.audit_flags),
            "provenance": c.provenance,
        } for c in self.compounds.values()])


def extend_unique(target: list[str], items: Sequence[str]) -> None:
    for item in items:
        if item and item not in target:
            target.append(item)
