"""The carbon-fixation route of a network and the energy profile along it.

A route is a list of (reaction id, direction) in the order the carbon flows. By default it is
read from a certified steady state (:func:`route_reactions`): the reactions tagged (``pathway``
note) with the methyl or carbonyl branch of the acetyl-CoA pathway or with pyruvate synthesis that
carry flux there, put in carbon order by :func:`order_route`; the user may name one instead
(:func:`parse_route`). :func:`energy_profile` gives ΔrG' and ΔrG'° of each step at given
concentrations (Alberty 2003, eq. 4.1-4).

Units: kJ/mol; concentrations as natural logarithms of mol/L (gases: bar).
"""

from __future__ import annotations

import logging
import math
from typing import Mapping, Sequence

import pandas as pd

from ..errors import InputError
from ..network.thermo_model import ThermoModel
from ..thermo.balance import parse_formula

log = logging.getLogger(__name__)

#: Pathway tags (lower case, substrings) of the carbon-fixation route from H2 + CO2 to pyruvate.
ROUTE_PATHWAYS = ("acetyl-coa pathway (methyl branch)", "acetyl-coa pathway (carbonyl branch)",
                  "pyruvate")
#: Columns of :func:`energy_profile`.
PROFILE_COLUMNS = ["step", "reaction", "direction", "delta_g_kJ_per_mol",
                   "delta_g_standard_kJ_per_mol", "cumulative_delta_g_kJ_per_mol"]
#: Concentration of a compound the profile has no value for, mol/L (the 1 mM reference state).
PROFILE_DEFAULT_CONCENTRATION = 1e-3


def route_reactions(model, demand_id: str | None = None,
                    pathways: Sequence[str] = ROUTE_PATHWAYS,
                    fluxes: Mapping[str, float] | None = None) -> list[tuple[str, int]]:
    """The main carbon-fixation route from H2 + CO2 to pyruvate: (reaction id, direction), in
    route order.

    The reactions are those tagged (``pathway`` note, case-insensitive substring of
    :data:`ROUTE_PATHWAYS`) with the methyl or carbonyl branch of the acetyl-CoA pathway or
    with pyruvate synthesis that carry flux in the least-total-flux way of making one unit of
    pyruvate from the feed (parsimonious flux balance, Lewis et al. 2010, Mol. Syst. Biol.
    6:390; the network's own demand switched off). They are put in order by
    :func:`order_route`. Empty when the network has no pyruvate or cannot make it.

    When ``fluxes`` (reaction id -> flux of a certified steady state) is given, the route is
    read from that steady state instead, so the profile's steps and its concentrations come
    from one and the same solution.
    """
    import cobra

    pyruvate = [m for m in model.metabolites if _is_pyruvate(m)]
    if not pyruvate:
        return []
    if fluxes is not None:
        return _route_from_fluxes(model, fluxes, pathways)
    with model:
        if demand_id is not None and demand_id in model.reactions:
            model.reactions.get_by_id(demand_id).bounds = (0.0, 0.0)
        sink = model.add_boundary(pyruvate[0], type="demand", reaction_id="tfa_route_pyruvate")
        sink.bounds = (1.0, 1.0)
        model.objective = sink
        try:
            fluxes = cobra.flux_analysis.pfba(model).fluxes
        except Exception as err:  # an infeasible LP: cobra raises its own errors
            log.info("route: pyruvate cannot be made from the feed (%s)", err)
            return []
    return _route_from_fluxes(model, fluxes, pathways)


def pathway_of(reaction) -> str:
    """The pathway tag of a reaction (``pathway`` note, else cobra's subsystem; may be empty)."""
    return str((reaction.notes or {}).get("pathway") or reaction.subsystem or "")


def _route_from_fluxes(model, fluxes: Mapping[str, float],
                       pathways: Sequence[str]) -> list[tuple[str, int]]:
    """Route steps (tagged reactions that carry flux, in their direction), in carbon order."""
    chosen = []
    for reaction in model.reactions:
        tag = pathway_of(reaction).lower()
        v = float(fluxes.get(reaction.id, 0.0))
        if abs(v) <= 1e-9 or not any(p in tag for p in pathways):
            continue
        direction = 1 if v > 0 else -1
        if "acetyl-coa" not in tag:
            made = [m for m, c in reaction.metabolites.items() if c * direction > 0]
            if not any(_is_pyruvate(m) for m in made):
                continue
        chosen.append((reaction.id, direction))
    return order_route(model, chosen)


def _formula_counts(met) -> dict[str, int]:
    """Element counts of a metabolite's formula (empty when it has none or it is unreadable)."""
    try:
        return parse_formula(str(met.formula or ""))[0]
    except InputError:
        return {}


def _contains(big: dict[str, int], small: dict[str, int]) -> bool:
    return big != small and all(big.get(e, 0) >= n for e, n in small.items())


def order_route(model, steps: Sequence[tuple[str, int]]) -> list[tuple[str, int]]:
    """Put route steps in the order the carbon flows: a step comes once every substrate it needs
    is fed or made by an earlier step (ties: order of the network file).

    Carrier moieties (tetrahydrofolate, coenzyme A: a compound of at least six carbons that
    another route compound contains whole and that contains no such compound itself) and
    compounds with a role in the compounds table (electron carriers, ATP, phosphate, water)
    count as present from the start, since the network regenerates them. When the remaining steps wait on
    each other, the first of them in the file goes next.
    """
    if not steps:
        return []
    position = {r.id: k for k, r in enumerate(model.reactions)}
    steps = sorted(steps, key=lambda s: position.get(s[0], 0))
    sides = {}
    for rid, d in steps:
        reaction = model.reactions.get_by_id(rid)
        sides[rid] = ({m.id for m, c in reaction.metabolites.items() if c * d < 0},
                      {m.id for m, c in reaction.metabolites.items() if c * d > 0})
    made = set().union(*(p for _, p in sides.values()))
    involved = {m for pair in sides.values() for side in pair for m in side}
    formulas = {m: _formula_counts(model.metabolites.get_by_id(m)) for m in involved}
    big = {m for m, f in formulas.items() if f.get("C", 0) >= 6}
    carriers = {m for m in big
                if any(_contains(formulas[o], formulas[m]) for o in involved if o != m)
                and not any(_contains(formulas[m], formulas[o]) for o in big if o != m)}
    # compounds with a role (electron carriers, ATP/ADP/AMP, phosphate, water, H+) are
    # regenerated elsewhere in the network: they never hold a carbon step back
    cofactors = {m for m in involved if (model.metabolites.get_by_id(m).notes or {}).get("role")}
    available = (involved - made) | carriers | cofactors
    ordered: list[tuple[str, int]] = []
    remaining = list(steps)
    while remaining:
        ready = [s for s in remaining if sides[s[0]][0] <= available]
        step = ready[0] if ready else remaining[0]
        ordered.append(step)
        remaining.remove(step)
        available |= sides[step[0]][1]
    return ordered


def _is_pyruvate(met) -> bool:
    return met.id.lower() in ("pyr", "pyruvate") or str(met.name or "").lower() == "pyruvate"


def parse_route(text: str | Sequence[str] | None) -> list[tuple[str, int]] | None:
    """``"R1,R2,-R3"`` -> [("R1", 1), ("R2", 1), ("R3", -1)] (a leading minus: run backwards).

    >>> parse_route("HDCR, -FALDH,ACS")
    [('HDCR', 1), ('FALDH', -1), ('ACS', 1)]
    """
    if text is None:
        return None
    items = text.split(",") if isinstance(text, str) else list(text)
    out = []
    for item in items:
        item = str(item).strip()
        if not item:
            continue
        direction = -1 if item.startswith("-") else 1
        out.append((item.lstrip("-+").strip(), direction))
    if not out:
        raise InputError(f"route {text!r}: give reaction ids separated by commas, e.g. HDCR,FTHFS")
    return out


def energy_profile(tm: ThermoModel, route: Sequence[tuple[str, int]],
                   log_conc: Mapping[str, float]) -> pd.DataFrame:
    """ΔrG' and ΔrG'° of each route step in the direction it runs, at given concentrations.

    ΔrG' = d (ΔrG'° + RT Σ_i ν_i ln c_i) (Alberty 2003, eq. 4.1-4), d = ±1 the direction; H+ and
    water carry no activity term. Units: kJ/mol. Compounds missing from ``log_conc`` are taken
    at :data:`PROFILE_DEFAULT_CONCENTRATION`.

    Returns
    -------
    DataFrame
        :data:`PROFILE_COLUMNS`: ``step``, ``reaction``, ``direction``, ΔrG' and ΔrG'° in the
        direction run, and the running sum of ΔrG' (kJ/mol).
    """
    rt = tm.RT
    rows = []
    total = 0.0
    for rid, d in route:
        e = tm.energies.get(rid)
        if e is None:
            continue
        reaction = tm.model.reactions.get_by_id(rid)
        term = sum(c * log_conc.get(m.id, math.log(PROFILE_DEFAULT_CONCENTRATION)) for m, c in reaction.metabolites.items()
                   if m.id not in tm.no_activity)
        g = d * (e.standard + rt * term)
        total += g
        rows.append({"step": rid if d > 0 else f"{rid} (reverse)", "reaction": rid,
                     "direction": "forward" if d > 0 else "backward", "delta_g_kJ_per_mol": g,
                     "delta_g_standard_kJ_per_mol": d * e.standard,
                     "cumulative_delta_g_kJ_per_mol": total})
    return pd.DataFrame(rows, columns=PROFILE_COLUMNS)
