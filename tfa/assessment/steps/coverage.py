"""Step: where each reaction's energy comes from (data coverage of the network as given)."""

from __future__ import annotations

from ...network.coverage import CoverageReport, coverage
from ..context import RunContext
from ..step import Section, Step


class CoverageStep(Step):
    """Data coverage: per internal reaction, the kind of data behind its ΔrG'° and its sources."""

    id = "coverage"
    label = "data coverage"
    title = "Data coverage"
    question = "where does each reaction's energy come from?"

    def run(self, ctx: RunContext) -> CoverageReport:
        return coverage(ctx.model, ctx.environment, ctx.database, ctx.literature())

    def tables(self, result: CoverageReport, ctx: RunContext) -> dict:
        return {"coverage": result.to_frame()}

    def summary_lines(self, result: CoverageReport, ctx: RunContext) -> list[str]:
        from ...report.text import number_in_words, counted

        data = self.summary_data(result, ctx)["coverage"]
        total, with_energy = data["reactions"], data["with_energy"]
        return [f"data: {number_in_words(with_energy, 'none')} of {counted(total, 'reaction')} "
                f"{'has' if with_energy == 1 else 'have'} an energy "
                f"({number_in_words(data['estimated'], 'none')} estimated, "
                f"{number_in_words(data['missing'], 'none')} missing)"]

    def summary_data(self, result: CoverageReport, ctx: RunContext) -> dict:
        counts = result.counts
        missing = counts.get("placeholder", 0) + counts.get("none", 0)
        return {"coverage": {"reactions": result.total, "with_energy": result.total - missing,
                             "estimated": counts.get("estimated", 0), "missing": missing}}

    def sections(self, result: CoverageReport, ctx: RunContext) -> list[Section]:
        text = (f"{result.total} internal reactions; {100 * result.reviewed_or_cited_fraction:.0f}% "
                "have their transformed standard energy from reviewed species data or cited "
                "literature values. Sources: species (reviewed species data), literature (a "
                "cited reaction value), reconciled (several values combined), estimated (group "
                "contribution, wide uncertainty).")
        return [Section(self.title, text,
                        extra_tables=[("Reactions per kind of data", result.counts_frame())],
                        tables=[("coverage", "Every reaction: ΔrG'° (kJ/mol), standard "
                                             "uncertainty and provenance")])]
