"""Impossible demands and contradictory input end with plain words, never a bare solver status.

The problem is the thermodynamics-based flux problem of Henry, Broadbelt & Hatzimanikatis 2007
(Biophys. J. 92:1792); a demand that mass balance alone cannot meet is infeasible for it too
(Orth, Thiele & Palsson 2010, Nat. Biotechnol. 28:245), which the messages must say.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import pytest
from optlang import interface as optlang_status

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import feasibility, h2_threshold, minimal_uphill_set, ranges  # noqa: E402
from tfa.analyses.demand import ImpossibleDemandError  # noqa: E402
from tfa.errors import InputError, MissingDataError, UndeterminedError  # noqa: E402
from tfa.network.thermo_model import ReactionEnergy  # noqa: E402
from tfa.problem import InfeasibleProblem, ProblemOptions, ThermoProblem, available_solvers  # noqa: E402
from tfa.problem.solvers import check_status  # noqa: E402


def net(solver="glpk", demand=1.0, a_supply=10.0, b_bounds=(1e-6, 1e-2)):
    return build_thermo_model({"R1": ("A <=> B", -5.0, 1.0)}, {"A": (1e-3, 1e-3), "B": b_bounds},
                              exchanges={"A": (-a_supply, a_supply)}, demand=("B", demand),
                              solver=solver)


@pytest.mark.parametrize("solver", available_solvers())
def test_impossible_demand_is_explained(solver):
    # the feed delivers at most 10 of A, the demand asks for 50 of B: stoichiometry alone forbids it
    tm = net(solver, demand=50.0)
    result = feasibility(tm, ProblemOptions(solver=solver))
    assert not result.feasible and result.demand_impossible
    assert "even ignoring thermodynamics" in result.message
    assert "at most 10" in result.message and "at least 50" in result.message
    with pytest.raises(ImpossibleDemandError, match="at most 10"):
        minimal_uphill_set(tm, ProblemOptions(solver=solver))


def test_contradictory_concentration_bounds_name_the_compound():
    tm = net(b_bounds=(1e-2, 1e-6))
    with pytest.raises(InputError, match="compound B: contradictory concentration bounds"):
        feasibility(tm)


def test_missing_bounds_and_bad_energy_are_named():
    tm = net()
    del tm.log_bounds["B"]
    with pytest.raises(InputError, match="compound B has no concentration bounds"):
        ThermoProblem(tm)
    tm = net()
    tm.energies["R1"] = ReactionEnergy("R1", float("nan"), 1.0, "estimated")
    with pytest.raises(MissingDataError, match="reaction R1"):
        ThermoProblem(tm)


def test_unknown_solver_and_bad_options():
    with pytest.raises(InputError, match="unknown solver"):
        ThermoProblem(net(), ProblemOptions(solver="nonesuch"))
    with pytest.raises(InputError, match="unknown_energy"):
        ProblemOptions(unknown_energy="maybe")
    with pytest.raises(InputError, match="time limit"):
        ProblemOptions(time_limit=0)


def test_time_limit_reads_undetermined_within_n_seconds():
    with pytest.raises(UndeterminedError, match="undetermined within 5 s"):
        check_status(optlang_status.TIME_LIMIT, "feasibility", 5.0)
    with pytest.raises(InfeasibleProblem, match="no point satisfies"):
        check_status(optlang_status.INFEASIBLE, "feasibility", 5.0)


def test_ranges_of_infeasible_network_say_so():
    tm = net(b_bounds=(0.5, 1.0))  # B >= 0.5 M: -5 + RT ln(500) = +10.4 > 0, uphill everywhere
    with pytest.raises(InfeasibleProblem, match="infeasible, so there is no feasible set"):
        ranges(tm)


def test_h2_threshold_without_h2_is_an_input_error():
    with pytest.raises(InputError, match="H2"):
        h2_threshold(net())
    assert math.isfinite(1.0)


def test_model_left_as_it_was():
    tm = net()
    before = (len(tm.model.solver.variables), len(tm.model.solver.constraints))
    feasibility(tm)
    after = (len(tm.model.solver.variables), len(tm.model.solver.constraints))
    assert before == after


def test_glpk_answers_infeasible_with_one_branch_and_bound(monkeypatch):
    # optlang's own GLPK optimize solves the relaxation first and repeats the whole solve when
    # the answer is not "optimal"; tfa.problem.solvers.optimize calls glp_intopt once, so a
    # "no" costs what a "yes" costs. A (1 mM) <=> P at +10 kJ/mol runs forward only when
    # P < 1e-3 exp(-10.1/RT) = 1.70e-5 M, P <=> Q at 0 kJ/mol only when P > Q exp(0.1/RT) >=
    # 1.04e-4 M (Q >= 0.1 mM): both cannot run, so the demand on Q cannot be met downhill, while
    # the linear relaxation (0/1 variables between 0 and 1) has a point, so the branch and
    # bound must decide (Alberty 2003, eq. 4.1-4, at 298.15 K). The quick routes are off: they
    # are linear programs and a loose search of their own (tests/test_quick_routes.py).
    import swiglpk

    calls = []
    real = swiglpk.glp_intopt
    monkeypatch.setattr(swiglpk, "glp_intopt", lambda lp, parm: calls.append(1) or real(lp, parm))
    options = ProblemOptions(solver="glpk", quick_routes=False)
    tm = build_thermo_model({"R1": ("A <=> P", 10.0, 1.0), "R2": ("P <=> Q", 0.0, 1.0)},
                            {"A": (1e-3, 1e-3), "P": (1e-6, 1e-2), "Q": (1e-4, 1e-2)},
                            exchanges={"A": (-10.0, 10.0)}, demand=("Q", 1.0), solver="glpk")
    with ThermoProblem(tm, options) as problem:
        with pytest.raises(InfeasibleProblem, match="no point satisfies"):
            problem.solve()
    assert calls == [1]


def test_glpk_time_limit_is_reported_as_undetermined(monkeypatch):
    # a branch and bound stopped by its time limit (GLPK's return code GLP_ETMLIM) must read
    # "undetermined within N s", never a guess and never a silent second run
    import swiglpk

    calls = []

    def stopped(lp, parm):
        calls.append(parm.tm_lim)
        return swiglpk.GLP_ETMLIM

    monkeypatch.setattr(swiglpk, "glp_intopt", stopped)
    # the quick routes are off: they are linear programs (glp_simplex), which would answer first
    options = ProblemOptions(solver="glpk", time_limit=3, quick_routes=False)
    with ThermoProblem(net("glpk"), options) as problem:
        with pytest.raises(UndeterminedError, match="undetermined within 3 s"):
            problem.solve()
    # one branch-and-bound call, given what is left of the 3 s
    assert len(calls) == 1 and 2000 < calls[0] <= 3000
