"""Steady-state flux ranges (flux variability analysis), for the flux caps of the direction rows.

For each reaction j asked for, the least and the greatest net flux over the steady states of the
network, without thermodynamics:

    lo_j = min v_j,  hi_j = max v_j   subject to  S v = 0,  lower <= v <= upper

(flux variability analysis, Mahadevan & Schilling 2003, Metab. Eng. 5:264). Units: those of the
flux bounds. The direction rows of the thermodynamic problem, v_fwd_j <= U_j f_j, need U_j only
as large as any steady state can make v_j; the reaction's nominal bound (often 1000) is a much
weaker cap. With GLPK, the bundled network's "H2 only" mode was undetermined after 120 s with
nominal caps and proven infeasible in 0.12 s with these (scripts/bench_engine.py, 2026-12-02).

The linear programs are solved by GLPK (installed with cobra) on a problem of their own, built
from plain arrays, each from the last one's basis: on iJO1366 (2,252 reactions with an energy,
4,504 linear programs) 2.6 s, where HiGHS through highspy, warm-started the same way, took 72 s.
They only bound the problem, so the solver that answers the question does not matter here.
"""

from __future__ import annotations

import logging
import math

import numpy as np

log = logging.getLogger(__name__)

#: Caps are widened by this relative and absolute margin so that the solver's own tolerance
#: (1e-9) can never cut off a steady state.
CAP_MARGIN = 1e-7


def steady_state_flux_ranges(rows: np.ndarray, cols: np.ndarray, values: np.ndarray,
                             n_metabolites: int, lower: np.ndarray, upper: np.ndarray,
                             wanted: np.ndarray, time_limit: float | None = None) -> tuple[np.ndarray, np.ndarray] | None:
    """Least and greatest net flux of each reaction in ``wanted`` over the steady states.

    Parameters
    ----------
    rows, cols, values : ndarray
        The stoichiometric matrix in coordinate form (metabolite row, reaction column, coefficient).
    n_metabolites : int
        Number of rows of the matrix.
    lower, upper : ndarray
        Flux bounds of every reaction (finite).
    wanted : ndarray of int
        Columns whose range is wanted.
    time_limit : float or None
        Seconds for all the linear programs together; past it, None.

    Returns
    -------
    (lo, hi) arrays over ``wanted``, or None when there is no steady state at all (or the time
    limit was reached): the caller then keeps the nominal bounds.

    Examples
    --------
    A chain feed -> A -> B -> out with the feed at most 10 and the second step at most 4: every
    steady state has v1 = v2 <= 4 (Mahadevan & Schilling 2003, the method's definition).

    >>> import numpy as np
    >>> rows, cols, vals = np.array([0, 0, 1, 1]), np.array([0, 1, 1, 2]), np.array([1., -1, 1, -1])
    >>> lo, hi = steady_state_flux_ranges(rows, cols, vals, 2, np.zeros(3), np.array([10., 4, 10]),
    ...                                   np.array([0, 1, 2]))
    >>> hi.round(6).tolist(), lo.round(6).tolist()
    ([4.0, 4.0, 4.0], [0.0, 0.0, 0.0])
    """
    wanted = np.asarray(wanted, int)
    if wanted.size == 0:
        return np.zeros(0), np.zeros(0)
    tasks = [(int(j), "max") for j in wanted] + [(int(j), "min") for j in wanted]
    found = _solve_glpk_tasks(np.asarray(rows, int), np.asarray(cols, int),
                              np.asarray(values, float), int(n_metabolites),
                              np.asarray(lower, float), np.asarray(upper, float), tasks, time_limit)
    if found is None:
        return None
    return found[len(wanted):], found[:len(wanted)]


def least_signed_fluxes(rows: np.ndarray, cols: np.ndarray, values: np.ndarray, n_metabolites: int,
                        lower: np.ndarray, upper: np.ndarray, wanted: np.ndarray, signs: np.ndarray,
                        time_limit: float | None = None) -> np.ndarray | None:
    """For each column j in ``wanted`` with sign d_j (+1 or -1), the least d_j v_j over the steady
    states (one linear program each, half of :func:`steady_state_flux_ranges`). A positive value
    means every steady state uses the direction d_j of reaction j. None when there is no steady
    state (or the time limit was reached).

    >>> import numpy as np
    >>> rows, cols, vals = np.array([0, 0, 1, 1]), np.array([0, 1, 1, 2]), np.array([1., -1, 1, -1])
    >>> least_signed_fluxes(rows, cols, vals, 2, np.array([0., 0, 2]), np.array([10., 4, 10]),
    ...                     np.array([1, 0]), np.array([1, -1])).round(6).tolist()
    [2.0, -4.0]
    """
    wanted = np.asarray(wanted, int)
    if wanted.size == 0:
        return np.zeros(0)
    signs = np.asarray(signs, float)
    tasks = [(int(j), "min" if d > 0 else "max") for j, d in zip(wanted, signs)]
    found = _solve_glpk_tasks(np.asarray(rows, int), np.asarray(cols, int), np.asarray(values, float),
                              int(n_metabolites), np.asarray(lower, float), np.asarray(upper, float),
                              tasks, time_limit)
    return None if found is None else signs * found


def flux_caps(lo: np.ndarray, hi: np.ndarray, forward_bound: np.ndarray,
              backward_bound: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Forward and backward caps from flux ranges: U = min(bound, hi+) and L = min(bound, (-lo)+),
    widened by :data:`CAP_MARGIN`; a direction no steady state uses gets cap 0.

    >>> u, l = flux_caps(np.array([-2.0, 0.0]), np.array([5.0, 1e-12]), np.array([1e3, 1e3]),
    ...                  np.array([1e3, 1e3]))
    >>> u.round(4).tolist(), l.round(4).tolist()
    ([5.0, 0.0], [2.0, 0.0])
    """
    def cap(reach, bound):
        reach = np.where(reach > 1e-9, reach * (1 + CAP_MARGIN) + CAP_MARGIN, 0.0)
        return np.minimum(bound, reach)

    return cap(np.asarray(hi, float), forward_bound), cap(-np.asarray(lo, float), backward_bound)


def _solve_glpk_tasks(rows, cols, values, n_met, lower, upper, tasks, time_limit):
    """Optimal v_j of each (column j, "min" or "max") task over the steady states, in order,
    each linear program warm-started from the last one's basis; None on failure."""
    import swiglpk as glpk

    lp = glpk.glp_create_prob()
    terminal = glpk.glp_term_out(glpk.GLP_OFF)   # glp_adv_basis and glp_scale_prob print
    try:
        n = len(lower)
        glpk.glp_add_rows(lp, n_met)
        glpk.glp_add_cols(lp, n)
        for i in range(1, n_met + 1):
            glpk.glp_set_row_bnds(lp, i, glpk.GLP_FX, 0.0, 0.0)
        for j in range(n):
            kind = glpk.GLP_FX if lower[j] == upper[j] else glpk.GLP_DB
            glpk.glp_set_col_bnds(lp, j + 1, kind, float(lower[j]), float(upper[j]))
        k = len(values)
        ia, ja, ar = glpk.intArray(k + 1), glpk.intArray(k + 1), glpk.doubleArray(k + 1)
        for t in range(k):
            ia[t + 1] = int(rows[t]) + 1
            ja[t + 1] = int(cols[t]) + 1
            ar[t + 1] = float(values[t])
        glpk.glp_load_matrix(lp, k, ia, ja, ar)
        glpk.glp_scale_prob(lp, glpk.GLP_SF_AUTO)
        parm = glpk.glp_smcp()
        glpk.glp_init_smcp(parm)
        parm.msg_lev = glpk.GLP_MSG_OFF
        limit_ms = None if time_limit is None else int(math.ceil(time_limit * 1000))
        started = glpk.glp_time()
        out = np.empty(len(tasks))
        glpk.glp_adv_basis(lp, 0)
        for t, (j, sense) in enumerate(tasks):
            glpk.glp_set_obj_dir(lp, glpk.GLP_MAX if sense == "max" else glpk.GLP_MIN)
            glpk.glp_set_obj_coef(lp, int(j) + 1, 1.0)
            if limit_ms is not None:
                parm.tm_lim = max(1, limit_ms - int(glpk.glp_difftime(glpk.glp_time(), started) * 1000))
            code = glpk.glp_simplex(lp, parm)
            if code != 0 or glpk.glp_get_status(lp) != glpk.GLP_OPT:
                # a warm start can lose its way numerically: once more from a fresh basis
                glpk.glp_adv_basis(lp, 0)
                code = glpk.glp_simplex(lp, parm)
            if code != 0 or glpk.glp_get_status(lp) != glpk.GLP_OPT:
                log.debug("flux ranges: GLPK ended with code %d, status %d at column %d; "
                          "nominal caps kept", code, glpk.glp_get_status(lp), j)
                return None
            out[t] = glpk.glp_get_col_prim(lp, int(j) + 1)
            glpk.glp_set_obj_coef(lp, int(j) + 1, 0.0)
        return out
    finally:
        glpk.glp_delete_prob(lp)
        glpk.glp_term_out(terminal)
