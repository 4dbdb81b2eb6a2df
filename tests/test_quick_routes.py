"""The quick routes of yes/no questions (tfa.problem.search, ThermoProblem.solve).

Before the exact MILP, a yes/no question tries the flux pattern of least total flux (the
objective of parsimonious flux balance, Lewis et al. 2010, Mol. Syst. Biol. 6:390) as a linear
program, then the MILP at a loose integrality tolerance with its 0/1 values fixed exactly
afterwards. Any point found must be a point of the problem. These networks are solved by hand; energies at 298.15 K, RT = 2.4790 kJ/mol, Delta_r G' = Delta_r G'deg
+ RT ln Q (Alberty 2003, eq. 4.1-4).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

import tfa.problem.search as search  # noqa: E402
from tfa.problem.options import LOOSE_INTEGRALITY  # noqa: E402
from tfa.analyses import feasibility  # noqa: E402
from tfa.analyses.results import certify  # noqa: E402
from tfa.problem import InfeasibleProblem, ProblemOptions, ThermoProblem, available_solvers  # noqa: E402


def detour_network(solver):
    """The least-flux route A -> P -> Q is uphill at every allowed concentration; the detour
    A -> I -> P -> Q is downhill. A is fixed at 1 mM, I and P in 1 uM .. 10 mM, Q in 0.1 .. 10 mM.

    DIRECT (A <=> P, +10 kJ/mol) runs forward only when P < 1e-3 exp(-10.1/RT) = 1.70e-5 M;
    R3 (P <=> Q, 0 kJ/mol) runs forward only when P > Q exp(0.1/RT) >= 1.04e-4 M: each is
    possible alone, not both. Detour at I = 1e-4, P = 2e-4, Q = 1e-4: g1 = -10 + RT ln(0.1) =
    -15.7, g2 = -10 + RT ln 2 = -8.3, g3 = RT ln 0.5 = -1.7 kJ/mol. The least total flux (4 units:
    exchange, DIRECT, R3, demand) takes DIRECT; the detour needs 5.
    """
    return build_thermo_model(
        {"DIRECT": ("A <=> P", 10.0, 1.0), "R1": ("A <=> I", -10.0, 1.0),
         "R2": ("I <=> P", -10.0, 1.0), "R3": ("P <=> Q", 0.0, 1.0)},
        {"A": (1e-3, 1e-3), "I": (1e-6, 1e-2), "P": (1e-6, 1e-2), "Q": (1e-4, 1e-2)},
        exchanges={"A": (-10.0, 10.0)}, demand=("Q", 1.0), solver=solver)


def assert_detour_taken(sol):
    # DIRECT cannot run forward while R3 does (detour_network's docstring): P reaches Q through I
    assert sol.flux("DIRECT") <= 1e-6
    assert sol.flux("R2") >= 1.0 - 1e-6 and sol.flux("R3") >= 1.0 - 1e-6


def straight_network(solver, demand=1.0):
    """A <=> B with Delta_r G'deg = -5 kJ/mol, A fixed at 1 mM, B in 1 uM .. 10 mM: downhill
    whenever B < 1e-3 exp(5/RT) = 7.5 mM."""
    return build_thermo_model({"R1": ("A <=> B", -5.0, 1.0)}, {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2)},
                              exchanges={"A": (-10.0, 10.0)}, demand=("B", demand), solver=solver)


@pytest.fixture
def solver_calls(monkeypatch):
    """Records each solver call made by the problem: "lp" (a linear program: the relaxation or
    a pattern with every 0/1 variable fixed), "loose" (the MILP at the loose integrality
    tolerance) or "exact" (the MILP at the working tolerance)."""
    calls = []
    real = search.optimize

    def spy(model_solver, time_limit, first_point=False, presolve=True):
        if not first_point:
            calls.append("lp")
        else:
            loose = model_solver.configuration.tolerances.integrality == LOOSE_INTEGRALITY
            calls.append("loose" if loose else "exact")
        return real(model_solver, time_limit, first_point, presolve)

    monkeypatch.setattr(search, "optimize", spy)
    return calls


@pytest.mark.parametrize("solver", available_solvers())
def test_least_flux_pattern_answers_without_the_milp(solver, solver_calls):
    with ThermoProblem(straight_network(solver), ProblemOptions(solver=solver)) as problem:
        sol = problem.solve()
        certify(problem, sol)
        assert sol.flux("R1") == pytest.approx(1.0, abs=1e-6)
        assert sol.concentration("B") < 7.5e-3
    assert solver_calls == ["lp", "lp"]     # the relaxation, then the pattern; no MILP


@pytest.mark.parametrize("solver", available_solvers())
def test_uphill_least_flux_pattern_falls_back_to_the_loose_search(solver, solver_calls):
    with ThermoProblem(detour_network(solver), ProblemOptions(solver=solver)) as problem:
        sol = problem.solve()
        certify(problem, sol)
    # relaxation, its pattern (uphill: no point), the loose search, its repair
    assert solver_calls == ["lp", "lp", "loose", "lp"]
    assert_detour_taken(sol)


@pytest.mark.parametrize("solver", available_solvers())
def test_exact_milp_when_no_quick_route_finds_a_point(solver, solver_calls, monkeypatch):
    # the loose route made to come back empty, as when its repair fails: the exact MILP decides
    monkeypatch.setattr(ThermoProblem, "_loose_point", lambda self, what, limit: None)
    with ThermoProblem(detour_network(solver), ProblemOptions(solver=solver)) as problem:
        sol = problem.solve()
        certify(problem, sol)
    # the exact MILP's point is confirmed by the linear program with its directions fixed
    assert solver_calls == ["lp", "lp", "exact", "lp"]
    assert_detour_taken(sol)
    assert problem.solver.configuration.tolerances.integrality == problem.tolerances["integrality"]


@pytest.mark.parametrize("solver", available_solvers())
def test_infeasible_relaxation_proves_infeasible_without_the_milp(solver, solver_calls):
    # the feed gives at most 10 of A, the demand asks 50 of B: even the relaxation has no point
    with ThermoProblem(straight_network(solver, demand=50.0), ProblemOptions(solver=solver)) as problem:
        with pytest.raises(InfeasibleProblem, match="no point satisfies"):
            problem.solve()
    assert solver_calls == ["lp"]


@pytest.mark.parametrize("solver", available_solvers())
@pytest.mark.parametrize("b_bounds, expected", [
    ((1e-6, 1e-2), True),    # B can sit below the 7.5 mM switch (straight_network's docstring)
    ((8e-3, 1e-2), False),   # B at or above 8 mM: -5 + RT ln(8) = +0.15 kJ/mol, uphill
])
def test_same_answer_with_and_without_the_quick_routes(solver, b_bounds, expected):
    answers = []
    for start in (True, False):
        tm = build_thermo_model({"R1": ("A <=> B", -5.0, 1.0)}, {"A": (1e-3, 1e-3), "B": b_bounds},
                                exchanges={"A": (-10.0, 10.0)}, demand=("B", 1.0), solver=solver)
        result = feasibility(tm, ProblemOptions(solver=solver, quick_routes=start), diagnose=False)
        answers.append(result.feasible)
    assert answers == [expected, expected]


@pytest.mark.parametrize("solver", available_solvers())
def test_quick_routes_leave_the_problem_as_it_was(solver):
    # the relaxation turns the direction binaries continuous and sets an objective for a moment,
    # the loose search loosens the integrality tolerance; afterwards all is as it was
    with ThermoProblem(detour_network(solver), ProblemOptions(solver=solver)) as problem:
        binaries = problem.f_vars + problem.b_vars
        before = [(v.lb, v.ub) for v in binaries]
        # R1 cannot run backward: g1 <= -10 + RT ln(1e-2/1e-3) = -4.3 kJ/mol everywhere
        assert (0, 0) in before and (0, 1) in before
        problem.solve()
        assert all(v.type == "integer" for v in binaries)
        assert problem._objective_is_zero
        assert [(v.lb, v.ub) for v in binaries] == before
        tolerance = problem.solver.configuration.tolerances.integrality
        assert tolerance == problem.tolerances["integrality"]
