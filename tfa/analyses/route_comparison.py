"""Carbon-fixation routes side by side: each route alone as the entry of carbon from CO2
(:func:`tfa.network.routes.route_only`), asked the same questions as the whole network.

Per route: feasible or not (thermodynamics-based flux analysis, Henry, Broadbelt &
Hatzimanikatis 2007, Biophys. J. 92:1792), the max-min driving force B (Noor et al. 2014, PLoS
Comput. Biol. 10:e1003483; kJ/mol) when feasible, the minimal uphill set when not, and the least H2
at which it runs (one MILP minimising ln[H2] over the H2 range; mol/L, or bar for a gas feed).
Every answer is certified or proven by the analysis that gives it (tfa.analyses.feasibility,
driving_force, hydrogen).

What separates the routes, from each route's own certified steady state (the max-min
driving-force point when the route runs downhill, else the point of its first minimal uphill set),
taken at its least total flux over the same directions and concentrations
(:mod:`tfa.analyses.steady_state`):

- the **energy budget per carbon fixed** (:mod:`tfa.analyses.budget`), every amount divided by
  the carbon taken up from the feed, n_C [mol C per unit of demand]: H2 per carbon
  h2_per_carbon = n_H2 / n_C, ATP made and spent per carbon, ATP_made / n_C and ATP_spent / n_C,
  and ΔG_net / n_C [kJ per mol C], with the share of ΔG_net paid by the proton gradient,
  gradient_share = n_H e_H / ΔG_net (the rest is the feed chemistry);
- the **carbon entries** (:func:`tfa.analyses.carbon_paths.carbon_graph`): the share of the carbon
  leaving the carbon source through each reaction, f(co2 -> p, j) / Σ f(co2 -> ., .), and the
  share through the route's own reactions (route_carbon_share; the rest went through the shared
  entries), so a reader sees that the route was the only entry;
- the **binding constraints** of the route's H2 threshold and max-min driving force: the dual
  values of the linear program with the optimum's flux pattern fixed (:mod:`tfa.analyses.binding`;
  the first two named, each confirmed by re-solving with its datum moved both ways, "proven"
  when both lie between the one-sided derivatives; the rows not named are not re-solved);
- the **distance to a flipped verdict** (:mod:`tfa.analyses.margins`): the least change of the
  energies, in σ of their sources (L1), that flips the route's verdict, and the sources carrying
  it. Not asked of a route whose demand cannot be met at all (nothing to flip). A feasible
  verdict's distance is a verified flip, an upper bound; closing the other carbon entries only
  removes steady states, so a change that leaves the whole network no steady state leaves the
  route none either, and the whole network's flip is taken when it is the smaller
  (:func:`compare_routes` asks it once, or reads it from the assessment).

Example (hand-derived, tests/test_route_comparison.py): CO2 reduced to D by two H2 (route P),
or carboxylated with one ATP (made back from pyrophosphate) and reduced by one H2 (route Q):
h2_per_carbon 2 and 1, ATP made and spent per carbon 0 and 1.
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..errors import ComputationError, InputError
from ..network.routes import Route, route_only
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions
from ..problem.sensitivity import ZERO_DUAL
from ..vocabulary import DEFAULT_H2_RANGE
from .budget import EnergyBudget, energy_budget
from .carbon_paths import carbon_graph
from .margins import MarginResult, verdict_margin
from .route import delta_g_at
from .steady_state import least_flux_state

log = logging.getLogger(__name__)

#: Columns of the ``route_comparison`` table (one row per route).
ROUTE_COMPARISON_COLUMNS = ["route", "name", "reactions", "closed_entries", "feasible",
                            "driving_force_kJ_per_mol", "uphill_set_size", "uphill_set",
                            "h2_threshold", "h2_unit", "h2_per_carbon", "atp_made_per_carbon",
                            "atp_spent_per_carbon", "delta_g_net_kJ_per_carbon", "gradient_share",
                            "carbon_entries", "route_carbon_share", "h2_threshold_binding",
                            "driving_force_binding", "margin_sigma", "margin_status",
                            "carried_by", "solution", "message", "verification"]
#: Binding constraints named per answer.
BINDING_SHOWN = 2


@dataclass
class RouteAnswer:
    """The answers for one route (see the module text).

    ``budget`` is the energy budget of the route's steady state (None when it has none: demand
    impossible, undetermined, or not asked); ``entries`` reaction -> share of the carbon taken
    from the carbon source through it; ``binding`` answer ("h2_threshold", "driving_force") ->
    the constraints named first (words, dual value, its unit); ``margin`` the distance to a flipped verdict
    (``margin_of_network``: the whole network's flip, the smaller); ``not_asked``
    what was not asked or not computed for this route, and why.
    """

    route: Route
    closed: list[str] = field(default_factory=list)
    feasible: bool | None = None
    driving_force: float = float("nan")
    bottlenecks: list[str] = field(default_factory=list)
    uphill_set: list[str] = field(default_factory=list)
    uphill_set_size: int | None = None
    h2_threshold: float = float("nan")
    h2_unit: str = ""
    h2_message: str = ""
    message: str = ""
    verification: dict = field(default_factory=dict)
    budget: EnergyBudget | None = None
    solution: str = ""
    entries: dict[str, float] = field(default_factory=dict)
    route_carbon_share: float = float("nan")
    binding: dict[str, list[tuple[str, float, str]]] = field(default_factory=dict)
    margin: MarginResult | None = None
    margin_of_network: bool = False
    not_asked: list[str] = field(default_factory=list)

    def per_carbon(self, amount: float) -> float:
        """An amount per unit of demand divided by the carbon taken up (mol C per unit of
        demand); NaN without a budget or carbon."""
        b = self.budget
        if b is None or not b.carbon_taken_up > 0 or not math.isfinite(amount):
            return math.nan
        return amount / b.carbon_taken_up

    @property
    def gradient_share(self) -> float:
        """Share of the net ΔrG' paid by the proton gradient (n_H e_H / ΔG_net); NaN without a
        budget or when the net reaction gives out no energy."""
        b = self.budget
        if b is None or not b.delta_g_net < 0:
            return math.nan
        return b.gradient / b.delta_g_net + 0.0   # + 0.0: no gradient gives 0, not -0

    def entry_words(self, shown: int = 3) -> str:
        """The carbon entries, largest first: "PFOR 60 %, PC 40 %"."""
        items = list(self.entries.items())
        words = ", ".join(f"{rid} {100 * share:.0f} %" for rid, share in items[:shown])
        return words + (f" and {len(items) - shown} more" if len(items) > shown else "")

    def binding_words(self, answer: str) -> str:
        """The binding constraints of one answer with their dual values: "the lower bound of D
        (+0.5 d ln[H2] per unit ln c); ..."."""
        return "; ".join(f"{what} ({s:+.3g} {unit})" for what, s, unit in self.binding.get(answer, []))

    def row(self) -> dict:
        checks = "; ".join(f"{k}: {v}" for k, v in self.verification.items())
        b = self.budget
        margin = self.margin
        notes = "; ".join(self.not_asked + (["margin: the whole network's flip, smaller than the "
                                             "route's own"] if self.margin_of_network else []))
        return {"route": self.route.id, "name": self.route.name,
                "reactions": len(self.route.reactions), "closed_entries": ", ".join(self.closed),
                "feasible": self.feasible, "driving_force_kJ_per_mol": self.driving_force,
                "uphill_set_size": self.uphill_set_size, "uphill_set": ", ".join(self.uphill_set),
                "h2_threshold": self.h2_threshold, "h2_unit": self.h2_unit,
                "h2_per_carbon": b.h2_per_carbon if b is not None else math.nan,
                "atp_made_per_carbon": self.per_carbon(b.atp_made) if b is not None else math.nan,
                "atp_spent_per_carbon": self.per_carbon(b.atp_spent) if b is not None else math.nan,
                "delta_g_net_kJ_per_carbon": (self.per_carbon(b.delta_g_net) if b is not None
                                              else math.nan),
                "gradient_share": self.gradient_share,
                "carbon_entries": self.entry_words(shown=len(self.entries)),
                "route_carbon_share": self.route_carbon_share,
                "h2_threshold_binding": self.binding_words("h2_threshold"),
                "driving_force_binding": self.binding_words("driving_force"),
                "margin_sigma": margin.distance if margin is not None else math.nan,
                "margin_status": margin.status if margin is not None else "",
                "carried_by": ", ".join(margin.carried_by()) if margin is not None else "",
                "solution": self.solution,
                "message": self.message + (f" ({notes})" if notes else ""),
                "verification": checks}


def compare_route(tm: ThermoModel, route: Route, carbon, options: ProblemOptions | None = None,
                  h2_range: tuple[float, float] = DEFAULT_H2_RANGE, stage=None,
                  budget: bool = True, binding: bool = True, margins: bool = True,
                  network_margin: MarginResult | None = None) -> RouteAnswer:
    """The questions of the module text for one route (the model is restored afterwards);
    ``stage(words)`` is told before each question. ``budget``, ``binding`` and ``margins`` ask
    the energy budget with the carbon entries, the binding constraints and the distance to a
    flipped verdict (each may be left out, e.g. to measure what it costs); ``network_margin``
    is the whole network's distance to a flipped verdict in the same mode (module text)."""
    from .driving_force import network_driving_force
    from .feasibility import feasibility
    from .hydrogen import h2_threshold

    answer = RouteAnswer(route)
    stage = stage or (lambda words: None)
    options = options or ProblemOptions()
    mode = tm.mode
    with route_only(tm.model, route, carbon) as closed:
        answer.closed = closed
        stage("feasibility")
        try:
            verdict = feasibility(tm, options, alternatives=1)
        except ComputationError as err:
            answer.message = f"undetermined: {err}"
            return answer
        answer.feasible = verdict.feasible
        answer.verification["feasibility"] = verdict.verification.get("status", "")
        answer.message = verdict.message
        mdf = None
        point = None
        if verdict.demand_impossible:
            answer.message = "the demand cannot be met through this route alone: " + verdict.message
        elif verdict.feasible:
            answer.uphill_set_size = 0
            stage("driving force")
            try:
                mdf = network_driving_force(tm, options)
                answer.driving_force = mdf.driving_force
                answer.bottlenecks = list(mdf.bottlenecks)
                answer.verification["driving force"] = mdf.verification.get("status", "")
                point = _solution_point(tm, mdf.solution, "the route's max-min driving-force "
                                        "steady state", mdf.verification)
            except ComputationError as err:
                log.info("route %s: driving force not computed (%s)", route.id, err)
            if point is None and verdict.solution is not None:
                point = _solution_point(tm, verdict.solution, "the route's certified steady state "
                                        "of the feasibility question", verdict.verification)
        elif verdict.diagnosis is not None and verdict.diagnosis.sets:
            answer.uphill_set = list(verdict.diagnosis.sets[0])
            answer.uphill_set_size = verdict.diagnosis.size
            if verdict.diagnosis.points:
                reactions, concentrations = verdict.diagnosis.points[0]
                point = _frame_point(tm, reactions, concentrations,
                                     f"the route's certified steady state of its minimal uphill "
                                     f"set ({', '.join(answer.uphill_set)} run uphill)",
                                     verdict.diagnosis.verification)
        threshold = None
        if not verdict.demand_impossible:
            stage("H2 threshold")
            try:
                threshold = h2_threshold(tm, options, h2_range=h2_range)
                answer.h2_unit = threshold.unit
                answer.h2_message = threshold.message
                answer.verification["H2 threshold"] = threshold.verification.get("status", "")
                if threshold.feasible:
                    answer.h2_threshold = threshold.threshold
            except (ComputationError, InputError) as err:
                answer.h2_message = f"not computed ({err})"
        if budget and point is not None:
            stage("energy budget")
            _fill_budget(tm, answer, carbon, *point)
        if binding:
            stage("binding constraints")
            _fill_binding(tm, answer, options, mode, mdf, threshold, h2_range)
        if margins and verdict.demand_impossible:
            answer.not_asked.append("not asked: distance to a flipped verdict (the demand "
                                    "cannot be met at all, whatever the energies)")
        elif margins:
            stage("distance to a flipped verdict")
            try:
                own = verdict_margin(tm, options, verdict.feasible)
                answer.margin = _smaller_flip(own, network_margin)
                answer.margin_of_network = answer.margin is not own
                answer.verification["margin"] = answer.margin.verification.get("status", "")
            except ComputationError as err:
                answer.not_asked.append(f"not computed: distance to a flipped verdict ({err})")
    return answer


def _smaller_flip(own: MarginResult, network: MarginResult | None) -> MarginResult:
    """The route's own flip, or the whole network's when the route is feasible and that one is
    smaller (it flips the route too: module text)."""
    if (network is None or not own.feasible or not network.feasible
            or not math.isfinite(network.distance)
            or (math.isfinite(own.distance) and own.distance <= network.distance)):
        return own
    found = (f"{own.distance:.3g}σ" if math.isfinite(own.distance) else own.status)
    taken = replace(network, mode=own.mode)
    taken.verification = dict(network.verification)
    taken.verification["check"] = (
        f"the whole network's flip ({network.verification.get('check', '')}): closing the other "
        "carbon entries only removes steady states, so the route has none at those energies "
        f"either; the route's own search found {found}")
    return taken


def _solution_point(tm: ThermoModel, solution, words: str, checked: dict):
    """(fluxes, ΔrG', ln activity, words, verification) of a certified solution: ΔrG' recomputed
    from its concentrations (ΔrG'° + slack + RT Σ ν ln a)."""
    if solution is None:
        return None
    ln_activity = {m: float(x) for m, x in zip(solution.metabolite_ids, solution.log_conc)}
    slack = dict(zip(solution.energy_ids, np.asarray(solution.slack, float)))
    delta_g = {}
    for rid in solution.energy_ids:
        g = delta_g_at(tm, rid, ln_activity)
        if math.isfinite(g):
            delta_g[rid] = g + float(slack.get(rid, 0.0))
    fluxes = dict(zip(solution.reaction_ids, map(float, solution.fluxes)))
    return fluxes, delta_g, ln_activity, words, checked


def _frame_point(tm: ThermoModel, reactions: pd.DataFrame, concentrations: pd.DataFrame,
                 words: str, checked: dict):
    """The same from the tables of a certified point (a minimal uphill set's)."""
    fluxes = dict(zip(reactions["reaction"], reactions["flux"].astype(float)))
    ln_activity = dict(zip(concentrations["compound"], concentrations["ln_activity"].astype(float)))
    delta_g = {}
    for rid in fluxes:
        g = delta_g_at(tm, rid, ln_activity)
        if math.isfinite(g):
            delta_g[rid] = g
    if "delta_g_kJ_per_mol" in reactions:
        for rid, g in zip(reactions["reaction"], reactions["delta_g_kJ_per_mol"]):
            if g is not None and math.isfinite(float(g)):
                delta_g[rid] = float(g)
    return fluxes, delta_g, ln_activity, words, checked


def _fill_budget(tm: ThermoModel, answer: RouteAnswer, carbon, fluxes: dict, delta_g: dict,
                 ln_activity: dict, words: str, checked: dict) -> None:
    """The route's energy budget and carbon entries at the least total flux of its point."""
    check = str(checked.get("check", ""))
    try:
        least = least_flux_state(tm.model, fluxes, set(delta_g))
        fluxes = least.fluxes
        words += ", at its least total flux over the same directions and concentrations"
        check = f"{least.check}; the point: {check}"
    except ComputationError as err:
        answer.not_asked.append(f"not computed: least-flux form of the steady state ({err}; the "
                                "budget uses the certified point as it is)")
    answer.solution = words
    status = checked.get("status", "certified") or "certified"
    try:
        answer.budget = energy_budget(tm, fluxes, delta_g, ln_activity, words,
                                      {"status": status, "check": check})
        edges, _, _ = carbon_graph(tm.model, fluxes, tm.demand_id)
    except InputError as err:
        answer.not_asked.append(f"not computed: energy budget ({err})")
        return
    answer.verification["energy budget"] = status
    entries: dict[str, float] = {}
    for (source, _, rid, _), flow in edges.items():
        if source == carbon.id and flow > 0:
            entries[rid] = entries.get(rid, 0.0) + flow
    total = sum(entries.values())
    if total > 0:
        answer.entries = {rid: f / total for rid, f in
                          sorted(entries.items(), key=lambda kv: (-kv[1], kv[0]))}
        own = set(answer.route.reactions)
        answer.route_carbon_share = sum(f for rid, f in answer.entries.items() if rid in own)


def _fill_binding(tm: ThermoModel, answer: RouteAnswer, options: ProblemOptions, mode: str,
                  mdf, threshold, h2_range: tuple[float, float]) -> None:
    """The first :data:`BINDING_SHOWN` constraints of the route's H2 threshold and max-min
    driving force (dual values of the pattern LP, tfa.analyses.binding)."""
    from .binding import BindingResult, binding_frame, optimum_constraints

    asked = []
    if threshold is not None and threshold.feasible and threshold.solution is not None:
        h2 = threshold.h2_id
        overrides = dict(options.log_bound_overrides)
        overrides[h2] = (math.log(h2_range[0]), math.log(h2_range[1]))
        opts = replace(options, log_bound_overrides=overrides, uphill=False, driving_force=False)
        asked.append(("h2_threshold", lambda: optimum_constraints(
            tm, threshold.solution, opts, mode, "h2_threshold", ("ln_activity", h2), "min",
            range_compound=h2, unit=threshold.unit, confirm=BINDING_SHOWN)))
    if mdf is not None and mdf.solution is not None:
        asked.append(("driving_force", lambda: optimum_constraints(
            tm, mdf.solution, options, mode, "driving_force", ("driving_force", None), "max",
            confirm=BINDING_SHOWN)))
    for name, ask in asked:
        try:
            rows, _ = ask()
        except (ComputationError, InputError) as err:
            answer.not_asked.append(f"not computed: binding constraints of the "
                                    f"{name.replace('_', ' ')} ({err})")
            continue
        table = BindingResult(conditions=tm.conditions, table=binding_frame(rows)).table
        moving = table[table["sensitivity"].abs() > ZERO_DUAL].sort_values("rank")
        named = moving.head(BINDING_SHOWN)
        answer.binding[name] = [(constraint_words(r), float(r["sensitivity"]),
                                 str(r["sensitivity_unit"])) for _, r in named.iterrows()]
        # each dual named is re-solved with its datum moved both ways (tfa.analyses.binding)
        confirmed = bool(len(named)) and all(named["dual_confirmed"] == True)  # noqa: E712
        answer.verification[f"binding ({name.replace('_', ' ')})"] = (
            "proven" if confirmed else "solver proof")


def constraint_words(row) -> str:
    """One row of the binding_constraints table in a few words: "the lower bound of D"."""
    kind, compound, reaction, bound = row["kind"], row["compound"], row["reaction"], row["bound"]
    return {"concentration bound": f"the {bound} bound of {compound}",
            "fed concentration": f"the fed {compound}",
            "range searched": f"the {'bottom' if bound == 'lower' else 'top'} of the H2 range",
            "carrier state": f"the carrier state {compound} ({bound} end)",
            "reaction energy": f"ΔrG'° of {reaction}",
            "least driving force": "the least driving force"}.get(kind, str(kind))


def compare_routes(tm: ThermoModel, routes: list[Route], carbon,
                   options: ProblemOptions | None = None,
                   h2_range: tuple[float, float] = DEFAULT_H2_RANGE,
                   progress=None, budget: bool = True, binding: bool = True,
                   margins: bool = True,
                   network_margin: MarginResult | None = None) -> list[RouteAnswer]:
    """:func:`compare_route` for every route, in order (``progress(done, total, words)`` before
    each question of each route). With ``margins``, the whole network's distance to a flipped
    verdict is asked once first unless given (``network_margin``, e.g. the assessment's)."""
    if not routes:
        raise InputError("no routes to compare: the network has no carbon-fixing pathway tag; "
                         "write a route file (routes.toml) beside it")
    if margins and network_margin is None:
        if progress is not None:
            progress(0, len(routes), "the whole network: distance to a flipped verdict")
        try:
            network_margin = verdict_margin(tm, options)
        except ComputationError as err:
            log.info("whole network: distance to a flipped verdict not computed (%s)", err)
    out = []
    for k, route in enumerate(routes):
        def stage(words: str, k: int = k, route: Route = route) -> None:
            if progress is not None:
                progress(k, len(routes), f"{route.id}: {words}")
        out.append(compare_route(tm, route, carbon, options, h2_range, stage, budget=budget,
                                 binding=binding, margins=margins, network_margin=network_margin))
    return out


def comparison_table(answers: list[RouteAnswer]) -> pd.DataFrame:
    """The ``route_comparison`` table."""
    return pd.DataFrame([a.row() for a in answers], columns=ROUTE_COMPARISON_COLUMNS)


def comparison_words(answer: RouteAnswer) -> str:
    """One route's answer in one line: the verdict, the least H2, the cost per carbon fixed and
    what binds."""
    if answer.feasible is None:
        return f"{answer.route.name}: {answer.message}"
    if answer.feasible:
        verdict = f"feasible alone (max-min driving force {answer.driving_force:.2f} kJ/mol)"
    elif answer.uphill_set:
        verdict = (f"infeasible alone ({answer.uphill_set_size} step(s) uphill: "
                   f"{', '.join(answer.uphill_set)})")
    else:
        verdict = "infeasible alone: " + answer.message
    h2 = (f"; runs from H2 = {answer.h2_threshold:.3g} {answer.h2_unit}"
          if math.isfinite(answer.h2_threshold) else
          ("; no H2 level in the range lets it run" if answer.h2_message.startswith("infeasible")
           else ""))
    return f"{answer.route.name}: {verdict}{h2}{cost_words(answer)}{binds_words(answer)}"


def cost_words(answer: RouteAnswer) -> str:
    """"; per carbon fixed 1.94 H2, 4.12 ATP made and 4.12 spent, the proton gradient pays 101 %
    of the net ΔrG' (the feed chemistry alone is uphill)", or "" without a budget."""
    b = answer.budget
    if b is None or not b.carbon_taken_up > 0:
        return ""
    words = (f"; per carbon fixed {b.h2_per_carbon:.3g} H2, {answer.per_carbon(b.atp_made):.3g} "
             f"ATP made and {answer.per_carbon(b.atp_spent):.3g} spent")
    share = answer.gradient_share
    if math.isfinite(share) and b.protons_in:
        words += f", the proton gradient pays {100 * share:.0f} % of the net ΔrG'"
        if b.feed_chemistry > 0:
            words += " (the feed chemistry alone is uphill)"
    return words


def binds_words(answer: RouteAnswer) -> str:
    """"; the H2 threshold is set by the upper bound of fdox", or ""."""
    named = answer.binding.get("h2_threshold") or []
    return f"; the H2 threshold is set by {named[0][0]}" if named else ""
