"""Step: ΔrG' of each step along the carbon-fixation route, at the concentrations of one certified
steady state (the reference solution of :func:`.driving_force.reference_solution`)."""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from ...analyses.route import PROFILE_COLUMNS, energy_profile, route_reactions
from ..context import RunContext
from ..step import FigureSpec, Section, Step
from .driving_force import reference_solution


@dataclass
class ProfileResult:
    """The energy profile and what it was computed from.

    Attributes
    ----------
    route : list of (str, int)
        Reaction ids and directions, in carbon order.
    route_source : str
        Where the route came from (named by the user, or the tagged route that carries flux).
    reference : DrivingForceResult or None
        The steady state whose concentrations are used.
    reference_words : str
        That steady state in words.
    table : DataFrame
        One row per step (:data:`tfa.analyses.route.PROFILE_COLUMNS`).
    """

    route: list[tuple[str, int]] = field(default_factory=list)
    route_source: str = ""
    reference: object | None = None
    reference_words: str = ""
    table: pd.DataFrame = field(default_factory=lambda: pd.DataFrame(columns=PROFILE_COLUMNS))


class EnergyProfileStep(Step):
    """The energy profile along the route from H2 + CO2 to pyruvate (or a named route)."""

    id = "energy_profile"
    label = "energy profile"
    title = "Energy profile"
    question = "how does ΔrG' fall along the carbon-fixation route?"

    def run(self, ctx: RunContext) -> ProfileResult:
        if ctx.skipped_as_not_applicable("energy profile"):
            return ProfileResult()
        tm = ctx.thermo_model(ctx.settings.mode)
        reference, words = reference_solution(ctx)
        concentrations: dict[str, float] = {}
        fluxes = None
        if reference is not None:
            ref = reference.concentrations
            concentrations = dict(zip(ref["compound"], ref["ln_activity"]))
            table = reference.to_frame()
            fluxes = dict(zip(table["reaction"], table["flux"]))
        result = ProfileResult(reference=reference, reference_words=words)
        if ctx.settings.route is not None:
            result.route, result.route_source = list(ctx.settings.route), "given with --route"
        else:
            result.route = route_reactions(tm.model, tm.demand_id, fluxes=fluxes)
            result.route_source = "acetyl-CoA pathway to pyruvate"
            if not result.route:
                ctx.note("no route from the feed to pyruvate through reactions tagged with the "
                         "acetyl-CoA pathway or pyruvate synthesis: no energy profile (name the "
                         "route with --route R1,R2,...)")
        result.table = energy_profile(tm, result.route, concentrations)
        return result

    def tables(self, result: ProfileResult, ctx: RunContext) -> dict:
        return {"energy_profile": result.table}

    def verification(self, result: ProfileResult, ctx: RunContext) -> dict:
        return dict(getattr(result.reference, "verification", {}) or {})

    def figures(self, result: ProfileResult, ctx: RunContext) -> dict:
        if not len(result.table):
            return {}

        def make():
            from ...report.figures import energy_profile_figure

            return energy_profile_figure(result.table, f"Energy profile along the route, "
                                                       f"{ctx.settings.mode} mode")

        return {"energy_profile": FigureSpec(make, "Cumulative ΔrG' along the route (kJ/mol)")}

    def sections(self, result: ProfileResult, ctx: RunContext) -> list[Section]:
        if not len(result.table):
            return []
        return [Section(self.title, f"Route ({result.route_source}): "
                        + ", ".join(result.table["step"]) + f". ΔrG' at the concentrations of "
                        f"{result.reference_words}; ΔrG'° dashed.",
                        tables=[("energy_profile", "Route steps (kJ/mol)")],
                        figures=[("energy_profile", "Cumulative ΔrG' along the route (kJ/mol)")])]
