"""Carrier states: ratio bounds, pool totals and the phosphorylation-potential
floor, on networks small enough to solve by hand.

Reference for every derivation: Delta_r G' = Delta_r G'deg + RT sum_i nu_i ln c_i (Alberty 2003,
eq. 4.1-4), RT = 2.478957 kJ/mol at 298.15 K (CODATA 2018 R), a reaction carrying flux forward
needs Delta_r G' <= -0.1 kJ/mol (the least driving force).
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import feasibility  # noqa: E402
from tfa.errors import InputError, NetworkFileError  # noqa: E402
from tfa.network.cofactors import CofactorStates, LogLinearBound, PoolTotal  # noqa: E402
from tfa.network.environment import Environment  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

RT = 8.314462618e-3 * 298.15
DELTA = 0.1
SOLVERS = available_solvers()


def carrier_network(solver):
    """A (fed 1 mM) + NH <=> B + N (dG'deg +5), N + H (fed 1 mM) <=> NH (dG'deg -30), B drained.

    R1 needs 5 + RT ln(B N / (A NH)) <= -0.1; with B >= A = 1 mM that is NH/N >= exp(5.1/RT)
    = 7.82 (hand derivation). R2 allows NH/N up to exp(29.9/RT) * 1e-3 = 172.
    """
    return build_thermo_model(
        {"R1": ("A + NH <=> B + N", 5.0, 0.0), "R2": ("N + H <=> NH", -30.0, 0.0)},
        {"A": (1e-3, 1e-3), "H": (1e-3, 1e-3), "B": (1e-3, 1e-2), "N": (1e-6, 1e-2),
         "NH": (1e-6, 1e-2)},
        exchanges={"A": (-10, 10), "H": (-10, 10)}, demand=("B", 1.0), solver=solver)


RATIO_LIMIT = math.exp((5.0 + DELTA) / RT)


@pytest.mark.parametrize("solver", SOLVERS)
def test_ratio_bound_decides_feasibility_at_the_hand_derived_ratio(solver):
    assert RATIO_LIMIT == pytest.approx(7.8243, rel=1e-4)
    opts = ProblemOptions(solver=solver)
    tm = carrier_network(solver)
    assert feasibility(tm, opts, diagnose=False).feasible          # NH/N free up to 1e4
    for highest, expected in ((RATIO_LIMIT * 0.999, False), (RATIO_LIMIT * 1.001, True)):
        tm = carrier_network(solver)
        tm.log_rows = [LogLinearBound("ratio NH/N", {"NH": 1.0, "N": -1.0}, math.log(0.1),
                                      math.log(highest), f"NH/N <= {highest:g}")]
        answer = feasibility(tm, opts, diagnose=False)
        assert answer.feasible is expected
        if expected:
            point = answer.solution
            ratio = point.concentration("NH") / point.concentration("N")
            assert RATIO_LIMIT * (1 - 1e-6) <= ratio <= highest * (1 + 1e-6)


def dimer_network(solver):
    """2 P + A (fed 1 mM) <=> B + Q (dG'deg +5), Q + H (fed 1 mM) <=> 2 P (dG'deg -40), B drained.

    With B, A at 1 mM, R1 needs 2 ln P - ln Q >= 5.1/RT = 2.0573; Q >= 1 uM, so
    ln P >= (2.0573 + ln 1e-6)/2, P >= 2.7973e-3 mol/L; R2 allows 2 ln P - ln Q <= 9.19. With
    the pool P + Q <= T the least total that works is T* = P* + 1 uM = 2.7983e-3 mol/L.
    """
    return build_thermo_model(
        {"R1": ("2 P + A <=> B + Q", 5.0, 0.0), "R2": ("Q + H <=> 2 P", -40.0, 0.0)},
        {"A": (1e-3, 1e-3), "H": (1e-3, 1e-3), "B": (1e-3, 1e-2), "P": (1e-6, 1e-2),
         "Q": (1e-6, 1e-2)},
        exchanges={"A": (-10, 10), "H": (-10, 10)}, demand=("B", 1.0), solver=solver)


P_LEAST = math.exp(((5.0 + DELTA) / RT + math.log(1e-6)) / 2)
T_LEAST = P_LEAST + 1e-6


@pytest.mark.parametrize("solver", SOLVERS)
@pytest.mark.parametrize("method, factor, expected", [
    ("inner", 0.999, False), ("inner", 1.01, True),      # inner: never beyond the true total
    ("outer", 0.99, False), ("outer", 1.0001, True),     # outer: at most 0.8 % beyond it
])
def test_pool_total_brackets_the_hand_derived_least_total(solver, method, factor, expected):
    assert P_LEAST == pytest.approx(2.7973e-3, rel=1e-4)
    tm = dimer_network(solver)
    total = T_LEAST * factor
    tm.pools = [PoolTotal("pool PQ", ("P", "Q"), total, method, f"P + Q <= {total:g}")]
    answer = feasibility(tm, ProblemOptions(solver=solver), diagnose=False)
    assert answer.feasible is expected
    if expected:
        point = answer.solution
        pool = point.concentration("P") + point.concentration("Q")
        limit = total * (1 + (1e-6 if method == "inner" else 0.0081))
        assert pool <= limit           # the certificate checked the same on the concentrations
        assert point.concentration("P") >= P_LEAST * (1 - 1e-6)


def test_unmeetable_pool_is_an_input_error_naming_it():
    tm = dimer_network("glpk")
    tm.pools = [PoolTotal("pool PQ", ("P", "Q"), 1.5e-6, "inner", "P + Q <= 1.5e-06")]
    with pytest.raises(InputError, match=r"P \+ Q <= 1.5e-06.*add up to 2e-06"):
        feasibility(tm, ProblemOptions(solver="glpk"), diagnose=False)


def test_cofactor_section_is_read_and_checked():
    data = {"conditions": {"temperature_C": 25.0, "pH": 7.0, "ionic_strength_M": 0.1},
            "demand": {"none": True},
            "cofactors": {"phosphorylation_potential_min_kJ_per_mol": 45.0,
                          "pools": {"NAD": {"forms": ["nad", "nadh"], "total": 1e-3}},
                          "ratios": {"nadh/nad": [0.001, 1.0]},
                          "bounds": {"atp": [1e-4, 1e-2]}}}
    env = Environment.from_dict(data, "env.toml")
    states = env.cofactors
    assert isinstance(states, CofactorStates)
    assert states.pools[0].forms == ("nad", "nadh") and states.pools[0].total == 1e-3
    assert (states.ratios[0].numerator, states.ratios[0].lowest) == ("nadh", 0.001)
    assert env.with_loose_cofactors().cofactors is None
    bad = dict(data, cofactors={"ratios": {"nadh": [0.1, 1.0]}})
    with pytest.raises(NetworkFileError, match="numerator/denominator"):
        Environment.from_dict(bad, "env.toml")
    floored = dict(data, cofactors={"pools": {"NAD": {"forms": ["nad", "nadh"], "total": 1e-3,
                                                      "least": 5e-4, "shares": [0.97, 0.03]}}})
    pool = Environment.from_dict(floored, "env.toml").cofactors.pools[0]
    assert (pool.least, pool.shares) == (5e-4, (0.97, 0.03))
    floored["cofactors"]["pools"]["NAD"]["shares"] = [1.0]
    with pytest.raises(NetworkFileError, match="one number per form"):
        Environment.from_dict(floored, "env.toml")
    bad = dict(data, cofactors={"pool": {}})
    with pytest.raises(NetworkFileError, match="did you mean 'pools'"):
        Environment.from_dict(bad, "env.toml")


@pytest.mark.slow
def test_bundled_h2_threshold_rests_on_the_physiological_carrier_states():
    """With the energy-converting hydrogenase and Rnf in the network, H2 is needed as the donor
    that reduces ferredoxin; the least H2 then rests on the carrier states of the environment's
    [cofactors] (the ferredoxin pool), not on the loose per-form bounds: dropping the section
    (--loose-cofactors) moves it, and the binding-constraint analysis (the LP of the threshold's
    flux pattern, tests/test_binding.py) names a constraint of that section."""
    from tfa.analyses import h2_threshold
    from tfa.network.energies import prepare
    from tfa.network.inputs import resolve_inputs

    inputs = resolve_inputs()
    env = inputs.environment
    physiological = h2_threshold(prepare(inputs.model, env, "native"), ProblemOptions())
    loose = h2_threshold(prepare(inputs.model, env.with_loose_cofactors(), "native"), ProblemOptions())
    assert physiological.feasible and loose.feasible
    assert physiological.threshold != pytest.approx(loose.threshold, rel=1e-3)
    assert physiological.certificates and physiological.certificates[0].carrier_checks >= 5


def floor_network(solver):
    """A (fed 1 mM) <=> P (dG'deg -5), P drained; Q only in Q <=> D (no flux needed); P, Q, D in
    [1 uM, 10 mM]. R1 needs P <= 1e-3 exp(4.9/RT) = 7.216e-3 mol/L (hand derivation). With the
    floor P + Q >= L and Q <= 10 mM the true limit is L <= 10 mM + 7.216 mM = 17.216 mM."""
    return build_thermo_model(
        {"R1": ("A <=> P", -5.0, 0.0), "R2": ("Q <=> D", 0.0, 0.0)},
        {"A": (1e-3, 1e-3), "P": (1e-6, 1e-2), "Q": (1e-6, 1e-2), "D": (1e-6, 1e-2)},
        exchanges={"A": (-10, 10)}, demand=("P", 1.0), solver=solver)


P_MOST = 1e-3 * math.exp((5.0 - DELTA) / RT)


@pytest.mark.parametrize("solver", SOLVERS)
def test_pool_floor_is_conservative_and_exact_at_its_reference_shares(solver):
    from tfa.network.cofactors import Pool, floor_row

    assert P_MOST == pytest.approx(7.216e-3, rel=1e-3)
    true_limit = 1e-2 + P_MOST

    def feasible(least, shares):
        tm = floor_network(solver)
        tm.log_rows = [floor_row(Pool("PQ", ("P", "Q"), 1.0, least, shares), ("P", "Q"))]
        answer = feasibility(tm, ProblemOptions(solver=solver), diagnose=False)
        if answer.feasible:   # the floor holds on the concentrations (AM-GM on the row)
            point = answer.solution
            assert point.concentration("P") + point.concentration("Q") >= least * (1 - 1e-6)
        return answer.feasible

    # equal reference shares: sqrt(P Q) >= L/2 with Q <= 10 mM gives L <= 2 sqrt(0.01 P_MOST)
    equal_limit = 2 * math.sqrt(1e-2 * P_MOST)
    assert equal_limit < true_limit                              # stricter than the true floor
    assert feasible(equal_limit * 0.999, (0.5, 0.5))
    assert not feasible(equal_limit * 1.001, (0.5, 0.5))
    # shares of the limiting point (P_MOST : 10 mM): exact there
    shares = (P_MOST, 1e-2)
    assert feasible(true_limit * 0.999, shares)
    assert not feasible(true_limit * 1.001, shares)
