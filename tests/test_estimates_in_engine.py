"""The estimates in the engine: the feasibility engine with uncertainty slack k = 2 runs on the
bundled network with the group-contribution estimates in place and passes its certificate.

The slack follows the design notes (docs/design): g_j = Delta_r G'deg_j + eps_j + RT sum_i S_ij x_i with
|eps_j| <= k sigma_j (the "uncertainty" relaxation of thermodynamics-based flux analysis,
Henry, Broadbelt & Hatzimanikatis 2007, Biophys. J. 92:1792). Widening every energy by
2 sigma can only enlarge the feasible set, so the minimal uphill set with k = 2 is never larger
than with k = 0: a check that could fail if the slack were applied with the wrong sign.
"""

from __future__ import annotations

import math

import pytest

from tfa.analyses import feasibility, minimal_uphill_set
from tfa.network import energies
from tfa.network.bundled import load_bundled_network
from tfa.network.environment import bundled_environment
from tfa.problem import ProblemOptions


@pytest.fixture(scope="module")
def native():
    return energies.prepare(load_bundled_network(), bundled_environment(), "native")


def test_estimates_enter_with_their_uncertainty(native):
    estimated = [e for e in native.energies.values() if e.source == "estimated"]
    assert estimated, "the bundled network should use group-contribution estimates"
    for e in estimated:
        assert math.isfinite(e.standard) and e.uncertainty > 0
        assert "group contribution" in e.provenance
    # no internal reaction is left without an energy (every bundled reaction has one)
    assert all(math.isfinite(e.standard) for e in native.all_energies.values())


def test_feasibility_with_two_sigma_slack_is_certified(native):
    strict = minimal_uphill_set(native, ProblemOptions(time_limit=120))
    relaxed = feasibility(native, ProblemOptions(uncertainty_k=2.0, time_limit=120))
    assert relaxed.certificates and all(c.passed for c in relaxed.certificates)
    if relaxed.feasible:
        assert relaxed.solution is not None
    else:
        assert relaxed.diagnosis is not None
        assert relaxed.diagnosis.size <= strict.size
