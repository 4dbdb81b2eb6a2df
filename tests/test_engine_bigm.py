"""Big-M constants: never larger than the interval width of their Delta_r G', and the interval
bounds themselves equal the true extremes over the box (checked by enumerating the box corners,
since a linear form takes its extremes at vertices: R. E. Moore, Interval Analysis, 1966)."""

from __future__ import annotations

import itertools
import math
import sys
from pathlib import Path

import numpy as np
import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.problem import ProblemOptions, ThermoProblem, available_solvers  # noqa: E402
from tfa.problem.bigm import energy_intervals  # noqa: E402


def small_network(solver: str):
    return build_thermo_model(
        {"R1": ("A <=> B", -10.0, 2.0), "R2": ("B <=> 2 C", 30.0, 3.0),
         "R3": ("A + C <=> D", 1.0, 1.0), "R4": ("D <=> E", 60.0, 1.0)},
        {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2), "C": (1e-5, 1e-3), "D": (1e-6, 1e-2),
         "E": (1e-6, 1e-2)},
        exchanges={"A": (-10, 10)}, demand=("E", 0.0), solver=solver)


def test_intervals_equal_vertex_enumeration():
    rng = np.random.default_rng(7)
    for _ in range(20):
        n_met = 4
        coefs = rng.integers(-2, 3, size=(3, n_met)).astype(float)
        lo = np.log(rng.uniform(1e-7, 1e-4, n_met))
        hi = lo + rng.uniform(0.0, 8.0, n_met)
        std = rng.normal(0, 20, 3)
        slack = rng.uniform(0, 3, 3)
        rows, cols = np.nonzero(coefs)
        g_lo, g_hi = energy_intervals(std, slack, rows, cols, coefs[rows, cols], lo, hi, 2.5)
        corners = np.array(list(itertools.product(*zip(lo, hi))))
        values = std[None, :] + 2.5 * corners @ coefs.T
        assert np.allclose(g_lo, values.min(axis=0) - slack)
        assert np.allclose(g_hi, values.max(axis=0) + slack)


@pytest.mark.parametrize("solver", available_solvers())
@pytest.mark.parametrize("k", [0.0, 2.0])
def test_no_big_m_exceeds_interval_width(solver, k):
    tm = small_network(solver)
    # flux caps from the flux bounds: with caps from steady-state flux ranges, R2 could not run
    # backward in any steady state (C has no other source) and would lose its row
    options = ProblemOptions(solver=solver, uncertainty_k=k, flux_caps="bounds")
    with ThermoProblem(tm, options) as problem:
        width = problem.g_upper - problem.g_lower
        checked = 0
        # read the coefficients back from the solver's rows, not from our arrays
        for j in range(len(problem.energy_ids)):
            for name, binary in ((f"tfa_gf_{j}", problem.f_vars[j]), (f"tfa_gb_{j}", problem.b_vars[j])):
                if name not in problem.solver.constraints:
                    continue
                row = problem.solver.constraints[name]
                m = row.get_linear_coefficients([binary])[binary]
                assert 0 < m <= width[j] + 1e-9, (name, m, width[j])
                checked += 1
        assert checked >= 2  # R2 in both directions (R1 is downhill over the whole box)
        # R4: D <=> E, 60 + RT ln(E/D) >= 60 - 22.8 > 0: the forward direction is impossible,
        # so its binary is fixed at 0 and it has no big-M row
        j4 = problem.energy_ids.index("R4")
        assert problem.f_vars[j4].ub == 0
        assert f"tfa_gf_{j4}" not in problem.solver.constraints
        # interval of R2 (B <=> 2 C, 30 +/- k*3): 30 -/+ 3k + RT (2 ln C - ln B) over the box
        rt = tm.RT
        j2 = problem.energy_ids.index("R2")
        lo = 30 - 3 * k + rt * (2 * math.log(1e-5) - math.log(1e-2))
        hi = 30 + 3 * k + rt * (2 * math.log(1e-3) - math.log(1e-6))
        assert problem.g_lower[j2] == pytest.approx(lo)
        assert problem.g_upper[j2] == pytest.approx(hi)
