"""Step: how far the energies must move, in units of their uncertainty, to flip each mode's
verdict, and which compounds or values carry that change (deterministic; part of the default
assessment)."""

from __future__ import annotations

import pandas as pd

from ...analyses.margins import MARGIN_COLUMNS, SOURCE_COLUMNS, MarginResult, verdict_margin
from ..context import RunContext
from ..step import Section, Step


class VerdictMarginStep(Step):
    """Distance to a flipped verdict per mode (:mod:`tfa.analyses.margins`)."""

    id = "verdict_margins"
    label = "verdict margins"
    title = "Distance to a flipped verdict"
    question = ("how far must the energies move, in units of their uncertainty, to flip each "
                "mode's verdict, and what carries that change?")

    def run(self, ctx: RunContext) -> dict[str, MarginResult]:
        out: dict[str, MarginResult] = {}
        modes = [m for m in ctx.applicable(ctx.settings.modes)
                 if not ctx.feasibility(m).demand_impossible
                 and not ctx.feasibility(m).message.startswith("undetermined")]
        for k, mode in enumerate(modes):
            ctx.tick(k, len(modes), f"modes ({mode})")
            verdict = ctx.feasibility(mode).feasible
            def tell(text: str, k: int = k, mode: str = mode) -> None:
                ctx.tick(k, len(modes), f"modes ({mode}: {text})")

            answer = ctx.attempt(f"verdict margin ({mode})", lambda mode=mode, verdict=verdict,
                                 tell=tell: verdict_margin(ctx.thermo_model(mode), ctx.options,
                                                           verdict, progress=tell))
            if answer is not None:
                out[mode] = answer
        return out

    def tables(self, result: dict[str, MarginResult], ctx: RunContext) -> dict:
        return {"verdict_margins": pd.DataFrame([r.row() for r in result.values()],
                                                columns=MARGIN_COLUMNS),
                "verdict_margin_sources": pd.DataFrame(
                    [row for r in result.values() for row in r.source_rows()],
                    columns=SOURCE_COLUMNS)}

    def summary_lines(self, result: dict[str, MarginResult], ctx: RunContext) -> list[str]:
        return [r.sentence() for r in result.values()]

    def summary_data(self, result: dict[str, MarginResult], ctx: RunContext) -> dict:
        return {"verdict_margins": [r.row() for r in result.values()]}

    def verification(self, result: dict[str, MarginResult], ctx: RunContext) -> dict:
        from ...analyses.results import weakest

        return weakest([r.verification for r in result.values()], list(result))

    def sections(self, result: dict[str, MarginResult], ctx: RunContext) -> list[Section]:
        if not result:
            return []
        text = ("The smallest change of the energies that flips each verdict, as the total "
                "deviation of their sources (species data, reaction values, groups of estimates) "
                "in units of each source's σ (L1 norm in whitened compound space). An infeasible "
                "verdict's distance is the exact minimum (a MILP); a feasible verdict's is a "
                "change found and verified to leave no steady state (an upper bound).\n"
                + "\n".join(r.sentence() for r in result.values()))
        return [Section(self.title, text, tables=[
            ("verdict_margins", "Distance to a flipped verdict per mode"),
            ("verdict_margin_sources", "The sources that carry each change")])]

    def text(self, result: dict[str, MarginResult], ctx: RunContext) -> str:
        return "\n".join(r.sentence() for r in result.values())
