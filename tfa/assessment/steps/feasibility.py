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
        return {"feasibility": pd.DataFrame([r.row() for r in result.values()],
                                            columns=FEASIBILITY_COLUMNS),
                "uphill_sets": pd.DataFrame([row for r in result.values() for row in r.uphill_rows()],
                                            columns=UPHILL_SET_COLUMNS)}

    def summary_lines(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> list[str]:
        from ...report.text import mode_line

        lines = []
        for mode, r in result.items():
            undetermined = r.message.startswith("undetermined")
            sets = r.diagnosis.sets if r.diagnosis is not None else []
            lines.append(mode_line(MODES[mode].question, None if undetermined else r.feasible,
                                   sets, r.demand_impossible,
                                   status=r.verification.get("status", "")))
        return lines

    def summary_data(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> dict:
        return {"feasible": {m: r.feasible for m, r in result.items()},
                "uphill": {m: (r.diagnosis.sets if r.diagnosis is not None else [])
                           for m, r in result.items()},
                "demand_impossible": [m for m, r in result.items() if r.demand_impossible]}

    def sections(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> list[Section]:
        modes = "; ".join(f"{m}: {MODES[m].description}" for m in result)
        return [Section(self.title, modes, tables=[("feasibility", "Feasibility per mode")]),
                Section("Minimal uphill sets",
                        "The fewest reactions that must run against their gradient (coupled to an "
                        "energy source) for the demand to be met; uphill_by_kJ_per_mol is how far "
                        "uphill each runs at the concentrations that make the set's total "
                        "smallest.", tables=[("uphill_sets", "Minimal uphill sets per mode")])]

    def text(self, result: dict[str, FeasibilityResult], ctx: RunContext) -> str:
        from ...report.text import table_text

        lines = [f"{mode}: {r.message}" for mode, r in result.items()]
        tables = self.tables(result, ctx)
        parts = ["\n".join(lines), table_text(tables["feasibility"].drop(columns=["message"]))]
        if len(tables["uphill_sets"]):
            parts.append(table_text(tables["uphill_sets"], "{:.2f}"))
        return "\n\n".join(parts) + "\n"
