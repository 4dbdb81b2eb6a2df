"""Energies of a network at an environment: a transformed formation energy for every compound,
then ΔrG'° = Σ ν ΔfG'° for every internal reaction, with uncertainty, source and provenance.

One mechanism for every reaction
--------------------------------
Each network compound gets ΔfG'° at the environment's conditions from one of

1. ``species``: its ``thermo_key`` names a compound of the thermodynamic database with species
   data (or an electron carrier with a reduction potential, whose oxidised form is the zero of
   its pair);
2. ``reconciled``: it has no species data but literature reaction values link it to compounds
   that have (:mod:`tfa.thermo.reconcile`); the solution is turned into a species record
   (origin "reconciled") and the database extended with it, so the Legendre transform to the
   environment's pH, ionic strength and temperature is done by the same code as for species data;
3. ``estimated``: a group-contribution estimate from its SMILES
   (:mod:`tfa.thermo.group_contribution`), also as species records;
4. ``placeholder`` (it has a SMILES, so an estimate can be made later) or ``none``: no energy,
   never zero.

Reactions, including those the mode rewrites create, sum over their compounds. The rules:

- Compounds with species data enter with their database σ, added in quadrature (the rule of
  :mod:`tfa.thermo.uncertainty`).
- The part over reconciled compounds is used only when its stoichiometry lies in the row space of
  the literature values (identified; conserved moieties such as CoA otherwise leave it open);
  its σ is √(vᵀCv) from the reconciliation covariance plus the temperature term of
  :meth:`~tfa.thermo.reconcile.Reconciliation.temperature_sigma`. Known compounds are treated as
  independent of the literature values, which over-states σ a little for reactions that repeat a
  literature value (conservative).
- When the reconciled part is not identified, compounds with an estimate use it instead.
- Source of the reaction: the weakest kind among its compounds, ``species`` <
  ``literature``/``reconciled`` < ``estimated`` < ``placeholder``/``none``. A reaction whose
  stoichiometry over the compounds without species data is a multiple of exactly that of one
  literature value is labelled ``literature`` (it restates that value); other reconciled ones
  ``reconciled``. An unresolved reaction is ``placeholder`` when every compound that blocks it
  has a SMILES, ``none`` otherwise; it has no value (NaN) and is left out of
  :attr:`ThermoModel.energies`.

Pressure: species data are carried to the environment's pressure with their V°; reconciled and
estimated species have no V°, so the literature reactions are taken as having ΔrV'° = 0 for their
unknown compounds (the database flags "no V" for them).

Literature values are read from ``reaction_values.tsv`` beside the network's reactions table
(passed by the caller, or found through ``model.notes['reaction_values_path']``, or the bundled
table when the model is the bundled network).

Units: kJ/mol, K, mol/L (gases: bar). Concentration bounds become natural logarithms.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003.
[2] C. S. Henry, L. J. Broadbelt, V. Hatzimanikatis, Biophys. J. 92 (2007) 1792-1805 (energies of
    network reactions from compound energies; independent errors in quadrature).
"""

from __future__ import annotations

import contextlib
import dataclasses
import logging
import math
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path
from typing import Any, Iterator, Mapping, Sequence

import cobra
import numpy as np
import pandas as pd

from ..conditions import Conditions
from ..constants import T_REF
from ..errors import InputError, MissingDataError, NetworkFileError, UnknownCompoundError
from ..thermo.balance import parse_formula
from ..thermo.database import ThermoDatabase
from ..thermo.reconcile import (
    LiteratureValue,
    Reconciliation,
    UnknownSpecies,
    legendre_offset,
    read_literature_values,
    reconcile,
)
from ..thermo.species import Species
from .thermo_model import ReactionEnergy, ThermoModel

logger = logging.getLogger(__name__)

#: Kinds of compound energy, strongest first.
COMPOUND_SOURCES = ("species", "reconciled", "estimated", "placeholder", "none")
#: Rank of each reaction source (higher = weaker).
SOURCE_RANK = {"species": 0, "literature": 1, "reconciled": 1, "estimated": 2, "placeholder": 3, "none": 3}
#: Prefix of the database ids of reconciled and estimated compounds.
RECONCILED_PREFIX = "reconciled:"
ESTIMATED_PREFIX = "estimated:"
#: Name of the literature-values table beside a network's reactions table.
REACTION_VALUES_FILE = "reaction_values.tsv"
#: Fallback when neither compound nor environment gives bounds, mol/L (common practice).
FALLBACK_BOUNDS = (1.0e-6, 1.0e-2)


@dataclass
class CompoundEnergy:
    """ΔfG'° of one network compound at the environment.

    ``standard`` is NaN when ``source`` is "placeholder" or "none". ``key`` is the compound id in
    the (extended) thermodynamic database; ``estimate_key`` the id of its estimate, if any.
    For a reconciled compound inside an unidentified moiety ``standard`` is the minimum-norm
    value, usable only in identified combinations (``identified`` False).
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
        by_key: dict[str, float] = {}
        for m, n in known.items():
            by_key[self.compounds[m].key] = by_key.get(self.compounds[m].key, 0.0) + n
        key_energy = {self.compounds[m].key: self.compounds[m] for m in known}
        for key, n in by_key.items():
            if abs(n) < 1e-12:
                continue
            ce = key_energy[key]
            value += n * ce.standard
            variance += (n * ce.uncertainty) ** 2
            terms[key] = terms.get(key, 0.0) + n
            _extend(sources, ce.sources)
        if known:
            parts.append("species data: " + ", ".join(sorted({self.compounds[m].key for m in known})))
        source = "species"
        if other:
            result = self._unknown_part(reaction_id, other, energy_source)
            if result is None:
                blockers = self._blockers(other)
                kind = "placeholder" if blockers and all(self.compounds[m].smiles for m in blockers) else "none"
                why = self._why_unresolved(other, blockers)
                return ReactionEnergy(reaction_id, math.nan, math.nan, kind,
                                      f"no energy: {why}" + (f"; {parts[0]}" if parts else ""),
                                      {})
            u_value, u_variance, u_source, u_terms, u_sources, u_text = result
            value += u_value
            variance += u_variance
            for k, v in u_terms.items():
                terms[k] = terms.get(k, 0.0) + v
            _extend(sources, u_sources)
            parts.insert(0, u_text)
            source = u_source
        sigma = math.sqrt(max(variance, 0.0))
        provenance = "; ".join(parts)
        if sources:
            provenance += f" [{', '.join(sources)}]"
        return ReactionEnergy(reaction_id, float(value), sigma, source, provenance, terms)

    def _unknown_part(self, reaction_id: str, other: dict[str, float], energy_source: str):
        """(value, variance, source, terms, sources, text) of the compounds without species data,
        or None when they are not determined."""
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
                terms[self.compounds[m].key] = n
            variance += s_ref ** 2 + t_sigma ** 2
            ids = rec.value_ids(reconciled)
            _extend(sources, rec.source_keys(reconciled))
            label = "reconciled"
            if not rest and self._restates_one_value(reconciled, energy_source):
                label = "literature"
            text = (f"{label} ({', '.join(sorted(reconciled))} from literature value(s) "
                    f"{', '.join(ids)}; ±{s_ref:.2f} kJ/mol at 25 degC")
            if t_sigma > 0:
                text += f", ±{t_sigma:.2f} kJ/mol for temperature"
            text += ")"
            if rest:
                e_value, e_var, e_terms, e_sources = self._estimated_sum(rest)
                value += e_value
                variance += e_var
                terms.update(e_terms)
                _extend(sources, e_sources)
                text += f"; estimated: {', '.join(sorted(rest))}"
                label = "estimated"
            return value, variance, label, terms, sources, text
        if all(self.compounds[m].estimate_key for m in other):
            e_value, e_var, e_terms, e_sources = self._estimated_sum(other)
            return e_value, e_var, "estimated", e_terms, e_sources, (
                f"estimated (group contribution: {', '.join(sorted(other))})")
        return None

    def _estimated_sum(self, stoich: Mapping[str, float]):
        value, variance, terms, sources = 0.0, 0.0, {}, []
        for m, n in stoich.items():
            key = self.compounds[m].estimate_key
            fe = self.database.formation_energy(key, self.conditions)
            value += n * fe.value
            variance += (n * fe.uncertainty) ** 2
            terms[key] = n
            _extend(sources, fe.sources)
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
        """One row per compound: source, ΔfG'° (kJ/mol), σ, identified, provenance."""
        return pd.DataFrame([{
            "compound": c.metabolite, "source": c.source, "dfG_prime_kJ": c.standard,
            "sigma_kJ": c.uncertainty, "identified": c.identified, "key": c.key,
            "provenance": c.provenance,
        } for c in self.compounds.values()])


def _extend(target: list[str], items: Sequence[str]) -> None:
    for item in items:
        if item and item not in target:
            target.append(item)


# ------------------------------------------------------------------------------------ inputs
def bundled_reaction_values_path() -> Path | None:
    """Path of the bundled network's literature values, if the file exists."""
    try:
        path = resources.files("tfa.models") / "ancestral_core" / REACTION_VALUES_FILE
    except ModuleNotFoundError:  # pragma: no cover
        return None
    return Path(str(path)) if path.is_file() else None


def _default_literature(model: cobra.Model) -> list[LiteratureValue]:
    path = (model.notes or {}).get("reaction_values_path")
    if not path:
        bundled = bundled_reaction_values_path()
        if bundled is not None and model.id == bundled.parent.name:
            path = bundled
    if not path:
        return []
    return read_literature_values(path)


def _metabolite_species(met: cobra.Metabolite) -> UnknownSpecies:
    try:
        counts, charge = parse_formula(met.formula or "", where=f"compound '{met.id}'")
    except InputError:
        return UnknownSpecies()
    if not met.formula:
        return UnknownSpecies()
    z = met.charge if met.charge is not None else charge
    return UnknownSpecies(n_h=float(counts.get("H", 0)), charge=float(z))


def _note(met: cobra.Metabolite, key: str) -> str:
    return str((met.notes or {}).get(key) or "").strip()


def _estimator():
    """``(estimate_species, estimated_species_records)`` or None when unavailable."""
    try:
        from ..thermo.group_contribution import estimate_species, estimated_species_records
    except ImportError:  # the module, or RDKit, is not there
        return None
    return estimate_species, estimated_species_records


def _species_row(key: str, met: cobra.Metabolite, species_ids: Sequence[str], formula: str,
                 charge: int) -> dict[str, Any]:
    return {"id": key, "name": met.name or met.id, "synonyms": "", "kind": "aqueous",
            "species": ";".join(species_ids), "formula": formula, "charge": charge}


def compound_energies(model: cobra.Model, environment, db: ThermoDatabase | None = None,
                      literature: Sequence[LiteratureValue] | str | Path | None = None,
                      estimate: bool = True) -> CompoundEnergyTable:
    """ΔfG'° of every compound of ``model`` at the environment's conditions.

    Parameters
    ----------
    model : cobra.Model
        The network (metabolite notes: ``thermo_key``, ``smiles``; formula and charge).
    environment : Environment or Conditions
        Anything with ``conditions`` (or a :class:`~tfa.conditions.Conditions` itself).
    db : ThermoDatabase, optional
        Default: the bundled database (reviewed sources only).
    literature : values, path or None
        Literature reaction values over network ids (default: see the module docstring).
    estimate : bool
        Use the group-contribution estimator for compounds still unknown (when RDKit is there).

    Returns
    -------
    CompoundEnergyTable
    """
    db = db or ThermoDatabase.load()
    conditions = environment if isinstance(environment, Conditions) else environment.conditions
    if literature is None:
        values = _default_literature(model)
    elif isinstance(literature, (str, Path)):
        values = read_literature_values(literature)
    else:
        values = list(literature)

    # 1. species data
    keyed: dict[str, str] = {}
    unknown: dict[str, cobra.Metabolite] = {}
    for met in model.metabolites:
        key = _note(met, "thermo_key")
        if not key:
            unknown[met.id] = met
            continue
        try:
            compound = db.compound(key)
        except UnknownCompoundError as err:
            raise NetworkFileError(
                f"compound '{met.id}': thermo_key '{key}' is not in the thermodynamic database"
                + (f"; did you mean {', '.join(err.matches)}?" if err.matches else "")
                + " Fix the key or leave it empty to use literature values or an estimate") from err
        if compound.has_data:
            keyed[met.id] = compound.id
        else:
            logger.info("compound %s: %s has no usable species data (%s)", met.id, key,
                        ", ".join(compound.dropped_species) or "none listed")
            unknown[met.id] = met

    # 2. literature values -> reconciliation
    skipped: dict[str, str] = {}
    usable: list[LiteratureValue] = []
    for value in values:
        if not value.peer_reviewed and not db.include_unreviewed:
            skipped[value.id] = "source not peer reviewed"
            continue
        strangers = [c for c in value.stoichiometry if c not in keyed and c not in unknown
                     and c not in db.registry]
        if strangers:
            skipped[value.id] = f"compound(s) {', '.join(strangers)} are not in this network"
            continue
        usable.append(value)
    for vid, why in skipped.items():
        logger.info("literature value %s not used: %s", vid, why)

    def known_energy(compound: str, at: Conditions) -> tuple[float, float]:
        key = keyed.get(compound, compound)
        fe = db.formation_energy(key, at)
        return fe.value, fe.uncertainty

    rec: Reconciliation | None = None
    if usable and unknown:
        rec = reconcile(usable, known_energy, {m: _metabolite_species(unknown[m]) for m in unknown})
        for r in rec.disagreements:
            logger.warning("literature value %s disagrees with the others (%.1f sigma)", r.id, r.studentized)

    # 3. species records for reconciled compounds; estimates
    records: list[Species] = []
    rows: list[dict[str, Any]] = []
    reconciled_key: dict[str, str] = {}
    if rec is not None:
        for i, m in enumerate(rec.unknowns):
            met = unknown[m]
            sp = rec.species[m]
            if not sp.defined:
                continue
            key = RECONCILED_PREFIX + m
            counts, _ = parse_formula(met.formula, where=f"compound '{m}'")
            formula = "".join(f"{e}{n if n != 1 else ''}" for e, n in counts.items())
            records.append(Species(
                id=key, reactant=key, formula=formula, state="aq", charge=int(sp.charge),
                n_h=int(sp.n_h), n_mg=0, G=float(rec.species_energies[i]), H=None,
                S=float(rec.entropies[i]) * 1000.0, Cp=float(rec.heat_capacities[i]) * 1000.0, V=None,
                source=",".join(rec.source_keys({m: 1.0})) or "literature",
                origin="reconciled", sigma_G=rec.compound_sigma(m) if rec.compound_identified(m) else None))
            rows.append(_species_row(key, met, [key], formula, int(sp.charge)))
            reconciled_key[m] = key
    estimated_key: dict[str, str] = {}
    tools = _estimator() if estimate else None
    estimate_errors: dict[str, str] = {}
    if tools is not None:
        estimate_species, estimated_species_records = tools
        for m, met in unknown.items():
            smiles = _note(met, "smiles")
            if not smiles:
                continue
            try:
                est = estimate_species(smiles, name=m)
            except InputError as err:
                estimate_errors[m] = str(err)
                continue
            key = ESTIMATED_PREFIX + m
            recs = estimated_species_records(est, key)
            records.extend(recs)
            rows.append(_species_row(key, met, [r.id for r in recs], est.formula, est.charge))
            estimated_key[m] = key
    ext = db.with_extra_species(records, rows) if records else db

    # 4. the table
    table: dict[str, CompoundEnergy] = {}
    for met in model.metabolites:
        m = met.id
        smiles = _note(met, "smiles")
        if m in keyed:
            fe = db.formation_energy(keyed[m], conditions)
            table[m] = CompoundEnergy(m, "species", fe.value, fe.uncertainty, fe.provenance, keyed[m],
                                      None, tuple(fe.sources), tuple(fe.flags), True, smiles)
            continue
        est_key = estimated_key.get(m)
        if rec is not None and m in rec.unknowns:
            identified = rec.compound_identified(m)
            t_sigma = rec.temperature_sigma({m: 1.0}, conditions.temperature) if identified else math.nan
            sigma = math.hypot(rec.compound_sigma(m), t_sigma) if identified else math.nan
            if m in reconciled_key:
                fe = ext.formation_energy(reconciled_key[m], conditions)
                value, flags = fe.value, tuple(fe.flags)
            else:  # no formula: ΔfG'° independent of pH and I, constant ΔrS'° = 0 approximation
                value = rec.species_gibbs(m, conditions.temperature) + legendre_offset(rec.species[m], conditions)
                flags = (f"{m}: no formula, Legendre transform not applied",)
            ids = rec.value_ids({m: 1.0}) if identified else [v.id for v in rec.values if m in v.stoichiometry]
            text = (f"{m}: reconciled from literature value(s) {', '.join(ids)}"
                    + ("" if identified else " (inside a conserved moiety: only combinations are fixed)"))
            table[m] = CompoundEnergy(m, "reconciled", value, sigma, text, reconciled_key.get(m, m),
                                      est_key, tuple(rec.source_keys({m: 1.0})), flags, identified, smiles)
            continue
        if est_key:
            fe = ext.formation_energy(est_key, conditions)
            table[m] = CompoundEnergy(m, "estimated", fe.value, fe.uncertainty,
                                      f"{m}: group-contribution estimate from SMILES", est_key, est_key,
                                      tuple(fe.sources), tuple(fe.flags), True, smiles)
            continue
        if smiles:
            why = estimate_errors.get(m) or ("no estimator available (needs RDKit and "
                                             "tfa.thermo.group_contribution)")
            table[m] = CompoundEnergy(m, "placeholder", math.nan, math.nan,
                                      f"no species data, no literature value; estimate pending: {why}",
                                      None, None, (), (), False, smiles)
        else:
            table[m] = CompoundEnergy(m, "none", math.nan, math.nan,
                                      "no species data, no literature value, no SMILES to estimate from",
                                      None, None, (), (), False, smiles)
    return CompoundEnergyTable(conditions, table, ext, rec, tuple(usable), skipped)


# ------------------------------------------------------------------------ reaction energies
def reaction_energies(model: cobra.Model, table: CompoundEnergyTable) -> dict[str, ReactionEnergy]:
    """:class:`ReactionEnergy` of every internal reaction (both sides non-empty), NaN where undetermined."""
    from .checks import is_boundary_reaction

    out: dict[str, ReactionEnergy] = {}
    for reaction in model.reactions:
        if is_boundary_reaction(reaction):  # exchanges and demands (one empty side) carry no energy
            continue
        source = str((reaction.notes or {}).get("energy_source") or "auto").strip()
        if source != "auto" and table.reconciliation is not None and \
                source not in {v.id for v in table.literature} and source not in table.skipped_values:
            raise NetworkFileError(
                f"reaction '{reaction.id}': energy_source '{source}' is not an id of the literature "
                "values (reaction_values.tsv); write 'auto' or a value id")
        stoich = {m.id: c for m, c in reaction.metabolites.items()}
        out[reaction.id] = table.reaction_energy(reaction.id, stoich, source)
    return out


# ---------------------------------------------------------------------------- environment
def _env_get(environment, *names, default=None):
    for name in names:
        if isinstance(environment, Mapping) and name in environment:
            return environment[name]
        if hasattr(environment, name):
            return getattr(environment, name)
    return default


def _demand(environment) -> tuple[str | None, float | None]:
    demand = _env_get(environment, "demand")
    reaction = _env_get(environment, "demand_reaction", "demand_id")
    flux = _env_get(environment, "demand_flux")
    if demand is not None:
        if isinstance(demand, Mapping):
            reaction = reaction or demand.get("reaction")
            flux = flux if flux is not None else demand.get("flux")
        elif isinstance(demand, str):
            reaction = reaction or demand
        else:
            reaction = reaction or getattr(demand, "reaction", None) or getattr(demand, "reaction_id", None)
            flux = flux if flux is not None else getattr(demand, "flux", None)
    return reaction, (None if flux is None else float(flux))


def _outlets(environment) -> list[str]:
    outlets = _env_get(environment, "outlets", default=()) or ()
    if isinstance(outlets, Mapping):
        outlets = outlets.get("allowed", ())
    elif not isinstance(outlets, (list, tuple, set, frozenset)):
        outlets = getattr(outlets, "allowed", ())
    return list(outlets)


def _match(met: cobra.Metabolite, table: Mapping[str, Any]) -> Any:
    """Entry of ``table`` keyed by the metabolite's id or thermo key (case-insensitive)."""
    lowered = {str(k).lower(): v for k, v in table.items()}
    for name in (met.id, _note(met, "thermo_key")):
        if name and name.lower() in lowered:
            return lowered[name.lower()]
    return None


def _no_activity(model: cobra.Model, db: ThermoDatabase) -> set[str]:
    out = set()
    for met in model.metabolites:
        role = _note(met, "role").lower()
        key = _note(met, "thermo_key")
        kind = None
        if key:
            with contextlib.suppress(InputError):
                kind = db.compound(key).kind
        if role in ("water", "proton") or kind in ("water", "proton"):
            out.add(met.id)
    return out


def log_bounds(model: cobra.Model, environment, no_activity: set[str]) -> tuple[dict[str, tuple[float, float]], dict[str, str]]:
    """ln-concentration bounds of every metabolite with an activity, and the fed metabolites.

    Order (later wins): environment default bounds; the compound's own ``conc_min``/``conc_max``;
    environment bounds given by id or thermo key; a fed compound is fixed at its feed value.

    Returns
    -------
    (log_bounds, feed_ids)
        ``feed_ids`` maps the environment's feed key (e.g. "H2") to the metabolite id.
    """
    default = _env_get(environment, "default_bounds") or FALLBACK_BOUNDS
    specific = dict(_env_get(environment, "bounds", default={}) or {})
    specific.pop("default", None)
    feed = dict(_env_get(environment, "feed", default={}) or {})
    feed_lower = {str(k).lower(): k for k in feed}
    bounds: dict[str, tuple[float, float]] = {}
    feed_ids: dict[str, str] = {}
    for met in model.metabolites:
        if met.id in no_activity:
            continue
        lo, hi = float(default[0]), float(default[1])
        own_lo, own_hi = _note(met, "conc_min"), _note(met, "conc_max")
        if own_lo:
            lo = float(own_lo)
        if own_hi:
            hi = float(own_hi)
        entry = _match(met, specific)
        if entry is not None:
            lo, hi = float(entry[0]), float(entry[1])
        fed = None
        for name in (met.id, _note(met, "thermo_key")):
            if name and name.lower() in feed_lower:
                fed = feed_lower[name.lower()]
                break
        if fed is not None:
            lo = hi = float(feed[fed])
            feed_ids[str(fed)] = met.id
        if not (lo > 0 and hi >= lo):
            raise InputError(f"compound '{met.id}': concentration bounds [{lo:g}, {hi:g}] are not "
                             "positive and ordered; give 0 < min <= max (mol/L, gases bar)")
        bounds[met.id] = (math.log(lo), math.log(hi))
    missing = [k for k in feed if str(k) not in feed_ids]
    if missing:
        logger.warning("feed compound(s) %s match no compound of the network (by id or thermo key)",
                       ", ".join(map(str, missing)))
    return bounds, feed_ids


def _apply_environment_fluxes(model: cobra.Model, environment, feed_ids: Mapping[str, str],
                              no_activity: set[str]) -> str | None:
    """Demand lower bound, outlets export-only, other exchanges closed (changes are recorded by
    the model's context when one is open)."""
    demand_id, flux = _demand(environment)
    if demand_id:
        if demand_id not in model.reactions:
            raise InputError(f"environment demand reaction '{demand_id}' is not in the network; name "
                             "a reaction of the network in [demand] reaction")
        if flux is not None:
            reaction = model.reactions.get_by_id(demand_id)
            if reaction.upper_bound < flux:
                reaction.upper_bound = max(flux, 1000.0)
            reaction.lower_bound = flux
    outlets = {str(o).lower() for o in _outlets(environment)}
    fed = set(feed_ids.values())
    for reaction in model.exchanges if hasattr(model, "exchanges") else []:
        if reaction.id == demand_id:
            continue
        mets = list(reaction.metabolites)
        if len(mets) != 1:
            continue
        met = mets[0]
        names = {met.id.lower(), _note(met, "thermo_key").lower()}
        if met.id in fed or met.id in no_activity:
            continue
        sign = reaction.metabolites[met]  # -1 for "met <=> ": positive flux exports
        if names & outlets:
            if sign < 0:
                reaction.lower_bound = 0.0
            else:
                reaction.upper_bound = 0.0
        else:
            logger.info("exchange %s closed: %s is neither fed nor an outlet of the environment",
                        reaction.id, met.id)
            reaction.bounds = (0.0, 0.0)
    return demand_id


def _thermo_model(model: cobra.Model, environment, mode: str, db: ThermoDatabase,
                  literature) -> ThermoModel:
    table = compound_energies(model, environment, db, literature)
    energies = reaction_energies(model, table)
    no_activity = _no_activity(model, db)
    if hasattr(environment, "metabolite_bounds") and hasattr(environment, "apply_exchange_bounds"):
        # a tfa.network.environment.Environment: its own resolution of keys, bounds and exchanges
        concentration = environment.metabolite_bounds(model)
        bounds = {m: (math.log(lo), math.log(hi)) for m, (lo, hi) in concentration.items()
                  if m not in no_activity}
        feed_ids = {str(key): environment.resolve(model, key).id for key in environment.feed}
        environment.apply_exchange_bounds(model)
        demand_id = environment.demand_reaction
    else:
        bounds, feed_ids = log_bounds(model, environment, no_activity)
        demand_id = _apply_environment_fluxes(model, environment, feed_ids, no_activity)
    if demand_id in energies:   # a two-sided demand (a lumped biomass reaction) is no chemistry
        energies = {rid: e for rid, e in energies.items() if rid != demand_id}
    kept = {rid: e for rid, e in energies.items() if math.isfinite(e.standard)}
    for rid, e in energies.items():
        if rid not in kept:
            logger.warning("reaction %s has no energy (%s): %s", rid, e.source, e.provenance)
    tm = ThermoModel(model=model, conditions=table.conditions, energies=kept, log_bounds=bounds,
                     no_activity=no_activity, mode=mode,
                     environment_name=str(_env_get(environment, "name", default="") or ""),
                     demand_id=demand_id, feed_ids=feed_ids)
    tm.compound_table = table
    tm.all_energies = energies
    return tm


@contextlib.contextmanager
def prepared(model: cobra.Model, environment, mode: str = "native", db: ThermoDatabase | None = None,
             literature=None) -> Iterator[ThermoModel]:
    """Context manager: the network rewritten for ``mode`` and its :class:`ThermoModel`.

    Every change (the rewrite, the demand bound, outlets) is undone on exit through cobra's
    ``with model:`` context::

        with prepared(model, env, "h2_only") as tm:
            ...  # tm.model is ``model`` itself, rewritten
    """
    from .rewrites import apply_mode

    db = db or ThermoDatabase.load()
    if literature is None:
        literature = _default_literature(model)
    with model:
        with apply_mode(model, mode):
            yield _thermo_model(model, environment, mode, db, literature)


def prepare(model: cobra.Model, environment, mode: str = "native", db: ThermoDatabase | None = None,
            literature=None) -> ThermoModel:
    """A :class:`ThermoModel` on a *copy* of ``model`` rewritten for ``mode``; ``model`` is untouched.

    The network is rewritten inside :func:`prepared`, copied in its rewritten state (a plain
    model with no pending undo) and restored. Use :func:`prepared` to work on the model itself
    inside a ``with`` block instead.
    """
    with prepared(model, environment, mode, db, literature) as tm:
        frozen = tm.model.copy()
        frozen.notes = dict(tm.model.notes or {})
    return dataclasses.replace(tm, model=frozen)
