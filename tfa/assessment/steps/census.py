"""Step: every reaction's energy at reference concentrations, and how many run downhill there, per
mode (no optimisation)."""

from __future__ import annotations

import pandas as pd

from ...analyses.census import CENSUS_COLUMNS, CensusResult, census
from ..context import RunContext
from ..step import FigureSpec, Section, Step


class CensusStep(Step):
    """Census: ΔrG'°, ΔrG' at 1 mM and at a substrate:product ratio, per mode."""

    id = "census"
    label = "census"
    title = "Census"
    question = "how many reactions run downhill at reference concentrations, per mode?"

    def run(self, ctx: RunContext) -> dict[str, CensusResult]:
        out = {}
        modes = ctx.applicable(ctx.settings.modes)
        for k, mode in enumerate(modes):
            ctx.tick(k, len(modes), "modes")
            out[mode] = census(ctx.thermo_model(mode), ctx.settings.ratio)
        return out

    def tables(self, result: dict[str, CensusResult], ctx: RunContext) -> dict:
        parts = [r.tables() for r in result.values()]
        return {"census": pd.concat([p["census"] for p in parts], ignore_index=True) if parts
                else pd.DataFrame(columns=["mode", *CENSUS_COLUMNS]),
                "census_counts": pd.concat([p["census_counts"] for p in parts], ignore_index=True)
                if parts else pd.DataFrame()}

    def figures(self, result: dict[str, CensusResult], ctx: RunContext) -> dict:
        table = self.tables(result, ctx)["census"]
        if not len(table):
            return {}

        def make():
            from ...report.figures import census_figure

            return census_figure(table, title="Reaction energies at the setting, per mode")

        return {"census": FigureSpec(make, "Distribution of reaction energies per mode (kJ/mol)")}

    def sections(self, result: dict[str, CensusResult], ctx: RunContext) -> list[Section]:
        return [Section(self.title, "ΔrG' of every reaction with all reactants at 1 mM (gases "
                        "1e-3 bar) but the fed ones, which stay at their feed values, and ΔrG'°, "
                        "per mode; H+ at its compartment's pH. ΔrG'° of a reaction across the "
                        "membrane refers to each compound in its own compartment (column "
                        "standard_state).",
                        tables=[("census_counts", "Reactions exergonic per mode"),
                                ("census", "Every reaction per mode (kJ/mol)")],
                        figures=[("census", "Distribution of reaction energies per mode (kJ/mol)")])]

    def text(self, result: dict[str, CensusResult], ctx: RunContext) -> str:
        from ...report.text import table_text

        lines = [r.summary() for r in result.values()]
        return "\n".join(lines) + "\n\n" + table_text(self.tables(result, ctx)["census_counts"],
                                                      "{:.3f}") + "\n"
