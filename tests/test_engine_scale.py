"""Answers that do not depend on the flux unit, honest edges, and a solver library shared with
other code in the same process.

Energies: Delta_r G' = Delta_r G'deg + RT ln Q (Alberty 2003, eq. 4.1-4) at 298.15 K, RT =
2.478957 kJ/mol (CODATA 2018 R); a reaction carrying flux needs Delta_r G' <= -delta in its
direction (Henry, Broadbelt & Hatzimanikatis 2007, Biophys. J. 92:1792), delta = 0.1 kJ/mol.
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import feasibility, minimal_uphill_set  # noqa: E402
from tfa.analyses.demand import ImpossibleDemandError  # noqa: E402
from tfa.errors import InputError  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

RT = 8.314462618e-3 * 298.15
SOLVERS = available_solvers()


def uphill_join(demand: float, solver: str, extra_required: float | None = None):
    """A + B <=> C at +30 kJ/mol with A and B fed at 1 mM and C in 1 uM .. 10 mM: Delta_r G' >=
    30 + RT ln(1e-6 / 1e-6) = +30 kJ/mol everywhere, so the network is infeasible at any demand.
    ``extra_required``: a second reaction D <=> E (downhill) whose flux must be at least that."""
    reactions = {"JOIN": ("A + B <=> C", 30.0, 1.0)}
    bounds = {"A": (1e-3, 1e-3), "B": (1e-3, 1e-3), "C": (1e-6, 1e-2)}
    exchanges = {"A": (-1000.0, 1000.0), "B": (-1000.0, 1000.0)}
    if extra_required is not None:
        reactions["SIDE"] = ("D <=> E", -20.0, 1.0)
        bounds.update({"D": (1e-3, 1e-3), "E": (1e-6, 1e-2)})
        exchanges.update({"D": (-1000.0, 1000.0), "E": (0.0, 1000.0)})
    tm = build_thermo_model(reactions, bounds, exchanges=exchanges, demand=("C", demand),
                            solver=solver, flux_bound=1000.0)
    if extra_required is not None:
        tm.model.reactions.SIDE.lower_bound = extra_required
    return tm


@pytest.mark.parametrize("solver", SOLVERS)
@pytest.mark.parametrize("demand", [1e-9, 5e-6, 1e-5, 1e-3, 10.0])
def test_truly_infeasible_join_is_infeasible_at_every_demand(solver, demand):
    result = feasibility(uphill_join(demand, solver), ProblemOptions(solver=solver))
    assert not result.feasible and not result.demand_impossible
    assert result.diagnosis.sets == [["JOIN"]]
    # uphill by 30 kJ/mol at every concentration (A, B, C at their bounds: 30 + RT ln(1e-6/1e-6))
    assert result.diagnosis.uphill_by[0]["JOIN"] == pytest.approx(30.0, abs=1e-6)
    # the "no" was re-asked of the other solver, and the answer says so
    assert result.verification["status"] == "proven"
    assert "confirmed by" in result.verification["check"]


@pytest.mark.parametrize("solver", SOLVERS)
def test_required_fluxes_too_far_apart_are_refused(solver):
    # a demand of 1e-3 next to a required flux of 800: a ratio of 8e5, beyond what a solver at
    # 1e-9 resolves once fluxes are scaled to the largest
    with pytest.raises(InputError, match="span from 0.001 .* to 800"):
        feasibility(uphill_join(1e-3, solver, extra_required=800.0), ProblemOptions(solver=solver))
    # within the span the same network is answered, and infeasible as before
    result = feasibility(uphill_join(1.0, solver, extra_required=800.0), ProblemOptions(solver=solver))
    assert not result.feasible and result.diagnosis.sets == [["JOIN"]]


@pytest.mark.parametrize("solver", SOLVERS)
def test_step_short_of_the_least_driving_force_is_not_uphill_by_a_negative_amount(solver):
    # A (1 mM) <=> B at +5 kJ/mol with B >= b_low: the least Delta_r G' is 5 + RT ln(b_low/1e-3),
    # set to -0.05 kJ/mol: downhill, but by less than delta = 0.1, so the step must be driven and
    # it misses the least driving force by 0.05 kJ/mol
    b_low = 1e-3 * math.exp(-5.05 / RT)
    tm = build_thermo_model({"R1": ("A <=> B", 5.0, 1.0)}, {"A": (1e-3, 1e-3), "B": (b_low, 1e-2)},
                            exchanges={"A": (-10, 10)}, demand=("B", 1e-6), solver=solver)
    result = feasibility(tm, ProblemOptions(solver=solver))
    assert not result.feasible
    uphill = result.diagnosis
    assert uphill.sets == [["R1"]]
    assert uphill.uphill_by[0]["R1"] == 0.0
    assert uphill.short_by[0]["R1"] == pytest.approx(0.05, abs=1e-6)
    assert "uphill by -" not in result.message and "short of the least driving force" in result.message


@pytest.mark.parametrize("solver", SOLVERS)
def test_least_driving_force_beyond_any_reaction_energy_is_refused(solver):
    tm = build_thermo_model({"R1": ("A <=> B", -5.0, 1.0)}, {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2)},
                            exchanges={"A": (-10, 10)}, demand=("B", 1.0), solver=solver)
    # |Delta_r G'| reaches at most 5 + RT ln(1e4) = 27.8 kJ/mol within the bounds (the option's
    # own cap, 100 kJ/mol, refuses larger values before any problem is built)
    with pytest.raises(InputError, match="least driving force 90 kJ/mol is larger"):
        feasibility(tm, ProblemOptions(solver=solver, min_driving_force=90.0))
    with pytest.raises(InputError, match="least driving force"):
        ProblemOptions(solver=solver, min_driving_force=1e9)


@pytest.mark.parametrize("solver", SOLVERS)
def test_every_answer_says_how_it_is_backed(solver):
    tm = build_thermo_model({"R1": ("A <=> B", -5.0, 1.0)}, {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2)},
                            exchanges={"A": (-10, 10)}, demand=("B", 1.0), solver=solver)
    feasible = json.loads(json.dumps(feasibility(tm, ProblemOptions(solver=solver)).to_dict(),
                                     default=str))
    assert feasible["verification"]["status"] == "certified"
    assert "independent numpy check" in feasible["verification"]["check"]
    uphill = minimal_uphill_set(uphill_join(1.0, solver), ProblemOptions(solver=solver)).to_dict()
    assert uphill["verification"]["status"] == "proven"
    assert uphill["verification"]["bound"] == 1 and uphill["verification"]["gap"] == 0.0


@pytest.mark.skipif("highs" not in SOLVERS, reason="highspy is a declared dependency")
def test_highs_after_another_use_of_highspy_in_the_same_process():
    # a notebook user solves with highspy directly (HiGHS starts its thread scheduler with its
    # own count), then asks tfa: tfa's solves must still run. A fresh process, so that the
    # order is the user's.
    script = (
        "import highspy\n"
        "h = highspy.Highs(); h.silent()\n"
        "x = h.addVariable(lb=0, ub=4); h.maximize(x)\n"
        "assert abs(h.getInfo().objective_function_value - 4) < 1e-9\n"
        "import sys; sys.path.insert(0, %r)\n"
        "from engine_networks import build_thermo_model\n"
        "from tfa.analyses import feasibility\n"
        "from tfa.problem import ProblemOptions\n"
        "tm = build_thermo_model({'R1': ('A <=> B', -5.0, 1.0)}, {'A': (1e-3, 1e-3), "
        "'B': (1e-6, 1e-2)}, exchanges={'A': (-10, 10)}, demand=('B', 1.0), solver='highs')\n"
        "print(feasibility(tm, ProblemOptions(solver='highs')).feasible)\n"
    ) % str(Path(__file__).parent)
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr[-2000:]
    assert done.stdout.strip().splitlines()[-1] == "True"


@pytest.mark.parametrize("policy", ["free", "block"])
def test_a_two_sided_demand_is_never_a_reaction_without_an_energy(policy):
    # a lumped biomass reaction has products too (iJO1366's makes ADP, phosphate and H+): as the
    # environment's demand it is a boundary, so neither policy for reactions without an energy
    # touches its lower bound of 1. A (1 mM) <=> B at -5 kJ/mol with B down to 1 uM is downhill
    # (-5 + RT ln(1e-6/1e-3) = -22.1 kJ/mol), so the network is feasible.
    tm = build_thermo_model({"R1": ("A <=> B", -5.0, 1.0), "GROWTH": ("B -> X", None, 0.0)},
                            {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2), "X": (1e-6, 1e-2)},
                            exchanges={"A": (-10, 10), "X": (0, 10)}, solver="glpk")
    tm.model.reactions.GROWTH.lower_bound = 1.0
    tm.demand_id = "GROWTH"
    assert tm.reaction_kinds() == {"R1": "internal", "GROWTH": "demand", "EX_A": "exchange",
                                   "EX_X": "exchange"}
    result = feasibility(tm, ProblemOptions(solver="glpk", unknown_energy=policy))
    assert result.feasible and result.reactions_without_energy == []
    assert result.solution.flux("GROWTH") >= 1.0 - 1e-9


def test_an_impossible_demand_under_the_block_policy_says_what_was_closed():
    # A -> B -> C with no energy for B -> C: under "block" the only route is closed, so the
    # demand of C (1) cannot be met at all; plain flux balance with that reaction closed allows
    # 0 (hand-derived), and the message says the closure made it so rather than the feed.
    tm = build_thermo_model({"R1": ("A <=> B", -5.0, 1.0), "R2": ("B -> C", None, 0.0)},
                            {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2), "C": (1e-6, 1e-2)},
                            exchanges={"A": (-10, 10)}, demand=("C", 1.0), solver="glpk")
    with pytest.raises(ImpossibleDemandError) as caught:
        minimal_uphill_set(tm, ProblemOptions(solver="glpk", unknown_energy="block"))
    message = str(caught.value)
    assert "allow at most 0 with the 1 reaction(s) without an energy blocked" in message
    # under "free" the same network is feasible, so the closure is the whole reason
    assert feasibility(tm, ProblemOptions(solver="glpk", unknown_energy="free")).feasible
