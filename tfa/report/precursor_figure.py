"""The per-precursor verdicts as a grid: one column per demanded compound, one row per mode.

Each cell is a tile: filled in the downhill colour when the compound is made with every step
downhill; an open tile in the uphill colour, with the number of steps that must be driven uphill
written in it, when it is made only with those (a thermodynamic bottleneck); a grey tile crossed
by a diagonal line when it cannot be made from the feed whatever the energies (a stoichiometric
gap); an empty dotted outline when the mode does not apply or the answer is undetermined.
"""

from __future__ import annotations

import math

import pandas as pd
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import FancyBboxPatch

from ..modes import MODES
from .figure_style import (DOWNHILL_COLOUR, FIGURE_WIDTH_IN, MIN_FONT_PT, REFERENCE_COLOUR,
                           UPHILL_COLOUR, mode_label, new_figure, require_columns, wrap_label)

#: How each verdict is drawn: (face colour, edge colour, line style, hatch).
TILES = {
    "downhill": (DOWNHILL_COLOUR, DOWNHILL_COLOUR, "-"),
    "uphill": ("white", UPHILL_COLOUR, "-"),
    "stoichiometric gap": ("#D9D9D9", REFERENCE_COLOUR, "-"),
    "undetermined": ("white", REFERENCE_COLOUR, ":"),
    "not applicable": ("white", REFERENCE_COLOUR, ":"),
}


def precursors_figure(frame: pd.DataFrame, title: str | None = None) -> Figure:
    """The grid of verdicts (module text).

    Parameters
    ----------
    frame : DataFrame
        The ``precursors`` table: ``mode``, ``compound``, ``verdict`` and ``uphill_set_size``.
    title : str, optional
        Axes title.

    Returns
    -------
    Figure

    Examples
    --------
    >>> f = pd.DataFrame({"mode": ["native", "native", "no_atp_strict", "no_atp_strict"],
    ...                   "compound": ["gly", "utp", "gly", "utp"],
    ...                   "verdict": ["downhill", "downhill", "uphill", "stoichiometric gap"],
    ...                   "uphill_set_size": [0, 0, 1, None]})
    >>> [t.get_text() for t in precursors_figure(f).axes[0].texts]
    ['1']
    """
    require_columns(frame, ["mode", "compound", "verdict", "uphill_set_size"], "precursors")
    compounds = list(dict.fromkeys(frame["compound"]))
    modes = list(dict.fromkeys(frame["mode"]))
    modes = [m for m in MODES if m in modes] + [m for m in modes if m not in MODES]
    n_c, n_m = len(compounds), len(modes)
    cell = min(0.42, (FIGURE_WIDTH_IN - 2.0) / max(n_c, 1))
    fig, ax = new_figure(max(1.9, 1.35 + cell * n_m))
    ax.set_xlim(-0.5, n_c - 0.5)
    ax.set_ylim(n_m - 0.5, -0.5)
    ax.set_aspect("equal")
    size = 0.8
    for _, row in frame.iterrows():
        x, y = compounds.index(row["compound"]), modes.index(row["mode"])
        verdict = str(row["verdict"])
        face, edge, style = TILES.get(verdict, TILES["undetermined"])
        ax.add_patch(FancyBboxPatch((x - size / 2, y - size / 2), size, size,
                                    boxstyle="round,pad=0,rounding_size=0.12", facecolor=face,
                                    edgecolor=edge, linestyle=style, linewidth=1.6))
        if verdict == "stoichiometric gap":
            ax.plot([x - size / 2 + 0.1, x + size / 2 - 0.1],
                    [y + size / 2 - 0.1, y - size / 2 + 0.1], color=REFERENCE_COLOUR, lw=1.2)
        elif verdict == "uphill":
            steps = pd.to_numeric(pd.Series([row["uphill_set_size"]]), errors="coerce").iloc[0]
            if not (isinstance(steps, float) and math.isnan(steps)):
                ax.text(x, y, f"{int(steps)}", ha="center", va="center", color=UPHILL_COLOUR,
                        fontsize=max(MIN_FONT_PT, 9.0), fontweight="bold")
    ax.set_xticks(range(n_c), [wrap_label(c, 12, 1) for c in compounds], rotation=60,
                  ha="left", rotation_mode="anchor")
    ax.xaxis.tick_top()
    ax.set_yticks(range(n_m), [mode_label(m) for m in modes])
    ax.tick_params(length=0)
    for side in ("top", "right", "bottom", "left"):
        ax.spines[side].set_visible(False)
    handles = [
        Line2D([], [], marker="s", ls="none", ms=10, markerfacecolor=DOWNHILL_COLOUR,
               markeredgecolor=DOWNHILL_COLOUR, label="made downhill"),
        Line2D([], [], marker="s", ls="none", ms=10, markerfacecolor="white",
               markeredgecolor=UPHILL_COLOUR, label="only with n steps driven uphill"),
        Line2D([], [], marker="s", ls="none", ms=10, markerfacecolor="#D9D9D9",
               markeredgecolor=REFERENCE_COLOUR, label="not from the feed (stoichiometric gap)"),
    ]
    if any(str(v) in ("undetermined", "not applicable") for v in frame["verdict"]):
        handles.append(Line2D([], [], marker="s", ls="none", ms=10, markerfacecolor="white",
                              markeredgecolor=REFERENCE_COLOUR,
                              label="not applicable / undetermined"))
    fig.legend(handles=handles, loc="outside lower center", ncol=2, frameon=False)
    if title:
        ax.set_title(title, pad=10)
    return fig
