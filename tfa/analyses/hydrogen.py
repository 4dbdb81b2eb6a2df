"""H2 comparison: a scan over H2 supply and the H2 threshold.

Scan: for each H2 level (dissolved concentration in mol/L, or partial pressure in bar for a gas
compound, log-spaced), the problem is built once over the whole range and only the bounds of
ln[H2] change: lower = upper = ln(level). Without the driving force, each level first tries the
flux pattern certified at the previous level as a linear program (a solution proves
feasibility) and solves the full problem (quick routes, then the exact MILP) only when that
fails. At each level the result says whether the network is feasible, its max-min driving
force B (Noor et al. 2014, PLoS Comput. Biol. 10:e1003483; feasible iff B >= delta) and, where
infeasible, the minimal uphill set: the first of the least size in the order of reaction ids
(:mod:`tfa.analyses.set_order`, as the minimal-set answer lists its sets).

Threshold: ln[H2] becomes a variable over the user's range and one MILP minimises it subject to
feasibility (thermodynamics-based flux analysis, Henry, Broadbelt & Hatzimanikatis 2007,
Biophys. J. 92:1792). For H2 + X <=> XH2 alone the answer is analytic:
[H2]_min = [XH2]_min / ([X]_max K) with K = exp(-(ΔrG'° + delta)/RT).
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field, replace
from typing import Callable, Sequence

import numpy as np
import pandas as pd

from ..errors import InputError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, Solution, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from ..vocabulary import DEFAULT_H2_LEVELS, DEFAULT_H2_RANGE
from .h2_levels import h2_equivalents, level_words
from .set_order import first_of_least_size
from .results import (AnalysisResult, certificate_words, certify, confirm_infeasible, optimum_words,
                      provenance_of, verification)

log = logging.getLogger(__name__)

#: Called after each H2 level: (levels done, levels in all).
LevelProgress = Callable[[int, int], None]


def h2_unit(tm: ThermoModel) -> str:
    """The unit of the network's H2 supply: "bar" when its H2 compound is the gas, else "mol/L".

    Read from the kind of the database compound behind the fed H2 (its ``thermo_key``).
    """
    h2 = {role.lower(): mid for role, mid in tm.feed_ids.items()}.get("h2")
    table = tm.compound_table
    if h2 is None or table is None or h2 not in table.compounds:
        return "mol/L"
    key = table.compounds[h2].key
    if not key:
        return "mol/L"
    try:
        return "bar" if table.database.compound(key).kind == "gas" else "mol/L"
    except InputError:
        return "mol/L"


def scan_levels(h2_range: tuple[float, float] = DEFAULT_H2_RANGE,
                count: int = DEFAULT_H2_LEVELS) -> list[float]:
    """``count`` H2 levels log-spaced over ``h2_range`` (both ends included).

    >>> scan_levels((1e-6, 1e-3), 4)
    [1e-06, 1e-05, 0.0001, 0.001]
    """
    low, high = _check_range(h2_range)
    if count < 1:
        raise InputError(f"H2 levels: give at least 1 level, got {count}")
    if count == 1:
        return [float(low)]
    return [float(f"{v:.12g}") for v in np.logspace(math.log10(low), math.log10(high), count)]


def _h2_id(tm: ThermoModel, h2_id: str | None) -> str:
    h2 = h2_id
    if h2 is None:
        roles = {role.lower(): mid for role, mid in tm.feed_ids.items()}
        h2 = roles.get("h2")
    if h2 is None:
        raise InputError("the network names no H2 compound: give the H2 metabolite id (the "
                         "environment's feed should list H2)")
    if h2 not in [m.id for m in tm.model.metabolites]:
        raise InputError(f"H2 compound {h2} is not in the network; give the metabolite id of H2")
    return h2


def _check_range(levels: Sequence[float]) -> np.ndarray:
    arr = np.asarray(list(levels), float)
    if arr.size == 0 or not np.all(np.isfinite(arr)) or np.any(arr <= 0):
        raise InputError("H2 levels must be positive, finite concentrations (mol/L) or pressures "
                         "(bar)")
    return arr


#: Columns of the H2 scan table (one row per level).
SCAN_COLUMNS = ["h2_activity", "ln_h2_activity", "h2_unit", "feasible", "driving_force_kJ_per_mol",
                "uphill_set_size", "uphill_set", "in_order_of_ids"]
#: Columns of the H2 threshold table (one row).
THRESHOLD_COLUMNS = ["h2_compound", "feasible", "h2_threshold", "ln_h2_threshold", "h2_unit",
                     "h2_at_range_floor", "h2_partial_pressure_bar", "h2_partial_pressure_Pa",
                     "h2_mmol_per_kg", "h2_range_low", "h2_range_high"]


@dataclass(kw_only=True)
class H2ScanResult(AnalysisResult):
    """Feasibility, max-min driving force and minimal uphill set size at each H2 level."""

    h2_id: str = ""
    unit: str = "mol/L"
    table: pd.DataFrame = field(default_factory=pd.DataFrame)
    analysis: str = "H2 scan"

    def to_frame(self) -> pd.DataFrame:
        return self.table

    def summary(self) -> str:
        feasible = self.table[self.table["feasible"]] if len(self.table) else self.table
        if len(feasible) == 0:
            return f"infeasible at every scanned level of {self.h2_id}"
        return (f"feasible at {len(feasible)} of {len(self.table)} levels of {self.h2_id}; lowest "
                f"feasible level scanned {feasible['h2_activity'].min():.3g} {self.unit}")


def h2_scan(tm: ThermoModel, levels: Sequence[float], options: ProblemOptions | None = None,
            h2_id: str | None = None, with_driving_force: bool = True,
            with_uphill: bool = True, progress: LevelProgress | None = None) -> H2ScanResult:
    """Scan H2 supply over the given levels.

    Parameters
    ----------
    tm : ThermoModel
        The network prepared in one mode.
    levels : sequence of float
        H2 levels [mol/L dissolved; bar for a gas compound].
    options : ProblemOptions
    h2_id : str, optional
        The H2 metabolite (default: the fed compound keyed "H2").
    with_driving_force, with_uphill : bool
        Also the max-min driving force at each level [kJ/mol], and the size of the minimal
        uphill set at infeasible levels.
    progress : callable, optional
        Called after each level with (levels done, levels in all).

    The problem is built once per kind (driving force or feasibility; uphill set for infeasible
    levels); between levels only the bounds of ln[H2] change. Every solution is certified.
    """
    options = options or ProblemOptions()
    h2 = _h2_id(tm, h2_id)
    arr = _check_range(levels)
    envelope = (math.log(arr.min()), math.log(arr.max()))
    overrides = dict(options.log_bound_overrides)
    overrides[h2] = envelope
    result = H2ScanResult(conditions=tm.conditions, h2_id=h2, unit=h2_unit(tm))
    rows = []
    n_infeasible_max = len(arr) if with_uphill else 0

    def tick(done: int) -> None:
        if progress is not None:
            progress(done, len(arr) + n_infeasible_max)
    main = replace(options, driving_force=with_driving_force, uphill=False,
                   log_bound_overrides=overrides)
    with ThermoProblem(tm, main) as problem:
        result.provenance = provenance_of(tm, main, problem)
        if h2 not in problem.metabolite_index:
            raise InputError(f"H2 compound {h2} takes part in no reaction with an energy, so its "
                             "supply cannot change the answer")
        if with_driving_force:
            problem.set_objective({problem.b_var: 1.0}, "max")
        pattern = None
        for level in arr:
            x = math.log(level)
            problem.set_log_bounds(h2, x, x)
            row = {"h2_activity": float(level), "ln_h2_activity": x}
            try:
                sol = None
                if pattern is not None and not with_driving_force:
                    # the last certified flux pattern, as a linear program: a solution proves
                    # feasibility at this level; failure proves nothing, so the full MILP follows
                    try:
                        sol = problem.solve_with_pattern(*pattern, what=f"H2 scan at {level:.3g}")
                    except InfeasibleProblem:
                        sol = None
                if sol is None:
                    sol = problem.solve(f"H2 scan at {level:.3g}")
                pattern = problem.flux_pattern(sol)
            except InfeasibleProblem:
                row.update(feasible=False, driving_force_kJ_per_mol=float("nan"))
            else:
                if with_driving_force:
                    b = float(sol.driving_force)
                    result.certificates.append(certify(problem, sol, min_driving_force=b))
                    row.update(feasible=b >= options.min_driving_force - 1e-9,
                               driving_force_kJ_per_mol=b)
                else:
                    result.certificates.append(certify(problem, sol))
                    row.update(feasible=True, driving_force_kJ_per_mol=float("nan"))
            rows.append(row)
            tick(len(rows))
    table = pd.DataFrame(rows)
    table["uphill_set_size"] = np.where(table["feasible"], 0, -1)
    table["uphill_set"] = ""
    table["in_order_of_ids"] = True
    infeasible = [i for i, r in enumerate(rows) if not r["feasible"]]
    if with_uphill and infeasible:
        up = replace(options, uphill=True, driving_force=False, log_bound_overrides=overrides)
        with ThermoProblem(tm, up) as problem:
            for k, i in enumerate(infeasible):
                tick(len(arr) + k)
                x = rows[i]["ln_h2_activity"]
                problem.set_log_bounds(h2, x, x)
                what = f"minimal uphill set at H2 {rows[i]['h2_activity']:.3g}"
                problem.set_objective({v: 1.0 for v in problem.u_vars}, "min")
                try:
                    sol = problem.solve(what)
                except InfeasibleProblem:
                    continue  # demand impossible at this level whatever the energies
                item = first_of_least_size(problem, sol, what)
                result.certificates.append(certify(problem, item.solution,
                                                   allowed_uphill=item.solution.uphill))
                table.loc[i, "uphill_set_size"] = len(item.members)
                table.loc[i, "uphill_set"] = ", ".join(item.members)
                table.loc[i, "in_order_of_ids"] = item.ordered
    table.loc[table["uphill_set_size"] < 0, "uphill_set_size"] = np.nan
    table["h2_unit"] = result.unit
    result.table = table[SCAN_COLUMNS]
    tick(len(arr) + n_infeasible_max)
    n_no = len(infeasible)
    in_order = bool(table["in_order_of_ids"].all())
    result.verification = verification(
        "certified" if n_no == 0 else "solver proof",
        f"{len(rows) - n_no} feasible level(s): each point passed the independent numpy check"
        + (f"; {n_no} infeasible level(s): no point, by {main.solver or 'the default solver'}'s "
           "branch and bound (not re-asked of the other solver)" if n_no else "")
        + ("" if not (with_uphill and n_no) else "; uphill sets the first in the order of reaction ids"
           if in_order else "; some uphill sets in the order found (in_order_of_ids false)"))
    return result


#: Relative precision to which the ends of an H2 window inside the range are found by
#: bisection in ln[H2] (the least and largest feasible H2 are MILP optima, exact to the solver's
#: tolerance).
WINDOW_PRECISION = 1e-3
#: Columns of the H2 window table (one row per end of a window).
WINDOW_COLUMNS = ["h2_window", "window_end", "h2_activity", "h2_unit", "h2_partial_pressure_bar",
                  "h2_partial_pressure_Pa", "h2_mmol_per_kg", "at_range_end", "found_by",
                  "binding_constraint"]


@dataclass(kw_only=True)
class H2ThresholdResult(AnalysisResult):
    """The H2 levels at which the network is feasible: the least (the threshold), the largest,
    and the window(s) between, each end with the constraint that binds there.

    Attributes
    ----------
    threshold : least H2 at which the network is feasible [h2_unit], nan when never
    windows : list of (low, high) [h2_unit], the feasible intervals found, in order
    ends : one dict per end of a window: ``h2_window`` (1, 2 ...), ``window_end`` ("low" or
        "high"), ``h2_activity``, ``found_by``, ``at_range_end``, ``solution`` (certified)
    binding : rows of the binding_constraints table for the ends (tfa.analyses.binding)
    precision : relative precision of the ends found by bisection
    """

    h2_id: str = ""
    unit: str = "mol/L"
    feasible: bool = False
    threshold: float = float("nan")
    search_range: tuple[float, float] = DEFAULT_H2_RANGE
    message: str = ""
    solution: Solution | None = None
    windows: list = field(default_factory=list)
    ends: list = field(default_factory=list)
    binding: list = field(default_factory=list)
    carrier_pairs: dict = field(default_factory=dict)
    precision: float = WINDOW_PRECISION
    analysis: str = "H2 threshold"

    def to_frame(self) -> pd.DataFrame:
        eq = (h2_equivalents(self.threshold, self.unit, self.conditions)
              if self.feasible and self.conditions is not None else {})
        return pd.DataFrame([{"h2_compound": self.h2_id, "feasible": self.feasible,
                              "h2_threshold": self.threshold,
                              "ln_h2_threshold": math.log(self.threshold) if self.feasible
                              else float("nan"), "h2_unit": self.unit,
                              "h2_at_range_floor": self.at_range_floor,
                              "h2_partial_pressure_bar": eq.get("h2_partial_pressure_bar", math.nan),
                              "h2_partial_pressure_Pa": eq.get("h2_partial_pressure_Pa", math.nan),
                              "h2_mmol_per_kg": eq.get("h2_mmol_per_kg", math.nan),
                              "h2_range_low": self.search_range[0],
                              "h2_range_high": self.search_range[1]}], columns=THRESHOLD_COLUMNS)

    def window_frame(self) -> pd.DataFrame:
        """One row per end of each feasible window (:data:`WINDOW_COLUMNS`)."""
        rows = []
        for end in self.ends:
            eq = h2_equivalents(end["h2_activity"], self.unit, self.conditions)
            rows.append({**{k: end[k] for k in ("h2_window", "window_end", "h2_activity",
                                                "found_by", "at_range_end")},
                         "h2_unit": self.unit, **{k: eq[k] for k in WINDOW_COLUMNS if k in eq},
                         "binding_constraint": self.binding_words(end)})
        return pd.DataFrame(rows, columns=WINDOW_COLUMNS)

    def binding_words(self, end: dict) -> str:
        """The top binding constraint at one end, in words ("" when none was found)."""
        from .binding import BindingResult, binding_frame

        answer = self.answer_of(end)
        rows = [r for r in self.binding
                if r["answer"] == answer and r.get("h2_window", 1) == end["h2_window"]]
        if not rows:
            return ""
        ranked = BindingResult(conditions=self.conditions, table=binding_frame(rows))
        return ranked.top_words(rows[0]["mode"], answer, self.carrier_pairs)

    @staticmethod
    def answer_of(end: dict) -> str:
        """The binding-constraints answer an end belongs to."""
        if end["window_end"] == "high":
            return "h2_window_high"
        return "h2_threshold" if end["h2_window"] == 1 else "h2_window_low"

    def tables(self) -> dict[str, pd.DataFrame]:
        return {"h2_threshold": self.to_frame(), "h2_window": self.window_frame()}

    @property
    def at_range_floor(self) -> bool:
        """True when the network is feasible already at the bottom of the range searched (the
        true threshold, if any, lies lower)."""
        return bool(self.feasible and self.threshold <= self.search_range[0] * (1 + 1e-6))

    def window_words(self) -> str:
        """The feasible H2 levels in one sentence, with the constraint binding at each end."""
        lo, hi = self.search_range
        if not self.feasible:
            return f"infeasible at every H2 level from {lo:.3g} to {hi:.3g} {self.unit}"
        if not self.windows:
            return f"feasible from {level_words(self.threshold, self.unit, self.conditions)}"
        parts = []
        for k, (a, b) in enumerate(self.windows, 1):
            low_end = next(e for e in self.ends if e["h2_window"] == k and e["window_end"] == "low")
            high_end = next(e for e in self.ends if e["h2_window"] == k and e["window_end"] == "high")
            if low_end["at_range_end"] and high_end["at_range_end"]:
                parts.append(f"feasible at every level searched ({lo:.3g} to {hi:.3g} {self.unit})")
                continue
            low = ("the bottom of the range searched" if low_end["at_range_end"]
                   else level_words(a, self.unit, self.conditions))
            high = ("the top of the range searched" if high_end["at_range_end"]
                    else level_words(b, self.unit, self.conditions))
            why = [w for w in (self.binding_words(low_end) if not low_end["at_range_end"] else "",
                               self.binding_words(high_end) if not high_end["at_range_end"]
                               else "") if w]
            parts.append(f"feasible for H2 between {low} and {high}"
                         + (f" ({'; '.join(why)})" if why else ""))
        return "; and ".join(parts)

    def summary(self) -> str:
        return self.message


def _range_words(lo: float, hi: float, unit: str) -> str:
    return f"{lo:.3g} to {hi:.3g} {unit}"


def h2_threshold(tm: ThermoModel, options: ProblemOptions | None = None, h2_id: str | None = None,
                 h2_range: tuple[float, float] = DEFAULT_H2_RANGE, window: bool = False,
                 precision: float = WINDOW_PRECISION, mode: str | None = None,
                 progress: LevelProgress | None = None) -> H2ThresholdResult:
    """Least H2 (mol/L or bar) at which the network is feasible, by one MILP minimising ln[H2];
    with ``window``, every H2 level in the range at which it is feasible.

    Window: the largest feasible H2 by one MILP maximising ln[H2]; gaps between the two by a
    feasibility check at each level of the default scan grid that lies between them (one per
    decade) and bisection in ln[H2] between neighbours that disagree, to ``precision`` relative
    (a gap narrower than the grid spacing between two feasible levels is not seen). At each end
    the constraints that bind are read from the dual values of the linear program with that
    end's flux pattern fixed (:mod:`tfa.analyses.binding`).

    When the network is infeasible even at the top of the range, the message says so and the
    minimal uphill set there is the diagnosis (use :func:`tfa.analyses.uphill.minimal_uphill_set`).

    Parameters
    ----------
    h2_range : (low, high) searched [mol/L; bar for a gas feed]
    window : also the largest feasible H2, the gaps and the binding constraints at the ends
    precision : relative precision of the ends found by bisection [dimensionless]
    mode : the mode's id, for the rows of the binding constraints
    progress : called with (solves done, solves planned) as the window is searched
    """
    options = options or ProblemOptions()
    h2 = _h2_id(tm, h2_id)
    lo, hi = _check_range(h2_range)
    if lo >= hi:
        raise InputError(f"H2 range ({lo:g}, {hi:g}): the lower end must be below the upper end")
    if not (0 < precision < 1):
        raise InputError(f"window precision {precision!r}: give a relative precision between 0 and 1")
    overrides = dict(options.log_bound_overrides)
    overrides[h2] = (math.log(lo), math.log(hi))
    opts = replace(options, log_bound_overrides=overrides, uphill=False, driving_force=False)
    result = H2ThresholdResult(conditions=tm.conditions, h2_id=h2, unit=h2_unit(tm),
                               search_range=(lo, hi), precision=precision)
    with ThermoProblem(tm, opts) as problem:
        result.provenance = provenance_of(tm, opts, problem)
        if h2 not in problem.metabolite_index:
            raise InputError(f"H2 compound {h2} takes part in no reaction with an energy, so there "
                             "is no H2 threshold")
        x_h2 = problem.x_vars[problem.metabolite_index[h2]]
        problem.set_objective({x_h2: 1.0}, "min")
        solver = problem.solver_name
        try:
            sol = problem.solve("H2 threshold", accept_best=True)
        except InfeasibleProblem:
            sol = None
        if sol is not None:
            cert = certify(problem, sol)
            result.certificates.append(cert)
            status, details = optimum_words(sol, "ln H2")
            result.verification = verification(
                status, certificate_words(cert) + f" at the threshold; optimality: {solver}'s "
                f"bound on ln[H2] {details.get('bound')}", **details)
            if window:
                before = len(result.certificates)
                _find_windows(problem, result, h2, sol, precision, progress)
                result.verification["check"] += (
                    f"; window: {len(result.certificates) - before} more point(s) (the largest "
                    "H2 and the levels checked between) passed the independent check, gaps by "
                    f"bisection to {precision:g} relative")
    if sol is None:
        outcome, words = confirm_infeasible(tm, opts, "H2 threshold")
        result.message = (f"infeasible at every H2 level from {lo:.3g} to {hi:.3g}: no H2 supply "
                          "in this range lets the network run downhill; see the minimal uphill "
                          "set for which steps need driving")
        result.verification = verification("proven" if outcome == "confirmed" else "solver proof",
                                            f"no point: {solver} (branch and bound); {words}")
        if outcome == "point":   # the other solver found a point: ask again for the least H2
            return h2_threshold(tm, replace(options, solver="glpk" if solver == "highs" else "highs"),
                                h2_id, h2_range, window, precision, mode, progress)
        return result
    x = float(sol.log_conc[sol.metabolite_ids.index(h2)])
    result.feasible = True
    result.threshold = math.exp(x)
    result.solution = sol
    if window:
        from .binding import window_binding

        window_binding(tm, opts, result, mode or tm.mode)
    at_floor = abs(x - math.log(lo)) < 1e-9
    result.message = (f"the least H2 at which the network is feasible is "
                      f"{level_words(result.threshold, result.unit, tm.conditions)}"
                      + (" (the bottom of the range searched: lower it to look further)"
                         if at_floor else "")
                      + ("" if sol.proven else " (the best found within the time limit)"))
    if window:
        result.message = (result.window_words() + (" (lower the bottom of the range to look "
                          "further)" if at_floor else "")
                          + ("" if sol.proven else " (the best found within the time limit)"))
    return result


def _find_windows(problem: ThermoProblem, result: H2ThresholdResult, h2: str, low_sol: Solution,
                  precision: float, progress: LevelProgress | None = None) -> None:
    """Fill ``result.windows`` and ``result.ends`` (see :func:`h2_threshold`)."""
    step = math.log1p(precision)
    grid = [math.log(v) for v in scan_levels(result.search_range, DEFAULT_H2_LEVELS)]
    done, planned = 1, 2 + len(grid)

    def tick(more: int = 0) -> None:
        nonlocal done, planned
        done, planned = done + 1, planned + more
        if progress is not None:
            progress(min(done, planned), planned)

    lo, hi = (math.log(v) for v in result.search_range)
    x_h2 = problem.x_vars[problem.metabolite_index[h2]]
    index = low_sol.metabolite_ids.index(h2)
    x_low = float(low_sol.log_conc[index])
    problem.set_objective({x_h2: 1.0}, "max")
    high_sol = problem.solve("largest H2 at which the network is feasible", accept_best=True)
    result.certificates.append(certify(problem, high_sol))
    x_high = float(high_sol.log_conc[index])
    tick()
    problem.set_objective({})

    def feasible_at(x: float):
        problem.set_log_bounds(h2, x, x)
        try:
            sol = problem.solve(f"H2 window at {math.exp(x):.3g}")
        except InfeasibleProblem:
            sol = None
        else:
            result.certificates.append(certify(problem, sol))
        tick()
        return sol

    points = [(x_low, low_sol)] + [(x, feasible_at(x)) for x in grid if x_low + step < x < x_high - step]
    points.append((x_high, high_sol))
    refined = [points[0]]
    for (xa, sa), (xb, sb) in zip(points, points[1:]):
        if (sa is None) != (sb is None):   # bisection in ln[H2] between disagreeing neighbours
            a, b, s_a, s_b = xa, xb, sa, sb
            planned += max(0, math.ceil(math.log2((b - a) / step)))
            while b - a > step:
                mid = 0.5 * (a + b)
                s_mid = feasible_at(mid)
                if (s_mid is None) == (s_a is None):
                    a, s_a = mid, s_mid
                else:
                    b, s_b = mid, s_mid
            refined += [(a, s_a), (b, s_b)]
        refined.append((xb, sb))
    problem.set_log_bounds(h2, lo, hi)
    windows, ends, start = [], [], None
    for k, (x, sol) in enumerate(refined):
        if sol is not None and start is None:
            start = (x, sol, k == 0)
        if sol is not None and (k == len(refined) - 1 or refined[k + 1][1] is None):
            n = len(windows) + 1
            windows.append((math.exp(start[0]), math.exp(x)))
            bisected = f"bisection in ln[H2] to {precision:g} relative"
            ends.append({"h2_window": n, "window_end": "low", "h2_activity": math.exp(start[0]),
                         "found_by": "least H2, MILP" if start[2] else bisected,
                         "at_range_end": start[2] and start[0] <= lo + 1e-9, "solution": start[1]})
            last = k == len(refined) - 1
            ends.append({"h2_window": n, "window_end": "high", "h2_activity": math.exp(x),
                         "found_by": "largest H2, MILP" if last else bisected,
                         "at_range_end": last and x >= hi - 1e-9, "solution": sol})
            start = None
    result.windows, result.ends = windows, ends
    if progress is not None:
        progress(done, done)


def h2_threshold_by_bisection(tm: ThermoModel, options: ProblemOptions | None = None,
                              h2_id: str | None = None,
                              h2_range: tuple[float, float] = DEFAULT_H2_RANGE,
                              relative_tolerance: float = 1e-8) -> float:
    """The H2 threshold by bisection on ln[H2] over repeated feasibility checks (a cross-check of
    :func:`h2_threshold`; assumes feasibility is monotone in H2). Returns nan when infeasible at
    the top of the range."""
    options = options or ProblemOptions()
    h2 = _h2_id(tm, h2_id)
    lo, hi = math.log(h2_range[0]), math.log(h2_range[1])
    overrides = dict(options.log_bound_overrides)
    overrides[h2] = (lo, hi)
    opts = replace(options, log_bound_overrides=overrides, uphill=False, driving_force=False)
    with ThermoProblem(tm, opts) as problem:
        def feasible_at(x: float) -> bool:
            problem.set_log_bounds(h2, x, x)
            try:
                certify(problem, problem.solve("bisection step"))
            except InfeasibleProblem:
                return False
            return True

        if not feasible_at(hi):
            return float("nan")
        if feasible_at(lo):
            return math.exp(lo)
        while hi - lo > relative_tolerance:
            mid = 0.5 * (lo + hi)
            if feasible_at(mid):
                hi = mid
            else:
                lo = mid
    return math.exp(hi)
