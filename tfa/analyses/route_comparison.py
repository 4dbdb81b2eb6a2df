"""Carbon-fixation routes side by side: each route alone as the entry of carbon from CO2
(:func:`tfa.network.routes.route_only`), asked the same questions as the whole network.

Per route: feasible or not (thermodynamics-based flux analysis, Henry, Broadbelt &
Hatzimanikatis 2007, Biophys. J. 92:1792), the max-min driving force B (Noor et al. 2014, PLoS
Comput. Biol. 10:e1003483; kJ/mol) when feasible, the minimal uphill set when not, and the least H2
at which it runs (one MILP minimising ln[H2] over the H2 range; mol/L, or bar for a gas feed).
Every answer is certified or proven by the analysis that gives it (tfa.analyses.feasibility,
driving_force, hydrogen).

Hooks left for the analyses built elsewhere: the energy budget per pyruvate or per carbon fixed
(table ``energy_budget``) and the binding steps (table ``binding_constraints``) are
not columns here yet; :data:`ROUTE_COMPARISON_COLUMNS` is where they go.
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field

import pandas as pd

from ..errors import ComputationError, InputError
from ..network.routes import Route, route_only
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions
from ..vocabulary import DEFAULT_H2_RANGE

log = logging.getLogger(__name__)

#: Columns of the ``route_comparison`` table (one row per route).
ROUTE_COMPARISON_COLUMNS = ["route", "name", "reactions", "closed_entries", "feasible",
                            "driving_force_kJ_per_mol", "uphill_set_size", "uphill_set",
                            "h2_threshold", "h2_unit", "message", "verification"]


@dataclass
class RouteAnswer:
    """The answers for one route (see the module text)."""

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

    def row(self) -> dict:
        checks = "; ".join(f"{k}: {v}" for k, v in self.verification.items())
        return {"route": self.route.id, "name": self.route.name,
                "reactions": len(self.route.reactions), "closed_entries": ", ".join(self.closed),
                "feasible": self.feasible, "driving_force_kJ_per_mol": self.driving_force,
                "uphill_set_size": self.uphill_set_size, "uphill_set": ", ".join(self.uphill_set),
                "h2_threshold": self.h2_threshold, "h2_unit": self.h2_unit,
                "message": self.message, "verification": checks}


def compare_route(tm: ThermoModel, route: Route, carbon, options: ProblemOptions | None = None,
                  h2_range: tuple[float, float] = DEFAULT_H2_RANGE, stage=None) -> RouteAnswer:
    """The questions of the module text for one route (the model is restored afterwards);
    ``stage(words)`` is told before each question."""
    from .driving_force import network_driving_force
    from .feasibility import feasibility
    from .hydrogen import h2_threshold

    answer = RouteAnswer(route)
    stage = stage or (lambda words: None)
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
            except ComputationError as err:
                log.info("route %s: driving force not computed (%s)", route.id, err)
        elif verdict.diagnosis is not None and verdict.diagnosis.sets:
            answer.uphill_set = list(verdict.diagnosis.sets[0])
            answer.uphill_set_size = verdict.diagnosis.size
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
    return answer


def compare_routes(tm: ThermoModel, routes: list[Route], carbon,
                   options: ProblemOptions | None = None,
                   h2_range: tuple[float, float] = DEFAULT_H2_RANGE,
                   progress=None) -> list[RouteAnswer]:
    """:func:`compare_route` for every route, in order (``progress(done, total, words)`` before
    each question of each route)."""
    if not routes:
        raise InputError("no routes to compare: the network has no carbon-fixing pathway tag; "
                         "write a route file (routes.toml) beside it")
    out = []
    for k, route in enumerate(routes):
        def stage(words: str, k: int = k, route: Route = route) -> None:
            if progress is not None:
                progress(k, len(routes), f"{route.id}: {words}")
        out.append(compare_route(tm, route, carbon, options, h2_range, stage))
    return out


def comparison_table(answers: list[RouteAnswer]) -> pd.DataFrame:
    """The ``route_comparison`` table."""
    return pd.DataFrame([a.row() for a in answers], columns=ROUTE_COMPARISON_COLUMNS)


def comparison_words(answer: RouteAnswer) -> str:
    """One route's answer in one line."""
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
          (f"; no H2 level in the range lets it run" if answer.h2_message.startswith("infeasible")
           else ""))
    return f"{answer.route.name}: {verdict}{h2}"
