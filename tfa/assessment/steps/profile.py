"""Step: ΔrG' of each step along one connected carbon path that carries flux in a certified
steady state (the reference solution of :func:`.driving_force.reference_solution`), or along the
route the user names; steps shown one by one, never summed."""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from ...analyses.carbon_paths import CarbonPath, carbon_routes, main_path, transferable_carbon
from ...analyses.route import (PROFILE_COLUMNS, connect_steps, energy_profile,
                               near_equilibrium_limit)
from ...analyses.steady_state import least_flux_state
from ...errors import ComputationError, InputError
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
        Where the route came from (the widest carbon path of the steady state, or named).
    reference : DrivingForceResult or None
        The steady state whose concentrations and fluxes are used.
    reference_words : str
        That steady state in words.
    path : CarbonPath or None
        The carbon path followed (None for a named route).
    notes : list of str
        Named steps that carry no flux, places where the named route is broken.
    table : DataFrame
        One row per step (:data:`tfa.analyses.route.PROFILE_COLUMNS`).
    """

    route: list[tuple[str, int]] = field(default_factory=list)
    route_source: str = ""
    reference: object | None = None
    reference_words: str = ""
    path: CarbonPath | None = None
    notes: list[str] = field(default_factory=list)
    near_equilibrium_kJ_per_mol: float = float("nan")
    table: pd.DataFrame = field(default_factory=lambda: pd.DataFrame(columns=PROFILE_COLUMNS))


class EnergyProfileStep(Step):
    """The energy profile along the widest carbon path of the steady state (or a named route)."""

    id = "energy_profile"
    label = "energy profile"
    title = "Energy profile"
    question = "how far downhill does each step of the carbon path that ran go?"

    def run(self, ctx: RunContext) -> ProfileResult:
        if ctx.skipped_as_not_applicable("energy profile"):
            return ProfileResult()
        tm = ctx.thermo_model(ctx.settings.mode)
        reference, words = reference_solution(ctx)
        result = ProfileResult(reference=reference, reference_words=words,
                               near_equilibrium_kJ_per_mol=near_equilibrium_limit(tm))
        if reference is None:
            ctx.note("no steady state to draw the energy profile from")
            return result
        ref = reference.concentrations
        concentrations = dict(zip(ref["compound"], ref["ln_activity"]))
        solution = getattr(reference, "solution", None)
        if solution is not None:   # every reaction's flux, the boundaries and the demand too
            fluxes = dict(zip(solution.reaction_ids, map(float, solution.fluxes)))
        else:
            table = reference.to_frame()
            fluxes = dict(zip(table["reaction"], table["flux"].astype(float)))
        carbon = transferable_carbon(tm.model)
        if ctx.settings.route is not None:
            result.route, result.route_source = list(ctx.settings.route), "named with --route"
            steps, breaks = connect_steps(tm.model, result.route, carbon)
            result.notes += [f"the named route is broken: {b}" for b in breaks]
            idle = [rid for rid, _ in result.route if abs(fluxes.get(rid, 0.0)) <= 1e-12]
            if idle:
                result.notes.append(
                    f"{', '.join(idle)} carr{'ies' if len(idle) == 1 else 'y'} no flux in this steady "
                    "state: ΔrG' is what the step would have at its concentrations, not a step that ran")
            result.table = energy_profile(tm, steps, concentrations, fluxes)
            return result
        try:
            fluxes = least_flux_state(tm.model, fluxes, set(tm.energies)).fluxes
        except ComputationError as err:
            ctx.note(f"energy profile: {err}; the path is read from the steady state as it is")
        try:
            path = main_path(carbon_routes(tm.model, fluxes, tm.demand_id))
        except InputError as err:
            ctx.note(f"energy profile: {err}")
            path = None
        if path is None:
            ctx.note("no carbon path from the feed to the demand carries flux: no energy profile "
                     "(name a route with --route R1,R2,...)")
            return result
        result.path = path
        result.route = [(s.reaction, s.direction) for s in path.steps]
        result.route_source = (f"the widest carbon path of the steady state, {' → '.join(path.compounds)}"
                               f" ({100 * path.share:.0f} % of the carbon taken up)")
        steps = [(s.reaction, s.direction, s.compound_in, s.compound_out) for s in path.steps]
        result.table = energy_profile(tm, steps, concentrations, fluxes, path.carbon_flux)
        return result

    def tables(self, result: ProfileResult, ctx: RunContext) -> dict:
        return {"energy_profile": result.table}

    def summary_data(self, result: ProfileResult, ctx: RunContext) -> dict:
        if not len(result.table):
            return {}
        return {"profile_path": {"source": result.route_source,
                                 "steps": list(result.table["step"]), "notes": list(result.notes)}}

    def summary_lines(self, result: ProfileResult, ctx: RunContext) -> list[str]:
        return [f"energy profile: {note}" for note in result.notes]

    def verification(self, result: ProfileResult, ctx: RunContext) -> dict:
        return dict(getattr(result.reference, "verification", {}) or {})

    def figures(self, result: ProfileResult, ctx: RunContext) -> dict:
        if not len(result.table) or result.table["delta_g_kJ_per_mol"].isna().any():
            return {}
        caption = (f"ΔrG' of each step (bar) with ±σ of ΔrG'° (whisker); near equilibrium: "
                   f"|ΔrG'| < RT ln 10 = {result.near_equilibrium_kJ_per_mol:.1f} kJ/mol")

        def make():
            from ...report.figures import energy_profile_figure

            return energy_profile_figure(result.table, f"Energy profile, {ctx.settings.mode} mode",
                                         result.near_equilibrium_kJ_per_mol)

        return {"energy_profile": FigureSpec(make, caption)}

    def sections(self, result: ProfileResult, ctx: RunContext) -> list[Section]:
        if not len(result.table):
            return []
        from ...network.standard_states import standard_state_words

        text = (f"Route ({result.route_source}): " + ", ".join(result.table["step"])
                + f". ΔrG' at the concentrations of {result.reference_words}; flux is each "
                "reaction's flux there, carbon_flux_per_demand the carbon the path carries. "
                + standard_state_words(ctx.model, ctx.database)
                + (" " + " ".join(n[0].upper() + n[1:] + "." for n in result.notes)
                   if result.notes else ""))
        figures = [("energy_profile", spec.caption) for spec in self.figures(result, ctx).values()]
        return [Section(self.title, text, tables=[("energy_profile", "Steps of the path (kJ/mol)")],
                        figures=figures)]
