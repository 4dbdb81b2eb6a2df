"""Step: which energy source the network depends on: verdicts and the H2 threshold with and
without the gradient across the membrane, the least gradient at which it runs, and how far H2
reduces a carrier with and without an ion-coupled enzyme."""

from __future__ import annotations

from ...analyses.gradient import GradientResult, gradient_dependence
from ..context import RunContext
from ..step import Section, Step


class GradientStep(Step):
    """With and without the gradient; the least gradient; the carrier by H2."""

    id = "gradient"
    label = "gradient"
    title = "The gradient across the membrane"
    question = ("does the network run with and without the gradient across its membrane, and "
                "what is the least gradient at which it runs?")

    def run(self, ctx: RunContext) -> GradientResult | None:
        env = ctx.environment
        if not env.compartments:
            ctx.note("gradient: not applicable: the environment gives no compartment besides the "
                     "cell (no [compartments.ID]), so there is no gradient to compare with")
            return None
        if ctx.skipped_as_not_applicable("gradient"):
            return None
        from ...analyses.feasibility import feasibility
        from ...analyses.hydrogen import h2_threshold
        from ...network.energies import prepare

        modes = ctx.applicable(ctx.settings.modes)
        mode = ctx.settings.mode

        def prepare_at(environment, m):
            if environment is env:
                return ctx.thermo_model(m)
            return prepare(ctx.model, environment, m, db=ctx.database, literature=ctx.literature())

        def ask(tm, diagnose):
            return feasibility(tm, ctx.options, diagnose=diagnose,
                               alternatives=1 if diagnose else 0)

        h2 = ctx.h2_id()
        threshold = None
        with_threshold = None
        if h2 is not None:
            with_threshold = ctx.result_of("h2_threshold")
            threshold = (lambda tm: ctx.attempt("H2 threshold without the gradient", lambda: h2_threshold(
                tm, ctx.options, h2_id=h2, h2_range=ctx.settings.h2_range)))
        return ctx.attempt("gradient", lambda: gradient_dependence(
            env, modes, prepare_at, ask, {m: ctx.feasibility(m) for m in modes}, mode,
            ctx.options, h2_id=h2, threshold=threshold, with_threshold=with_threshold,
            progress=ctx.ticker("gradient levels")))

    def tables(self, result: GradientResult | None, ctx: RunContext) -> dict:
        return {} if result is None else result.tables()

    def summary_lines(self, result: GradientResult | None, ctx: RunContext) -> list[str]:
        if result is None:
            return []
        lines = []
        for row in result.verdicts:
            if row["gradient"] == "without":
                verdict = ("yes" if row["feasible"] else "no" if row["feasible"] is False
                           else "undetermined")
                lines.append(f"without the gradient ({row['mode']}): {verdict}"
                             + (f"; H2 threshold {row['h2_threshold']:.3g} {row['h2_unit']}"
                                if row.get("h2_threshold") is not None else ""))
        lines += [f"least gradient ({text.split(': ', 1)[0]}): {text.split(': ', 1)[1]}"
                  for text in result.least_words]
        if result.carrier_words:
            lines.append(result.carrier_words)
        return lines

    def summary_data(self, result: GradientResult | None, ctx: RunContext) -> dict:
        if result is None:
            return {}
        return {"gradient": {"verdicts": result.verdicts,
                             "least_gradient": result.least,
                             "verification": result.verification}}

    def sections(self, result: GradientResult | None, ctx: RunContext) -> list[Section]:
        if result is None:
            return []
        tables = [("gradient_verdicts", "Verdicts with and without the gradient"),
                  ("least_gradient", "The least gradient at which the network runs")]
        if result.carrier:
            tables.append(("carrier_by_h2", "A carrier reduced by H2, with and without the gradient"))
        return [Section(self.title, "Without the gradient every compartment has the cell's pH and "
                        "Δψ = 0. " + result.message + f" ({result.verification.get('status', '')}: "
                        f"{result.verification.get('check', '')})", tables=tables)]

    def text(self, result: GradientResult | None, ctx: RunContext) -> str:
        from ...report.text import table_text

        if result is None:
            return ""
        return "\n".join(self.summary_lines(result, ctx)) + "\n\n" + "\n\n".join(
            table_text(t, "{:.3g}") for t in result.tables().values()) + "\n"
