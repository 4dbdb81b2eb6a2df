"""The look of every figure (Okabe-Ito colours, fonts, size) and writing figures as PNG and SVG.

Colours come from the colour-blind-safe palette of Okabe and Ito (M. Okabe, K. Ito, "Color
Universal Design", 2008), fixed per role so that a mode has the same colour in every figure
(:mod:`tfa.modes`). Figures are written atomically, PNG and SVG side by side.
"""

from __future__ import annotations

import io
import logging
import math
import re
from pathlib import Path
from typing import Sequence

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import pandas as pd  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402

from ..errors import InputError  # noqa: E402
from ..modes import MODES  # noqa: E402
from ..util.files import write_bytes  # noqa: E402

logger = logging.getLogger(__name__)

#: Okabe-Ito colours (colour-blind safe), by name.
OKABE_ITO = {
    "black": "#000000",
    "orange": "#E69F00",
    "sky_blue": "#56B4E9",
    "bluish_green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "reddish_purple": "#CC79A7",
}

#: Colours of roles shared by several figures.
DOWNHILL_COLOUR = OKABE_ITO["blue"]
UPHILL_COLOUR = OKABE_ITO["vermillion"]
REFERENCE_COLOUR = "#6E6E6E"
THRESHOLD_COLOUR = OKABE_ITO["vermillion"]
#: Steps near equilibrium in the energy profile.
NEAR_EQUILIBRIUM_COLOUR = OKABE_ITO["orange"]

#: Smallest font used anywhere in a figure, pt.
MIN_FONT_PT = 8.0

#: Width of every figure, inches (shown about 900 px wide in the HTML report).
FIGURE_WIDTH_IN = 8.0

#: Keyword for horizontal box plots ("orientation" from matplotlib 3.10, "vert" before).
HORIZONTAL_BOX = ({"orientation": "horizontal"}
                   if tuple(int(p) for p in matplotlib.__version__.split(".")[:2]) >= (3, 10)
                   else {"vert": False})

#: Marker per kind of energy in the census (cycled).
KIND_MARKERS = ("o", "s", "^", "D", "v")

STYLE = {
    "font.size": 10.0,
    "axes.titlesize": 11.0,
    "axes.labelsize": 10.0,
    "xtick.labelsize": 9.0,
    "ytick.labelsize": 9.0,
    "legend.fontsize": 9.0,
    "axes.spines.top": False,
    "axes.spines.right": False,
    "svg.fonttype": "path",  # glyphs as paths: the SVG looks the same on every machine
    "svg.hashsalt": "tfa",  # stable element ids in the SVG
}


def new_figure(height_in: float, nrows: int = 1, sharex: bool = False, **kwargs):
    with plt.rc_context(STYLE):
        fig, axes = plt.subplots(nrows, 1, figsize=(FIGURE_WIDTH_IN, height_in), sharex=sharex,
                                 layout="constrained", **kwargs)
    return fig, axes


def require_columns(frame: pd.DataFrame, columns: Sequence[str], figure: str) -> None:
    if not isinstance(frame, pd.DataFrame):
        raise InputError(f"{figure}: expected a pandas DataFrame, got {type(frame).__name__}")
    missing = [c for c in columns if c not in frame.columns]
    if missing:
        raise InputError(
            f"{figure}: the table lacks the column(s) {', '.join(missing)}; it has "
            f"{', '.join(map(str, frame.columns)) or 'no columns'}; add them"
        )
    if frame.empty:
        raise InputError(f"{figure}: the table has no rows; nothing to draw")


def mode_label(mode: str) -> str:
    """Short label of a mode (:mod:`tfa.modes`), the id wrapped when it is not registered."""
    return MODES[mode].label if mode in MODES else wrap_label(mode, 16, 1)


def wrap_label(text: str, width: int = 14, max_lines: int = 3) -> str:
    """Wrap a label at spaces, underscores and hyphens (kept), shortened beyond ``max_lines``.

    >>> wrap_label("step_07_of_a_long_reaction_name", 20, 1)
    'step_07_o…ction_name'
    >>> wrap_label("methylene_THF_reductase", 12)
    'methylene_\\nTHF_\\nreductase'
    """
    text = str(text)
    if max_lines == 1:  # one line: keep both ends, which usually tell reactions apart
        if len(text) <= width:
            return text
        head = (width - 1) // 2
        return text[:head] + "\u2026" + text[len(text) - (width - 1 - head):]
    pieces = [p for p in re.split(r"(?<=[_\-\s])", text) if p]
    lines: list[str] = []
    current = ""
    for piece in pieces:
        if current and len(current) + len(piece.rstrip()) > width:
            lines.append(current.rstrip())
            current = ""
        while len(piece) > width:  # a single piece longer than a line: cut it
            lines.append(piece[:width])
            piece = piece[width:]
        current += piece
    if current.strip():
        lines.append(current.rstrip())
    if len(lines) > max_lines:
        lines = lines[:max_lines]
        lines[-1] = lines[-1][: max(1, width - 1)] + "\u2026"
    return "\n".join(lines) if lines else text


def scientific(value: float) -> str:
    """A number for a figure label in mathtext, e.g. ``3.0e-05`` -> ``$3.0\\times10^{-5}$``.

    >>> print(scientific(3e-5), scientific(0.25))
    $3.0\\times10^{-5}$ 0.25
    """
    if value == 0 or 1e-2 <= abs(value) < 1e4:
        return f"{value:.3g}"
    exponent = int(math.floor(math.log10(abs(value))))
    mantissa = value / 10**exponent
    return f"${mantissa:.1f}\\times10^{{{exponent}}}$"


def figure_bytes(fig: Figure, fmt: str, dpi: int = 150) -> bytes:
    """Render a figure to PNG or SVG bytes in memory (no file touched)."""
    if fmt not in ("png", "svg"):
        raise InputError(f"figure format {fmt!r} unknown; use 'png' or 'svg'")
    buffer = io.BytesIO()
    metadata = {"Software": "tfa"} if fmt == "png" else {"Creator": "tfa", "Date": None}
    with plt.rc_context(STYLE):
        fig.savefig(buffer, format=fmt, dpi=dpi, metadata=metadata, bbox_inches="tight",
                    pad_inches=0.08)
    return buffer.getvalue()


def save_figure(fig: Figure, path_stem: str | Path, dpi: int = 150,
                close: bool = True) -> tuple[Path, Path]:
    """Write a figure as ``<stem>.png`` and ``<stem>.svg``, each atomically.

    Parameters
    ----------
    fig : Figure
        The figure.
    path_stem : str or Path
        Path without suffix (a suffix, if any, is replaced).
    dpi : int
        Resolution of the PNG.
    close : bool
        Close the figure afterwards (frees its memory).

    Returns
    -------
    (Path, Path)
        The PNG and SVG paths.
    """
    stem = Path(path_stem)
    if stem.suffix.lower() in (".png", ".svg"):
        stem = stem.with_suffix("")
    png = write_bytes(stem.with_name(stem.name + ".png"), figure_bytes(fig, "png", dpi))
    svg = write_bytes(stem.with_name(stem.name + ".svg"), figure_bytes(fig, "svg", dpi))
    if close:
        plt.close(fig)
    logger.info("figure written: %s (.png, .svg)", stem)
    return png, svg
