"""How tfa calls the two solvers: one solver call per question, HiGHS with its presolve on, and
a yes/no question answered by the first point found.

These guard measured choices (scripts/bench_engine.py: on iJO1366 with synthetic energies HiGHS
without presolve took 8.0 s where it takes 2.1 s with it; on the bundled network GLPK's
depth-first search took 12.6 s where best projection takes 0.19 s). The answers themselves are
checked against hand-derived values in tests/test_engine_small.py.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import feasibility, minimal_uphill_set  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402


def one_step(solver: str, b_bounds: tuple = (1e-6, 1e-2)):
    # A (fed at 1 mM) <=> B with Delta_r G'deg = -5 kJ/mol; B drained by a demand of 1. With
    # B down to 1 uM the step is downhill: -5 + RT ln(1e-6 / 1e-3) = -22.1 kJ/mol at 298.15 K
    # (Alberty 2003, eq. 4.1-4), so the network is feasible.
    return build_thermo_model({"R1": ("A <=> B", -5.0, 1.0)}, {"A": (1e-3, 1e-3), "B": b_bounds},
                              exchanges={"A": (-10, 10)}, demand=("B", 1.0), solver=solver)


@pytest.mark.skipif("highs" not in available_solvers(), reason="highspy is a declared dependency")
def test_highs_runs_with_its_presolve():
    from tfa.problem import highs_interface

    model = highs_interface.Model()
    assert model.configuration.presolve == "auto"
    assert model.problem._options().presolve == "choose"   # HiGHS: "choose" = presolve on


def test_glpk_searches_for_a_first_point_only_in_yes_no_questions(monkeypatch):
    import swiglpk

    seen = []
    real = swiglpk.glp_intopt

    def spy(lp, parm):
        seen.append(parm.bt_tech)
        return real(lp, parm)

    monkeypatch.setattr(swiglpk, "glp_intopt", spy)
    # the MILP's own search is under test: the quick routes (whose pattern LPs are
    # glp_intopt calls with every 0/1 variable fixed) are off; tests/test_quick_routes.py
    milp_only = ProblemOptions(solver="glpk", quick_routes=False)
    answer = feasibility(one_step("glpk"), milp_only)
    assert answer.feasible and answer.certificates[0].passed
    assert seen == [swiglpk.GLP_BT_BPH]
    seen.clear()
    # the minimal uphill set first asks the yes/no question (is it feasible as it stands?), then
    # minimises the number of uphill steps: that optimisation must be proven, not cut short. Two
    # parallel steps A <=> B, both uphill with B >= 0.5 M (-5 + RT ln(500) = +10.4 kJ/mol): neither
    # is needed by every steady state, so no bound known beforehand settles the size
    parallel = build_thermo_model({"R1": ("A <=> B", -5.0, 1.0), "R2": ("A <=> B", -5.0, 1.0)},
                                  {"A": (1e-3, 1e-3), "B": (0.5, 1.0)}, exchanges={"A": (-10, 10)},
                                  demand=("B", 1.0), solver="glpk")
    uphill = minimal_uphill_set(parallel, milp_only)
    assert uphill.size == 1 and uphill.verification["status"] == "proven"
    # the yes/no question ends at its linear relaxation (no downhill way for B at all), with GLPK's
    # MIP presolve off glp_simplex says so before any branch and bound; the minimisation is one
    # branch and bound by best local bound; listing the sets in the order of reaction ids and
    # counting them (tfa.analyses.set_order) then asks yes/no questions: a first point only
    assert seen[0] == swiglpk.GLP_BT_BLB and set(seen[1:]) <= {swiglpk.GLP_BT_BPH}


@pytest.mark.skipif("highs" not in available_solvers(), reason="highspy is a declared dependency")
def test_highs_removal_keeps_expressions_so_a_row_can_come_back():
    # tfa's HiGHS interface removes rows in one pass; a removed row must keep its expression, as
    # cobra re-adds removed constraints when a `with model:` block ends. Reference value: the
    # E. coli core model grows at 0.874 /h on glucose (Orth, Thiele & Palsson 2010, Nat.
    # Biotechnol. 28:245, the textbook model bundled with cobra).
    import cobra

    from tfa.problem.solvers import use_solver

    model = cobra.io.load_model("textbook")
    use_solver(model, "highs")
    assert model.slim_optimize() == pytest.approx(0.8739, abs=1e-4)
    row = model.solver.constraints["pyr_c"]
    coefficients = {v.name: c for v, c in row.get_linear_coefficients(row.variables).items()}
    model.solver.remove([row])
    assert "pyr_c" not in model.solver.constraints
    # without the pyruvate balance, pyruvate comes from nothing and growth rises
    assert model.slim_optimize() > 0.8739 + 0.1
    kept = {v.name: float(c) for v, c in row.expression.as_coefficients_dict().items()}
    assert kept == pytest.approx(coefficients)
    model.solver.add([row])
    assert model.slim_optimize() == pytest.approx(0.8739, abs=1e-4)


@pytest.mark.parametrize("solver", available_solvers())
def test_problem_leaves_the_model_as_it_was(solver):
    # tfa.problem.bulk removes the problem's rows and columns in one call each (GLPK); the model
    # must come back with the same rows and columns in the same order, the same optimum (E. coli
    # core on glucose: 0.874 /h, Orth, Thiele & Palsson 2010, Nat. Biotechnol. 28:245) and room
    # for the next problem, whose names are the same. The energies of two glycolytic steps are
    # arbitrary test values (the check is structural); every compound between 1 uM and 10 mM.
    import math

    import cobra

    from tfa.conditions import Conditions
    from tfa.network.thermo_model import ReactionEnergy, ThermoModel
    from tfa.problem import ThermoProblem
    from tfa.problem.solvers import use_solver

    model = cobra.io.load_model("textbook")
    use_solver(model, solver)
    energies = {rid: ReactionEnergy(rid, value, 1.0, "placeholder", "arbitrary test value")
                for rid, value in (("PGI", 2.0), ("PFK", -15.0))}
    bounds = {m.id: (math.log(1e-6), math.log(1e-2)) for m in model.metabolites}
    tm = ThermoModel(model, Conditions(), energies, bounds, no_activity={"h_c", "h2o_c"})
    before = ([v.name for v in model.solver.variables], [c.name for c in model.solver.constraints])
    for _ in range(2):
        with ThermoProblem(tm, ProblemOptions(solver=solver)) as problem:
            assert len(model.solver.variables) > len(before[0])
            problem.solve()
        after = ([v.name for v in model.solver.variables], [c.name for c in model.solver.constraints])
        assert after == before
        assert model.slim_optimize() == pytest.approx(0.8739, abs=1e-4)
