"""The linear program of one flux pattern and its dual values: which bounds set an optimum.

With every direction binary fixed to the directions a solution carries flux in, the
thermodynamic flux problem (:mod:`tfa.problem.builder`) falls apart into two independent
blocks: the flux block (mass balance, flux bounds, the demand) and the energy block, in the
ln-concentrations x and the uncertainty allowances eps (and B for the max-min driving force).
An objective on x or B (the H2 threshold, the ends of the H2 window, the max-min driving force)
sees only the energy block, so its linear program is, for each reaction k carrying flux in
direction d_k (+1 forward, -1 backward)::

    d_k (Delta_r G'deg_k + eps_k + RT sum_i S_ik x_i) <= -delta        (feasibility form)
    d_k (Delta_r G'deg_k + eps_k + RT sum_i S_ik x_i) + B <= 0         (driving-force form)
    ln c_lo,i <= x_i <= ln c_hi,i,   |eps_k| <= k sigma_k

(thermodynamics-based flux analysis, Henry, Broadbelt & Hatzimanikatis 2007, Biophys. J.
92:1792; the driving-force form is the max-min driving force of Noor et al. 2014, PLoS Comput.
Biol. 10:e1003483). Its optimum equals the mixed-integer optimum whenever the pattern is the
optimum's own: the optimal point satisfies it, and the pattern LP is a restriction of the MILP.

Dual values (shadow prices) of this LP say how the optimum moves with each bound: for a
concentration bound, d(objective)/d(ln bound) [objective units per unit ln c]; for a reaction's
standard energy, d(objective)/d(Delta_r G'deg) [objective units per kJ/mol]; for the least
driving force, d(objective)/d(delta). They are read from HiGHS through
:func:`scipy.optimize.linprog` (``ineqlin``, ``lower``, ``upper`` marginals) and checked by
re-solving with the bound moved both ways (:func:`finite_difference`): the dual of a linear
program lies between the left and right derivatives of its optimal value (Bertsimas &
Tsitsiklis 1997, Introduction to Linear Optimization, Section 5.2).

Units: kJ/mol; x = ln(c / 1 mol/L) (ln(p / 1 bar) for a gas).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from ..errors import ComputationError, InputError

#: Step of the finite-difference check, in ln units (concentration bounds) or kJ/mol (energies).
FINITE_DIFFERENCE_STEP = 1e-3
#: A dual value below this (objective units per ln unit or per kJ/mol) counts as zero.
ZERO_DUAL = 1e-7


@dataclass
class PatternLP:
    """The energy block of the thermodynamic flux problem with one flux pattern fixed.

    Attributes
    ----------
    reaction_ids : reactions carrying flux, each with an energy
    direction : +1 (forward) or -1 (backward) per reaction
    metabolite_ids : compounds with an activity term in those reactions
    standard : Delta_r G'deg per reaction [kJ/mol]
    allowance : k sigma per reaction [kJ/mol]
    rows, cols, values : the stoichiometry of the activity terms (reaction row, compound column)
    lower, upper : ln bounds of each compound [ln(mol/L) or ln(bar)]
    rt : R T [kJ/mol]
    min_driving_force : delta [kJ/mol]
    """

    reaction_ids: list[str]
    direction: np.ndarray
    metabolite_ids: list[str]
    standard: np.ndarray
    allowance: np.ndarray
    rows: np.ndarray
    cols: np.ndarray
    values: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    rt: float
    min_driving_force: float
    #: Linear rows on ln c from the carrier states (ratio bounds, the phosphorylation floor):
    #: (column -> coefficient, lower or None, upper or None, text), as in the full problem.
    state_rows: list = field(default_factory=list)

    def index(self, metabolite_id: str) -> int:
        """Column of a compound (InputError naming it when it has no activity term here)."""
        try:
            return self.metabolite_ids.index(metabolite_id)
        except ValueError:
            raise InputError(f"compound {metabolite_id} takes part in no reaction that carries "
                             "flux with an energy, so it cannot set this answer") from None

    def with_bounds(self, metabolite_id: str, lower: float | None = None,
                    upper: float | None = None) -> "PatternLP":
        """A copy with one compound's ln bounds changed."""
        i = self.index(metabolite_id)
        lo, hi = self.lower.copy(), self.upper.copy()
        if lower is not None:
            lo[i] = lower
        if upper is not None:
            hi[i] = upper
        return replace(self, lower=lo, upper=hi)


def pattern_lp(tm, solution, options, log_bound_overrides: dict | None = None,
               flux_tolerance: float = 1e-9) -> PatternLP:
    """The pattern LP of a solution: the reactions with an energy that carry flux in it.

    Parameters
    ----------
    tm : ThermoModel
    solution : Solution (:class:`tfa.problem.options.Solution`)
    options : ProblemOptions (uncertainty_k, min_driving_force, log_bound_overrides)
    log_bound_overrides : dict, optional
        metabolite -> (ln lower, ln upper) over the options' and the model's bounds.
    flux_tolerance : float
        A flux counts as carried above this fraction of the largest |flux| [dimensionless].
    """
    fluxes = dict(zip(solution.reaction_ids, np.asarray(solution.fluxes, float)))
    scale = max((abs(v) for v in fluxes.values()), default=0.0)
    limit = flux_tolerance * max(scale, 1.0)
    kinds = tm.reaction_kinds()
    overrides = {**dict(options.log_bound_overrides), **dict(log_bound_overrides or {})}
    no_activity = set(tm.no_activity)
    ids, direction, met_ids, m_index = [], [], [], {}
    rows, cols, vals = [], [], []
    for r in tm.model.reactions:
        v = fluxes.get(r.id, 0.0)
        if kinds.get(r.id) != "internal" or r.id not in tm.energies or abs(v) <= limit:
            continue
        k = len(ids)
        ids.append(r.id)
        direction.append(1.0 if v > 0 else -1.0)
        for met, coef in r.metabolites.items():
            if met.id in no_activity:
                continue
            if met.id not in m_index:
                m_index[met.id] = len(met_ids)
                met_ids.append(met.id)
            rows.append(k)
            cols.append(m_index[met.id])
            vals.append(float(coef))
    state_rows = []
    for row in getattr(tm, "log_rows", []):
        # a row on compounds of the pattern binds it as in the full problem; a compound of the
        # row that no carried reaction uses joins as a column of its own (within its bounds)
        if not any(mid in m_index for mid in row.coefficients):
            continue
        for mid in row.coefficients:
            if mid not in m_index:
                m_index[mid] = len(met_ids)
                met_ids.append(mid)
        state_rows.append(({m_index[mid]: float(a) for mid, a in row.coefficients.items()},
                           row.lower, row.upper, row.text))
    lower, upper = [], []
    for mid in met_ids:
        bounds = overrides.get(mid, tm.log_bounds.get(mid))
        if bounds is None:
            raise InputError(f"compound {mid} has no concentration bounds; give conc_min and "
                             "conc_max for it")
        lower.append(float(bounds[0]))
        upper.append(float(max(bounds)))
    sigma = np.array([abs(tm.energies[r].uncertainty or 0.0) for r in ids], float)
    return PatternLP(ids, np.array(direction, float), met_ids,
                     np.array([float(tm.energies[r].standard) for r in ids], float),
                     options.uncertainty_k * np.nan_to_num(sigma), np.array(rows, int),
                     np.array(cols, int), np.array(vals, float), np.array(lower, float),
                     np.array(upper, float), float(tm.RT), float(options.min_driving_force),
                     state_rows)


@dataclass
class LPOptimum:
    """The optimum of a pattern LP and its dual values, in the objective's own sense.

    Attributes
    ----------
    value : the optimum (ln activity for a compound objective; kJ/mol for the driving force)
    log_conc : ln c of each compound at the optimum
    lower_duals, upper_duals : d(value)/d(ln lower bound), d(value)/d(ln upper bound) per compound
    energy_duals : d(value)/d(Delta_r G'deg) per reaction [value units per kJ/mol]
    delta_dual : d(value)/d(delta) (feasibility form; 0 in the driving-force form)
    state_duals : per carrier-state row of the LP, (d(value)/d(its lower), d(value)/d(its upper))
    """

    value: float
    log_conc: np.ndarray
    lower_duals: np.ndarray
    upper_duals: np.ndarray
    energy_duals: np.ndarray
    delta_dual: float
    objective: tuple = field(default_factory=tuple)
    state_duals: list = field(default_factory=list)


def solve_pattern(lp: PatternLP, objective: tuple[str, str | None], sense: str) -> LPOptimum:
    """Optimise the pattern LP.

    Parameters
    ----------
    objective : ("ln_activity", compound id) or ("driving_force", None)
    sense : "min" or "max"

    Raises
    ------
    ComputationError
        When the LP has no optimum (the pattern has no point at these bounds).

    Examples
    --------
    A <=> B forward, Delta_r G'deg = 5 kJ/mol, A in [1 mM, 1 mM], B in [1 uM, 10 mM], at
    RT = 2.478957 kJ/mol (298.15 K). The max-min driving force is -(5 + RT ln(1e-6/1e-3))
    = 12.124 kJ/mol, and it moves by RT per unit ln of the lower bound of B (hand-derived):

    >>> lp = PatternLP(["R1"], np.array([1.0]), ["A", "B"], np.array([5.0]), np.array([0.0]),
    ...                np.array([0, 0]), np.array([0, 1]), np.array([-1.0, 1.0]),
    ...                np.log([1e-3, 1e-6]), np.log([1e-3, 1e-2]), 2.478957, 0.1)
    >>> opt = solve_pattern(lp, ("driving_force", None), "max")
    >>> round(opt.value, 3), round(float(opt.lower_duals[1]), 6)
    (12.124, -2.478957)
    """
    from scipy.optimize import linprog

    if sense not in ("min", "max"):
        raise InputError(f"sense {sense!r}: give 'min' or 'max'")
    kind, target = objective
    n_m, n_r = len(lp.metabolite_ids), len(lp.reaction_ids)
    with_b = kind == "driving_force"
    n = n_m + n_r + (1 if with_b else 0)
    a = np.zeros((n_r, n))
    for k, i, s in zip(lp.rows, lp.cols, lp.values):
        a[k, i] += lp.direction[k] * lp.rt * s
    for k in range(n_r):
        a[k, n_m + k] = lp.direction[k]
        if with_b:
            a[k, -1] = 1.0
    b = -lp.direction * lp.standard - (0.0 if with_b else lp.min_driving_force)
    # carrier-state rows: a x <= upper, and -a x <= -lower
    state_index = []
    extra_a, extra_b = [], []
    for coefficients, low, high, _ in lp.state_rows:
        line = np.zeros(n)
        for i, value in coefficients.items():
            line[i] = value
        sides = []
        for bound, sign_row in ((high, 1.0), (low, -1.0)):
            if bound is None:
                sides.append(None)
                continue
            sides.append(len(extra_a))
            extra_a.append(sign_row * line)
            extra_b.append(sign_row * float(bound))
        state_index.append(tuple(sides))
    if extra_a:
        a = np.vstack([a, np.array(extra_a)])
        b = np.concatenate([b, np.array(extra_b)])
    n_rows = len(b)
    c = np.zeros(n)
    if with_b:
        c[-1] = 1.0
    elif kind == "ln_activity":
        c[lp.index(target)] = 1.0
    else:
        raise InputError(f"objective {kind!r}: give 'ln_activity' or 'driving_force'")
    sign = 1.0 if sense == "min" else -1.0
    bounds = ([(float(lo), float(hi)) for lo, hi in zip(lp.lower, lp.upper)]
              + [(-float(w), float(w)) for w in lp.allowance]
              + ([(None, None)] if with_b else []))
    res = linprog(sign * c, A_ub=a if n_rows else None, b_ub=b if n_rows else None, bounds=bounds,
                  method="highs")
    if res.status != 0:
        raise ComputationError(f"the linear program of the flux pattern has no optimum "
                               f"({res.message}); the pattern does not hold at these bounds")
    all_duals = np.asarray(res.ineqlin.marginals, float) if n_rows else np.zeros(0)
    row_duals, extra_duals = all_duals[:n_r], all_duals[n_r:]
    state_duals = [(0.0 if lo is None else float(-sign * extra_duals[lo]),
                    0.0 if hi is None else float(sign * extra_duals[hi]))
                   for hi, lo in state_index]
    lower = sign * np.asarray(res.lower.marginals, float)
    upper = sign * np.asarray(res.upper.marginals, float)
    return LPOptimum(value=sign * float(res.fun), log_conc=np.asarray(res.x[:n_m], float),
                     lower_duals=lower[:n_m], upper_duals=upper[:n_m],
                     energy_duals=sign * row_duals * (-lp.direction),
                     delta_dual=0.0 if with_b else float(sign * -row_duals.sum()),
                     objective=(kind, target, sense), state_duals=state_duals)


def optimum_value(lp: PatternLP, objective: tuple[str, str | None], sense: str) -> float:
    """The optimum alone (nan when the LP has none)."""
    try:
        return solve_pattern(lp, objective, sense).value
    except ComputationError:
        return math.nan


def finite_difference(lp: PatternLP, objective: tuple[str, str | None], sense: str,
                      what: tuple[str, str, str], step: float = FINITE_DIFFERENCE_STEP
                      ) -> tuple[float, float]:
    """Left and right derivatives of the optimum by re-solving with one datum moved by ±step.

    ``what``: ("lower" | "upper" | "fixed", compound id, "") for a concentration bound (ln
    units; "fixed" moves both bounds), or ("energy", reaction id, "") for a standard energy
    (kJ/mol), or ("delta", "", "") for the least driving force, or ("state", row number,
    "lower" | "upper") for a bound of a carrier-state row (ln units). nan where the moved LP has
    no optimum.
    """
    side, name, extra = what

    def moved(h: float) -> PatternLP:
        if side == "state":
            rows = list(lp.state_rows)
            coefficients, low, high, text = rows[int(name)]
            if extra == "lower":
                low = low + h
            else:
                high = high + h
            rows[int(name)] = (coefficients, low, high, text)
            return replace(lp, state_rows=rows)
        if side == "energy":
            standard = lp.standard.copy()
            standard[lp.reaction_ids.index(name)] += h
            return replace(lp, standard=standard)
        if side == "delta":
            return replace(lp, min_driving_force=lp.min_driving_force + h)
        i = lp.index(name)
        lo, hi = float(lp.lower[i]), float(lp.upper[i])
        if side == "lower":
            return lp.with_bounds(name, lower=min(lo + h, hi))
        if side == "upper":
            return lp.with_bounds(name, upper=max(hi + h, lo))
        return lp.with_bounds(name, lower=lo + h, upper=hi + h)

    base = optimum_value(lp, objective, sense)
    minus = optimum_value(moved(-step), objective, sense)
    plus = optimum_value(moved(step), objective, sense)
    return (base - minus) / step, (plus - base) / step


def dual_confirmed(dual: float, left: float, right: float, tolerance: float = 1e-4) -> bool:
    """Whether a dual value lies between the left and right derivatives (within ``tolerance``
    relative, 1e-6 absolute): the subgradient property of a linear program's optimal value.

    >>> dual_confirmed(1.0, 1.0, 1.0), dual_confirmed(0.5, 0.0, 1.0), dual_confirmed(2.0, 1.0, 1.0)
    (True, True, False)
    """
    finite = [d for d in (left, right) if math.isfinite(d)]
    if not finite:
        return False
    slack = 1e-6 + tolerance * max(abs(dual), *(abs(d) for d in finite))
    return min(finite) - slack <= dual <= max(finite) + slack
