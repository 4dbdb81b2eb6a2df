"""A route through a network and the energy profile along it.

A route is a list of (reaction id, direction) in the order the carbon flows. The energy profile
follows one connected path that carries flux in a certified steady state (the widest carbon path
of :mod:`tfa.analyses.carbon_paths`), or the route the user names (:func:`parse_route`), whose
consecutive steps are linked by the carbon compound they share (:func:`connect_steps`, which says
where they share none). :func:`energy_profile` gives ΔrG', ΔrG'°, σ and the flux of each step at
the steady state's concentrations (Alberty 2003, eq. 4.1-4); steps are shown one by one, never
summed. :func:`order_route` puts a set of steps in carbon order.

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

#: Columns of :func:`energy_profile`.
PROFILE_COLUMNS = ["step", "reaction", "direction", "compound_in", "compound_out", "flux",
                   "carbon_flux_per_demand", "delta_g_kJ_per_mol", "delta_g_standard_kJ_per_mol",
                   "sigma_kJ_per_mol", "near_equilibrium"]


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


def delta_g_at(tm: ThermoModel, reaction_id: str, log_conc: Mapping[str, float]) -> float:
    """ΔrG' of a reaction as written at given concentrations, kJ/mol:
    ΔrG' = ΔrG'° + RT Σ_i ν_i ln a_i (Alberty 2003, eq. 4.1-4); H⁺ and water carry no activity
    term. NaN when the reaction has no energy or a compound has no concentration given.

    Example (hand-derived): ΔrG'° = -3 kJ/mol for A -> B with [B]/[A] = 10 at 25 degC gives
    -3 + 2.479 ln 10 = +2.71 kJ/mol (tests/test_budget_routes.py).
    """
    e = tm.energies.get(reaction_id)
    if e is None:
        return math.nan
    reaction = tm.model.reactions.get_by_id(reaction_id)
    term = 0.0
    for m, c in reaction.metabolites.items():
        if m.id in tm.no_activity:
            continue
        if m.id not in log_conc:
            return math.nan
        term += c * float(log_conc[m.id])
    return e.standard + tm.RT * term


def near_equilibrium_limit(tm: ThermoModel) -> float:
    """|ΔrG'| below which a step counts as near equilibrium, kJ/mol: RT ln 10, where the backward
    flux is a tenth of the forward one (flux-force relation J+/J- = exp(-ΔrG'/RT), D. A. Beard,
    H. Qian, PLoS ONE 2 (2007) e144; used so by Noor et al. 2014). 5.71 kJ/mol at 25 degC."""
    return tm.RT * math.log(10.0)


def connect_steps(model, route: Sequence[tuple[str, int]], carbon: Mapping[str, float]
                  ) -> tuple[list[tuple[str, int, str, str]], list[str]]:
    """A named route as steps (reaction, direction, carbon compound in, carbon compound out): the
    compound out of a step is the carbon product it shares with the next step's carbon
    substrates. Returns the steps and, in words, each place where two consecutive steps share no
    carbon compound (the route is broken there)."""
    sides = []
    for rid, d in route:
        reaction = model.reactions.get_by_id(rid)
        sides.append(([m.id for m, c in reaction.metabolites.items()
                       if c * d < 0 and carbon.get(m.id, 0) > 0],
                      [m.id for m, c in reaction.metabolites.items()
                       if c * d > 0 and carbon.get(m.id, 0) > 0]))
    links = []
    breaks = []
    for k in range(len(route) - 1):
        shared = [m for m in sides[k][1] if m in sides[k + 1][0]]
        links.append(shared[0] if shared else "")
        if not shared:
            breaks.append(f"{route[k][0]} and {route[k + 1][0]} share no carbon compound")
    steps = []
    for k, (rid, d) in enumerate(route):
        into = links[k - 1] if k > 0 and links[k - 1] else (sides[k][0][0] if sides[k][0] else "")
        out = links[k] if k < len(links) and links[k] else (sides[k][1][0] if sides[k][1] else "")
        steps.append((rid, d, into, out))
    return steps, breaks


def energy_profile(tm: ThermoModel, steps: Sequence[tuple[str, int, str, str]],
                   log_conc: Mapping[str, float], fluxes: Mapping[str, float],
                   carbon_flux: float = math.nan) -> pd.DataFrame:
    """ΔrG', ΔrG'°, σ and flux of each step of a path, in the direction it runs, at the
    concentrations of one steady state.

    ΔrG' = d (ΔrG'° + RT Σ_i ν_i ln c_i) (Alberty 2003, eq. 4.1-4), d = ±1 the direction; H⁺
    and water carry no activity term. A step is near equilibrium when |ΔrG'| <
    :func:`near_equilibrium_limit`. Units: kJ/mol; fluxes in the network's unit. Steps are never
    summed: each row is one step.

    Parameters
    ----------
    steps : sequence of (reaction id, direction, compound in, compound out)
    log_conc : mapping
        ln activity of every compound with an activity term at the steady state.
    fluxes : mapping
        Reaction id -> flux at the steady state (a step missing or at 0 carries no flux).
    carbon_flux : float
        Carbon the path carries, mol C per unit demand (NaN for a named route).

    Returns
    -------
    DataFrame
        :data:`PROFILE_COLUMNS`.
    """
    limit = near_equilibrium_limit(tm)
    rows = []
    for rid, d, into, out in steps:
        e = tm.energies.get(rid)
        g = d * delta_g_at(tm, rid, log_conc)
        rows.append({"step": rid if d > 0 else f"{rid} (reverse)", "reaction": rid,
                     "direction": "forward" if d > 0 else "backward", "compound_in": into,
                     "compound_out": out, "flux": float(fluxes.get(rid, 0.0)),
                     "carbon_flux_per_demand": carbon_flux, "delta_g_kJ_per_mol": g,
                     "delta_g_standard_kJ_per_mol": d * e.standard if e else math.nan,
                     "sigma_kJ_per_mol": e.uncertainty if e else math.nan,
                     "near_equilibrium": bool(abs(g) < limit) if math.isfinite(g) else None})
    return pd.DataFrame(rows, columns=PROFILE_COLUMNS)
