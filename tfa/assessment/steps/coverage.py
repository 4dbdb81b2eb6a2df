"""Step: where each reaction's energy comes from (data coverage of the network as given)."""

from __future__ import annotations

import pandas as pd

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
        return {"coverage": result.to_frame(), "to_verify": result.to_verify()}

    def summary_lines(self, result: CoverageReport, ctx: RunContext) -> list[str]:
        from ...report.text import counted, names, number_in_words

        data = self.summary_data(result, ctx)["coverage"]
        total, with_energy = data["reactions"], data["with_energy"]
        missing = [r.reaction_id for r in result.reactions if r.source in ("placeholder", "none")]
        lines = [f"data: {number_in_words(with_energy, 'none')} of {counted(total, 'reaction')} "
                 f"{'has' if with_energy == 1 else 'have'} an energy "
                 f"({number_in_words(data['estimated'], 'none')} estimated, "
                 f"{number_in_words(data['missing'], 'none')} missing"
                 + (f": {names(missing)}" if missing else "") + ")"]
        unchecked = data["unchecked"]
        if unchecked:
            lines.append(f"data to verify: {number_in_words(unchecked)} of {total} rest on a value "
                         f"recalled but not checked against its source, a rule of thumb, an "
                         f"estimate or unreviewed data ({data['to_verify']} numbers in to_verify"
                         + (f"; {counted(data['flagged'], 'reaction')} touched by an open audit "
                            "disagreement" if data["flagged"] else "") + ")")
        return lines

    def summary_data(self, result: CoverageReport, ctx: RunContext) -> dict:
        from ...thermo.status import needs_checking

        counts = result.counts
        missing = counts.get("placeholder", 0) + counts.get("none", 0)
        statuses = result.status_counts
        return {"coverage": {"reactions": result.total, "with_energy": result.total - missing,
                             "estimated": counts.get("estimated", 0), "missing": missing,
                             "statuses": statuses,
                             "unchecked": sum(n for s, n in statuses.items() if needs_checking(s)),
                             "flagged": sum(1 for r in result.reactions if r.audit_flags),
                             "to_verify": len(result.to_verify())}}

    def sections(self, result: CoverageReport, ctx: RunContext) -> list[Section]:
        text = (f"{result.total} internal reactions; {100 * result.reviewed_or_cited_fraction:.0f}% "
                "have their transformed standard energy from reviewed species data or cited "
                "literature values. Sources: species (reviewed species data), literature (a "
                "cited reaction value), reconciled (several values combined), estimated (group "
                "contribution, wide uncertainty).")
        statuses = pd.DataFrame({"status": list(result.status_counts),
                                 "reactions": list(result.status_counts.values())})
        text += ("\n\nStatus: how far the numbers behind each energy were checked. A value "
                 "\"recalled (from memory)\" was taken from its source without checking the printed "
                 "table; \"common practice\" is a rule of thumb; estimates carry wide "
                 "uncertainties. The numbers to verify before publishing are listed below (and in "
                 "to_verify.csv; tfa inspect --to-verify prints them).")
        return [Section(self.title, text,
                        extra_tables=[("Reactions per kind of data", result.counts_frame()),
                                      ("Reactions per status of their data", statuses)],
                        tables=[("coverage", "Every reaction: ΔrG'° (kJ/mol), standard "
                                             "uncertainty, status, audit flags and provenance"),
                                ("to_verify", "The numbers to verify before publishing")])]
