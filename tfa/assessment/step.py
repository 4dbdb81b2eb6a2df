"""The shape of every analysis in an assessment: a :class:`Step`.

A step knows its question, how to answer it on a :class:`~tfa.assessment.context.RunContext`,
the tables and figures it produces, its lines in the summary (and its keys in ``summary.json``)
and its section of the HTML report. :func:`tfa.assess` and ``tfa assess`` loop over the
registered steps (:mod:`tfa.assessment.registry`); a single-analysis command runs one step
alone, so a command and the assessment cannot disagree.

Adding an analysis is one subclass and one registration line::

    class PathwayCount(Step):
        id, label, title = "pathway_counts", "pathway counts", "Reactions per pathway"
        question = "how many reactions does each pathway have?"

        def run(self, ctx):
            ...                                   # return any result object

        def tables(self, result, ctx):
            return {"pathway_counts": frame}      # columns from tfa.vocabulary

    register_step(PathwayCount())

Every method but :meth:`Step.run` has a default: no tables, no figures, no summary line, and a
report section made of the step's tables.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Callable

import pandas as pd

if TYPE_CHECKING:
    from matplotlib.figure import Figure

    from .context import RunContext


@dataclass
class FigureSpec:
    """A figure a step can draw: how to make it (called only when files are written, so that
    matplotlib is imported only then) and its caption."""

    make: Callable[[], "Figure"]
    caption: str = ""


@dataclass
class Section:
    """A section of the report as a step gives it.

    Attributes
    ----------
    title, text : str
        Heading and plain words.
    tables : list of (stem, caption)
        The step's tables shown, named by their file stems.
    figures : list of (stem, caption)
        The step's figures shown, named by their file stems.
    extra_tables : list of (caption, DataFrame)
        Tables shown in the report only (before ``tables``).
    """

    title: str
    text: str
    tables: list[tuple[str, str]] = field(default_factory=list)
    figures: list[tuple[str, str]] = field(default_factory=list)
    extra_tables: list[tuple[str, pd.DataFrame]] = field(default_factory=list)


class Step:
    """One analysis of an assessment (see the module docstring).

    Class attributes
    ----------------
    id : str
        The step's name: its key in the results, in ``--skip`` and in ``timings_s``.
    label : str
        What the progress display shows while it runs.
    title : str
        Title of its report section.
    question : str
        The question it answers, in one line (shown by ``tfa assess --help``).
    """

    id: str = ""
    label: str = ""
    title: str = ""
    question: str = ""

    def run(self, ctx: "RunContext") -> Any:
        """Answer the question; return the result (None when it could not be computed; say why
        with :meth:`RunContext.note`)."""
        raise NotImplementedError

    def tables(self, result: Any, ctx: "RunContext") -> dict[str, pd.DataFrame]:
        """File stem -> table (columns from :mod:`tfa.vocabulary`)."""
        return {}

    def figures(self, result: Any, ctx: "RunContext") -> dict[str, FigureSpec]:
        """File stem -> figure."""
        return {}

    def summary_lines(self, result: Any, ctx: "RunContext") -> list[str]:
        """The step's sentences in the summary."""
        return []

    def summary_data(self, result: Any, ctx: "RunContext") -> dict:
        """The step's keys in ``summary.json`` (plain data)."""
        return {}

    def verification(self, result: Any, ctx: "RunContext") -> dict:
        """How the answer was checked (``status``, ``check``): the result's own ``verification``
        (for a dict of results, one per key); empty when there is none."""
        if isinstance(result, dict):
            return {key: dict(getattr(r, "verification", {}) or {}) for key, r in result.items()}
        return dict(getattr(result, "verification", {}) or {})

    def sections(self, result: Any, ctx: "RunContext") -> list[Section]:
        """The step's report sections (default: one section with its tables)."""
        stems = list(self.tables(result, ctx))
        figures = self.figures(result, ctx)
        return [Section(self.title or self.id, self.question,
                        tables=[(stem, stem.replace("_", " ")) for stem in stems],
                        figures=[(stem, spec.caption) for stem, spec in figures.items()])]

    def text(self, result: Any, ctx: "RunContext") -> str:
        """What the step's command prints as text (default: its summary lines and tables)."""
        from ..report.text import table_text

        lines = self.summary_lines(result, ctx)
        parts = ["\n".join(lines)] if lines else []
        for frame in self.tables(result, ctx).values():
            if len(frame):
                parts.append(table_text(frame))
        return "\n\n".join(parts) + "\n"
