"""Heatmaps of a condition map (and, for a map along one axis such as a mixing line, a figure of
feasibility and margins along it: :func:`line_figure`): feasibility, uphill-set size, driving force and H2 threshold over
two condition axes, one figure per mode (matplotlib, Agg backend), written as PNG and SVG through
:func:`tfa.report.figures.save_figure` (atomic).

Input: a :class:`pandas.DataFrame` with one row per grid point and mode and the columns ``x``,
``y`` (axis values), ``mode``, ``feasible`` (bool or NaN where the point failed),
``uphill_size``, ``driving_force_kJ`` and ``h2_threshold`` (mol/L; NaN where not computed).
Axes are drawn by grid index with the values as tick labels, so log-spaced axes (H2 supply)
stay evenly spaced. Colours: Okabe-Ito for feasibility, cividis (colour-vision-deficiency
friendly, Nuñez, Anderton & Renslow, PLoS ONE 13 (2018) e0199239) for the numbers; failed or
missing points are grey.
"""

from __future__ import annotations

import logging
import math
from pathlib import Path
from typing import Sequence

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from matplotlib.colors import ListedColormap  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.ticker import MaxNLocator  # noqa: E402

from ..errors import InputError  # noqa: E402
from ..modes import MODES  # noqa: E402
from .figure_style import FIGURE_WIDTH_IN, OKABE_ITO, STYLE, save_figure  # noqa: E402

log = logging.getLogger(__name__)

#: Panels of a map figure: column, title, how values are shown.
PANELS = (
    ("feasible", "feasible", "binary"),
    ("uphill_set_size", "size of the minimal uphill set", "integer"),
    ("driving_force_kJ_per_mol", "max-min driving force, kJ/mol", "float"),
    ("h2_threshold", "H2 threshold, log10(mol/L)", "log"),
)
#: Words for the condition axes, by table column.
AXIS_LABELS = {
    "temperature_C": "temperature, °C",
    "pH": "pH",
    "ionic_strength_mol_per_L": "ionic strength, mol/L",
    "h2_activity": "H2 supply, mol/L (gas feed: bar)",
    "pressure_bar": "pressure, bar",
    "vent_fraction": "share of vent fluid (0: seawater, 1: vent fluid)",
}
#: Largest grid whose cells get their value written in.
ANNOTATE_MAX_CELLS = 144
_MISSING = "#BBBBBB"


def _grid(frame: pd.DataFrame, column: str, x_column: str, y_column: str, xs: list,
          ys: list) -> np.ndarray:
    values = np.full((len(ys), len(xs)), np.nan)
    xi = {v: i for i, v in enumerate(xs)}
    yi = {v: i for i, v in enumerate(ys)}
    for x, y, v in zip(frame[x_column], frame[y_column], frame[column]):
        if v is None or (isinstance(v, float) and math.isnan(v)):
            continue
        values[yi[y], xi[x]] = float(v)
    return values


def _ticks(values: Sequence[float]) -> list[str]:
    return [f"{v:.3g}" for v in values]


def map_figure(frame: pd.DataFrame, x_column: str, y_column: str, mode: str,
               title: str | None = None) -> Figure:
    """Four heatmaps (feasible, uphill-set size, driving force, H2 threshold) of one mode; the
    axes are the table's columns ``x_column`` and ``y_column``."""
    needed = [x_column, y_column, "mode"] + [p[0] for p in PANELS]
    missing = [c for c in needed if c not in frame.columns]
    if missing:
        raise InputError(f"map figure: the table lacks the column(s) {', '.join(missing)}")
    rows = frame[frame["mode"] == mode]
    if rows.empty:
        raise InputError(f"map figure: no rows for mode {mode!r}; modes present: "
                         f"{', '.join(sorted(frame['mode'].unique()))}")
    xs = sorted(rows[x_column].unique())
    ys = sorted(rows[y_column].unique())
    annotate = len(xs) * len(ys) <= ANNOTATE_MAX_CELLS
    floor = (_grid(rows.assign(h2_at_range_floor=rows["h2_at_range_floor"].astype(float)),
                   "h2_at_range_floor", x_column, y_column, xs, ys) > 0.5
             if "h2_at_range_floor" in rows.columns else np.zeros((len(ys), len(xs)), bool))
    with plt.rc_context(STYLE):
        fig, axes = plt.subplots(2, 2, figsize=(FIGURE_WIDTH_IN, FIGURE_WIDTH_IN * 0.78),
                                 layout="constrained")
        for ax, (column, label, kind) in zip(axes.ravel(), PANELS):
            values = _grid(rows, column, x_column, y_column, xs, ys)
            shown = values.copy()
            if kind == "log":
                with np.errstate(divide="ignore", invalid="ignore"):
                    shown = np.where(values > 0, np.log10(values), np.nan)
            if kind == "binary":
                cmap = ListedColormap([OKABE_ITO["vermillion"], OKABE_ITO["blue"]])
                cmap.set_bad(_MISSING)
                image = ax.imshow(np.ma.masked_invalid(shown), origin="lower", aspect="auto",
                                  cmap=cmap, vmin=0, vmax=1, interpolation="nearest")
                bar = fig.colorbar(image, ax=ax, ticks=[0.25, 0.75], shrink=0.85)
                bar.ax.set_yticklabels(["no", "yes"])
            else:
                cmap = plt.get_cmap("cividis").copy()
                cmap.set_bad(_MISSING)
                image = ax.imshow(np.ma.masked_invalid(shown), origin="lower", aspect="auto",
                                  cmap=cmap, interpolation="nearest")
                bar = fig.colorbar(image, ax=ax, shrink=0.85)
                if kind == "integer":
                    bar.locator = MaxNLocator(integer=True)
                    bar.update_ticks()
            if annotate:
                finite = shown[np.isfinite(shown)]
                middle = float(np.nanmean(finite)) if finite.size else 0.0
                for (iy, ix), v in np.ndenumerate(shown):
                    if not np.isfinite(v):
                        continue
                    text = {"binary": "yes" if v > 0.5 else "no", "integer": f"{v:.0f}",
                            "float": f"{v:.1f}", "log": f"{v:.1f}"}[kind]
                    if kind == "log" and floor[iy, ix]:
                        text = "≤" + text   # feasible already at the bottom of the range
                    colour = "white" if (kind == "binary" or v < middle) else "black"
                    ax.text(ix, iy, text, ha="center", va="center", fontsize=8, color=colour)
            if kind == "log" and floor.any():
                label += "\n(≤: at the bottom of the range searched)"
            ax.set_title(label)
            ax.set_xticks(range(len(xs)), _ticks(xs), rotation=45 if len(xs) > 6 else 0)
            ax.set_yticks(range(len(ys)), _ticks(ys))
            ax.set_xlabel(AXIS_LABELS.get(x_column, x_column))
            ax.set_ylabel(AXIS_LABELS.get(y_column, y_column))
        label = MODES[mode].title if mode in MODES else mode
        fig.suptitle(title or f"condition map, {label} (grey: failed or not computed)")
    return fig


def write_map_figures(frame: pd.DataFrame, x_column: str, y_column: str, folder: str | Path,
                      stem: str = "map") -> list[Path]:
    """One PNG + SVG per mode, ``<folder>/<stem>_<mode>.png|svg``; returns the paths."""
    paths: list[Path] = []
    for mode in sorted(frame["mode"].unique()):
        fig = map_figure(frame, x_column, y_column, mode)
        paths.extend(save_figure(fig, Path(folder) / f"{stem}_{mode}"))
    return paths


def line_figure(frame: pd.DataFrame, x_column: str, mode: str, title: str | None = None) -> Figure:
    """Answers along one axis (a mixing line: ``x_column`` = ``vent_fraction``) of one mode, in
    three stacked panels sharing the axis: feasibility (blue dot: feasible, vermillion cross: not,
    with the size of the minimal uphill set beside it); the margins, the max-min driving force
    (kJ/mol, zero line dashed) and the H2 margin log10(H2 of the mixture / H2 threshold) on a
    second scale; and, when the table has them, the mixture's temperature (°C) and pH."""
    if x_column not in frame.columns or "feasible" not in frame.columns:
        raise InputError(f"line figure: the table lacks {x_column} or feasible")
    rows = frame[frame["mode"] == mode].sort_values(x_column)
    if rows.empty:
        raise InputError(f"line figure: no rows for mode {mode!r}")
    x = rows[x_column].astype(float).to_numpy()
    mixture = "pH" in rows.columns and "temperature_C" in rows.columns
    with plt.rc_context(STYLE):
        fig, axes = plt.subplots(3 if mixture else 2, 1, sharex=True, layout="constrained",
                                 figsize=(FIGURE_WIDTH_IN, FIGURE_WIDTH_IN * (0.95 if mixture else 0.7)))
        ax = axes[0]
        feasible = rows["feasible"].map(lambda v: None if v is None or (isinstance(v, float) and math.isnan(v))
                                        else bool(v))
        yes = feasible.to_numpy() == True  # noqa: E712 - None stays neither
        no = feasible.to_numpy() == False  # noqa: E712
        ax.scatter(x[yes], np.ones(yes.sum()), marker="o", s=40, color=OKABE_ITO["blue"], label="feasible")
        ax.scatter(x[no], np.zeros(no.sum()), marker="x", s=40, color=OKABE_ITO["vermillion"],
                   label="infeasible")
        missing = ~(yes | no)
        if missing.any():
            ax.scatter(x[missing], np.full(missing.sum(), 0.5), marker="s", s=30, color=_MISSING,
                       label="failed")
        if "uphill_set_size" in rows.columns:
            for xv, flag, size in zip(x, no, rows["uphill_set_size"]):
                if flag and size is not None and not (isinstance(size, float) and math.isnan(size)):
                    ax.annotate(f"{int(size)} uphill", (xv, 0.0), textcoords="offset points",
                                xytext=(0, 8), ha="center", fontsize=7)
        ax.set_yticks([0, 1], ["no", "yes"])
        ax.set_ylim(-0.5, 1.6)
        ax.set_title("feasible (label: size of the minimal uphill set)")
        ax = axes[1]
        force = pd.to_numeric(rows.get("driving_force_kJ_per_mol"), errors="coerce")
        ax.plot(x, force, marker="o", color=OKABE_ITO["blue"], label="max-min driving force")
        ax.axhline(0.0, color="0.4", linestyle="--", linewidth=0.8)
        ax.set_ylabel("driving force, kJ/mol")
        ax.set_title("margins")
        if "h2_margin_decades" in rows.columns:
            twin = ax.twinx()
            margin = pd.to_numeric(rows["h2_margin_decades"], errors="coerce")
            twin.plot(x, margin, marker="s", color=OKABE_ITO["orange"], label="H2 margin")
            twin.set_ylabel("H2 margin, log10(H2 / threshold)")
            lines = ax.get_lines()[:1] + twin.get_lines()
            ax.legend(lines, [ln.get_label() for ln in lines], loc="best", fontsize=7)
        if mixture:
            ax = axes[2]
            ax.plot(x, rows["temperature_C"].astype(float), marker="o", color=OKABE_ITO["vermillion"],
                    label="temperature")
            ax.set_ylabel("temperature, °C")
            twin = ax.twinx()
            twin.plot(x, rows["pH"].astype(float), marker="s", color=OKABE_ITO["bluish_green"], label="pH")
            twin.set_ylabel("pH")
            lines = ax.get_lines() + twin.get_lines()
            ax.legend(lines, [ln.get_label() for ln in lines], loc="best", fontsize=7)
            ax.set_title("the mixture")
        axes[-1].set_xlabel(AXIS_LABELS.get(x_column, x_column))
        label = MODES[mode].title if mode in MODES else mode
        kind = "mixing line" if x_column == "vent_fraction" else "condition line"
        fig.suptitle(title or f"{kind}, {label} (grey: failed or not computed)")
    return fig


def write_line_figures(frame: pd.DataFrame, x_column: str, folder: str | Path,
                       stem: str = "map") -> list[Path]:
    """One PNG + SVG per mode of a one-axis map, ``<folder>/<stem>_<mode>.png|svg``."""
    paths: list[Path] = []
    for mode in sorted(frame["mode"].unique()):
        paths.extend(save_figure(line_figure(frame, x_column, mode), Path(folder) / f"{stem}_{mode}"))
    return paths
