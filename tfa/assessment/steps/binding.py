"""Step: what binds each answer: the constraints that decide it, with dual values in words
(:mod:`tfa.analyses.binding`).

Reads the answers of the steps that ran before it (feasibility per mode, the H2 window, the
max-min driving force) and solves nothing of its own but the small linear programs of their flux
patterns; a step left out (``--skip``) leaves its answer out here too.
"""

from __future__ import annotations

from ...analyses.binding import (ANSWERS, BindingResult, binding_frame, binding_verification,
                                 optimum_constraints, point_constraints)
from ...errors import ComputationError
from ..context import RunContext
from ..step import Section, Step


def _carrier_pairs(ctx: RunContext, mode: str) -> dict[str, str]:
    """Reduced form -> oxidised form of each carrier pair of the network in ``mode``."""
    from ...errors import InputError
    from ...network.roles import carrier_pairs

    try:
        pairs = carrier_pairs(ctx.thermo_model(mode).model)
    except InputError:
        return {}
    return {p.reduced.id: p.oxidised.id for p in pairs.values()}


def _h2_words(result: BindingResult, mode: str, h2: str | None) -> str:
    """"; the H2 supply does not move it" when the fed H2 has no effect on the driving force."""
    table = result.table
    rows = table[(table["mode"] == mode) & (table["answer"] == "driving_force")
                 & (table["compound"] == h2) & (table["kind"] == "fed concentration")]
    if h2 is None or rows.empty:
        return ""
    row = rows.iloc[0]
    moves = [abs(row[c]) for c in ("sensitivity", "sensitivity_left", "sensitivity_right")]
    if max(moves) > 1e-7:
        return ""
    return ("; the H2 supply does not move it (its dual value and both one-sided derivatives "
            "are 0)")


class BindingStep(Step):
    """The constraints that decide each answer, with their dual values."""

    id = "binding_constraints"
    label = "binding constraints"
    title = "What binds"
    question = "which bounds, feeds, energies and demands decide each answer, and by how much?"

    def run(self, ctx: RunContext) -> BindingResult | None:
        rows, mismatches = [], []
        for mode in ctx.applicable(ctx.settings.modes):
            answer = ctx.feasibility(mode)
            if answer.feasible and answer.solution is not None:
                rows += point_constraints(ctx.thermo_model(mode), answer.solution, ctx.options,
                                          mode)
        threshold = ctx.results.get("h2_threshold")
        if threshold is not None:
            rows += [{k: v for k, v in row.items() if k != "h2_window"} for row in threshold.binding]
        force = ctx.results.get("driving_force")
        network = getattr(force, "network", None)
        if network is not None and network.solution is not None:
            mode = ctx.settings.mode
            try:
                found, value = optimum_constraints(ctx.thermo_model(mode), network.solution,
                                                   ctx.options, mode, "driving_force",
                                                   ("driving_force", None), "max")
            except ComputationError as err:
                ctx.note(f"binding constraints of the driving force: not computed ({err})")
            else:
                rows += found
                if abs(value - network.driving_force) > 1e-6 * max(1.0, abs(value)):
                    mismatches.append(f"driving force {value:.6g} against {network.driving_force:.6g}"
                                      " kJ/mol")
        if not rows:
            return None
        table = binding_frame(rows)
        result = BindingResult(conditions=ctx.environment.conditions, table=table)
        result.verification = binding_verification(table, mismatches)
        return result

    def tables(self, result: BindingResult | None, ctx: RunContext) -> dict:
        return {} if result is None else result.tables()

    def summary_lines(self, result: BindingResult | None, ctx: RunContext) -> list[str]:
        if result is None:
            return []
        lines = []
        for (mode, answer), _ in result.table.groupby(["mode", "answer"], sort=False):
            words = result.top_words(mode, answer, _carrier_pairs(ctx, mode))
            if words and answer == "driving_force":
                words += _h2_words(result, mode, ctx.h2_id())
            if words:
                lines.append(f"what binds {ANSWERS[answer]} ({mode}): {words}")
        return lines

    def summary_data(self, result: BindingResult | None, ctx: RunContext) -> dict:
        if result is None:
            return {}
        out: dict = {}
        for (mode, answer), _ in result.table.groupby(["mode", "answer"], sort=False):
            out.setdefault(mode, {})[answer] = result.top_words(mode, answer) or None
        return {"binding": out}

    def sections(self, result: BindingResult | None, ctx: RunContext) -> list[Section]:
        if result is None:
            return []
        text = ("For each answer, the constraints that decide it. For the H2 answers and the "
                "max-min driving force: the dual value of each constraint in the linear program "
                "with the optimum's flux pattern fixed (how far the answer moves per unit ln c "
                "of a bound, or per kJ/mol of an energy), each checked by re-solving with the "
                "datum moved both ways (sensitivity_left, sensitivity_right). These are local to "
                "the pattern: another pattern may take over when a datum moves, so the top "
                "binding constraint(s) of the H2 answers are also checked on the full problem, "
                "the H2 MILP solved again with the datum moved down by check_step "
                "(measured_ln_h2_change beside predicted_ln_h2_change). For a feasible "
                "mode: the bounds reached at the point found (one of many). "
                + result.verification.get("check", ""))
        return [Section(self.title, text + "\n\n" + result.summary(),
                        tables=[("binding_constraints", "Binding constraints")])]

    def text(self, result: BindingResult | None, ctx: RunContext) -> str:
        from ...report.text import table_text

        if result is None:
            return "no answer with a solution to read the binding constraints from\n"
        shown = result.table[result.table["rank"] <= 5]
        return (result.summary() + "\n\n"
                + table_text(shown[["mode", "answer", "rank", "kind", "compound", "reaction",
                                    "bound", "sensitivity", "sensitivity_unit",
                                    "predicted_ln_h2_change", "measured_ln_h2_change"]],
                             "{:.3g}") + "\n")
