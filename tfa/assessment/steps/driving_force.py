"""Step: the max-min driving force of the network (and of a named route), and the steady state
whose concentrations the energy profile and the ranges figure show."""

from __future__ import annotations

from dataclasses import dataclass

from ...analyses.driving_force import DrivingForceResult, network_driving_force, pathway_driving_force
from ..context import RunContext
from ..step import Section, Step


@dataclass
class DrivingForceAnswer:
    """The network's max-min driving force and, when a route was named, the route's own."""

    network: DrivingForceResult | None
    route: DrivingForceResult | None = None


class DrivingForceStep(Step):
    """Max-min driving force (Noor et al. 2014, PLoS Comput. Biol. 10:e1003483)."""

    id = "driving_force"
    label = "driving force"
    title = "Driving force"
    question = "by how much can every step that carries flux run downhill at once?"

    def run(self, ctx: RunContext) -> DrivingForceAnswer:
        if ctx.skipped_as_not_applicable("driving force"):
            return DrivingForceAnswer(None)
        tm = ctx.thermo_model(ctx.settings.mode)
        network = ctx.attempt("driving force", lambda: network_driving_force(tm, ctx.options))
        route = None
        if ctx.settings.route:
            route = ctx.attempt("driving force of the route", lambda: pathway_driving_force(
                tm, dict(ctx.settings.route), ctx.options))
        return DrivingForceAnswer(network, route)

    def tables(self, result: DrivingForceAnswer, ctx: RunContext) -> dict:
        out = {}
        if result.network is not None:
            out["driving_force"] = result.network.to_frame()
        if result.route is not None:
            out["driving_force_route"] = result.route.to_frame()
        return out

    def summary_lines(self, result: DrivingForceAnswer, ctx: RunContext) -> list[str]:
        from ...report.text import driving_force_line

        lines = []
        for label, answer in (("", result.network), ("route ", result.route)):
            if answer is not None:
                lines.append(label + driving_force_line(answer.driving_force, answer.bottlenecks,
                                                        answer.verification.get("status", "")))
        return lines

    def summary_data(self, result: DrivingForceAnswer, ctx: RunContext) -> dict:
        out = {}
        if result.network is not None:
            out["driving_force_kJ_per_mol"] = result.network.driving_force
            out["bottlenecks"] = list(result.network.bottlenecks)
        if result.route is not None:
            out["route_driving_force_kJ_per_mol"] = result.route.driving_force
            out["route_bottlenecks"] = list(result.route.bottlenecks)
        return out

    def verification(self, result: DrivingForceAnswer, ctx: RunContext) -> dict:
        return {label: dict(answer.verification) for label, answer in
                (("network", result.network), ("route", result.route)) if answer is not None}

    def sections(self, result: DrivingForceAnswer, ctx: RunContext) -> list[Section]:
        if result.network is None and result.route is None:
            return []
        words = " ".join(r.summary() for r in (result.network, result.route) if r is not None)
        tables = []
        if result.network is not None:
            tables.append(("driving_force", "Reactions carrying flux at the max-min driving force "
                                            "(kJ/mol)"))
        if result.route is not None:
            tables.append(("driving_force_route", "The named route at its max-min driving force "
                                                  "(kJ/mol)"))
        return [Section(self.title, words + " (a negative value: the most uphill step cannot be "
                        "made less uphill than this).", tables=tables)]


def reference_solution(ctx: RunContext) -> tuple[DrivingForceResult | None, str]:
    """The steady state whose concentrations the energy profile and the ranges figure show, and
    its description: the max-min driving-force solution of the network when it is feasible in
    the analysis mode, else of the network with its first minimal uphill set allowed to run
    uphill."""

    def compute():
        plain = "the max-min driving-force solution of the network"
        answer = ctx.result_of("driving_force")
        mode = ctx.settings.mode
        feasibility = ctx.feasibility(mode)
        diagnosis = feasibility.diagnosis
        if feasibility.feasible or diagnosis is None or not diagnosis.sets or not diagnosis.sets[0]:
            return answer.network, plain
        members = diagnosis.sets[0]
        relaxed = ctx.thermo_model(mode).relax(members)
        reference = ctx.attempt("driving force with the minimal uphill set allowed",
                                lambda: network_driving_force(relaxed, ctx.options))
        return reference, (f"{plain} in which {', '.join(members)} (the minimal uphill set) may "
                           "run uphill")

    return ctx.cached("reference_solution", compute)
