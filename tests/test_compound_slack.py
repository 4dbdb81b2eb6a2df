"""The uncertainty slack in compound space (tfa.problem.builder, ``--k-sigma``): eps = A z with
‖z‖₁ <= k, so a slack changes formation energies, never one reaction alone.

Reference: a set of reactions with zero net stoichiometry (a loop) has Σ ΔrG' = 0 at any
concentrations (Hess's law; Beard, Liang & Qian 2002, Biophys. J. 83:79, "energy balance
analysis": no steady-state cycle can run with every step downhill). A per-reaction box
|eps_j| <= k σ_j breaks it: with k σ > δ each step of the loop can be pushed downhill. Hand-
derived network: A -> B -> C -> A, every ΔrG'° = 0 and every compound's ΔfG'° σ = 4 kJ/mol.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pytest

from tfa.analyses.feasibility import feasibility
from tfa.network.compound_table import CompoundEnergy, CompoundEnergyTable
from tfa.problem.builder import ProblemOptions

sys.path.insert(0, str(Path(__file__).resolve().parent))
from engine_networks import build_thermo_model  # noqa: E402


def loop(compound_terms: bool):
    """The loop, every step forced to carry 1 unit of flux forward (a cycle at steady state)."""
    tm = build_thermo_model(
        {"R1": ("a <=> b", 0.0, 4.0 * 2 ** 0.5), "R2": ("b <=> c", 0.0, 4.0 * 2 ** 0.5),
         "R3": ("c <=> a", 0.0, 4.0 * 2 ** 0.5)},
        bounds={"a": (1e-6, 1e-2), "b": (1e-6, 1e-2), "c": (1e-6, 1e-2)})
    for rid in ("R1", "R2", "R3"):
        tm.model.reactions.get_by_id(rid).lower_bound = 1.0
    if compound_terms:
        for rid, (x, y) in {"R1": ("A", "B"), "R2": ("B", "C"), "R3": ("C", "A")}.items():
            tm.energies[rid].compound_terms = {x: -1.0, y: 1.0}
        tm.compound_table = CompoundEnergyTable(tm.conditions, {
            m: CompoundEnergy(m, "species", 0.0, 4.0, "hand-made", m) for m in "ABC"}, None)
    return tm


@pytest.mark.parametrize("k", [0.0, 0.5, 1.0, 3.0, 10.0])
def test_no_slack_makes_a_loop_all_downhill(k):
    tm = loop(compound_terms=True)
    result = feasibility(tm, ProblemOptions(uncertainty_k=k, solver="highs", time_limit=60),
                         diagnose=False)
    assert not result.feasible


def test_the_old_per_reaction_box_would_run_the_loop():
    # control: the same loop with reaction-level errors only (no compound terms) is "feasible"
    # once the slack gives the loop 3 δ = 0.3 kJ/mol (whitened: 0.3/5.66 = 0.053 σ of the steps'
    # own sources <= k = 0.1): the defect compound space removes.
    tm = loop(compound_terms=False)
    result = feasibility(tm, ProblemOptions(uncertainty_k=0.1, solver="highs", time_limit=60),
                         diagnose=False)
    assert result.feasible
    sol = result.solution
    # around the loop Σ g = Σ eps (the concentration terms cancel), and each g <= -δ = -0.1
    assert np.sum(sol.slack) <= -0.3 + 1e-9
    assert np.sum(np.abs(sol.slack_coordinates)) <= 0.1 + 1e-9
    assert result.certificates[0].passed
