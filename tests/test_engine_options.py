"""The bundled network gives the same verdicts under every unknown-energy policy, at every demand
scale and with both solvers: the README's verdicts (native feasible; H2 in place of carriers one
uphill step; no ATP the demand impossible; bare chemistry eleven uphill steps).

Every internal reaction of the bundled network has an energy (`tfa inspect`: 138 of 138), so the
policy for reactions without one must change nothing: the demand reaction (a drain of 17
precursors) and the exchanges are boundaries, never "reactions without an energy". The
thermodynamic problem is that of Henry, Broadbelt & Hatzimanikatis 2007 (Biophys. J. 92:1792);
a demand that no steady state meets even without thermodynamics is the flux-balance answer of
Orth, Thiele & Palsson 2010 (Nat. Biotechnol. 28:245).
"""

from __future__ import annotations

import dataclasses

import pytest

from tfa.analyses import feasibility, minimal_uphill_set
from tfa.analyses.demand import ImpossibleDemandError
from tfa.network.bundled import load_bundled_network
from tfa.network.energies import prepare
from tfa.network.environment import bundled_environment
from tfa.modes import STANDARD_MODES as MODES
from tfa.problem import ProblemOptions, available_solvers

#: The README's verdicts: uphill-set size per mode (0 feasible, None demand impossible).
README_SIZES = {"native": 0, "h2_only": 0, "no_atp_strict": None, "no_atp_bare": 11}
DEMANDS = (1e-6, 1e-2, 10.0)


@pytest.fixture(scope="module")
def prepared():
    """mode, demand -> ThermoModel (prepared once for the module)."""
    model, env = load_bundled_network(), bundled_environment()
    out = {}
    for demand in DEMANDS:
        changed = dataclasses.replace(env, demand_flux=demand)
        for mode in MODES:
            out[mode, demand] = prepare(model, changed, mode)
    return out


def size_of(tm, options) -> int | None:
    try:
        return minimal_uphill_set(tm, options).size
    except ImpossibleDemandError:
        return None


@pytest.mark.parametrize("policy", ["free", "block"])
def test_unknown_energy_policy_changes_no_verdict(prepared, policy):
    options = ProblemOptions(unknown_energy=policy, time_limit=120)
    for mode in MODES:
        tm = prepared[mode, 1e-2]
        result = feasibility(tm, options, diagnose=False)
        assert result.reactions_without_energy == []
        assert "without an energy" not in result.message
        assert result.feasible == (README_SIZES[mode] == 0), mode
        assert size_of(tm, options) == README_SIZES[mode], mode


@pytest.fixture(scope="module")
def prepared_glpk():
    """The same networks prepared afresh for GLPK: a problem that another solver's interface held
    first (its rows and columns cloned into GLPK's) can leave GLPK's branch and bound searching
    for minutes where the fresh one answers in seconds (the order sensitivity noted in
    docs/internals.md)."""
    model, env = load_bundled_network(), bundled_environment()
    return {(mode, demand): prepare(model, dataclasses.replace(env, demand_flux=demand), mode)
            for demand in DEMANDS for mode in MODES}


@pytest.mark.parametrize("solver", available_solvers())
@pytest.mark.parametrize("demand", DEMANDS)
def test_verdicts_do_not_depend_on_the_demand_scale(prepared, prepared_glpk, solver, demand):
    # yes/no with both solvers (GLPK proves the bare-chemistry minimum slowly: its size is
    # checked with HiGHS below); the "no" answers are re-asked of the other solver
    options = ProblemOptions(solver=solver, time_limit=120)
    if solver == "glpk":
        prepared = prepared_glpk
    for mode in MODES:
        result = feasibility(prepared[mode, demand], options, diagnose=False)
        assert result.feasible == (README_SIZES[mode] == 0), (mode, demand)
        expected = "certified" if result.feasible else "proven"
        assert result.verification["status"] == expected, result.verification
    if solver == "highs":   # GLPK's branch and bound on this size depends on the load (time limit)
        assert size_of(prepared["h2_only", demand], options) == README_SIZES["h2_only"]
    with pytest.raises(ImpossibleDemandError, match="even ignoring thermodynamics"):
        minimal_uphill_set(prepared["no_atp_strict", demand], options)


@pytest.mark.parametrize("demand", DEMANDS)
def test_bare_chemistry_needs_eleven_uphill_steps_at_every_demand(prepared, demand):
    result = minimal_uphill_set(prepared["no_atp_bare", demand], ProblemOptions(solver="highs",
                                                                                time_limit=120))
    assert result.size == 11 and result.verification["status"] == "proven"
    assert all(v >= 0.0 for v in result.uphill_by[0].values())
