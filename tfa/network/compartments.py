"""Compartments of a network: which compartment is the cell, the warning for a
compartment whose pH the environment does not state, and the ion stoichiometry of reactions
that move ions across the membrane (an environment parameter, e.g. H+ per ATP).

Nothing here computes an energy: the electrochemical terms are in :mod:`tfa.thermo.membrane`
and are applied per compound by :func:`tfa.network.energies.compound_energies`.
"""

from __future__ import annotations

import difflib
import logging
from dataclasses import replace
from typing import Mapping

import cobra

from ..conditions import Compartment, Conditions
from ..errors import ConditionsError, NetworkFileError

logger = logging.getLogger(__name__)


def cell_compartment(model: cobra.Model) -> str:
    """The compartment the environment's ``[conditions]`` describe: the network's inner one
    (:func:`tfa.network.role_inference.inner_compartment`)."""
    from .role_inference import inner_compartment

    return inner_compartment(model)


def other_compartments(model: cobra.Model) -> list[str]:
    """The compartments of ``model`` besides the cell, sorted."""
    cell = cell_compartment(model)
    return sorted({m.compartment for m in model.metabolites if m.compartment} - {cell})


def crosses_membrane(reaction: cobra.Reaction, cell: str) -> bool:
    """True when the reaction has compounds in more than one compartment (a transport or an
    ion-coupled reaction)."""
    return len({m.compartment or cell for m in reaction.metabolites}) > 1


def _thermo_key(met: cobra.Metabolite) -> str:
    return str((met.notes or {}).get("thermo_key") or "").strip() or met.id


def translocated_ions(reaction: cobra.Reaction, cell: str) -> list[tuple[cobra.Metabolite, cobra.Metabolite]]:
    """(outer, inner) pairs of the same compound (same thermo key, or same formula and charge
    when neither has one) on opposite sides of the membrane in ``reaction``."""
    pairs = []
    inner = [m for m in reaction.metabolites if (m.compartment or cell) == cell]
    for outer in reaction.metabolites:
        if (outer.compartment or cell) == cell:
            continue
        for met in inner:
            same_key = _thermo_key(met) == _thermo_key(outer)
            same_species = met.formula == outer.formula and met.charge == outer.charge
            if same_key or (same_species and not (met.notes or {}).get("thermo_key")):
                pairs.append((outer, met))
                break
    return pairs


def set_ion_stoichiometry(model: cobra.Model, stoichiometry: dict[str, float], where: str = "") -> None:
    """Set how many ions each named reaction moves across the membrane per turnover (undone on
    leaving an enclosing ``with model:``).

    For a reaction that takes ν_out < 0 of an ion from outside and gives ν_in of the same ion
    in the cell (ATP synthase ``adp + pi + 4 h_out <=> atp + h2o + 3 h``), n ions per turnover
    means ν_out = −n and ν_in changed by the same amount the other way, so the balance holds
    (n = 3: ``adp + pi + 3 h_out <=> atp + h2o + 2 h``). A reaction that gives ions to the
    outside (ν_out > 0) is set likewise with ν_out = +n.

    Raises
    ------
    NetworkFileError
        A reaction the network lacks, or one with no ion on both sides of the membrane.
    """
    cell = cell_compartment(model)
    for rid, n in stoichiometry.items():
        if rid not in model.reactions:
            logger.info("%s [ion_stoichiometry] %s: not a reaction of network %s (ignored)",
                        where, rid, model.id)
            continue
        reaction = model.reactions.get_by_id(rid)
        pairs = translocated_ions(reaction, cell)
        if len(pairs) != 1:
            raise NetworkFileError(
                f"{where} [ion_stoichiometry] {rid}: reaction {rid} must take one ion from a "
                f"compartment other than the cell ({cell}) and give it on the other side, found "
                f"{len(pairs)}; write its equation with the ion in both compartments "
                "(e.g. '4 h_out' and 'h'), or remove the entry")
        outer, inner = pairs[0]
        nu_out = reaction.metabolites[outer]
        sign = -1.0 if nu_out < 0 else 1.0
        change = sign * float(n) - nu_out
        reaction.add_metabolites({outer: change, inner: -change}, combine=True)
def compartment_warnings(model: cobra.Model, environment) -> list[str]:
    """One warning per compartment of ``model`` besides the cell that the environment gives no
    pH: its compounds are taken at the cell's pH with Δψ = 0, which is rarely what the network
    means."""
    from .role_inference import inner_compartment

    cell = inner_compartment(model)
    found = sorted({m.compartment for m in model.metabolites if m.compartment} - {cell})
    missing = [cid for cid in found if cid not in environment.compartments]
    if not missing:
        return []
    where = environment.source or environment.name
    return [f"network {model.id}: compartment(s) {', '.join(missing)} have no stated pH in "
            f"environment {where}; their compounds are taken at the cell's ({cell}) pH "
            f"{environment.conditions.ph:g} with membrane potential 0, so transport between them "
            "and the cell carries no energy; give each a [compartments.ID] table with pH = ... "
            "and membrane_potential_mV = ..."]


#: Keys of one ``[compartments.ID]`` table.
COMPARTMENT_KEYS = ("name", "pH", "ionic_strength_M", "pMg", "membrane_potential_mV")


def read_compartments(where: str, data: dict, real) -> tuple[dict[str, Compartment], dict[str, float]]:
    """The ``[compartments.ID]`` tables (compartment id -> :class:`~tfa.conditions.Compartment`)
    and ``[ion_stoichiometry]`` (reaction id -> ions per turnover, 0-20) of an environment file's
    parsed TOML ``data``; ``real(where, section, key, value, **bounds)`` reads one number.

    Keys of ``[compartments.ID]``: ``pH`` (required), ``membrane_potential_mV`` (Δψ = ψ(cell) −
    ψ(ID), default 0), ``ionic_strength_M`` and ``pMg`` (default: the cell's), ``name``.

    Raises
    ------
    NetworkFileError, ConditionsError
    """
    out: dict[str, Compartment] = {}
    for cid, table in data.get("compartments", {}).items():
        if not isinstance(table, dict):
            raise NetworkFileError(f"{where} [compartments] {cid}: give a table [compartments.{cid}] "
                                   "with pH = ... (and optionally membrane_potential_mV, "
                                   "ionic_strength_M, pMg)")
        for key in table:
            if key not in COMPARTMENT_KEYS:
                close = difflib.get_close_matches(str(key), list(COMPARTMENT_KEYS), n=1)
                hint = f"did you mean '{close[0]}'? " if close else ""
                raise NetworkFileError(f"{where}: unknown key '{key}' in [compartments.{cid}]; "
                                       f"{hint}allowed: {', '.join(COMPARTMENT_KEYS)}")
        if "pH" not in table:
            raise NetworkFileError(f"{where} [compartments.{cid}]: 'pH' is missing; give the pH of "
                                   f"compartment {cid}, e.g. pH = 5.5")
        section_name = f"compartments.{cid}"
        value = {k: real(where, section_name, k, v) for k, v in table.items() if k != "name"}
        name = table.get("name", "")
        if not isinstance(name, str):
            raise NetworkFileError(f"{where} [{section_name}] name: give a text")
        try:
            out[str(cid)] = Compartment(str(cid), ph=value["pH"],
                                        ionic_strength=value.get("ionic_strength_M"),
                                        pmg=value.get("pMg"),
                                        membrane_potential_mV=value.get("membrane_potential_mV", 0.0),
                                        name=name)
        except ConditionsError as exc:
            raise ConditionsError(f"{where} [{section_name}]: {exc}") from exc
        if out[str(cid)].ionic_strength is not None:
            Conditions(ionic_strength=out[str(cid)].ionic_strength)   # the same checks as the cell's
    ions = {str(rid): real(where, "ion_stoichiometry", rid, value, minimum=0.0, maximum=20.0)
            for rid, value in data.get("ion_stoichiometry", {}).items()}
    return out, ions




def with_compartment(environment, compartment_id: str, **changes):
    """A copy of ``environment`` with one compartment's conditions changed (``ph``,
    ``ionic_strength``, ``pmg``, ``membrane_potential_mV``), or added (then ``ph`` is required).

    >>> from tfa.network.environment import Environment
    >>> env = Environment("demo", Conditions(ph=7.5))
    >>> with_compartment(env, "out", ph=5.5).compartments["out"].ph
    5.5
    """
    old = environment.compartments.get(compartment_id)
    given = {k: v for k, v in changes.items() if v is not None}
    if old is None:
        if "ph" not in given:
            raise ConditionsError(f"compartment {compartment_id}: give its pH")
        new = Compartment(compartment_id, **given)
    else:
        new = replace(old, **given)
    return replace(environment, compartments={**environment.compartments, compartment_id: new})


def scaled_gradient(compartments: dict, cell_ph: float, factor: float) -> dict:
    """Every compartment's ΔpH (pH_cell − pH_k) and Δψ times ``factor`` (0: no gradient; 1:
    unchanged); ionic strength and pMg kept.

    >>> out = scaled_gradient({"out": Compartment("out", 5.5, membrane_potential_mV=-100)}, 7.5, 0.5)
    >>> out["out"].ph, out["out"].membrane_potential_mV
    (6.5, -50.0)

    Raises
    ------
    ConditionsError
        When a scaled pH leaves 0-14.
    """
    return {cid: replace(c, ph=cell_ph - factor * (cell_ph - c.ph),
                         membrane_potential_mV=factor * c.membrane_potential_mV)
            for cid, c in compartments.items()}


def with_gradient_scaled(environment, factor: float):
    """A copy of ``environment`` with every compartment's ΔpH and Δψ ``factor`` times its own
    (:func:`scaled_gradient`)."""
    return replace(environment, compartments=scaled_gradient(environment.compartments,
                                                             environment.conditions.ph, factor))


def without_gradient(environment):
    """A copy of ``environment`` with every compartment at the cell's pH and Δψ = 0: no
    proton-motive force, all else equal."""
    return with_gradient_scaled(environment, 0.0)


def with_cell_ph(environment, ph: float, hold_gradient: bool = True):
    """A copy of ``environment`` with the cell at pH ``ph``; with ``hold_gradient`` every
    compartment's pH moves by the same amount, so ΔpH (and Δψ) stay as they were (a pH axis that
    does not silently change the gradient), else the compartments keep their own pH.

    >>> from tfa.network.environment import Environment
    >>> env = Environment("demo", Conditions(ph=7.5), compartments={"out": Compartment("out", 5.5)})
    >>> with_cell_ph(env, 8.0).compartments["out"].ph, with_cell_ph(env, 8.0, False).compartments["out"].ph
    (6.0, 5.5)

    Raises
    ------
    ConditionsError
        When a moved pH leaves 0-14.
    """
    shift = ph - environment.conditions.ph
    moved = environment.with_conditions(ph=ph)
    if not hold_gradient:
        return moved
    return replace(moved, compartments={cid: replace(c, ph=c.ph + shift)
                                        for cid, c in environment.compartments.items()})


def describe_compartments(environment, prefix: str = "") -> str:
    """The compartments besides the cell in words ("" when none), e.g.
    ``out: pH 5.50, Δψ = 0 mV (ψ cell − ψ out)``."""
    compartments = getattr(environment, "compartments", None) or {}
    if not compartments:
        return ""
    return prefix + "; ".join(c.describe() for _, c in sorted(compartments.items()))


def _hydrogen_and_charge(met: cobra.Metabolite) -> tuple[float, float]:
    """H atoms and charge of a metabolite's reference species (0 H when it has no formula)."""
    from ..errors import InputError
    from ..thermo.balance import parse_formula

    try:
        counts, suffix = parse_formula(met.formula or "", where=f"compound '{met.id}'")
    except InputError:
        counts, suffix = {}, 0
    return float(counts.get("H", 0)), float(met.charge if met.charge is not None else suffix)


def compartment_places(model: cobra.Model, environment, conditions: Conditions
                       ) -> dict[str, tuple[str, Conditions, float]]:
    """Metabolite id -> (compartment, its conditions, electrochemical offset in kJ/mol) for
    every compound outside the cell whose compartment the environment describes
    (:mod:`tfa.thermo.membrane`, equation (1)); compounds of the cell, and of compartments the
    environment does not describe (warned about by
    :func:`tfa.network.compartments.compartment_warnings`), are at the cell's conditions."""
    from ..thermo.membrane import electrochemical_offset

    described = getattr(environment, "compartments", None) or {}
    if not described:
        return {}
    cell = cell_compartment(model)
    out: dict[str, tuple[str, Conditions, float]] = {}
    for met in model.metabolites:
        place = met.compartment or cell
        if place == cell or place not in described:
            continue
        compartment = described[place]
        n_h, charge = _hydrogen_and_charge(met)
        offset = electrochemical_offset(n_h, charge, conditions.ph, compartment.ph,
                                        compartment.membrane_potential_V, conditions.temperature)
        out[met.id] = (place, compartment.conditions(conditions), offset)
    return out


def offset_words(compartment: str, offset: float) -> str:
    """The words a compound energy outside the cell adds to its provenance."""
    if not compartment:
        return ""
    return (f"; in compartment {compartment}: at its pH, ionic strength and pMg, plus "
            f"{offset:+.2f} kJ/mol for its H+ and electric potential relative to the cell")


def standard_state_words(table, stoichiometry: Mapping[str, float]) -> str:
    """The reference of ΔrG'° of a reaction across a membrane, in words ("" within the cell):
    every compound at 1 mol/L (gases 1 bar) in its own compartment, at that compartment's pH,
    ionic strength and electric potential, H+ of each compartment at its pH."""
    places = {table.compounds[m].compartment for m in stoichiometry if m in table.compounds}
    if not places - {""}:
        return ""
    c = table.conditions
    parts = [f"cell pH {c.ph:g}"]
    for m in sorted({m for m in stoichiometry if m in table.compounds and table.compounds[m].compartment}):
        ce = table.compounds[m]
        comp = table.compartments.get(ce.compartment)
        text = (f"{ce.compartment} pH {comp.ph:g}, Δψ = ψ cell − ψ {ce.compartment} = "
                f"{comp.membrane_potential_mV:g} mV" if comp is not None else ce.compartment)
        if text not in parts:
            parts.append(text)
    return ("each compound at 1 mol/L in its compartment at that compartment's pH and electric "
            "potential (" + "; ".join(parts) + "; the electric and H+ terms relative to the cell)")
