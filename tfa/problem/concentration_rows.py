"""Rows on the ln-concentration variables beyond their bounds: the carrier states of the
environment (:mod:`tfa.network.cofactors`: ratio bounds, the phosphorylation-potential floor and
pool totals).

- A :class:`~tfa.network.cofactors.LogLinearBound` is one row, lower <= sum_i a_i x_i <= upper.
- A :class:`~tfa.network.cofactors.PoolTotal` sum_i c_i <= T gets one share variable s_i >= 0 per
  form, the rows s_i >= (slope_k x_i + intercept_k) / T for the pieces of
  :func:`tfa.network.cofactors.pool_rows` (chords: inner; tangents: outer) and sum_i s_i <= 1.
  The shares are scaled by T, so the rows have coefficients of order 1.

Before anything is solved each row is checked against the box of ln c: a row no point of the box
meets is an input error naming it (it would otherwise be reported as an infeasible network).
:class:`ConcentrationChecks` hands the rows to the certificate, which checks them on the returned
concentrations (the pool totals exactly, with the slack the approximation allows).
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..network.cofactors import CHORD_RELATIVE_ERROR, pool_rows

log = logging.getLogger(__name__)


@dataclass
class ConcentrationChecks:
    """What the certificate checks beyond the bounds (plain arrays and words).

    Attributes
    ----------
    rows : list of (column indices, coefficients, lower or None, upper or None, text)
        Linear rows on ln c (columns index the problem's compounds with an activity term).
    pools : list of (column indices, total mol/L, allowed relative excess, text)
    names : dict
        Solver row name -> the constraint in words (``tfa_c_<k>``: a ratio or the
        phosphorylation floor; ``tfa_p_<k>``: a pool total), for an analysis of binding
        constraints.
    """

    rows: list = field(default_factory=list)
    pools: list = field(default_factory=list)
    names: dict = field(default_factory=dict)

    def describe(self) -> list[str]:
        """The constraints in words, for reports."""
        return [r[4] for r in self.rows] + [p[3] for p in self.pools]


def concentration_rows(problem, variable) -> tuple[list, list, ConcentrationChecks]:
    """(new variables, rows as (name, lb, ub, coefficients), checks) for ``problem``'s
    ThermoModel carrier states; ``variable`` is the solver interface's Variable class."""
    tm = problem.thermo_model
    index = problem.metabolite_index
    lower, upper = problem.envelope_lower, problem.envelope_upper
    checks = ConcentrationChecks()
    rows: list[tuple] = []
    variables: list = []
    for k, row in enumerate(getattr(tm, "log_rows", []) or []):
        missing = [m for m in row.coefficients if m not in index]
        if missing:
            log.info("%s left out: %s has no activity term here", row.name, ", ".join(missing))
            continue
        cols = np.array([index[m] for m in row.coefficients], int)
        coefs = np.array(list(row.coefficients.values()), float)
        reach_lo = float(np.sum(np.where(coefs > 0, coefs * lower[cols], coefs * upper[cols])))
        reach_hi = float(np.sum(np.where(coefs > 0, coefs * upper[cols], coefs * lower[cols])))
        if (row.lower is not None and reach_hi < row.lower - 1e-9) or \
                (row.upper is not None and reach_lo > row.upper + 1e-9):
            raise InputError(f"[cofactors] {row.text}: no concentrations within the bounds meet it "
                             f"(ln-sum reaches {reach_lo:.3g} to {reach_hi:.3g}); widen the bounds "
                             "of its compounds or relax the constraint")
        rows.append((f"tfa_c_{k}", row.lower, row.upper,
                     {problem.x_vars[i]: float(a) for i, a in zip(cols, coefs)}))
        checks.rows.append((cols, coefs, row.lower, row.upper, row.text))
        checks.names[f"tfa_c_{k}"] = row.text
    for k, pool in enumerate(getattr(tm, "pools", []) or []):
        cols = [index[m] for m in pool.forms if m in index]
        if not cols:
            continue
        least = float(np.sum(np.exp(lower[cols])))
        if least > pool.total * (1 + 1e-9):
            raise InputError(f"[cofactors] {pool.text}: the lower bounds of its forms already add "
                             f"up to {least:.3g} mol/L; lower them or raise the total")
        total_row = {}
        for i in cols:
            share = variable(f"tfa_s_{k}_{i}", lb=0.0, ub=max(1.0, math.exp(upper[i]) / pool.total))
            variables.append(share)
            total_row[share] = 1.0
            for p, (slope, intercept) in enumerate(pool_rows(float(lower[i]), float(upper[i]),
                                                             pool.total, pool.method)):
                rows.append((f"tfa_p_{k}_{i}_{p}", float(intercept), None,
                             {share: 1.0, problem.x_vars[i]: -float(slope)}))
        rows.append((f"tfa_p_{k}", None, 1.0, total_row))
        checks.names[f"tfa_p_{k}"] = pool.text
        excess = 1e-6 if pool.method == "inner" else CHORD_RELATIVE_ERROR + 1e-6
        checks.pools.append((np.array(cols, int), pool.total, excess,
                             f"{pool.text} ({pool.method} approximation)"))
    return variables, rows, checks
