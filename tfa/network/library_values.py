"""The library's reaction values for a network that brings none of its own.

A network without ``reaction_values.tsv`` (an SBML or cobra JSON model, a table of one's own)
whose compounds name, through their ``thermo_key``, compounds that have no species data but
that the library reconciles from literature values (acetyl-CoA, CoA, the sugar phosphates, PEP,
acetyl phosphate ...; :class:`tfa.thermo.library.ReactionLibrary`) gets those values, over its
own metabolite ids, for the same reconciliation a network's own values go through
(:func:`tfa.network.energies.compound_energies`): status, σ and audit flags carry over, and a
conserved moiety (CoA) stays fixed only in the combinations the values fix.

A value is used when each of its compounds without species data is one metabolite of the
network (of the inner compartment when there are several); its compounds with species data
keep their database ids.
"""

from __future__ import annotations

import dataclasses

import cobra

from ..errors import InputError
from ..thermo.literature import LiteratureValue


def library_values_for(model: cobra.Model, database) -> list[LiteratureValue]:
    """The library's values over the metabolite ids of ``model`` (see the module text)."""
    from ..thermo.library import ReactionLibrary
    from .role_inference import inner_compartment

    library = ReactionLibrary.load(database.include_unreviewed)
    inner = inner_compartment(model)
    holders: dict[str, list[cobra.Metabolite]] = {}
    for met in model.metabolites:
        key = str((met.notes or {}).get("thermo_key") or "").strip()
        if not key:
            continue
        try:
            compound = database.compound(key)
        except InputError:
            continue
        holders.setdefault(compound.id, []).append(met)
    out: list[LiteratureValue] = []
    for value in library.literature:
        stoichiometry: dict[str, float] = {}
        uses_network = False
        for compound_id, coefficient in value.stoichiometry.items():
            if database.compound(compound_id).has_data:
                stoichiometry[compound_id] = coefficient
                continue
            mets = holders.get(compound_id, [])
            if len(mets) > 1:
                mets = [m for m in mets if (m.compartment or "") == inner]
            if len(mets) != 1:
                break
            stoichiometry[mets[0].id] = stoichiometry.get(mets[0].id, 0.0) + coefficient
            uses_network = True
        else:
            if uses_network:
                out.append(dataclasses.replace(value, stoichiometry=stoichiometry))
    return out
