"""The energy of one reaction written by hand among a network's compounds (``tfa dg
--network``): the compounds' energies as the network fixes them, at the given conditions."""

from __future__ import annotations

import math
from typing import Mapping

import cobra

from ..conditions import Conditions
from ..errors import InputError, MissingDataError, UnknownCompoundError
from ..thermo.balance import parse_formula
from ..thermo.database import ThermoDatabase
from .compartments import standard_state_words
from .compound_table import extend_unique
from .energies import _kind_of, _note, checked_estimate, compound_energies
from .roles import without_activity


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
