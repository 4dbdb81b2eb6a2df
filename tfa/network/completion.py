"""What a network as read still needs before it can be assessed, filled in once on reading:
the compound of our data each metabolite is (:mod:`tfa.network.identifiers`), the roles its
compounds play (:mod:`tfa.network.role_inference`), the H2 compound named on the command line,
and the warnings that go with it (matches left open).
"""

from __future__ import annotations

import logging
from dataclasses import dataclass, field
from pathlib import Path

import cobra

from .identifiers import AMBIGUOUS, IdentifierMapping, map_identifiers
from .role_inference import RoleReport, check_roles, infer_roles, name_h2

logger = logging.getLogger(__name__)

@dataclass
class NetworkCompletion:
    """The identifier mapping, the roles and the warnings of a network as read."""

    mapping: IdentifierMapping
    roles: RoleReport
    warnings: list[str] = field(default_factory=list)


def complete_network(model: cobra.Model, database, from_table: bool,
                     identifiers: str | Path | None = None, h2: str | None = None) -> NetworkCompletion:
    """Match metabolites to our data, infer roles, name the H2 compound; collect the warnings.

    Parameters
    ----------
    model : cobra.Model
        Changed in place (metabolite notes ``thermo_key``, ``role`` and their evidence).
    database : ThermoDatabase
    from_table : bool
        The network comes from our own tables (no BiGG-style id fallback).
    identifiers : path, optional
        The user's table of identifiers (:func:`tfa.network.identifiers.read_identifier_table`).
    h2 : str, optional
        The H2 compound named with ``--h2``.

    Raises
    ------
    InputError
        A bad identifiers table or ``--h2`` id.
    """
    mapping = map_identifiers(model, database, identifiers, use_ids=not from_table)
    if h2:
        name_h2(model, h2)
    check_thermo_keys(model, database)
    check_roles(model)
    roles = infer_roles(model, database)
    check_energy_sources(model, database)
    warnings = []
    # compartments: the environment states each one's pH and membrane potential; one it does
    # not describe is warned about where the environment is known
    # (tfa.network.compartments.compartment_warnings, called by tfa.network.inputs)
    ambiguous = [m.metabolite for m in mapping.matches if m.status == AMBIGUOUS]
    if ambiguous:
        warnings.append(f"{len(ambiguous)} compound(s) whose identifiers name two compounds of our "
                        f"data, left without data: {', '.join(ambiguous)} (give their thermo_key in "
                        "identifiers.tsv)")
    for text in warnings:
        logger.warning("%s", text)
    return NetworkCompletion(mapping, roles, warnings)


def check_energy_sources(model: cobra.Model, database) -> None:
    """Every reaction's ``energy_source`` is ``auto`` or the id of a value the network uses (its
    own ``reaction_values.tsv``, else the library's).

    Raises
    ------
    InputError
        Naming the file and line of the reaction.
    """
    from ..errors import InputError
    from ..thermo.literature import read_literature_values
    from .locations import located

    named = {r.id: str((r.notes or {}).get("energy_source") or "auto").strip() for r in model.reactions}
    named = {rid: v for rid, v in named.items() if v and v != "auto"}
    if not named:
        return
    path = (model.notes or {}).get("reaction_values_path")
    if path:
        ids = {v.id for v in read_literature_values(path)}
        where = Path(path).name
    else:
        from ..thermo.library import ReactionLibrary

        ids = {v.id for v in ReactionLibrary.load(database.include_unreviewed).values}
        where = "the library (tfa/data/reaction_values.csv)"
    for rid, value in named.items():
        if value not in ids:
            raise InputError(located(model, "reaction", rid, (
                f"reaction '{rid}': energy_source '{value}' is not an id of the reaction values "
                f"of {where}; write 'auto' or a value id")))


def check_thermo_keys(model: cobra.Model, database) -> None:
    """Every ``thermo_key`` names a compound of the thermodynamic data.

    Raises
    ------
    InputError
        Naming the file and line of the compound, with close matches.
    """
    from ..errors import NetworkFileError, UnknownCompoundError
    from .energies import unknown_thermo_key

    for met in model.metabolites:
        key = str((met.notes or {}).get("thermo_key") or "").strip()
        if not key:
            continue
        try:
            database.compound(key)
        except UnknownCompoundError as err:
            raise NetworkFileError(unknown_thermo_key(model, met.id, key, err.matches)) from err
