"""The route-comparison figure: one row per carbon-fixation route, five measures side by side.

Left: the verdict with the demand met by that route alone, as a bar: the max-min driving force
(kJ/mol, blue, to the right) when it runs downhill throughout, or the size of its minimal uphill
set (vermillion, to the left, its members written beside it). Middle: the H2 window in which the
route runs, drawn from its least H2 to the top of the range searched (the least H2 is computed;
that the route runs at every level above it is assumed, as it does when H2 is only consumed), on
a log axis, with the setting's H2 as a dashed line. Then what the route costs per carbon fixed in
its own steady state: H2 (mol H2 per mol C), and ATP made (wide bar) and spent (narrow bar, mol
ATP per mol C). Right: the distance to a flipped verdict in σ of the energies' sources (an
exact minimum for an infeasible route, an upper bound, "≤", for a feasible one; "> 10σ" when
none was found within the cap). Reads only the plain ``route_comparison`` table.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
from matplotlib.figure import Figure

from .figure_style import (DOWNHILL_COLOUR, FIGURE_WIDTH_IN, MIN_FONT_PT, OKABE_ITO,
                           REFERENCE_COLOUR, STYLE, THRESHOLD_COLOUR, UPHILL_COLOUR,
                           require_columns, wrap_label)

__all__ = ["route_comparison_figure"]


def route_comparison_figure(frame: pd.DataFrame, h2_range: tuple[float, float],
                            h2_setting: float | None = None, unit: str = "mol/L",
                            title: str | None = None) -> Figure:
    """Routes x measures (see the module text).

    Parameters
    ----------
    frame : DataFrame
        The ``route_comparison`` table (``name``, ``feasible``, ``driving_force_kJ_per_mol``,
        ``uphill_set_size``, ``uphill_set``, ``h2_threshold``, ``h2_per_carbon``,
        ``atp_made_per_carbon``, ``atp_spent_per_carbon``, ``margin_sigma``, ``margin_status``).
    h2_range : (float, float)
        H2 range searched [mol/L, or bar for a gas feed].
    h2_setting : float, optional
        The setting's H2 supply, drawn as a dashed line.
    """
    require_columns(frame, ["name", "feasible", "driving_force_kJ_per_mol", "uphill_set_size",
                            "uphill_set", "h2_threshold", "h2_per_carbon", "atp_made_per_carbon",
                            "atp_spent_per_carbon", "margin_sigma", "margin_status"],
                    "route comparison figure")
    n = len(frame)
    import matplotlib.pyplot as plt

    with plt.rc_context(STYLE):
        fig, axes = plt.subplots(1, 5, figsize=(FIGURE_WIDTH_IN * 1.25, 1.6 + 0.55 * n),
                                 sharey=True, layout="constrained",
                                 gridspec_kw={"width_ratios": [1.3, 1.2, 0.7, 0.7, 0.7]})
    ax_verdict, ax_h2, ax_h2c, ax_atp, ax_margin = axes
    y = np.arange(n)[::-1]
    labels = [wrap_label(str(name), 22, 3) for name in frame["name"]]

    # 1. verdict: driving force (feasible) or uphill steps (infeasible)
    for yi, (_, row) in zip(y, frame.iterrows()):
        if row["feasible"] is True or row["feasible"] == 1:
            b = float(row["driving_force_kJ_per_mol"])
            value = b if math.isfinite(b) else 0.0
            ax_verdict.barh(yi, value, color=DOWNHILL_COLOUR, height=0.6)
            ax_verdict.text(value, yi, f" {b:.1f}" if math.isfinite(b) else " runs",
                            va="center", ha="left", fontsize=MIN_FONT_PT)
        elif row["uphill_set_size"] is not None and not _missing(row["uphill_set_size"]):
            size = float(row["uphill_set_size"])
            ax_verdict.barh(yi, -size, color=UPHILL_COLOUR, height=0.6)
            ax_verdict.text(0, yi, f" {int(size)} uphill: {wrap_label(str(row['uphill_set']), 24, 2)}",
                            va="center", ha="left", fontsize=MIN_FONT_PT)
        else:
            ax_verdict.text(0, yi, " demand not met", va="center", ha="left",
                            fontsize=MIN_FONT_PT, color=REFERENCE_COLOUR)
    ax_verdict.axvline(0, color="black", linewidth=0.8)
    low, high = ax_verdict.get_xlim()
    ax_verdict.set_xlim(min(low, -1.0) * 1.1, max(high, 1.0) * 1.6)
    ax_verdict.set_xlabel("left: steps uphill\nright: max-min driving force (kJ/mol)")
    ax_verdict.set_yticks(y, labels)
    ax_verdict.set_title("runs alone?", loc="left")

    # 2. H2 window
    lo, hi = h2_range
    for yi, threshold in zip(y, frame["h2_threshold"]):
        if threshold is not None and not _missing(threshold):
            ax_h2.plot([threshold, hi], [yi, yi], color=DOWNHILL_COLOUR, linewidth=5,
                       solid_capstyle="butt")
            ax_h2.plot([threshold], [yi], marker="|", color=THRESHOLD_COLOUR, markersize=14,
                       markeredgewidth=2)
        else:
            ax_h2.text(math.sqrt(lo * hi), yi, "no H2 level in range", va="center", ha="center",
                       fontsize=MIN_FONT_PT, color=REFERENCE_COLOUR)
    if h2_setting is not None:
        ax_h2.axvline(h2_setting, color=REFERENCE_COLOUR, linestyle="--", linewidth=1)
        ax_h2.text(h2_setting, y.max() + 0.5, " setting", fontsize=MIN_FONT_PT,
                   color=REFERENCE_COLOUR, va="bottom")
    ax_h2.set_xscale("log")
    ax_h2.set_xlim(lo, hi)
    ax_h2.set_xlabel(f"H2 supply ({unit})\nbar: where the route runs")
    ax_h2.set_title("H2 window", loc="left")

    # 3. H2 per carbon fixed
    _bars(ax_h2c, y, frame["h2_per_carbon"], DOWNHILL_COLOUR, "{:.3g}")
    ax_h2c.set_xlabel("H2 per\nC fixed")
    ax_h2c.set_title("H2 (mol/mol)", loc="left")

    # 4. ATP made (wide) and spent (narrow) per carbon fixed
    _bars(ax_atp, y, frame["atp_made_per_carbon"], "#BBBBBB", "{:.3g}")
    _bars(ax_atp, y, frame["atp_spent_per_carbon"], REFERENCE_COLOUR, "", height=0.25)
    ax_atp.set_xlabel("ATP per C: made\n(light), spent (dark)")
    ax_atp.set_title("ATP (mol/mol)", loc="left")

    # 5. distance to a flipped verdict
    for yi, (_, row) in zip(y, frame.iterrows()):
        sigma, status = row["margin_sigma"], str(row["margin_status"] or "")
        if not _missing(sigma):
            ax_margin.barh(yi, float(sigma), color=OKABE_ITO["bluish_green"], height=0.6)
            bound = "" if status == "proven" else "≤"
            ax_margin.text(float(sigma), yi, f" {bound}{float(sigma):.3g}σ", va="center",
                           ha="left", fontsize=MIN_FONT_PT)
        elif status.startswith("none within"):
            ax_margin.text(0, yi, " > " + status.split("within ", 1)[1].replace(" ", ""),
                           va="center", ha="left", fontsize=MIN_FONT_PT)
        else:
            ax_margin.text(0, yi, " not asked", va="center", ha="left", fontsize=MIN_FONT_PT,
                           color=REFERENCE_COLOUR)
    ax_margin.set_xlim(0, max(ax_margin.get_xlim()[1], 1.0) * 1.5)
    ax_margin.set_xlabel("σ of the energies\nto flip it")
    ax_margin.set_title("verdict margin", loc="left")
    ax_margin.set_ylim(-0.7, n - 0.3 + 0.5)
    for ax in axes:
        ax.grid(axis="x", color="#E5E5E5", linewidth=0.6)
        ax.set_axisbelow(True)
    if title:
        fig.suptitle(title)
    return fig


def _bars(ax, y, values, colour: str, label: str, height: float = 0.6) -> None:
    """Horizontal bars of one measure, "n/a" where a route has no value; ``label`` formats the
    value written beside each bar ("" for none)."""
    top = max([float(v) for v in values if not _missing(v)] + [1.0])
    for yi, value in zip(y, values):
        if _missing(value):
            if label:
                ax.text(0, yi, " n/a", va="center", ha="left", fontsize=MIN_FONT_PT,
                        color=REFERENCE_COLOUR)
            continue
        ax.barh(yi, float(value), color=colour, height=height)
        if label:
            ax.text(float(value), yi, " " + label.format(float(value)), va="center", ha="left",
                    fontsize=MIN_FONT_PT)
    ax.set_xlim(0, top * 1.6)


def _missing(value) -> bool:
    try:
        return value is None or (isinstance(value, float) and math.isnan(value)) or pd.isna(value)
    except (TypeError, ValueError):
        return False
