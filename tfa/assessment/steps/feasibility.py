"""Step: does a steady state exist with every reaction downhill, in each mode, and if not, which
fewest steps must be driven uphill (the minimal uphill sets)?"""

from __future__ import annotations

import pandas as pd

from ...analyses.feasibility import FEASIBILITY_COLUMNS, UPHILL_SET_COLUMNS, FeasibilityResult
from ...modes import MODES
from ..context import RunContext
from ..step import Section, Step


class FeasibilityStep(Step):
    """Feasibility per mode; the minimal uphill sets (with alternatives) where infeasible."""

    id = "feasibility"
    label = "feasibility"
    title = "Feasibility per mode"
    question = ("is there a steady state meeting the demand with every reaction downhill, per "
                "mode, and if not, which fewest steps must be driven uphill?")

    def run(self, ctx: RunContext) -> dict[str, FeasibilityResult]:
        out = {}
        for k, mode in enumerate(ctx.settings.modes):
            ctx.tick(k, len(ctx.settings.modes), f"modes ({mode})")
            out[mode] = ctx.feasibility(mode)
        return out

    def tables(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> dict:
        rows = []
        for mode, r in result.items():
            row = r.row()
            if ctx.not_applicable(mode):  # no verdict: the question cannot be asked
                row.update(feasible=None, uphill_set_size=None, demand_impossible=None)
            rows.append(row)
        return {"feasibility": pd.DataFrame(rows, columns=FEASIBILITY_COLUMNS),
                "uphill_sets": pd.DataFrame([row for r in result.values() for row in r.uphill_rows()],
                                            columns=UPHILL_SET_COLUMNS)}

    def summary_lines(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> list[str]:
        from ...report.text import constrained_words, mode_line

        lines = []
        for mode, r in result.items():
            reason = ctx.not_applicable(mode)
            if reason:
                lines.append(mode_line(question_for(mode, ctx), None, not_applicable=reason))
                continue
            undetermined = r.message.startswith("undetermined")
            sets = r.diagnosis.sets if r.diagnosis is not None else []
            constrained = "" if r.demand_impossible else constrained_words(*ctx.constrained(mode))
            d = r.diagnosis
            lines.append(mode_line(question_for(mode, ctx), None if undetermined else r.feasible,
                                   sets, r.demand_impossible, constrained=constrained,
                                   status=r.verification.get("status", ""),
                                   count=d.count if d is not None else None,
                                   complete=d.exhausted if d is not None else True,
                                   ordered=d.ordered if d is not None else True))
        return lines

    def summary_data(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> dict:
        reasons = {m: ctx.not_applicable(m) for m in result}
        return {"feasible": {m: (None if reasons[m] else r.feasible) for m, r in result.items()},
                "uphill": {m: (r.diagnosis.sets if r.diagnosis is not None else [])
                           for m, r in result.items()},
                "uphill_sets_found": {m: {"sets_found": r.diagnosis.count,
                                          "all_sets_found": r.diagnosis.exhausted,
                                          "in_order_of_ids": r.diagnosis.ordered,
                                          "energy_to_supply_total_kJ_per_mol_demand":
                                              r.diagnosis.energy_to_supply(0)}
                                      for m, r in result.items() if r.diagnosis is not None},
                "demand_impossible": [m for m, r in result.items() if r.demand_impossible],
                "not_applicable": {m: why for m, why in reasons.items() if why},
                "constrained": {m: dict(zip(("with_energy", "reactions"), ctx.constrained(m)))
                                for m in result if not reasons[m]}}

    def sections(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> list[Section]:
        modes = "; ".join(f"{m}: {MODES[m].description}" + (
            f" Not applicable to this network: {ctx.not_applicable(m)}." if ctx.not_applicable(m)
            else "") for m in result)
        return [Section(self.title, modes, tables=[("feasibility", "Feasibility per mode")]),
                Section("Minimal uphill sets",
                        "The fewest reactions that must run against their gradient (coupled to an "
                        "energy source) for the demand to be met, listed in the order of reaction "
                        "ids (sorted ids compared one by one) and counted (exactly, or 'at least "
                        "N' when the count stopped); uphill_by_kJ_per_mol is how far uphill each "
                        "runs per mole of reaction at the concentrations that make the set's total "
                        "smallest; energy_to_supply_kJ_per_mol_demand is that times the step's "
                        "flux per unit of demand flux (flux_per_demand), at the fluxes of least "
                        "energy to supply with those concentrations: summed over a set, the "
                        "energy the coupled sources must supply per mol of demand.",
                        tables=[("uphill_sets", "Minimal uphill sets per mode")])]

    def text(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> str:
        from ...report.text import table_text

        lines = self.summary_lines(result, ctx)
        missing = unconstrained(ctx)
        if missing:
            lines.append(missing)
        tables = self.tables(result, ctx)
        parts = ["\n".join(lines), table_text(tables["feasibility"].drop(columns=["message"]))]
        if len(tables["uphill_sets"]):
            parts.append(table_text(tables["uphill_sets"], "{:.2f}"))
        return "\n\n".join(parts) + "\n"


def question_for(mode: str, ctx: RunContext) -> str:
    """The mode's question, saying what was computed: "runs as given" for the native mode of a
    network without ATP; "runs with ATP from the proton gradient (ΔpH 2.0, 4 H⁺/ATP)" for a mode
    that keeps ATP and makes it from a gradient (:func:`tfa.analyses.budget.gradient_atp_coupling`)."""
    from ...analyses.budget import gradient_atp_coupling

    if mode == "native" and "atp" not in {str((m.notes or {}).get("role") or "")
                                          for m in ctx.model.metabolites}:
        return "runs as given"
    if mode == "native" and not ctx.not_applicable(mode):
        coupling = gradient_atp_coupling(ctx.thermo_model(mode))
        if coupling is not None:
            delta_ph, per_atp, _ = coupling
            return (f"runs with ATP from the proton gradient (ΔpH {delta_ph:.1f}, "
                    f"{per_atp:g} H⁺/ATP)")
    return MODES[mode].question


def unconstrained(ctx: RunContext) -> str:
    """The internal reactions of the network as given that have no energy, counted and named
    once (they run without a thermodynamic constraint in every mode); "" when there are none."""
    from ...report.text import names

    if ctx.not_applicable("native"):   # nothing was asked of the network as given
        return ""
    tm = ctx.thermo_model("native")
    ids = [r.id for r in tm.internal_reactions() if r.id != tm.demand_id and r.id not in tm.energies]
    if not ids:
        return ""
    total = ctx.constrained("native")[1]
    policy = "blocked" if ctx.options.unknown_energy == "block" else "unconstrained"
    return (f"without an energy ({policy} in every mode): {len(ids)} of {total} reactions: "
            f"{names(ids)}")
