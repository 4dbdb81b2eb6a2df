"""Step: the energy currencies side by side (:mod:`tfa.analyses.currencies`): ATP, acetyl
phosphate, thioester, pyrophosphate, polyphosphate and no ATP, with the carriers kept or H2 in
their place; the whole demand's verdict (shared with the feasibility step) and each precursor
alone."""

from __future__ import annotations

from ...analyses.currencies import CurrencyRow, currency_modes, currency_table
from ..context import RunContext
from ..step import Section, Step


def _whole(ctx: RunContext, mode: str):
    """The whole demand in a mode the feasibility step does not ask: the verdict and one minimal
    uphill set, an infeasible verdict not re-asked of the second solver (many modes)."""
    from dataclasses import replace

    from ...analyses.feasibility import FeasibilityResult, feasibility
    from ...errors import UndeterminedError

    try:
        return feasibility(ctx.thermo_model(mode), replace(ctx.options, confirm_infeasible="never"),
                           alternatives=1)
    except UndeterminedError as err:
        ctx.undetermined.append(f"currencies ({mode})")
        return FeasibilityResult(conditions=ctx.environment.conditions, mode=mode,
                                 message=f"undetermined: {err}")


class CurrenciesStep(Step):
    """Which energy currency can pay for the network's coupled steps."""

    id = "currencies"
    label = "currencies"
    title = "Energy currencies"
    question = ("which energy currency (ATP, acetyl phosphate, thioester, pyrophosphate, "
                "polyphosphate, none) can pay for the coupled steps, with the carriers kept or H2 "
                "in their place, and which precursors each can make")

    def run(self, ctx: RunContext) -> list[CurrencyRow]:
        from ...analyses.precursor_demand import known_verdicts, precursor_verdicts

        precursors = ctx.results.get("precursors")   # when the assessment has run that step
        rows = []
        modes = currency_modes()
        for k, mode in enumerate(modes):
            ctx.tick(k, len(modes), f"modes ({mode})")
            reason = ctx.not_applicable(mode)
            if reason:
                rows.append(CurrencyRow(mode, None, message=f"not applicable: {reason}"))
                continue
            ctx.tick(k, len(modes), f"modes ({mode}, whole demand)")
            whole = (ctx.feasibility(mode) if mode in ctx.settings.modes
                     else ctx.cached(f"currency_feasibility:{mode}", lambda: _whole(ctx, mode)))
            sets = whole.diagnosis.sets if whole.diagnosis is not None else []
            tick = (lambda done, total, k=k, mode=mode: ctx.tick(
                k, len(modes), f"modes ({mode}, precursor {done + 1}/{total})"))
            # the precursors step asks the same question of the modes of the run: read it
            known = (known_verdicts(precursors.of_mode(mode))
                     if precursors is not None and mode in ctx.settings.modes else {})
            verdicts = ctx.attempt(f"currencies ({mode}) per precursor",
                                   lambda: precursor_verdicts(ctx.thermo_model(mode), ctx.options,
                                                              progress=tick, known=known))
            rows.append(CurrencyRow(mode, None if whole.message.startswith("undetermined")
                                    else whole.feasible, sets, verdicts or {}, whole.message,
                                    whole.verification.get("status", "")))
        return rows

    def tables(self, result: list[CurrencyRow], ctx: RunContext) -> dict:
        return {"currencies": currency_table(result)}

    def summary_lines(self, result: list[CurrencyRow], ctx: RunContext) -> list[str]:
        lines = []
        for r in result:
            row = r.row()
            if r.feasible is None:
                continue
            verdict = "yes" if r.feasible else (
                f"no ({row['uphill_set_size']} uphill: {row['uphill_set']})" if r.uphill_sets
                else "no")
            lack = row["precursors_not_made"]
            lines.append(f"currency {row['currency']}, carriers {row['carriers']}: {verdict}"
                         + (f"; cannot make {lack}" if lack else "; every precursor alone"))
        return lines

    def sections(self, result: list[CurrencyRow], ctx: RunContext) -> list[Section]:
        text = ("Each ATP-coupled step coupled to another donor instead (acetyl phosphate -> "
                "acetate + Pi, acetyl-CoA -> acetate + CoA, PPi -> 2 Pi, one phosphoanhydride of "
                "polyphosphate), or to none; each with its own energies. precursors_made: the "
                "precursors the mode makes alone with every step downhill (a 'no' is the solver's "
                "proof, not confirmed by the second solver).")
        return [Section(self.title, text, tables=[("currencies", "Energy currencies per mode")])]

    def text(self, result: list[CurrencyRow], ctx: RunContext) -> str:
        from ...report.text import table_text

        table = self.tables(result, ctx)["currencies"].drop(columns=["message"])
        return "\n".join(self.summary_lines(result, ctx)) + "\n\n" + table_text(table) + "\n"
