"""Figures of a network assessment, drawn with matplotlib (Agg backend, no display).

Each figure function takes a plain :class:`pandas.DataFrame` with documented columns and returns a
:class:`matplotlib.figure.Figure`; :func:`save_figure` writes it as PNG and SVG atomically. The
figures know nothing of the analyses, so they can be drawn from any table with these columns.

Figures
-------
- :func:`energy_profile_figure`: Delta_r G' of each step of a path, horizontal bars with σ whiskers.
- :func:`h2_scan_figure`: feasibility, uphill-set size and driving force against dissolved H2.
- :func:`census_figure`: distribution of Delta_r G' per mode, with counts of exergonic steps.
- :func:`ranges_figure`: the feasible interval of Delta_r G' per reaction.

Colours, fonts and writing: :mod:`tfa.report.figure_style`. Energies are in kJ/mol,
concentrations in mol/L (gases: bar).
"""

from __future__ import annotations

import logging
import math
from typing import Sequence

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.lines import Line2D  # noqa: E402
from matplotlib.ticker import MaxNLocator  # noqa: E402

from ..errors import InputError  # noqa: E402
from ..modes import MODES  # noqa: E402
from .figure_style import (DOWNHILL_COLOUR, HORIZONTAL_BOX, KIND_MARKERS, MIN_FONT_PT,  # noqa: E402
                           NEAR_EQUILIBRIUM_COLOUR, OKABE_ITO, REFERENCE_COLOUR, THRESHOLD_COLOUR, UPHILL_COLOUR,
                           mode_label, new_figure, require_columns, save_figure, scientific,
                           wrap_label)

__all__ = ["census_figure", "energy_profile_figure", "h2_scan_figure", "ranges_figure",
           "save_figure", "select_ranges"]

logger = logging.getLogger(__name__)

# ---------------------------------------------------------------------------------------------
# 1. energy profile
# ---------------------------------------------------------------------------------------------


def energy_profile_figure(frame: pd.DataFrame, title: str | None = None,
                          near_equilibrium: float | None = None) -> Figure:
    """ΔrG' of each step of a path as a horizontal bar, with its uncertainty as a whisker,
    coloured by whether the step is near equilibrium. Steps are never summed. The flux written
    beside each bar is its size in the direction the step runs.

    One bar per step, the first step on top. A bar's length is the step's ΔrG' in the direction
    it runs (kJ/mol); the whisker is ± σ of its ΔrG'° when given; a step with
    |ΔrG'| < ``near_equilibrium`` (the shaded band) is drawn in the near-equilibrium colour, a
    step that runs uphill (ΔrG' > 0) hatched, a step without flux (a named step that did not run)
    pale with a dashed edge. The flux of each step is written beside its bar.

    Parameters
    ----------
    frame : DataFrame
        One row per step, in path order. Columns: ``step`` (reaction id or label),
        ``delta_g_kJ_per_mol`` (ΔrG' at the solution); optional ``sigma_kJ_per_mol``,
        ``flux``, ``compound_in`` and ``compound_out`` (shown in the step's label).
    title : str, optional
        Axes title.
    near_equilibrium : float, optional
        |ΔrG'| below which a step is near equilibrium, kJ/mol (default RT ln 10 at 25 degC,
        5.71 kJ/mol).

    Returns
    -------
    Figure

    Examples
    --------
    >>> fig = energy_profile_figure(pd.DataFrame({"step": ["a", "b"],
    ...                                           "delta_g_kJ_per_mol": [-15.0, -2.0]}))
    >>> fig.axes[0].get_xlabel()
    "ΔrG' of the step (kJ/mol)"
    >>> from matplotlib.colors import to_hex
    >>> [to_hex(bar.get_facecolor()) for bar in fig.axes[0].containers[0]]  # far, near equilibrium
    ['#0072b2', '#e69f00']
    """
    require_columns(frame, ["step", "delta_g_kJ_per_mol"], "energy profile")
    steps = [str(s) for s in frame["step"]]
    dg = pd.to_numeric(frame["delta_g_kJ_per_mol"], errors="coerce").to_numpy(dtype=float)
    if not np.all(np.isfinite(dg)):
        bad = [steps[i] for i in np.flatnonzero(~np.isfinite(dg))]
        raise InputError(f"energy profile: step(s) {', '.join(bad)} have no finite ΔrG'; "
                         "give a value in kJ/mol for every step of the route")
    limit = 8.314462618e-3 * 298.15 * math.log(10.0) if near_equilibrium is None else near_equilibrium
    sigma = (pd.to_numeric(frame["sigma_kJ_per_mol"], errors="coerce").to_numpy(dtype=float)
             if "sigma_kJ_per_mol" in frame.columns else np.full(len(dg), np.nan))
    flux = (pd.to_numeric(frame["flux"], errors="coerce").to_numpy(dtype=float)
            if "flux" in frame.columns else None)
    labels = []
    for k, step in enumerate(steps):
        text = step
        if "compound_in" in frame.columns and "compound_out" in frame.columns:
            into, out = frame["compound_in"].iloc[k], frame["compound_out"].iloc[k]
            if isinstance(into, str) and isinstance(out, str) and into and out:
                text += f"  {into} → {out}"
        labels.append(wrap_label(text, 34, 1))
    n = len(steps)
    fig, ax = new_figure(max(2.6, 0.42 * n + 1.6))
    y = np.arange(n)[::-1]
    near = np.abs(dg) < limit
    colours = [NEAR_EQUILIBRIUM_COLOUR if e else DOWNHILL_COLOUR for e in near]
    ax.axvspan(-limit, limit, color=REFERENCE_COLOUR, alpha=0.12, linewidth=0)
    bars = ax.barh(y, dg, height=0.62, color=colours, edgecolor=OKABE_ITO["black"], linewidth=0.6)
    idle = np.zeros(n, bool) if flux is None else ~(np.abs(flux) > 0)
    for bar, g, no_flux in zip(bars, dg, idle):
        if g > 0:
            bar.set_hatch("///")
        if no_flux:   # a named step that did not run: drawn pale, with a dashed edge
            bar.set_alpha(0.35)
            bar.set_linestyle("--")
    whisker = np.where(np.isfinite(sigma), sigma, 0.0)
    if np.any(whisker > 0):
        ax.errorbar(dg, y, xerr=whisker, fmt="none", ecolor=OKABE_ITO["black"], elinewidth=1.0,
                    capsize=3)
    ax.axvline(0.0, color=OKABE_ITO["black"], linewidth=0.8)
    span = float(max(np.max(np.abs(dg) + whisker), limit))
    ax.set_xlim(min(-limit, float(np.min(dg - whisker))) - 0.35 * span,
                max(limit, float(np.max(dg + whisker))) + 0.35 * span)
    if flux is not None and n <= 30:
        right = ax.get_xlim()[1]
        for k in range(n):
            ax.annotate(f"flux {abs(flux[k]):.3g}", (right, y[k]), xytext=(-3, 0),
                        textcoords="offset points", ha="right", va="center", fontsize=MIN_FONT_PT,
                        color=REFERENCE_COLOUR)
    ax.set_yticks(y)
    ax.set_yticklabels(labels, fontsize=9.0 if n <= 14 else MIN_FONT_PT)
    ax.set_xlabel("ΔrG' of the step (kJ/mol)")
    from matplotlib.patches import Patch

    handles = [Patch(facecolor=DOWNHILL_COLOUR, edgecolor="black", label=f"|ΔrG'| ≥ {limit:.1f} kJ/mol"),
               Patch(facecolor=NEAR_EQUILIBRIUM_COLOUR, edgecolor="black",
                     label=f"near equilibrium, |ΔrG'| < {limit:.1f} kJ/mol")]
    if np.any(dg > 0):
        handles.append(Patch(facecolor="white", edgecolor="black", hatch="///",
                             label="uphill (ΔrG' > 0)"))
    if np.any(idle):
        handles.append(Patch(facecolor="white", edgecolor="black", linestyle="--",
                             label="carries no flux (ΔrG' it would have)"))
    if np.any(whisker > 0):
        handles.append(Line2D([], [], color="black", lw=1.0, label="± σ of ΔrG'°"))
    ax.legend(handles=handles, loc="lower left", frameon=True, framealpha=0.9, edgecolor="none",
              fontsize=MIN_FONT_PT)
    ax.set_title(title or f"Energy profile: {n} steps, each at its own flux")
    return fig


# ---------------------------------------------------------------------------------------------
# 2. H2 scan
# ---------------------------------------------------------------------------------------------

_H2_AXIS_LABELS = {
    "mol/L": "dissolved H2 (mol/L)",
    "bar": "H2 partial pressure (bar)",
}


def h2_scan_figure(frame: pd.DataFrame, unit: str = "mol/L", threshold: float | None = None,
                   title: str | None = None,
                   windows: Sequence[tuple[float, float]] = ()) -> Figure:
    """Feasibility, size of the minimal uphill set and driving force against the H2 supply.

    Three stacked panels on a shared logarithmic H2 axis; the H2 threshold (the smallest H2 at
    which the network runs) as a vertical line when given, and the feasible H2 windows
    ``windows`` ((low, high) in ``unit``, found exactly rather than at the scanned levels) as a
    shaded band on the feasibility panel.

    Parameters
    ----------
    frame : DataFrame
        One row per scanned H2 value. Columns: ``h2_activity`` (mol/L, or bar with
        ``unit="bar"``; > 0), ``feasible`` (bool), ``uphill_set_size`` (int, NaN where not
        computed), ``driving_force_kJ_per_mol`` (NaN where infeasible or not computed).
    unit : {"mol/L", "bar"}
        Unit of ``h2_activity`` and of ``threshold``.
    threshold : float, optional
        H2 threshold in ``unit``.
    title : str, optional
        Title above the panels.

    Returns
    -------
    Figure

    Examples
    --------
    >>> f = pd.DataFrame({"h2_activity": [1e-6, 1e-4], "feasible": [False, True],
    ...                   "uphill_set_size": [2, 0], "driving_force_kJ_per_mol": [float("nan"), 1.5]})
    >>> h2_scan_figure(f, threshold=1e-5).axes[-1].get_xlabel()
    'dissolved H2 (mol/L)'
    """
    require_columns(frame, ["h2_activity", "feasible", "uphill_set_size",
                             "driving_force_kJ_per_mol"], "H2 scan")
    if unit not in _H2_AXIS_LABELS:
        raise InputError(f"H2 scan: unit {unit!r} unknown; use 'mol/L' or 'bar'")
    data = frame.copy()
    data["h2_activity"] = pd.to_numeric(data["h2_activity"], errors="coerce")
    if not (data["h2_activity"] > 0).all():
        raise InputError("H2 scan: every H2 level must be a positive number (log axis); "
                         f"got {data['h2_activity'].min()!r}")
    data = data.sort_values("h2_activity")
    h2 = data["h2_activity"].to_numpy(dtype=float)
    feasible = data["feasible"].map(lambda v: bool(v) if pd.notna(v) else False).to_numpy()
    uphill = pd.to_numeric(data["uphill_set_size"], errors="coerce").to_numpy(dtype=float)
    force = pd.to_numeric(data["driving_force_kJ_per_mol"], errors="coerce").to_numpy(dtype=float)

    fig, axes = new_figure(6.4, nrows=3, sharex=True,
                            gridspec_kw={"height_ratios": [0.7, 1.0, 1.2]})
    ax_f, ax_u, ax_d = axes

    ax_f.plot(h2, feasible.astype(float), color=REFERENCE_COLOUR, lw=0.8, drawstyle="steps-mid")
    ax_f.scatter(h2[feasible], np.ones(feasible.sum()), color=DOWNHILL_COLOUR, zorder=3,
                 s=22, label="runs")
    ax_f.scatter(h2[~feasible], np.zeros((~feasible).sum()), color=UPHILL_COLOUR, marker="x",
                 zorder=3, s=22, label="does not run")
    ax_f.set_yticks([0, 1])
    ax_f.set_yticklabels(["no", "yes"])
    ax_f.set_ylim(-0.35, 1.35)
    ax_f.set_ylabel("feasible")

    ok = np.isfinite(uphill)
    ax_u.plot(h2[ok], uphill[ok], color=OKABE_ITO["orange"], marker="o", ms=4, lw=1.2,
              drawstyle="steps-mid")
    ax_u.yaxis.set_major_locator(MaxNLocator(integer=True))
    top = np.nanmax(uphill) if ok.any() else 1.0
    ax_u.set_ylim(-0.4, max(1.0, top) + 0.6)
    ax_u.set_ylabel("uphill steps\n(count)")

    ok = np.isfinite(force)
    ax_d.plot(h2[ok], force[ok], color=DOWNHILL_COLOUR, marker="o", ms=4, lw=1.2)
    ax_d.axhline(0.0, color=REFERENCE_COLOUR, lw=0.8, ls=":")
    ax_d.set_ylabel("driving force\n(kJ/mol)")
    ax_d.set_xscale("log")
    ax_d.set_xlabel(_H2_AXIS_LABELS[unit])
    if not ok.any():
        ax_d.text(0.5, 0.5, "no driving force computed", transform=ax_d.transAxes,
                  ha="center", va="center", color=REFERENCE_COLOUR)

    if threshold is not None and math.isfinite(threshold) and threshold > 0:
        for ax in axes:
            ax.axvline(threshold, color=THRESHOLD_COLOUR, lw=1.0, ls="--")
        ax_f.annotate(f"threshold {scientific(threshold)} {unit}", (threshold, 1.0),
                      xytext=(4, 6), textcoords="offset points", ha="left", va="bottom",
                      fontsize=MIN_FONT_PT + 1, color=THRESHOLD_COLOUR)
    for a, b in windows:
        ax_f.axvspan(a, b, color=DOWNHILL_COLOUR, alpha=0.12, lw=0, zorder=0)
    lo, hi = h2.min(), h2.max()
    if threshold is not None and math.isfinite(threshold) and threshold > 0:
        lo, hi = min(lo, threshold), max(hi, threshold)
    ax_d.set_xlim(lo / 2.0, hi * 2.0)
    for ax in axes:
        ax.yaxis.set_label_coords(-0.08, 0.5)
    fig.suptitle(title or "Network against H2 supply", fontsize=11)
    return fig


# ---------------------------------------------------------------------------------------------
# 3. census
# ---------------------------------------------------------------------------------------------


#: Energies the census figure draws by default: column of the census table -> label.
CENSUS_KINDS = {"delta_g_standard_kJ_per_mol": "ΔrG'°", "delta_g_1mM_kJ_per_mol": "ΔrG' at 1 mM"}


def census_figure(frame: pd.DataFrame, title: str | None = None, seed: int = 0,
                  kinds: dict[str, str] | None = None) -> Figure:
    """Distribution of ΔrG' of the reactions in each mode (strip plot over a box plot).

    One row of points per mode and kind of energy, a box for the quartiles, a vertical line at
    zero; the legend counts the exergonic reactions (ΔrG' < 0) of each row.

    Parameters
    ----------
    frame : DataFrame
        The census table: ``mode``, ``reaction`` and the energy columns named in ``kinds``
        (kJ/mol). Missing values are left out.
    title : str, optional
        Axes title.
    seed : int
        Seed of the vertical jitter of the points (the figure is reproducible).
    kinds : dict, optional
        Column -> label of the energies drawn (default :data:`CENSUS_KINDS`, those present).

    Returns
    -------
    Figure

    Examples
    --------
    >>> f = pd.DataFrame({"mode": ["native"] * 3, "reaction": ["a", "b", "c"],
    ...                   "delta_g_1mM_kJ_per_mol": [-10.0, 5.0, -1.0]})
    >>> census_figure(f).axes[0].get_xlabel()
    "ΔrG' (kJ/mol)"
    """
    kinds = kinds or {c: label for c, label in CENSUS_KINDS.items() if c in frame.columns}
    require_columns(frame, ["mode", "reaction", *kinds], "census")
    if not kinds:
        raise InputError("census: the table has none of the energy columns "
                         + ", ".join(CENSUS_KINDS) + "; nothing to draw")
    data = pd.concat([pd.DataFrame({"mode": frame["mode"], "reaction": frame["reaction"],
                                    "dg_prime": pd.to_numeric(frame[c], errors="coerce"),
                                    "kind": label}) for c, label in kinds.items()],
                     ignore_index=True)
    dropped = int(data["dg_prime"].isna().sum())
    data = data.dropna(subset=["dg_prime"])
    if data.empty:
        raise InputError("census: no reaction has a finite energy; nothing to draw")
    modes = [m for m in MODES if m in set(data["mode"])]
    modes += [m for m in dict.fromkeys(data["mode"].astype(str)) if m not in modes]
    labels = list(dict.fromkeys(data["kind"]))  # in the order given
    rows = [(m, k) for m in modes for k in labels
            if ((data["mode"] == m) & (data["kind"] == k)).any()]
    height = max(3.2, 1.6 + 0.5 * len(rows) + 0.2 * ((len(rows) + 1) // 2))
    fig, ax = new_figure(height)
    rng = np.random.default_rng(seed)
    handles = []
    for y, (mode, kind) in enumerate(rows):
        values = data.loc[(data["mode"] == mode) & (data["kind"] == kind), "dg_prime"]
        values = values.to_numpy(dtype=float)
        colour = MODES[mode].colour if mode in MODES else OKABE_ITO["black"]
        marker = KIND_MARKERS[labels.index(kind) % len(KIND_MARKERS)]
        ax.boxplot(values, positions=[y], **HORIZONTAL_BOX, widths=0.5, showfliers=False,
                   patch_artist=True, manage_ticks=False,
                   boxprops={"facecolor": "none", "edgecolor": colour},
                   medianprops={"color": colour, "linewidth": 1.6},
                   whiskerprops={"color": colour}, capprops={"color": colour})
        jitter = rng.uniform(-0.18, 0.18, size=len(values))
        ax.scatter(values, y + jitter, s=16, color=colour, marker=marker, alpha=0.75,
                   edgecolors="none", zorder=3)
        exergonic = int((values < 0).sum())
        label = mode_label(mode) + (f", {kind}" if len(labels) > 1 else "")
        handles.append(Line2D([], [], color=colour, marker=marker, ls="none",
                              label=f"{label}: {exergonic} of {len(values)} exergonic"))
    ax.axvline(0.0, color=REFERENCE_COLOUR, lw=1.0, ls="--")
    ax.set_yticks(range(len(rows)))
    ax.set_yticklabels([mode_label(m) + (f"\n{k}" if len(labels) > 1 else "") for m, k in rows])
    ax.set_ylim(len(rows) - 0.5, -0.5)
    ax.set_xlabel("ΔrG' (kJ/mol)")
    fig.legend(handles=handles, loc="outside lower center", ncol=2 if len(handles) > 1 else 1,
               frameon=False, title="exergonic = ΔrG' < 0", title_fontsize=9.0)
    text = title or "Census: reaction energies per mode"
    if dropped:
        text += f" ({dropped} without a value left out)"
    ax.set_title(text)
    return fig


# ---------------------------------------------------------------------------------------------
# 4. ranges
# ---------------------------------------------------------------------------------------------

#: Most reactions drawn in one ranges figure; beyond this the most constrained are shown.
MAX_RANGE_ROWS = 60


def select_ranges(frame: pd.DataFrame, max_reactions: int = MAX_RANGE_ROWS
                  ) -> tuple[pd.DataFrame, str]:
    """The rows a ranges figure shows, sorted, and a caption note saying what was left out.

    Rows are sorted by the midpoint of the range (most downhill at the top). When there
    are more than ``max_reactions`` rows, the ``max_reactions`` narrowest intervals (the most
    constrained reactions) are kept.

    Parameters
    ----------
    frame : DataFrame
        Columns ``reaction``, ``delta_g_min_kJ_per_mol``, ``delta_g_max_kJ_per_mol`` (kJ/mol), optional ``delta_g_kJ_per_mol``.
    max_reactions : int
        Largest number of rows to keep.

    Returns
    -------
    (DataFrame, str)
        The rows to draw and a note for the caption ("" when nothing was left out).

    Examples
    --------
    >>> f = pd.DataFrame({"reaction": list("abc"), "delta_g_min_kJ_per_mol": [-9.0, -1.0, -50.0],
    ...                   "delta_g_max_kJ_per_mol": [-1.0, 0.0, 50.0]})
    >>> rows, note = select_ranges(f, max_reactions=2)
    >>> list(rows["reaction"]), note
    (['a', 'b'], 'showing the 2 most constrained of 3 reactions (narrowest ranges)')
    """
    require_columns(frame, ["reaction", "delta_g_min_kJ_per_mol", "delta_g_max_kJ_per_mol"], "ranges")
    data = frame.copy()
    for column in ("delta_g_min_kJ_per_mol", "delta_g_max_kJ_per_mol"):
        data[column] = pd.to_numeric(data[column], errors="coerce")
    bad = data["delta_g_min_kJ_per_mol"].isna() | data["delta_g_max_kJ_per_mol"].isna()
    if bad.any():
        logger.info("ranges: %d reaction(s) without a range left out", int(bad.sum()))
    data = data.loc[~bad]
    if (data["delta_g_min_kJ_per_mol"] > data["delta_g_max_kJ_per_mol"] + 1e-9).any():
        wrong = data.loc[data["delta_g_min_kJ_per_mol"] > data["delta_g_max_kJ_per_mol"] + 1e-9, "reaction"].astype(str)
        raise InputError(f"ranges: the least ΔrG' exceeds the largest for {', '.join(wrong)}; swap or fix them")
    note = ""
    if len(data) > max_reactions:
        width = (data["delta_g_max_kJ_per_mol"] - data["delta_g_min_kJ_per_mol"]).replace([np.inf], np.finfo(float).max)
        data = data.assign(_width=width).sort_values("_width", kind="stable")
        data = data.head(max_reactions).drop(columns="_width")
        note = (f"showing the {max_reactions} most constrained of {len(frame)} reactions "
                "(narrowest ranges)")
    if bad.any():
        note = (note + "; " if note else "") + f"{int(bad.sum())} without a range left out"
    lo = data["delta_g_min_kJ_per_mol"].clip(lower=-1e6)
    hi = data["delta_g_max_kJ_per_mol"].clip(upper=1e6)
    data = data.assign(_mid=(lo + hi) / 2).sort_values(["_mid", "reaction"], kind="stable")
    return data.drop(columns="_mid").reset_index(drop=True), note


def ranges_figure(frame: pd.DataFrame, title: str | None = None,
                  max_reactions: int = MAX_RANGE_ROWS) -> Figure:
    """The range of Delta_r G' each reaction can take over the feasible set, one bar each.

    Rows as chosen by :func:`select_ranges`; an interval entirely below zero (the reaction must
    run forward) is drawn in the downhill colour, one entirely above zero (must run backward)
    in the uphill colour, one spanning zero in grey. The value at the returned solution, when
    given, is a black tick. The figure grows with the number of rows (about 0.2 in each), so the
    labels keep at least 8 pt.

    Parameters
    ----------
    frame : DataFrame
        Columns ``reaction``, ``delta_g_min_kJ_per_mol``, ``delta_g_max_kJ_per_mol`` (kJ/mol), optional ``delta_g_kJ_per_mol``.
    title : str, optional
        Axes title; the note of :func:`select_ranges` is added to it.
    max_reactions : int
        Largest number of rows drawn.

    Returns
    -------
    Figure

    Examples
    --------
    >>> f = pd.DataFrame({"reaction": ["a"], "delta_g_min_kJ_per_mol": [-3.0], "delta_g_max_kJ_per_mol": [2.0]})
    >>> ranges_figure(f).axes[0].get_xlabel()
    "ΔrG' range over the feasible set (kJ/mol)"
    """
    rows, note = select_ranges(frame, max_reactions)
    if rows.empty:
        raise InputError("ranges: no reaction has a finite range; nothing to draw")
    n = len(rows)
    height = 2.2 + 0.21 * n
    fig, ax = new_figure(height)
    lo_all = rows["delta_g_min_kJ_per_mol"].replace(-np.inf, np.nan).min()
    hi_all = rows["delta_g_max_kJ_per_mol"].replace(np.inf, np.nan).max()
    lo_all = min(0.0, lo_all if np.isfinite(lo_all) else 0.0)
    hi_all = max(0.0, hi_all if np.isfinite(hi_all) else 0.0)
    pad = 0.06 * ((hi_all - lo_all) or 1.0)
    left, right = lo_all - pad, hi_all + pad
    for y, row in rows.iterrows():
        lo, hi = float(row["delta_g_min_kJ_per_mol"]), float(row["delta_g_max_kJ_per_mol"])
        if hi < 0:
            colour = DOWNHILL_COLOUR
        elif lo > 0:
            colour = UPHILL_COLOUR
        else:
            colour = REFERENCE_COLOUR
        a, b = max(lo, left), min(hi, right)
        ax.hlines(y, a, b, color=colour, lw=4.0 if n <= 40 else 3.0)
        if not math.isfinite(lo):
            ax.plot(left, y, marker="<", color=colour, ms=5)
        if not math.isfinite(hi):
            ax.plot(right, y, marker=">", color=colour, ms=5)
        if abs(b - a) < 1e-9:
            ax.plot(a, y, marker="|", color=colour, ms=8, mew=2)
    has_solution = "delta_g_kJ_per_mol" in rows.columns
    if has_solution:
        sol = pd.to_numeric(rows["delta_g_kJ_per_mol"], errors="coerce")
        ok = sol.notna().to_numpy()
        ax.plot(sol[ok], np.arange(n)[ok], ls="none", marker="|", color=OKABE_ITO["black"],
                ms=9, mew=1.6)
    ax.axvline(0.0, color=OKABE_ITO["black"], lw=0.8, ls="--")
    ax.set_xlim(left, right)
    ax.set_ylim(n - 0.5, -0.5)
    ax.set_yticks(range(n))
    label_size = 9.0 if n <= 30 else MIN_FONT_PT
    ax.set_yticklabels([wrap_label(r, 28, 1) for r in rows["reaction"].astype(str)],
                       fontsize=label_size)
    ax.set_xlabel("ΔrG' range over the feasible set (kJ/mol)")
    ax.grid(axis="x", color="#DDDDDD", lw=0.6)
    ax.set_axisbelow(True)
    handles = [
        Line2D([], [], color=DOWNHILL_COLOUR, lw=4, label="always downhill (forward)"),
        Line2D([], [], color=UPHILL_COLOUR, lw=4, label="always uphill (runs backward)"),
        Line2D([], [], color=REFERENCE_COLOUR, lw=4, label="either direction"),
    ]
    if has_solution:
        handles.append(Line2D([], [], color=OKABE_ITO["black"], marker="|", ls="none", ms=9,
                              mew=1.6, label="at the solution"))
    fig.legend(handles=handles, loc="outside lower center", ncol=4 if len(handles) == 4 else 3,
               frameon=False, fontsize=MIN_FONT_PT + 0.5, handlelength=1.6)
    text = title or "Ranges of ΔrG'"
    if note:
        text += f"\n({note})"
    ax.set_title(text)
    return fig


