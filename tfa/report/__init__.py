"""Report layer: result tables (CSV + JSON), figures (PNG + SVG), one self-contained HTML report
and the plain-words summary.

Modules
-------
- :mod:`tfa.report.tables`: :func:`~tfa.report.tables.write_table`, read-back and comparison.
- :mod:`tfa.report.figures`: energy profile, H2 scan, census, ranges; ``save_figure``.
- :mod:`tfa.report.html`: :class:`~tfa.report.html.ReportSection`, ``build_report``.
- :mod:`tfa.report.text`: the answers in plain words and plain-text tables.

The figures module imports matplotlib (Agg backend); it is loaded only when one of its names
is used.
"""

from __future__ import annotations

from typing import Any

from .html import ReportSection, build_report
from .tables import compare_table_files, write_table

_FIGURE_NAMES = ("energy_profile_figure", "h2_scan_figure", "census_figure", "ranges_figure",
                 "save_figure")

__all__ = ["ReportSection", "build_report", "write_table",
           "compare_table_files", *_FIGURE_NAMES]


def __getattr__(name: str) -> Any:
    if name in _FIGURE_NAMES:
        from . import figures

        return getattr(figures, name)
    raise AttributeError(f"module 'tfa.report' has no attribute {name!r}")
