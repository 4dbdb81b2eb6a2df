"""Step: every carbon-fixation route of the network alone, side by side
(:mod:`tfa.analyses.route_comparison`): verdict, driving force, H2 threshold, the energy budget per
carbon fixed, the carbon entries, what binds and the distance to a flipped verdict; table
``route_comparison`` and its figure."""

from __future__ import annotations

from ...analyses.route_comparison import (RouteAnswer, compare_routes, comparison_table,
                                          comparison_words)
from ..context import RunContext
from ..step import FigureSpec, Section, Step


class RouteComparisonStep(Step):
    """Which route can be the only entry of carbon, and at what cost in H2."""

    id = "route_comparison"
    label = "route comparison"
    title = "Carbon-fixation routes side by side"
    question = ("which carbon-fixation route meets the demand as the only entry of carbon from "
                "CO2, how far downhill, with which steps uphill, from which H2 supply, at what "
                "cost in H2 and ATP per carbon fixed, set by what, and how sure")

    def run(self, ctx: RunContext) -> list[RouteAnswer]:
        from ...network.routes import network_routes

        if ctx.skipped_as_not_applicable("route comparison"):
            return []
        tm = ctx.thermo_model(ctx.settings.mode)
        routes, carbon = network_routes(tm.model, ctx.settings.route_file,
                                        getattr(ctx.inputs, "network_folder", None))
        # the whole network's distance to a flipped verdict, when the assessment has it
        network_margin = (ctx.results.get("verdict_margins") or {}).get(ctx.settings.mode)
        return ctx.attempt("route comparison", lambda: compare_routes(
            tm, routes, carbon, ctx.options, ctx.settings.h2_range,
            progress=lambda done, total, words: ctx.tick(done, total, f"routes ({words})"),
            network_margin=network_margin)) or []

    def tables(self, result: list[RouteAnswer], ctx: RunContext) -> dict:
        return {"route_comparison": comparison_table(result)} if result else {}

    def figures(self, result: list[RouteAnswer], ctx: RunContext) -> dict:
        if not result:
            return {}
        table = comparison_table(result)
        unit = next((a.h2_unit for a in result if a.h2_unit), "mol/L")
        h2 = ctx.h2_id()
        setting = ctx.environment.feed.get(h2) if h2 else None

        def make():
            from ...report.route_figure import route_comparison_figure

            return route_comparison_figure(table, ctx.settings.h2_range, setting, unit,
                                           title=f"Carbon-fixation routes alone, {ctx.settings.mode} mode")

        return {"route_comparison": FigureSpec(
            make, "Each route as the only entry of carbon: verdict (max-min driving force or "
                  "steps uphill), the H2 window in which it runs, H2 and ATP per carbon fixed, "
                  "and the distance to a flipped verdict")}

    def summary_lines(self, result: list[RouteAnswer], ctx: RunContext) -> list[str]:
        return [f"route {comparison_words(a)}" for a in result]

    def summary_data(self, result: list[RouteAnswer], ctx: RunContext) -> dict:
        if not result:
            return {}
        return {"routes_feasible": {a.route.id: a.feasible for a in result}}

    def verification(self, result: list[RouteAnswer], ctx: RunContext) -> dict:
        return {a.route.id: dict(a.verification) for a in result}

    def sections(self, result: list[RouteAnswer], ctx: RunContext) -> list[Section]:
        if not result:
            return []
        text = (" ".join(self.summary_lines(result, ctx)) + " Each route is the only entry of "
                "carbon from CO2: every other reaction that consumes CO2 is closed in that "
                "direction (closed_entries); carbon_entries and route_carbon_share show where the "
                "carbon of the route's steady state came in. The energy budget is per carbon "
                "fixed (per mol C taken up from the feed), at the route's own certified steady "
                "state (the max-min driving-force point, or the point of its first minimal "
                "uphill set; column solution) at its least total flux; gradient_share is the "
                "part of the net ΔrG' paid by protons entering. h2_threshold_binding and "
                "driving_force_binding name the first two constraints by the dual values of the "
                "linear program with the optimum's flux pattern fixed, each confirmed by "
                "re-solving; margin_sigma is the distance to a flipped verdict in σ of the "
                "energies' sources (an exact minimum for an infeasible route, an upper bound for "
                "a feasible one), not asked of a route whose demand cannot be met at all.")
        return [Section(self.title, text, tables=[("route_comparison", "Routes side by side")],
                        figures=[("route_comparison", "Routes side by side")])]

    def text(self, result: list[RouteAnswer], ctx: RunContext) -> str:
        from ...report.text import table_text

        if not result:
            return "route comparison: not asked (see notes)\n"
        table = comparison_table(result)[["route", "feasible", "driving_force_kJ_per_mol",
                                          "uphill_set_size", "h2_threshold", "h2_per_carbon",
                                          "atp_made_per_carbon", "atp_spent_per_carbon",
                                          "gradient_share", "route_carbon_share", "margin_sigma"]]
        return "\n".join(self.summary_lines(result, ctx)) + "\n\n" + table_text(table, "{:.3g}") + "\n"
