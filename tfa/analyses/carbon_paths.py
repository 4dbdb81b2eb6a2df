"""The routes that ran: a steady state's carbon flow split into source-to-sink paths.

Carbon graph. Each reaction carrying flux v moves carbon from its carbon substrates to its carbon
products (in the direction it runs). Only *transferable* carbon counts (:func:`transferable_carbon`):
compounds with a role (ATP, NAD(P)H, ferredoxin ...) lend no carbon, and a carrier moiety
(tetrahydrofolate, coenzyme A: at least :data:`CARRIER_MIN_CARBON` carbons, loaded with carbon
by some reaction into a compound that contains it whole) lends none of its own, so 10-formyl-THF carries one carbon and
acetyl-CoA two. No atom mapping is needed: a substrate and a product that carry the same amount
of carbon are paired first (most alike formulas first, so a transamination hands the keto acid's
skeleton to the amino acid); the rest of the carbon is shared in proportion (each product draws
from the remaining substrates in proportion to their carbon; common practice without an atom
mapping): the edge s -> p of reaction j then carries

    f(s, p, j) = |v_j| * |nu_s| t_s * |nu_p| t_p / sum_q |nu_q| t_q      [mol C per unit demand]

(t the transferable carbon, the sum over the products q), divided by the demand flux. Feeds are
edges from the source (a boundary reaction that brings a compound in), the demand and exports
edges into the sink.

Decomposition. The flow is split into source-to-sink paths by flow decomposition (R. K. Ahuja,
T. L. Magnanti, J. B. Orlin, Network Flows, Prentice Hall 1993, section 3.5): repeatedly take
the path of largest bottleneck (widest path; ties broken by compound and reaction id, so the
result is the same on every run), record its bottleneck as the path's carbon flow and subtract
it. Every round empties one edge, so it ends within the number of edges; what is left is carbon
going round cycles, taken out cycle by cycle the same way and reported as cycles (the imbalance of
a reaction whose carbon the carrier rule does not balance is reported as unassigned).

Each path is named by the pathway tags (``pathway`` note) of its reactions; the carbon-fixation
route of a path is its first reaction (the one that takes carbon from the feed) with its tag.

Units: carbon flows in mol C per unit of demand flux (the demand reaction run once); shares
dimensionless.
"""

from __future__ import annotations

import heapq
from dataclasses import dataclass, field
from typing import Mapping, Sequence

import pandas as pd

from ..errors import InputError
from ..thermo.balance import parse_formula

#: Least carbon count of a carrier moiety (tetrahydrofolate C19, coenzyme A C21; pyrimidine
#: nucleotides C9 and hexoses C6 stay below, so their carbon is transferred).
CARRIER_MIN_CARBON = 10
#: Fluxes and carbon flows below this (relative to the demand flux) count as zero.
FLOW_TOLERANCE = 1e-9
#: Names of the two ends of every path.
SOURCE, SINK = "(feed)", "(demand or outlet)"
#: Columns of the ``carbon_routes`` table.
CARBON_ROUTE_COLUMNS = ["mode", "path", "kind", "source_compound", "sink_compound", "compounds",
                        "steps", "fixation_step", "pathway_tags", "carbon_flux_per_demand",
                        "carbon_share"]


@dataclass(frozen=True)
class PathStep:
    """One step of a carbon path: a reaction run in ``direction`` (+1/-1) that takes carbon from
    ``compound_in`` to ``compound_out``."""

    reaction: str
    direction: int
    compound_in: str
    compound_out: str

    @property
    def label(self) -> str:
        return self.reaction if self.direction > 0 else f"{self.reaction} (reverse)"


@dataclass
class CarbonPath:
    """A source-to-sink carbon path and the carbon it carries (mol C per unit demand)."""

    steps: list[PathStep]
    carbon_flux: float
    share: float = 0.0
    pathways: list[str] = field(default_factory=list)

    @property
    def compounds(self) -> list[str]:
        return [self.steps[0].compound_in] + [s.compound_out for s in self.steps] if self.steps else []

    @property
    def route(self) -> str:
        """The pathway tags along the path, repeated tags shown once."""
        out: list[str] = []
        for tag in self.pathways:
            if tag and (not out or out[-1] != tag):
                out.append(tag)
        return " → ".join(out)


@dataclass
class CarbonRoutes:
    """The decomposition of one steady state.

    Attributes
    ----------
    paths : list of CarbonPath
        In the order found (largest bottleneck first).
    cycles : list of CarbonPath
        Carbon going round a cycle after the paths are taken out (``carbon_flux``: the carbon
        circulating, mol C per unit demand; its share is relative to the feed's carbon and may
        exceed 1).
    carbon_in : float
        Carbon taken from the feed, mol C per unit demand.
    unassigned : float
        Carbon flow left in cycles or unbalanced reactions after the paths, mol C per unit demand.
    unbalanced : list of str
        Reactions whose transferable carbon differs between the two sides (the carrier rule does
        not fit them); their carbon is shared in proportion, and the difference is unassigned.
    """

    paths: list[CarbonPath] = field(default_factory=list)
    cycles: list[CarbonPath] = field(default_factory=list)
    carbon_in: float = 0.0
    unassigned: float = 0.0
    unbalanced: list[str] = field(default_factory=list)

    def fixation_shares(self) -> dict[str, float]:
        """Share of the feed's carbon per fixation step ("HDCR (acetyl-CoA pathway ...)"),
        largest first."""
        shares: dict[str, float] = {}
        for p in self.paths:
            key = fixation_words(p)
            shares[key] = shares.get(key, 0.0) + p.share
        return dict(sorted(shares.items(), key=lambda kv: (-kv[1], kv[0])))

    def to_frame(self, mode: str = "") -> pd.DataFrame:
        rows = [{"mode": mode, "path": k + 1, "kind": kind,
                 "source_compound": p.steps[0].compound_in,
                 "sink_compound": p.steps[-1].compound_out,
                 "compounds": " → ".join(p.compounds),
                 "steps": ", ".join(s.label for s in p.steps),
                 "fixation_step": fixation_words(p), "pathway_tags": p.route,
                 "carbon_flux_per_demand": p.carbon_flux, "carbon_share": p.share}
                for k, (kind, p) in enumerate([("path", p) for p in self.paths]
                                              + [("cycle", c) for c in self.cycles]) if p.steps]
        return pd.DataFrame(rows, columns=CARBON_ROUTE_COLUMNS)


def fixation_words(path: CarbonPath) -> str:
    """The step that takes the path's carbon from the feed, with its pathway tag."""
    if not path.steps:
        return ""
    tag = path.pathways[0] if path.pathways else ""
    return f"{path.steps[0].label} ({tag})" if tag else path.steps[0].label


def pathway_of(reaction) -> str:
    """The pathway tag of a reaction (``pathway`` note, else cobra's subsystem; may be empty)."""
    return str((reaction.notes or {}).get("pathway") or reaction.subsystem or "")


def _contains(big: dict, small: dict) -> bool:
    """``big`` holds every heavy atom of ``small`` (hydrogen aside: 5,10-methenyl-THF has one H
    fewer than THF itself, yet carries it whole)."""
    return big != small and all(big.get(e, 0) >= n for e, n in small.items() if e != "H")


def _loaded(big: dict, small: dict) -> bool:
    """``big`` is ``small`` plus an organic group: more carbon, and the difference made of C, H,
    O and N only (a formyl, methyl, acetyl or succinyl group; not a phosphate or a thiol)."""
    if not _contains(big, small) or big.get("C", 0) <= small.get("C", 0):
        return False
    return all(e in ("C", "H", "O", "N") for e, n in big.items() if n > small.get(e, 0) and e != "H")


def transferable_carbon(model) -> dict[str, float]:
    """Compound id -> carbon atoms it can pass on along a carbon path.

    0 for a compound with a role (currency and carriers: ATP, NAD(P)H, ferredoxin, phosphate ...);
    a carrier moiety (at least :data:`CARRIER_MIN_CARBON` carbons and no role; some reaction
    turns it into a compound whose formula is its own plus a group of C, H, O (N) with carbon:
    a formyl, methyl, acetyl ... group; it is no loaded form
    of another carrier) lends 0, and a compound containing one lends its carbons minus the
    carrier's (the largest contained). Otherwise the carbon count of its formula.

    >>> import cobra
    >>> m = cobra.Model("x")
    >>> m.add_metabolites([cobra.Metabolite("thf", formula="C19H21N7O6"),
    ...                    cobra.Metabolite("fthf", formula="C20H21N7O7"),
    ...                    cobra.Metabolite("atp", formula="C10H12N5O13P3")])
    >>> m.metabolites.atp.notes["role"] = "atp"
    >>> load = cobra.Reaction("load")
    >>> m.add_reactions([load])
    >>> load.add_metabolites({m.metabolites.thf: -1, m.metabolites.fthf: 1})
    >>> transferable_carbon(m)
    {'thf': 0.0, 'fthf': 1.0, 'atp': 0.0}
    """
    formulas = {met.id: _formula(met) for met in model.metabolites}
    roles = {m.id for m in model.metabolites if (m.notes or {}).get("role")
             and str(m.notes.get("role")) != "co2"}
    candidates = {m for m, f in formulas.items() if f.get("C", 0) >= CARRIER_MIN_CARBON
                  and m not in roles}
    loads = set()  # (carrier, loaded form): a reaction turns one into the other, adding carbon
    for reaction in model.reactions:
        sides = ([m.id for m, c in reaction.metabolites.items() if c < 0],
                 [m.id for m, c in reaction.metabolites.items() if c > 0])
        for a, b in (sides, sides[::-1]):
            loads |= {(s, p) for s in a if s in candidates for p in b
                      if p not in roles and _loaded(formulas[p], formulas[s])}
    carriers = {s for s, _ in loads}
    carriers -= {p for s, p in loads if s in carriers}   # acetyl-CoA is loaded CoA, no carrier
    out = {}
    for met in model.metabolites:
        c = float(formulas[met.id].get("C", 0))
        if met.id in roles or met.id in carriers:
            out[met.id] = 0.0
            continue
        inside = [formulas[k].get("C", 0) for k in carriers if _contains(formulas[met.id], formulas[k])]
        out[met.id] = c - max(inside) if inside else c
    return out


def carbon_graph(model, fluxes: Mapping[str, float], demand_id: str | None,
                 carbon: Mapping[str, float] | None = None
                 ) -> tuple[dict[tuple[str, str, str, int], float], float, list[str]]:
    """The carbon flow of a steady state: edge (from, to, reaction, direction) -> mol C per unit
    demand, the demand flux, and the reactions whose transferable carbon is unbalanced.

    Raises
    ------
    InputError
        When the demand reaction carries no flux (nothing to normalise by).
    """
    carbon = carbon if carbon is not None else transferable_carbon(model)
    formulas = {m.id: _formula(m) for m in model.metabolites}
    demand = float(fluxes.get(demand_id, 0.0)) if demand_id else 0.0
    if abs(demand) <= FLOW_TOLERANCE:
        raise InputError(f"carbon routes: the demand reaction {demand_id!r} carries no flux in "
                         "this steady state; give a solution that meets a demand")
    edges: dict[tuple[str, str, str, int], float] = {}
    unbalanced = []
    for reaction in model.reactions:
        v = float(fluxes.get(reaction.id, 0.0)) / abs(demand)
        if abs(v) <= FLOW_TOLERANCE:
            continue
        d = 1 if v > 0 else -1
        made = {m.id: c * d * abs(v) * carbon.get(m.id, 0.0) for m, c in reaction.metabolites.items()}
        ins = {m: -x for m, x in made.items() if x < -FLOW_TOLERANCE}
        outs = {m: x for m, x in made.items() if x > FLOW_TOLERANCE}
        if not ins and not outs:
            continue
        if not ins:   # a boundary reaction bringing carbon in (a feed)
            ins = {SOURCE: sum(outs.values())}
        if not outs:  # the demand, an outlet
            outs = {SINK: sum(ins.values())}
        total_out, total_in = sum(outs.values()), sum(ins.values())
        if abs(total_out - total_in) > 1e-6 * max(total_in, total_out):
            unbalanced.append(reaction.id)
        for (s, p), f in _share(ins, outs, formulas).items():
            key = (s, p, reaction.id, d)
            edges[key] = edges.get(key, 0.0) + f
    return edges, abs(demand), unbalanced


def _formula(met) -> dict:
    try:
        return parse_formula(str(met.formula or ""))[0]
    except InputError:
        return {}


def _share(ins: dict[str, float], outs: dict[str, float], formulas: Mapping[str, dict]
           ) -> dict[tuple[str, str], float]:
    """Carbon of one reaction from each substrate to each product: a substrate and a product
    carrying the same carbon are paired first (the most alike formulas first: a transamination
    passes oxaloacetate's skeleton to aspartate and glutamate's to 2-oxoglutarate); what is left
    is shared in proportion to the products' carbon."""
    ins, outs = dict(ins), dict(outs)
    flows: dict[tuple[str, str], float] = {}

    def unlike(s: str, p: str) -> float:
        a, b = formulas.get(s, {}), formulas.get(p, {})
        return sum(abs(a.get(e, 0) - b.get(e, 0)) for e in set(a) | set(b))

    pairs = sorted(((unlike(s, p), s, p) for s in ins for p in outs
                    if abs(ins[s] - outs[p]) <= 1e-9 * max(ins[s], outs[p])), key=lambda t: t)
    for _, s, p in pairs:
        if ins.get(s, 0.0) > FLOW_TOLERANCE and outs.get(p, 0.0) > FLOW_TOLERANCE \
                and abs(ins[s] - outs[p]) <= 1e-9 * max(ins[s], outs[p]):
            flows[(s, p)] = ins[s]
            ins[s] = outs[p] = 0.0
    ins = {k: x for k, x in ins.items() if x > FLOW_TOLERANCE}
    outs = {k: x for k, x in outs.items() if x > FLOW_TOLERANCE}
    total = sum(outs.values())
    for s, cs in ins.items():
        for p, cp in outs.items():
            flows[(s, p)] = flows.get((s, p), 0.0) + cs * cp / total
    return flows


def _widest_path(edges: dict[tuple[str, str, str, int], float]) -> list[tuple[str, str, str, int]]:
    """The source-to-sink path of largest bottleneck over edges with positive flow (a
    maximum-capacity path by a Dijkstra-like search; ties broken by node and reaction id)."""
    out: dict[str, list[tuple[str, str, str, int]]] = {}
    for key, f in edges.items():
        if f > FLOW_TOLERANCE:
            out.setdefault(key[0], []).append(key)
    for keys in out.values():
        keys.sort(key=lambda k: (k[1], k[2], k[3]))
    best = {SOURCE: float("inf")}
    back: dict[str, tuple[str, str, str, int]] = {}
    heap = [(-float("inf"), SOURCE)]
    done = set()
    while heap:
        width, node = heapq.heappop(heap)
        if node in done:
            continue
        done.add(node)
        if node == SINK:
            break
        for key in out.get(node, []):
            w = min(-width, edges[key])
            if key[1] not in done and w > best.get(key[1], 0.0) + 1e-15:
                best[key[1]] = w
                back[key[1]] = key
                heapq.heappush(heap, (-w, key[1]))
    if SINK not in back:
        return []
    path, node = [], SINK
    while node != SOURCE:
        key = back[node]
        path.append(key)
        node = key[0]
    return path[::-1]


def carbon_routes(model, fluxes: Mapping[str, float], demand_id: str | None,
                  max_paths: int = 500) -> CarbonRoutes:
    """Split a steady state's carbon flow into source-to-sink paths (see the module docstring).

    Parameters
    ----------
    model : cobra.Model
        The network (as rewritten for the mode of the solution).
    fluxes : mapping
        Reaction id -> net flux of a steady state [flux unit].
    demand_id : str
        The demand reaction: every carbon flow is per unit of its flux.
    max_paths : int
        Stop after this many paths (the rest is counted as unassigned).

    Returns
    -------
    CarbonRoutes
        Paths with their carbon flow [mol C per unit demand] and share of the feed's carbon.

    Examples
    --------
    Two routes from CO2 to a product P (hand-derived: route a carries 3 of 4 units, b one):

    >>> import cobra
    >>> m = cobra.Model("two")
    >>> co2, a, b, p = (cobra.Metabolite(i, formula="CO2" if i == "co2" else "CH2O2")
    ...                 for i in ("co2", "a", "b", "p"))
    >>> rs = [cobra.Reaction(i) for i in ("EX_co2", "Ra", "Rb", "Ra2", "Rb2", "demand")]
    >>> m.add_reactions(rs)
    >>> for r, st in zip(rs, ({co2: -1}, {co2: -1, a: 1}, {co2: -1, b: 1}, {a: -1, p: 1},
    ...                       {b: -1, p: 1}, {p: -1})):
    ...     r.add_metabolites(st)
    >>> res = carbon_routes(m, {"EX_co2": -4, "Ra": 3, "Rb": 1, "Ra2": 3, "Rb2": 1,
    ...                         "demand": 4}, "demand")
    >>> [(", ".join(s.reaction for s in p.steps), p.share) for p in res.paths]
    [('Ra, Ra2', 0.75), ('Rb, Rb2', 0.25)]
    """
    edges, _, unbalanced = carbon_graph(model, fluxes, demand_id)
    carbon_in = sum(f for (s, _, _, _), f in edges.items() if s == SOURCE)
    result = CarbonRoutes(carbon_in=carbon_in, unbalanced=unbalanced)
    pathway = {r.id: pathway_of(r) for r in model.reactions}
    for _ in range(max_paths):
        path = _widest_path(edges)
        if not path:
            break
        found = _take_out(edges, path, pathway, carbon_in)
        if found is not None:
            result.paths.append(found)
    for _ in range(max_paths):
        cycle = _a_cycle(edges)
        if not cycle:
            break
        found = _take_out(edges, cycle, pathway, carbon_in)
        if found is not None:   # always: a cycle has no boundary edge
            result.cycles.append(found)
    result.unassigned = sum(f for f in edges.values() if f > FLOW_TOLERANCE)
    return result


def _take_out(edges: dict[tuple[str, str, str, int], float],
              keys: list[tuple[str, str, str, int]], pathway: Mapping[str, str],
              carbon_in: float) -> CarbonPath | None:
    """Subtract the bottleneck of ``keys`` (a path or a cycle) from ``edges`` and return it as a
    :class:`CarbonPath` (carbon flow: the bottleneck, mol C per unit demand; share: relative to
    ``carbon_in``), or None when no step is left.

    The boundary edges (feed, demand, outlet) are not steps of a route: a compound fed and
    demanded as it is has no step and no path (its flow is still subtracted). A cycle has no
    boundary edge, so every edge is a step.
    """
    width = min(edges[k] for k in keys)
    for k in keys:
        edges[k] -= width
    steps = [PathStep(k[2], k[3], k[0], k[1]) for k in keys if k[0] != SOURCE and k[1] != SINK]
    if not steps:
        return None
    return CarbonPath(steps, width, width / carbon_in if carbon_in else 0.0,
                      [pathway.get(s.reaction, "") for s in steps])


def _a_cycle(edges: dict[tuple[str, str, str, int], float]) -> list[tuple[str, str, str, int]]:
    """A cycle of edges with positive flow (the flow left after the paths), or []: from the
    edge of most flow, follow the largest outgoing edge until a compound repeats."""
    live = {k: f for k, f in edges.items() if f > FLOW_TOLERANCE and SOURCE not in k[:2]
            and SINK not in k[:2]}
    if not live:
        return []
    out: dict[str, list] = {}
    for k, f in live.items():
        out.setdefault(k[0], []).append(k)
    start = max(live, key=lambda k: (live[k], k[2]))
    walk, seen = [start], {start[0]: 0}
    while walk[-1][1] not in seen:
        seen[walk[-1][1]] = len(walk)
        nxt = out.get(walk[-1][1])
        if not nxt:
            return []   # flow that ends nowhere: an unbalanced reaction, left unassigned
        walk.append(max(nxt, key=lambda k: (live[k], k[2])))
    return walk[seen[walk[-1][1]]:]


def main_path(routes: CarbonRoutes) -> CarbonPath | None:
    """The path that carries the most carbon (the first found), or None."""
    return max(routes.paths, key=lambda p: p.carbon_flux, default=None)


def steps_share_carbon(steps: Sequence[PathStep], carbon: Mapping[str, float], model) -> bool:
    """Whether each step's carbon product is a carbon substrate of the next step (a connected
    path), checked against the reactions' equations."""
    for a, b in zip(steps, steps[1:]):
        if a.compound_out != b.compound_in or carbon.get(a.compound_out, 0.0) <= 0:
            return False
        ra, rb = model.reactions.get_by_id(a.reaction), model.reactions.get_by_id(b.reaction)
        made = {m.id for m, c in ra.metabolites.items() if c * a.direction > 0}
        used = {m.id for m, c in rb.metabolites.items() if c * b.direction < 0}
        if a.compound_out not in made or a.compound_out not in used:
            return False
    return True
