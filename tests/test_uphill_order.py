"""Minimal uphill sets in the order of reaction ids, their count, and the energy to supply, on
small hand-built networks whose answers are derived by hand below.

Conventions (Alberty 2003, eq. 4.1-4): Delta_r G' = Delta_r G'deg + RT ln Q at 298.15 K,
RT = 8.314462618e-3 x 298.15 = 2.47896 kJ/mol; A is fed at 1 mM, every other compound lies in
[1 uM, 10 mM]; the least driving force is 0.1 kJ/mol.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import minimal_uphill_set  # noqa: E402
from tfa.analyses.set_order import count_words  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

RT = 8.314462618e-3 * 298.15
BOX = (1e-6, 1e-2)


def two_stage_network(solver: str):
    """A -> B in one of two ways (R2, R4), B -> P in one of two ways (R1, R3), a bypass
    A -> Z -> P (R0, R5) and a three-step detour A -> E -> F -> P (R6, R7, R8); every step has
    Delta_r G'deg = +60 kJ/mol.

    By hand: a step X -> Y has Delta_r G' >= 60 + RT ln(1e-6 / 1e-2) = 60 - 22.8 = 37.2 kJ/mol
    within the box (A fixed at 1 mM only raises it), so every step that carries flux is uphill and
    a set is a route: the least size is 2 and the sets of size 2 are the five two-step routes
    {R0, R5}, {R1, R2}, {R1, R4}, {R2, R3}, {R3, R4} (the detour needs 3). In the order of the
    sorted ids they come exactly so: R0 < R1 < R2 < R3 decides each comparison at the first id,
    and (R1, R2) < (R1, R4) at the second.
    """
    reactions = {"R2": ("A -> B", 60.0, 0.0), "R4": ("A -> B", 60.0, 0.0),
                 "R1": ("B -> P", 60.0, 0.0), "R3": ("B -> P", 60.0, 0.0),
                 "R0": ("A -> Z", 60.0, 0.0), "R5": ("Z -> P", 60.0, 0.0),
                 "R6": ("A -> E", 60.0, 0.0), "R7": ("E -> F", 60.0, 0.0),
                 "R8": ("F -> P", 60.0, 0.0)}
    bounds = {m: BOX for m in "BZEFP"}
    bounds["A"] = (1e-3, 1e-3)
    return build_thermo_model(reactions, bounds, exchanges={"A": (-100, 0)}, demand=("P", 1.0),
                              solver=solver)


FIVE_SETS = [["R0", "R5"], ["R1", "R2"], ["R1", "R4"], ["R2", "R3"], ["R3", "R4"]]


@pytest.mark.parametrize("solver", available_solvers())
def test_sets_come_in_the_order_of_reaction_ids(solver):
    result = minimal_uphill_set(two_stage_network(solver), ProblemOptions(solver=solver),
                                alternatives=5, count_limit=20)
    assert result.size == 2
    assert result.sets == FIVE_SETS
    assert result.ordered and result.exhausted and result.count == 5


@pytest.mark.parametrize("solver", available_solvers())
def test_first_sets_and_the_count_do_not_depend_on_how_many_are_listed(solver):
    tm = two_stage_network(solver)
    two = minimal_uphill_set(tm, ProblemOptions(solver=solver), alternatives=2, count_limit=20)
    assert two.sets == FIVE_SETS[:2]
    assert (two.count, two.exhausted) == (5, True)
    assert two.count_words() == "5 sets of this size"
    # counting stopped early (3 counted, a fourth seen to exist): a lower bound, said so
    short = minimal_uphill_set(tm, ProblemOptions(solver=solver), alternatives=1, count_limit=3)
    assert short.sets == FIVE_SETS[:1]
    assert (short.count, short.exhausted) == (4, False)
    assert short.count_words() == "at least 4 sets of this size"


@pytest.mark.parametrize("solver", available_solvers())
def test_energy_to_supply_of_a_route_set(solver):
    """Set {R0, R5}: A -> Z -> P carries the demand (flux 1 per unit of demand each step). The
    two energies add up to 120 + RT ln(P / A), least at P = 1 uM:
    120 + 2.47896 ln(1e-3) = 120 - 17.1239 = 102.876 kJ per mol of demand."""
    result = minimal_uphill_set(two_stage_network(solver), ProblemOptions(solver=solver),
                                alternatives=1)
    assert result.sets[0] == ["R0", "R5"]
    assert result.flux_per_demand[0] == pytest.approx({"R0": 1.0, "R5": 1.0}, rel=1e-6)
    hand = 120.0 + RT * math.log(1e-3)
    assert sum(result.uphill_by[0].values()) == pytest.approx(hand, abs=1e-4)
    assert result.energy_to_supply(0) == pytest.approx(hand, abs=1e-4)


@pytest.mark.parametrize("solver", available_solvers())
def test_energy_to_supply_weights_each_step_by_its_flux(solver):
    """A -> B (+60 kJ/mol) then 2 B -> P (-100 kJ/mol): the first step carries two per unit of
    demand. By hand, A -> B is least uphill at B = 1 uM: 60 + RT ln(1e-6 / 1e-3) = 42.876 kJ/mol
    (2 B -> P is then -100 + RT ln(1e-6 / 1e-12) = -65.75, downhill), so the energy to supply is
    2 x 42.876 = 85.752 kJ per mol of demand, not 42.876."""
    tm = build_thermo_model({"UP": ("A -> B", 60.0, 0.0), "DOWN": ("2 B -> P", -100.0, 0.0)},
                            {"A": (1e-3, 1e-3), "B": BOX, "P": BOX},
                            exchanges={"A": (-100, 0)}, demand=("P", 1.0), solver=solver)
    result = minimal_uphill_set(tm, ProblemOptions(solver=solver))
    per_mole = 60.0 + RT * math.log(1e-3)
    assert result.sets == [["UP"]]
    assert result.uphill_by[0]["UP"] == pytest.approx(per_mole, abs=1e-4)
    assert result.flux_per_demand[0]["UP"] == pytest.approx(2.0, rel=1e-6)
    assert result.energy_to_supply(0) == pytest.approx(2 * per_mole, abs=1e-3)
    table = result.to_frame()
    assert table.loc[0, "energy_to_supply_kJ_per_mol_demand"] == pytest.approx(2 * per_mole, abs=1e-3)


def test_count_words():
    assert count_words(1, True) == "the only set of this size"
    assert count_words(7, False) == "at least 7 sets of this size"


def _tfa_json(*args: str) -> dict:
    import json
    import subprocess

    run = subprocess.run([sys.executable, "-m", "tfa", *args, "--json", "-q"], capture_output=True,
                         text=True, timeout=900)
    assert run.returncode == 0, run.stderr
    return json.loads(run.stdout)


@pytest.mark.slow
def test_uphill_and_feasible_give_the_same_first_set_and_count_in_every_mode():
    """Acceptance: `tfa uphill` and `tfa feasible` list the same first set and the same
    count for every mode, whatever number of alternatives each lists (the first set is the first
    in the order of reaction ids, the count does not depend on the listing)."""
    up = _tfa_json("uphill", "--modes", "all", "--alternatives", "3")
    feas = _tfa_json("feasible", "--modes", "all", "--alternatives", "1")
    assert up["feasible"] == feas["feasible"]
    for mode in up["feasible"]:
        first_up = up["uphill"][mode][0] if up["uphill"][mode] else []
        first_feas = feas["uphill"][mode][0] if feas["uphill"][mode] else []
        assert first_up == first_feas, mode
        assert up["uphill_sets_found"].get(mode) is not None or not first_up
        if first_up:
            counted_up, counted_feas = up["uphill_sets_found"][mode], feas["uphill_sets_found"][mode]
            assert counted_up["sets_found"] == counted_feas["sets_found"], mode
            assert counted_up["all_sets_found"] == counted_feas["all_sets_found"], mode
            # listed in the order of sorted reaction ids
            listed = up["uphill"][mode]
            assert listed == sorted(listed) and all(s == sorted(s) for s in listed)
    # the summary lines of the two commands tell the same for each mode
    assert [line for line in up["summary"] if "uphill" in line] == \
        [line for line in feas["summary"] if "uphill" in line]
