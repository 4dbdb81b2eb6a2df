"""Step: what each mode's steady state runs on: its energy budget (table ``energy_budget``) and the
routes that carry its carbon (table ``carbon_routes``).

The steady state of the mode of the single-mode analyses is the reference solution the energy
profile follows (the max-min driving-force solution, :func:`.driving_force.reference_solution`),
so the summary's route, the budget and the profile describe one steady state; of the other modes,
the certified point of the feasibility question (feasible) or of the first minimal uphill set
(infeasible). Each is taken at the least total flux over the same directions and concentrations
(:mod:`tfa.analyses.steady_state`); modes without such a point (demand impossible, undetermined,
not applicable) have no row.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import pandas as pd

from ...analyses.budget import BUDGET_COLUMNS, EnergyBudget, energy_budget
from ...analyses.carbon_paths import CARBON_ROUTE_COLUMNS, CarbonRoutes, carbon_routes, main_path
from ...analyses.route import delta_g_at
from ...analyses.steady_state import at_least_flux
from ..context import RunContext
from ..step import Section, Step


@dataclass
class SteadyStateAccount:
    """One mode's steady state: its fluxes, ΔrG' and activities, its budget and carbon routes."""

    mode: str
    words: str
    fluxes: dict[str, float]
    delta_g: dict[str, float]
    ln_activity: dict[str, float]
    budget: EnergyBudget | None = None
    routes: CarbonRoutes = field(default_factory=CarbonRoutes)


def steady_state_of(ctx: RunContext, mode: str) -> tuple[pd.DataFrame, pd.DataFrame, str, dict] | None:
    """(reaction table, concentration table, words, verification) of a mode's certified point:
    for the mode of the single-mode analyses, the reference solution the energy profile and the
    ranges figure show (the max-min driving-force solution); for the others the feasible point,
    or the point of the first minimal uphill set; None when there is none."""
    if ctx.not_applicable(mode):
        return None
    if mode == ctx.settings.mode:
        from .driving_force import reference_solution

        reference, words = reference_solution(ctx)
        solution = getattr(reference, "solution", None)
        if solution is not None:
            at = dict(zip(reference.table["reaction"], reference.table["delta_g_kJ_per_mol"]))
            reactions = pd.DataFrame({"reaction": list(solution.reaction_ids),
                                      "flux": [float(v) for v in solution.fluxes]})
            reactions["delta_g_kJ_per_mol"] = [at.get(r, math.nan) for r in reactions["reaction"]]
            return reactions, reference.concentrations, words, reference.verification
    result = ctx.feasibility(mode)
    if result.feasible and result.solution is not None:
        return (result.to_frame(), result.concentrations(),
                "the certified steady state of the feasibility question", result.verification)
    diagnosis = result.diagnosis
    if diagnosis is not None and diagnosis.points and diagnosis.sets:
        reactions, concentrations = diagnosis.points[0]
        members = ", ".join(diagnosis.sets[0])
        return (reactions, concentrations, f"the certified steady state of minimal uphill set 1 "
                f"({members} run uphill)", diagnosis.verification)
    return None


def account(ctx: RunContext, mode: str, reactions: pd.DataFrame, concentrations: pd.DataFrame,
            words: str, checked: dict) -> SteadyStateAccount:
    """Budget and carbon routes of one certified point, at its least total flux."""
    tm = ctx.thermo_model(mode)
    fluxes = dict(zip(reactions["reaction"], reactions["flux"].astype(float)))
    delta_g = {r: float(g) for r, g, has in zip(reactions["reaction"], reactions["delta_g_kJ_per_mol"],
                                                reactions.get("has_energy", [True] * len(reactions)))
               if has and math.isfinite(float(g))}
    ln_activity = dict(zip(concentrations["compound"], concentrations["ln_activity"].astype(float)))
    for rid, v in fluxes.items():   # a step allowed uphill has no energy in its relaxed problem
        if v and rid not in delta_g and rid in tm.energies:
            g = delta_g_at(tm, rid, ln_activity)
            if math.isfinite(g):
                delta_g[rid] = g
    fluxes, words, check, failed = at_least_flux(tm.model, fluxes, set(delta_g), words,
                                                 str(checked.get("check", "")))
    if failed:
        ctx.note(f"{mode}: {failed}; the budget and routes use the certified point as it is")
    verification = {"status": checked.get("status", "certified") or "certified", "check": check}
    out = SteadyStateAccount(mode, words, fluxes, delta_g, ln_activity)
    out.budget = energy_budget(tm, fluxes, delta_g, ln_activity, words, verification)
    out.routes = carbon_routes(tm.model, fluxes, tm.demand_id)
    if out.routes.unbalanced:
        ctx.note(f"carbon routes ({mode}): the carrier rule does not balance the carbon of "
                 f"{', '.join(out.routes.unbalanced)}; "
                 f"{out.routes.unassigned:.3g} mol C per unit of demand left unassigned")
    return out


class EnergyBudgetStep(Step):
    """Energy budget and carbon routes of each mode's steady state."""

    id = "energy_budget"
    label = "energy budget and carbon routes"
    title = "Energy budget and the routes that ran"
    question = ("what does each mode's steady state take in and give out, what pays for it, and "
                "which routes carry its carbon?")

    def run(self, ctx: RunContext) -> dict[str, SteadyStateAccount]:
        out = {}
        modes = ctx.applicable(list(ctx.settings.modes))
        for k, mode in enumerate(modes):
            ctx.tick(k, len(modes), f"modes ({mode})")
            point = steady_state_of(ctx, mode)
            if point is None:
                continue
            out[mode] = account(ctx, mode, *point)
        return out

    def tables(self, result: dict[str, SteadyStateAccount], ctx: RunContext) -> dict:
        budgets = [a.budget.row() for a in result.values() if a.budget is not None]
        routes = [a.routes.to_frame(mode) for mode, a in result.items()]
        routes = [r for r in routes if len(r)]
        return {"energy_budget": pd.DataFrame(budgets, columns=BUDGET_COLUMNS),
                "carbon_routes": (pd.concat(routes, ignore_index=True) if routes
                                  else pd.DataFrame(columns=CARBON_ROUTE_COLUMNS))}

    def summary_lines(self, result: dict[str, SteadyStateAccount], ctx: RunContext) -> list[str]:
        mode = ctx.settings.mode if ctx.settings.mode in result else next(iter(result), None)
        if mode is None:
            return []
        return route_lines(result[mode])

    def summary_data(self, result: dict[str, SteadyStateAccount], ctx: RunContext) -> dict:
        return {"energy_budget": {m: a.budget.row() for m, a in result.items() if a.budget},
                "carbon_fixation": {m: a.routes.fixation_shares() for m, a in result.items()}}

    def verification(self, result: dict[str, SteadyStateAccount], ctx: RunContext) -> dict:
        return {m: dict(a.budget.verification) for m, a in result.items() if a.budget}

    def sections(self, result: dict[str, SteadyStateAccount], ctx: RunContext) -> list[Section]:
        if not result:
            return []
        points = "; ".join(f"{m}: {a.words}" for m, a in result.items())
        return [Section("Energy budget", (
            "Per unit of demand (one turnover of the demand reaction): the net reaction over the "
            "internal reactions, its ΔrG' = Σ flux × ΔrG' at the solution's concentrations, split "
            "into the proton gradient (outer protons taken in × the energy each releases) and the "
            "feed chemistry (the rest: H2 and CO2 made into the demanded compounds and the "
            "outlets), and into the energy supplied to uphill steps and dissipated by downhill "
            "ones; ATP made and spent and the energy stored in the ATP made; H2 per carbon taken "
            f"up and ATP per H2. Steady states: {points}."),
            tables=[("energy_budget", "Energy budget per mode (kJ and mol per unit of demand)")]),
            Section("The routes that ran", (
                "The carbon flow of each steady state split into paths from the feed to the "
                "demanded compounds and outlets (flow decomposition, Ahuja, Magnanti & Orlin 1993, "
                "section 3.5, widest path first; carbon passed from substrate to product by "
                "matching skeletons, else in proportion). fixation_step: the reaction that takes "
                "the path's carbon from the feed, with its pathway tag; carbon_share: the path's "
                "part of the feed's carbon. Rows of kind 'cycle' are carbon going round."),
                tables=[("carbon_routes", "Carbon paths per mode (mol C per unit of demand)")])]


def route_lines(a: SteadyStateAccount) -> list[str]:
    """The summary's words on one mode's steady state: the route its carbon takes and what pays
    for it."""
    from ...report.text import names

    lines = []
    shares = a.routes.fixation_shares()
    if shares:
        entry = ", ".join(f"{k} {100 * v:.0f} %" for k, v in list(shares.items())[:3])
        path = main_path(a.routes)
        lines.append(f"carbon in the {a.mode} steady state ({a.words.split(',')[0]}) enters "
                     f"through {entry}"
                     + (f"; largest path {' → '.join(path.compounds)} "
                        f"({100 * path.share:.0f} % of the carbon)" if path else ""))
    b = a.budget
    if b is not None:
        pays = [f"the feed chemistry (H2 + CO2 to products) {b.feed_chemistry:.0f} kJ"]
        if b.protons_in:
            pays.append(f"the proton gradient {b.gradient:.0f} kJ ({b.protons_in:.3g} H⁺ in)")
        text = (f"paid for by {' and '.join(pays)} per unit of demand (ΔrG' of the net reaction "
                f"{b.delta_g_net:.0f} kJ)")
        if b.atp_made:
            text += f"; {b.atp_made:.3g} ATP made per unit of demand ({b.atp_per_h2:.2g} per H2)"
        if b.uphill_supplied > 0:
            text += f"; {b.uphill_supplied:.1f} kJ must be supplied to the uphill steps"
        if b.without_energy:
            text += f" (without an energy, left out: {names(b.without_energy)})"
        lines.append(text)
    return lines
