"""Compartments of a network (issue 19): which compartment is the cell, the warning for a
compartment whose pH the environment does not state, and the ion stoichiometry of reactions
that move ions across the membrane (an environment parameter, e.g. H+ per ATP).

Nothing here computes an energy: the electrochemical terms are in :mod:`tfa.thermo.membrane`
and are applied per compound by :func:`tfa.network.energies.compound_energies`.
"""

from __future__ import annotations

import logging

import cobra

from ..errors import NetworkFileError

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
    means (issue 19)."""
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


