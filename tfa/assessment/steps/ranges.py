"""Step: the range of each reaction's ΔrG' (and, when asked, each concentration) over the feasible
steady states, in the single-analysis mode."""

from __future__ import annotations

from ...analyses.ranges import RangesResult, ranges
from ...errors import InputError, TfaError
from ..context import RunContext
from ..step import FigureSpec, Section, Step
from .driving_force import reference_solution


class RangesStep(Step):
    """Ranges of ΔrG' over the feasible set; over the steady states in which the first minimal
    uphill set may run uphill when the network is infeasible as it stands."""

    id = "ranges"
    label = "ranges"
    title = "Ranges"
    question = "how far can each reaction's ΔrG' move over the feasible steady states?"

    def run(self, ctx: RunContext) -> RangesResult | None:
        mode = ctx.settings.mode
        if ctx.skipped_as_not_applicable("ranges"):
            return None
        tm = ctx.thermo_model(mode)
        wanted = ctx.settings.ranges_reactions
        unknown = [r for r in wanted or [] if r not in tm.energies]
        if unknown:
            raise InputError(f"reactions {', '.join(unknown)}: not in network {tm.model.id} or "
                             "without an energy; give ids of reactions with an energy")
        feasibility = ctx.feasibility(mode)
        relaxed: list[str] = []
        if not feasibility.feasible:
            if feasibility.diagnosis is None or not feasibility.diagnosis.sets:
                ctx.note(f"ranges: not computed, the {mode} network has no steady state that "
                         "meets the demand")
                return None
            relaxed = list(feasibility.diagnosis.sets[0])
            tm = tm.relax(relaxed)
            ctx.note("ranges: the network is infeasible in this mode; ranges are over the steady "
                     f"states in which {', '.join(relaxed)} may run uphill")
        settings = ctx.settings
        try:
            result = ranges(tm, ctx.options, reactions=settings.ranges_reactions,
                            compounds=None if settings.ranges_compounds else [],
                            workers=settings.workers, progress=ctx.ticker("extremes"))
        except TfaError as err:
            if err.exit_code == 2:
                raise
            ctx.note(f"ranges: not computed ({err})")
            return None
        result.uphill_allowed = relaxed
        if relaxed:
            result.provenance = {**result.provenance, "uphill_allowed": relaxed}
        return result

    def tables(self, result: RangesResult | None, ctx: RunContext) -> dict:
        return {} if result is None else result.tables()

    def figures(self, result: RangesResult | None, ctx: RunContext) -> dict:
        if result is None or not len(result.reactions):
            return {}
        reference, words = reference_solution(ctx)

        def make():
            from ...report.figures import ranges_figure

            frame = result.reactions
            if reference is not None and len(reference.table):
                at = dict(zip(reference.table["reaction"], reference.table["delta_g_kJ_per_mol"]))
                frame = frame.assign(delta_g_kJ_per_mol=[at.get(r, float("nan"))
                                                         for r in frame["reaction"]])
            return ranges_figure(frame, title=f"Feasible ΔrG' per reaction, "
                                              f"{ctx.settings.mode} mode")

        return {"ranges": FigureSpec(make, "Interval of ΔrG' per reaction over the feasible set "
                                           f"(kJ/mol); ticks: {words}")}

    def sections(self, result: RangesResult | None, ctx: RunContext) -> list[Section]:
        if result is None:
            return []
        words = result.summary()
        if result.uphill_allowed:
            words += (". The network is infeasible in this mode, so the ranges are over the "
                      "steady states in which " + ", ".join(result.uphill_allowed)
                      + " (the minimal uphill set) may run uphill.")
        tables = [("ranges", "Ranges of ΔrG' (kJ/mol)")]
        if len(result.compounds):
            tables.append(("ranges_compounds", "Ranges of the activities"))
        return [Section(self.title, words, tables=tables,
                        figures=[(stem, spec.caption)
                                 for stem, spec in self.figures(result, ctx).items()])]

    def text(self, result: RangesResult | None, ctx: RunContext) -> str:
        from ...report.text import table_text

        if result is None:
            return ""
        head = ""
        if result.uphill_allowed:
            head = (f"with {', '.join(result.uphill_allowed)} (the minimal uphill set) allowed to "
                    "run uphill\n\n")
        parts = [table_text(frame) for frame in result.tables().values()]
        return head + "\n\n".join(parts) + "\n"
