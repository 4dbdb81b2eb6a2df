"""Steps: the network against its H2 supply, as a scan over levels and as the least H2 at which
it runs (the threshold); both in the single-analysis mode."""

from __future__ import annotations

from ...analyses.hydrogen import H2ScanResult, H2ThresholdResult, h2_scan, h2_threshold
from ..context import RunContext
from ..step import FigureSpec, Section, Step


def without_h2(ctx: RunContext, what: str) -> str | None:
    """The H2 compound the analysis varies, or None (and a note: not applicable) when the
    network has none or the analysis mode does not apply."""
    if ctx.skipped_as_not_applicable(what):
        return None
    h2 = ctx.h2_id()
    if h2 is None:
        ctx.note(f"{what}: not applicable: no H2 in this network; name the H2 compound with "
                 "--h2 ID")
    return h2


class H2ScanStep(Step):
    """Feasibility, max-min driving force and uphill-set size at each H2 level."""

    id = "h2_scan"
    label = "H2 scan"
    title = "H2 scan"
    question = "how do feasibility, driving force and the uphill set change with the H2 supply?"

    def run(self, ctx: RunContext) -> H2ScanResult | None:
        h2 = without_h2(ctx, "H2 scan")
        if h2 is None:
            return None
        tm = ctx.thermo_model(ctx.settings.mode)
        return ctx.attempt("H2 scan", lambda: h2_scan(
            tm, ctx.settings.scan_levels(), ctx.options, h2_id=h2,
            with_uphill=ctx.settings.scan_uphill, progress=ctx.ticker("levels")))

    def tables(self, result: H2ScanResult | None, ctx: RunContext) -> dict:
        return {} if result is None else {"h2_scan": result.to_frame()}

    def figures(self, result: H2ScanResult | None, ctx: RunContext) -> dict:
        if result is None or not len(result.table):
            return {}
        threshold = ctx.results.get("h2_threshold")
        at = threshold.threshold if threshold is not None and threshold.feasible else None
        windows = list(threshold.windows) if threshold is not None else []
        caption = (f"Feasibility, size of the minimal uphill set and max-min driving force "
                   f"against the H2 supply ({result.unit})"
                   + ("; shaded: the H2 window(s) in which the network is feasible" if windows
                      else ""))

        def make():
            from ...report.figures import h2_scan_figure

            return h2_scan_figure(result.table, unit=result.unit, threshold=at,
                                  title=f"H2 supply, {ctx.settings.mode} mode", windows=windows)

        return {"h2_scan": FigureSpec(make, caption)}

    def sections(self, result: H2ScanResult | None, ctx: RunContext) -> list[Section]:
        if result is None:
            return []
        return [Section(self.title, result.summary(),
                        tables=[("h2_scan", f"H2 scan ({result.unit})")],
                        figures=[(stem, spec.caption)
                                 for stem, spec in self.figures(result, ctx).items()])]

    def text(self, result: H2ScanResult | None, ctx: RunContext) -> str:
        from ...report.text import table_text

        if result is None:
            return ""
        return (result.summary() + "\n\n"
                + table_text(result.table.drop(columns=["ln_h2_activity"]), "{:.3g}") + "\n")


class H2ThresholdStep(Step):
    """The least H2 at which the network runs, by one MILP over ln[H2]."""

    id = "h2_threshold"
    label = "H2 threshold"
    title = "H2 threshold"
    question = "what is the least H2 supply at which the network runs?"

    def run(self, ctx: RunContext) -> H2ThresholdResult | None:
        h2 = without_h2(ctx, "H2 threshold")
        if h2 is None:
            return None
        tm = ctx.thermo_model(ctx.settings.mode)
        return ctx.attempt("H2 threshold", lambda: h2_threshold(
            tm, ctx.options, h2_id=h2, h2_range=ctx.settings.h2_range, window=True,
            mode=ctx.settings.mode, progress=ctx.ticker("solves of the H2 window")))

    def tables(self, result: H2ThresholdResult | None, ctx: RunContext) -> dict:
        return {} if result is None else result.tables()

    def summary_lines(self, result: H2ThresholdResult | None, ctx: RunContext) -> list[str]:
        from ...report.text import checked, h2_line

        if result is None:
            return []
        status = result.verification.get("status", "")
        if result.feasible and result.windows:
            return [f"H2 ({ctx.settings.mode}): {result.window_words()}{checked(status)}"]
        return [h2_line(result.threshold if result.feasible else None, result.search_range,
                        result.unit, status)]

    def summary_data(self, result: H2ThresholdResult | None, ctx: RunContext) -> dict:
        if result is None:
            return {}
        return {"h2_threshold": result.threshold if result.feasible else None,
                "h2_at_range_floor": result.at_range_floor,
                "h2_windows": [list(w) for w in result.windows],
                "h2_range": list(result.search_range), "h2_unit": result.unit}

    def sections(self, result: H2ThresholdResult | None, ctx: RunContext) -> list[Section]:
        if result is None:
            return []
        return [Section(self.title, result.message,
                        tables=[("h2_threshold", "H2 threshold"),
                                ("h2_window", "H2 levels at which the network is feasible: each "
                                 "end, its partial pressure by Henry's law and what binds it")])]

    def text(self, result: H2ThresholdResult | None, ctx: RunContext) -> str:
        from ...report.text import table_text

        if result is None:
            return ""
        window = result.window_frame()
        return (result.message + "\n\n" + table_text(result.to_frame()) + "\n"
                + ("\n" + table_text(window.drop(columns=["binding_constraint"]), "{:.3g}") + "\n"
                   if len(window) else ""))
