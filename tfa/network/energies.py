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
table when the model is the bundled network); a network without its own takes the library's
values over its compounds (:mod:`tfa.network.library_values`).

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
from importlib import resources
from pathlib import Path
from typing import Any, Iterator, Mapping, Sequence

import cobra

from ..conditions import Conditions
from ..errors import InputError, MissingDataError, NetworkFileError, UnknownCompoundError
from ..thermo.audit import reconciliation_audit
from ..thermo.balance import parse_formula
from ..thermo.database import ThermoDatabase
from ..thermo.estimates import estimate_species, estimated_species_records
from ..thermo.literature import LiteratureValue, read_literature_values
from ..thermo.reconcile import (Reconciliation, UnknownSpecies, legendre_offset, reconcile,
                                reconciled_species)
from ..thermo.species import Species
from ..thermo.status import ESTIMATED, combined_value_status
from .compound_table import CompoundEnergy, CompoundEnergyTable, extend_unique
from .environment import Environment, apply_environment
from .compartments import compartment_places, offset_words, standard_state_words
from .roles import without_activity
from .thermo_model import ReactionEnergy, ThermoModel

logger = logging.getLogger(__name__)

#: Prefix of the database ids of reconciled and estimated compounds.
RECONCILED_PREFIX = "reconciled:"
ESTIMATED_PREFIX = "estimated:"
#: Name of the literature-values table beside a network's reactions table.
REACTION_VALUES_FILE = "reaction_values.tsv"


# ------------------------------------------------------------------------------------ inputs
def bundled_reaction_values_path() -> Path | None:
    """Path of the bundled network's literature values, if the file exists."""
    try:
        path = resources.files("tfa.models") / "ancestral_core" / REACTION_VALUES_FILE
    except ModuleNotFoundError:  # pragma: no cover
        return None
    return Path(str(path)) if path.is_file() else None


def _reaction_values_path(model: cobra.Model) -> Path | None:
    path = (model.notes or {}).get("reaction_values_path")
    if not path:
        bundled = bundled_reaction_values_path()
        if bundled is not None and model.id == bundled.parent.name:
            path = bundled
    return Path(path) if path else None


def _default_literature(model: cobra.Model, db: ThermoDatabase) -> list[LiteratureValue]:
    """The network's own reaction values; without them, the library's values over its
    compounds (:mod:`tfa.network.library_values`)."""
    path = _reaction_values_path(model)
    if not path:
        from .library_values import library_values_for

        return library_values_for(model, db)
    return read_literature_values(path)


def network_sources(model: cobra.Model) -> dict:
    """The network's own sources (``sources.tsv`` beside its reaction values), key -> Source;
    empty when there is none."""
    from ..thermo.species import read_sources_file

    path = _reaction_values_path(model)
    if path is None:
        return {}
    for name in ("sources.tsv", "sources.csv"):
        candidate = path.parent / name
        if candidate.is_file():
            return read_sources_file(candidate)
    return {}


def unknown_thermo_key(model: cobra.Model, metabolite_id: str, key: str,
                       matches: Sequence[str] = ()) -> str:
    """The error of a ``thermo_key`` the data do not know, naming where the compound is defined."""
    from .locations import located

    return located(model, "compound", metabolite_id, (
        f"compound '{metabolite_id}': thermo_key '{key}' is not in the thermodynamic database"
        + (f"; did you mean {', '.join(matches)}?" if matches else "")
        + " Fix the key or leave it empty to use literature values or an estimate"))


def _metabolite_species(met: cobra.Metabolite) -> UnknownSpecies:
    try:
        counts, charge = parse_formula(met.formula or "", where=f"compound '{met.id}'")
    except InputError:
        return UnknownSpecies()
    if not met.formula:
        return UnknownSpecies()
    z = met.charge if met.charge is not None else charge
    return UnknownSpecies(n_h=float(counts.get("H", 0)), charge=float(z))


def _library_audit(db: ThermoDatabase):
    """The data audit of the bundled library in the review mode of ``db`` (cached there)."""
    from ..thermo.library import ReactionLibrary

    return ReactionLibrary.load(db.include_unreviewed).audit()


def _note(met: cobra.Metabolite, key: str) -> str:
    return str((met.notes or {}).get(key) or "").strip()


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
        Literature reaction values over network ids (default: see the module docstring; a
        network without its own values gets the library's, :mod:`tfa.network.library_values`).
    estimate : bool
        Use the group-contribution estimator for compounds still unknown (when RDKit is there).

    Returns
    -------
    CompoundEnergyTable
    """
    db = db or ThermoDatabase.load()
    conditions = environment if isinstance(environment, Conditions) else environment.conditions
    if literature is None:
        values = _default_literature(model, db)
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
            raise NetworkFileError(unknown_thermo_key(model, met.id, key, err.matches)) from err
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
        for m in rec.unknowns:
            met = unknown[m]
            key = RECONCILED_PREFIX + m
            counts, _ = parse_formula(met.formula or "", where=f"compound '{m}'")
            formula = "".join(f"{e}{n if n != 1 else ''}" for e, n in counts.items())
            record = reconciled_species(rec, m, key, formula)
            if record is None:
                continue
            records.append(record)
            rows.append(_species_row(key, met, [key], formula, record.charge))
            reconciled_key[m] = key
    estimated_key: dict[str, str] = {}
    group_counts: dict[str, dict[str, int]] = {}
    estimate_errors: dict[str, str] = {}
    if estimate:
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
            group_counts[m] = dict(est.groups)
    ext = db.with_extra_species(records, rows) if records else db

    # 4. the table, with the status of every energy and the audit flags that touch it
    library_audit = _library_audit(db)
    network_audit = [e for e in reconciliation_audit(rec) if e.flagged] if rec is not None else []
    basis = {v.id: v.basis for v in usable}
    table: dict[str, CompoundEnergy] = {}
    places = compartment_places(model, environment, conditions)
    for met in model.metabolites:
        m = met.id
        smiles = _note(met, "smiles")
        compartment, at, offset = places.get(m, ("", conditions, 0.0))
        if m in keyed:
            fe = db.formation_energy(keyed[m], at)
            table[m] = CompoundEnergy(m, "species", fe.value + offset, fe.uncertainty,
                                      fe.provenance + offset_words(compartment, offset), keyed[m],
                                      None, tuple(fe.sources), tuple(fe.flags), True, smiles,
                                      fe.status, library_audit.flags_for([keyed[m]]),
                                      compartment=compartment, at=at, offset=offset)
            continue
        est_key = estimated_key.get(m)
        if rec is not None and m in rec.unknowns:
            identified = rec.compound_identified(m)
            t_sigma = rec.temperature_sigma({m: 1.0}, at.temperature) if identified else math.nan
            sigma = math.hypot(rec.compound_sigma(m), t_sigma) if identified else math.nan
            if m in reconciled_key:
                fe = ext.formation_energy(reconciled_key[m], at)
                value, flags = fe.value + offset, tuple(fe.flags)
            else:  # no formula: ΔfG'° independent of pH and I, constant ΔrS'° = 0 approximation
                value = (rec.species_gibbs(m, at.temperature) + legendre_offset(rec.species[m], at)
                         + offset)
                flags = (f"{m}: no formula, Legendre transform not applied",)
            ids = rec.value_ids({m: 1.0}) if identified else [v.id for v in rec.values if m in v.stoichiometry]
            status = combined_value_status(basis.get(i, "checked") for i in ids)
            text = (f"{m}: reconciled from literature value(s) {', '.join(ids)}"
                    + ("" if identified else " (inside a conserved moiety: only combinations are fixed)")
                    + f" ({status})")
            table[m] = CompoundEnergy(m, "reconciled", value, sigma, text, reconciled_key.get(m, m),
                                      est_key, tuple(rec.source_keys({m: 1.0})), flags, identified, smiles,
                                      status, tuple(e.flag_text() for e in network_audit
                                                    if m in e.compounds),
                                      group_counts.get(m, {}), compartment, at, offset)
            continue
        if est_key:
            fe = ext.formation_energy(est_key, at)
            table[m] = CompoundEnergy(m, "estimated", fe.value + offset, fe.uncertainty,
                                      f"{m}: group-contribution estimate from SMILES"
                                      + offset_words(compartment, offset), est_key, est_key,
                                      tuple(fe.sources), tuple(fe.flags), True, smiles, ESTIMATED, (),
                                      group_counts.get(m, {}), compartment, at, offset)
            continue
        if smiles:
            why = estimate_errors.get(m) or "estimates were switched off"
            table[m] = CompoundEnergy(m, "placeholder", math.nan, math.nan,
                                      f"no species data, no literature value; estimate pending: {why}",
                                      None, None, (), (), False, smiles)
        else:
            table[m] = CompoundEnergy(m, "none", math.nan, math.nan,
                                      "no species data, no literature value, no SMILES to estimate from",
                                      None, None, (), (), False, smiles)
    return CompoundEnergyTable(conditions, table, ext, rec, tuple(usable), skipped,
                               dict(getattr(environment, "compartments", None) or {}))


# ------------------------------------------------------------------------ reaction energies
def reaction_energies(model: cobra.Model, table: CompoundEnergyTable,
                      demand: str | None = None) -> dict[str, ReactionEnergy]:
    """:class:`ReactionEnergy` of every internal reaction (both sides non-empty) but the demand,
    NaN where undetermined; a reaction that does not balance over its compounds' formulas gets
    none (its energy would mean nothing), and says so."""
    from .checks import balance_problem, is_boundary_reaction

    out: dict[str, ReactionEnergy] = {}
    for reaction in model.reactions:
        if is_boundary_reaction(reaction) or reaction.id == demand:
            continue  # exchanges and demands carry no energy
        problem = balance_problem(reaction)
        if problem:
            out[reaction.id] = ReactionEnergy(reaction.id, math.nan, math.nan, "none",
                                              f"no energy: the reaction does not balance ({problem})")
            continue
        source = str((reaction.notes or {}).get("energy_source") or "auto").strip()
        if source != "auto" and table.reconciliation is not None and \
                source not in {v.id for v in table.literature} and source not in table.skipped_values:
            raise NetworkFileError(
                f"reaction '{reaction.id}': energy_source '{source}' is not an id of the literature "
                "values (reaction_values.tsv); write 'auto' or a value id")
        stoich = {m.id: c for m, c in reaction.metabolites.items()}
        energy = checked_estimate(table.reaction_energy(reaction.id, stoich, source), table)
        state = standard_state_words(table, stoich)
        if state:
            energy = dataclasses.replace(energy, standard_state=state,
                                         provenance=f"{energy.provenance}; reference: {state}")
        out[reaction.id] = energy
    return out


def network_reaction_energy(model: cobra.Model, conditions: Conditions, equation: str,
                            activities: Mapping[str, float] | None = None,
                            db: ThermoDatabase | None = None, literature=None,
                            estimate: bool = True, compartments: Mapping | None = None):
    """ΔrG'° and ΔrG' of any reaction over a network's compounds, from the network's own data.

    The compounds are named by metabolite id, name, synonym or thermo key; their energies are
    those the network uses (:func:`compound_energies`: species data, its own reaction values
    reconciled, estimates), so this answers "what does this network take for this reaction".
    ``compartments`` (compartment id -> :class:`tfa.conditions.Compartment`, the environment's)
    put compounds outside the cell at their compartment's pH and potential; the flags state the
    reference of a reaction across the membrane, or that a compartment has no stated pH.

    Returns
    -------
    tfa.thermo.database.ReactionEnergyResult
        With ``status`` and ``audit_flags``; ``compounds`` is empty (the per-compound energies are
        in :func:`compound_energies`).

    Raises
    ------
    UnknownCompoundError
        A name that is no compound of the network (with close matches).
    UnbalancedReactionError
        The reaction does not balance over the network's formulas and charges.
    MissingDataError
        The network's data do not fix the reaction's energy.
    """
    import difflib

    from ..equation import format_equation, parse_equation
    from ..thermo.balance import check_balance, require_balanced
    from ..thermo.compounds import normalise_name
    from ..thermo.database import ReactionEnergyResult

    db = db or ThermoDatabase.load()
    index: dict[str, str] = {}
    for met in model.metabolites:
        names = [met.id, met.name, _note(met, "thermo_key")] + _note(met, "synonyms").split(";")
        for name in names:
            if name and name.strip():
                index.setdefault(normalise_name(name), met.id)

    def resolve(name: str) -> str:
        key = normalise_name(name)
        if key in index:
            return index[key]
        close = difflib.get_close_matches(key, list(index), n=5, cutoff=0.6)
        matches = tuple(dict.fromkeys(index[k] for k in close))
        hint = f"; did you mean: {', '.join(matches)}?" if matches else ""
        raise UnknownCompoundError(f"'{name}' is no compound of network {model.id}{hint} Write a "
                                   "metabolite id, name or synonym of its compounds table",
                                   name=name, matches=matches)

    parsed = parse_equation(equation)
    net: dict[str, float] = {}
    for name, nu in parsed.stoichiometry().items():
        met_id = resolve(name)
        net[met_id] = net.get(met_id, 0.0) + nu
    net = {m: n for m, n in net.items() if abs(n) > 1e-12}
    text = format_equation(net, "<=>" if parsed.arrow == "=" else parsed.arrow)
    mets = {m: model.metabolites.get_by_id(m) for m in net}
    formulas = {m: (parse_formula(met.formula or "", where=f"compound '{m}'")[0],
                    int(met.charge or 0)) for m, met in mets.items()}
    balance = check_balance(net, formulas)
    require_balanced(balance, text, where=f"network {model.id}")
    import types

    setting = types.SimpleNamespace(conditions=conditions, compartments=dict(compartments or {}))
    table = compound_energies(model, setting, db, literature, estimate=estimate)
    energy = checked_estimate(table.reaction_energy("equation", net), table)
    state = standard_state_words(table, net)
    if not math.isfinite(energy.standard):
        raise MissingDataError(f"network {model.id} does not fix the energy of {text}: "
                               f"{energy.provenance}")
    fixed = without_activity(model, _kind_of(db))
    used: dict[str, float] = {}
    flags: list[str] = []
    given = {resolve(k): float(v) for k, v in (activities or {}).items()}
    for m in given:
        if m not in net or m in fixed:
            raise InputError(f"activity given for '{m}', which is not a variable compound of the "
                             "reaction (water and H+ are fixed); remove it")
    actual = energy.standard
    for m, nu in net.items():
        if m in fixed:
            continue
        a = given.get(m, 1.0)
        if not (math.isfinite(a) and a > 0):
            raise InputError(f"activity of '{m}' must be a positive number (mol/L or bar)")
        used[m] = a
        actual += nu * conditions.RT * math.log(a)
    defaulted = [m for m in used if m not in given]
    if defaulted:
        flags.append("activity 1 (standard state) used for " + ", ".join(defaulted))
    if state:
        flags.append(f"reference of the standard energy: {state}")
    from .compartments import cell_compartment

    cell = cell_compartment(model)
    unstated = sorted({mets[m].compartment for m in net if mets[m].compartment
                       and mets[m].compartment != cell} - set(setting.compartments))
    if unstated:
        flags.append(f"compartment(s) {', '.join(unstated)} have no stated pH: taken at the "
                     f"cell's pH {conditions.ph:g} with membrane potential 0 (give the network's "
                     "environment with [compartments.ID])")
    sources: list[str] = []
    for m in net:
        extend_unique(sources, table.compounds[m].sources)
    return ReactionEnergyResult(text, net, energy.standard, actual, energy.uncertainty, balance,
                                tuple(sources), (f"network {model.id}: {energy.source}; "
                                                 f"{energy.provenance}",),
                                tuple(flags), used, conditions, {}, energy.status,
                                energy.audit_flags)


def checked_estimate(energy: ReactionEnergy, table: CompoundEnergyTable) -> ReactionEnergy:
    """An estimated reaction energy checked against its reaction class
    (:mod:`tfa.thermo.reaction_classes`): flagged and its σ widened when it lies more than 3σ
    outside the class's typical range at 25 °C, pH 7, I = 0.25 M; other energies unchanged."""
    from ..thermo.reaction_classes import REFERENCE, check_estimate

    if energy.source != "estimated" or not math.isfinite(energy.standard):
        return energy
    at_reference = sum(n * table.database.formation_energy(key, REFERENCE).value
                       for key, n in energy.compound_terms.items())
    check = check_estimate(energy.compound_terms, at_reference, energy.uncertainty,
                           energy.reaction_id, table.database.include_unreviewed)
    if check is None:
        return energy
    if not check.flagged:
        return dataclasses.replace(energy, provenance=f"{energy.provenance}; {check.message}")
    return dataclasses.replace(energy, uncertainty=check.sigma,
                               audit_flags=energy.audit_flags + (check.message,))


# ---------------------------------------------------------------------------- environment
def _kind_of(db: ThermoDatabase):
    """Function thermo key -> kind of the database compound it names (None when unknown)."""
    def kind(key: str) -> str | None:
        try:
            return db.compound(key).kind
        except InputError:
            return None
    return kind


def _thermo_model(model: cobra.Model, environment: Environment, mode: str, db: ThermoDatabase,
                  literature) -> ThermoModel:
    table = compound_energies(model, environment, db, literature)
    energies = reaction_energies(model, table, environment.demand_reaction)
    applied = apply_environment(model, environment, without_activity(model, _kind_of(db)))
    if applied.demand_id in energies:   # a two-sided demand (a lumped biomass reaction) is no chemistry
        energies = {rid: e for rid, e in energies.items() if rid != applied.demand_id}
    kept = {rid: e for rid, e in energies.items() if math.isfinite(e.standard)}
    for rid, e in energies.items():  # counted and named once by the coverage, not per mode
        if rid not in kept:
            logger.info("reaction %s has no energy (%s): %s", rid, e.source, e.provenance)
    tm = ThermoModel(model=model, conditions=table.conditions, energies=kept,
                     log_bounds=applied.log_bounds, no_activity=set(applied.no_activity), mode=mode,
                     environment_name=environment.name, demand_id=applied.demand_id,
                     feed_ids=applied.feed_ids)
    tm.log_rows, tm.pools = _cofactor_constraints(model, environment, table)
    tm.compound_table = table
    tm.all_energies = energies
    return tm


def _cofactor_constraints(model: cobra.Model, environment: Environment, table) -> tuple[list, list]:
    """The environment's carrier states on this network's metabolite ids (none when it has no
    ``[cofactors]``; a form the mode removed is left out)."""
    from .cofactors import PHOSPHORYLATION, resolved_constraints

    states = environment.cofactors
    if states is None:
        return [], []

    def resolve(key: str) -> str | None:
        try:
            met = environment.resolve(model, key)
        except InputError:
            return None
        return met.id if met.reactions else None

    def phosphorylation():
        ids = {key: resolve(key) for key in PHOSPHORYLATION}
        if any(v is None for v in ids.values()) or any(v not in table.compounds for v in ids.values()):
            return None
        energy = table.reaction_energy("phosphorylation potential",
                                       {ids[k]: n for k, n in PHOSPHORYLATION.items()})
        if not math.isfinite(energy.standard):
            return None
        return energy.standard, table.conditions.RT, (ids["ATP"], ids["ADP"], ids["phosphate"])

    return resolved_constraints(states, resolve, phosphorylation)


@contextlib.contextmanager
def prepared(model: cobra.Model, environment: Environment, mode: str = "native", db: ThermoDatabase | None = None,
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
        literature = _default_literature(model, db)
    with model:
        with apply_mode(model, mode):
            ions = getattr(environment, "ion_stoichiometry", None)
            if ions:
                from .compartments import set_ion_stoichiometry

                set_ion_stoichiometry(model, ions, environment.source or environment.name)
            yield _thermo_model(model, environment, mode, db, literature)


def prepare(model: cobra.Model, environment: Environment, mode: str = "native", db: ThermoDatabase | None = None,
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
