"""One built problem answers many draws of the energies (tfa.analyses.draws,
ThermoProblem.set_standard): the problem after a change of energies is the one a fresh build
makes, and its answers agree with fresh builds.

Hand-derived reference (tests/robust_helpers.py): R1 (H2 + X <=> XH2) can run downhill exactly
when ΔrG'°1 <= c = -δ - RT ln(1e-6 / (1e-3 · 1e-2)) = -0.1 + RT ln 10 = 5.608 kJ/mol at 25 °C
(RT = 2.4790 kJ/mol, R from CODATA 2018); R2 is then far downhill. So the verdict flips between
ΔrG'°1 = 5.5 and 5.7 kJ/mol, and when it is "no" the minimal uphill set is {R1}.
"""

from __future__ import annotations

import math
import pickle
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from tfa.analyses.draws import SPREAD_SIGMAS, DrawSolver
from tfa.analyses.feasibility import feasibility
from tfa.analyses.uncertainty import with_energies
from tfa.constants import R
from tfa.errors import InputError
from tfa.problem.builder import ProblemOptions, ThermoProblem

sys.path.insert(0, str(Path(__file__).resolve().parent))
from robust_helpers import hand_prepare  # noqa: E402

#: The flip point of the hand network (module text), kJ/mol.
FLIP = -0.1 + R * 298.15 * math.log(10.0)


def test_the_flip_point_is_the_hand_derived_one():
    assert FLIP == pytest.approx(5.608, abs=1e-3)


@pytest.mark.parametrize("dg1, feasible", [(FLIP - 0.1, True), (FLIP + 0.1, False),
                                           (-3.0, True), (14.0, False)])
def test_a_reused_problem_answers_as_the_hand_derivation(dg1, feasible):
    tm = hand_prepare(None, None, "native")
    solver = DrawSolver(tm, ProblemOptions(), ["R1", "R2"], np.array([4.0, 2.0]))
    for first in (10.0, 1.0):        # another draw before: the answer must not depend on it
        solver.outcome(np.array([first, -20.0]))
        answer = solver.outcome(np.array([dg1, -20.0]))
        assert answer["feasible"] is feasible
        assert answer["verification"] in (("certified",) if feasible else ("proven", "solver proof"))
        assert answer["uphill_set"] == ([] if feasible else ["R1"])
        assert answer["uphill_set_size"] == (0 if feasible else 1)


def test_a_draw_beyond_the_spread_is_refused_with_the_reaction_named():
    tm = hand_prepare(None, None, "native")
    solver = DrawSolver(tm, ProblemOptions(), ["R1", "R2"], np.array([1.0, 1.0]))
    far = np.array([10.0 + SPREAD_SIGMAS * 1.0 + 0.5, -20.0])
    assert not solver.covers(far)
    with pytest.raises(InputError, match="R1.*spread"):
        solver.problem.set_standard(far)


def _bundled_native():
    from tfa.network.bundled import load_bundled_network
    from tfa.network.energies import prepare
    from tfa.network.environment import bundled_environment

    return prepare(load_bundled_network(), bundled_environment(), "native")


def test_set_standard_makes_the_problem_a_fresh_build_makes():
    """Intervals (Moore 1966 interval arithmetic, tfa.problem.bigm), big-M, open directions and
    the definition rows after set_standard equal those of a problem built for the new energies."""
    from tfa.network.compound_space import energy_covariance

    tm = _bundled_native()
    pristine = pickle.dumps(tm.model)
    cov = energy_covariance(tm)
    sigma = np.sqrt(np.diag(cov.covariance))
    spread = {rid: SPREAD_SIGMAS * s for rid, s in zip(cov.reaction_ids, sigma)}
    options = ProblemOptions(uphill=True)
    reused = ThermoProblem(replace(tm, model=pickle.loads(pristine)), options, energy_spread=spread)
    order = [cov.reaction_ids.index(rid) for rid in reused.energy_ids]
    for index in (0, 1, 2):
        values = cov.draw(11, index)
        reused.set_standard(values[order])
        drawn = with_energies(tm, dict(zip(cov.reaction_ids, values.tolist())))
        with ThermoProblem(replace(drawn, model=pickle.loads(pristine)), options) as fresh:
            assert np.allclose(reused.g_lower, fresh.g_lower, atol=1e-9)
            assert np.allclose(reused.g_upper, fresh.g_upper, atol=1e-9)
            assert np.allclose(reused.big_m.forward, fresh.big_m.forward, atol=1e-9)
            assert np.allclose(reused.big_m.backward, fresh.big_m.backward, atol=1e-9)
            assert [v.ub for v in reused.f_vars] == [v.ub for v in fresh.f_vars]
            assert [v.ub for v in reused.b_vars] == [v.ub for v in fresh.b_vars]
            assert [c.lb for c in reused._definition_rows] == pytest.approx(
                [c.lb for c in fresh._definition_rows], abs=1e-12)
    reused.remove()


def test_reused_answers_agree_with_fresh_builds_on_the_bundled_network():
    """Draw by draw, the verdict and the size of the minimal uphill set equal those of the full
    analysis on a fresh build (tfa.analyses.feasibility, its own certificate and proof)."""
    from tfa.network.compound_space import energy_covariance

    tm = _bundled_native()
    pristine = pickle.dumps(tm.model)
    cov = energy_covariance(tm)
    sigma = np.sqrt(np.diag(cov.covariance))
    solver = DrawSolver(replace(tm, model=pickle.loads(pristine)), ProblemOptions(),
                        list(cov.reaction_ids), sigma)
    verdicts = []
    for index in range(6):
        values = cov.draw(0, index)
        answer = solver.outcome(values)
        drawn = with_energies(tm, dict(zip(cov.reaction_ids, values.tolist())))
        fresh = feasibility(replace(drawn, model=pickle.loads(pristine)), ProblemOptions(),
                            canonical=False)
        assert answer["feasible"] == fresh.feasible, index
        assert answer["uphill_set_size"] == fresh.uphill_set_size, index
        verdicts.append(answer["feasible"])
    assert True in verdicts and False in verdicts     # both answers were exercised
