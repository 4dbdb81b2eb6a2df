"""The result of an assessment: every step's answer, the summary in words, and the files.

:class:`Assessment` holds what the steps returned (by step id: ``result.feasibility`` is the
feasibility step's answer, a dict mode -> FeasibilityResult); :meth:`Assessment.summary` the
answer in sentences; :meth:`Assessment.tables` every table; :meth:`Assessment.write` the CSV and
JSON tables, the PNG and SVG figures, ``summary.json`` and one self-contained ``report.html``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import pandas as pd

from .context import RunContext
from .step import Step

#: File names of the summary and the report in the output folder.
SUMMARY_FILE = "summary.json"
REPORT_FILE = "report.html"


@dataclass
class Assessment:
    """Every answer of one run of steps.

    Attributes
    ----------
    context : RunContext
        Inputs, settings, options, notes, timings and the results by step id.
    steps : list of Step
        The steps that ran, in order.
    """

    context: RunContext
    steps: list[Step] = field(default_factory=list)

    # ---------------------------------------------------------------- access
    def __getattr__(self, name: str) -> Any:
        # the answer of a step by its id: result.feasibility, result.h2_threshold ...
        if name.startswith("_") or name in ("context", "steps"):
            raise AttributeError(name)
        results = self.context.results
        if name in results:
            return results[name]
        raise AttributeError(f"no step {name!r} ran in this assessment; the steps were "
                             f"{', '.join(s.id for s in self.steps)}")

    def __dir__(self) -> list[str]:
        return sorted(set(super().__dir__()) | set(self.context.results))

    @property
    def network(self):
        """The network as read (a cobra model)."""
        return self.context.model

    @property
    def environment(self):
        """The setting (an Environment)."""
        return self.context.environment

    @property
    def notes(self) -> list[str]:
        """What could not be computed and why, relaxations made."""
        return self.context.notes

    @property
    def timings(self) -> dict[str, float]:
        """Seconds per step."""
        return self.context.timings

    def result(self, step_id: str) -> Any:
        """The answer of one step (None when it could not be computed)."""
        return self.context.results.get(step_id)

    # ---------------------------------------------------------------- words
    def header(self) -> str:
        """The first line: which network at which setting (and, for the neutral default
        environment of a network given without one, a second line saying so)."""
        from ..network.default_environment import NEUTRAL_NAME

        env = self.environment
        from ..network.compartments import describe_compartments

        line = (f"network {self.network.id} at {env.name} ({env.conditions.describe()}"
                f"{describe_compartments(env, '; ')})")
        return f"{line}\n{env.description}" if env.name == NEUTRAL_NAME else line

    def summary_lines(self) -> list[str]:
        """The answer in short sentences, one per line, in step order."""
        lines = [self.header()]
        for step in self.steps:
            lines.extend(step.summary_lines(self.result(step.id), self.context))
        mode = self.context.settings.mode
        if mode != "native" and {"h2_threshold", "driving_force"} & {s.id for s in self.steps}:
            lines.append(f"(H2 needed and driving force in mode {mode})")
        return lines

    def summary(self) -> str:
        """:meth:`summary_lines` as one text."""
        return "\n".join(self.summary_lines())

    def summary_data(self) -> dict:
        """The answers as plain data (the keys of ``summary.json``)."""
        env = self.environment
        data: dict[str, Any] = {"network": self.network.id,
                                "environment": f"{env.name} ({env.conditions.describe()})",
                                "mode": self.context.settings.mode}
        checks = {}
        for step in self.steps:
            data.update(step.summary_data(self.result(step.id), self.context))
            check = step.verification(self.result(step.id), self.context)
            if check:
                checks[step.id] = check
        data["verifications"] = checks
        data["notes"] = list(self.notes)
        data["warnings"] = list(self.context.warnings)
        data["undetermined"] = list(self.context.undetermined)
        data["steps"] = [s.id for s in self.steps]
        return data

    # ---------------------------------------------------------------- tables and files
    def tables(self) -> dict[str, pd.DataFrame]:
        """Every table by file stem, in step order."""
        out: dict[str, pd.DataFrame] = {}
        for step in self.steps:
            out.update(step.tables(self.result(step.id), self.context))
        return out

    def write(self, out_dir: str | Path, report: bool = True, command: str = "assess") -> list[Path]:
        """Write the tables (CSV + JSON), the figures (PNG + SVG) and, with ``report``,
        ``summary.json`` and ``report.html`` into ``out_dir``, replacing what an earlier run left
        there as a whole (:class:`tfa.util.outdir.OutputFolder`: written aside and swapped in,
        so an interruption leaves the earlier result as it was).

        Returns
        -------
        list of Path
            The files written.
        """
        from ..util.outdir import OutputFolder

        with OutputFolder(out_dir, "out", command=command) as folder:
            written = self._write_files(folder.staging, report)
        return [folder.target / path.name for path in written]

    def _write_files(self, out: Path, report: bool) -> list[Path]:
        from ..report.figures import save_figure
        from ..report.tables import write_table
        from ..util.files import write_json
        from .report import write_report

        written: list[Path] = []
        tables = self.tables()
        for name, frame in tables.items():
            written.extend(write_table(frame, out / name))
        figures: dict[str, Path] = {}
        for step in self.steps:
            for stem, spec in step.figures(self.result(step.id), self.context).items():
                png, svg = save_figure(spec.make(), out / stem)
                written.extend([png, svg])
                figures[stem] = svg
        if report:
            written.append(write_json(out / SUMMARY_FILE, {**self.summary_data(),
                                                           "summary": self.summary_lines(),
                                                           "timings_s": dict(self.timings)}))
            written.append(write_report(self, tables, figures, out / REPORT_FILE))
        return written
