"""The independent certificate catches tampered solutions. Reference of the recomputed energy:
Delta_r G' = Delta_r G'deg + RT ln Q (Alberty 2003, eq. 4.1-4)."""

from __future__ import annotations

import copy
import math
import sys
from pathlib import Path

import numpy as np
import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.errors import CertificateError  # noqa: E402
from tfa.problem import ProblemOptions, ThermoProblem  # noqa: E402
from tfa.verify import check_solution  # noqa: E402


def solved(solver="glpk", uphill=False, dg2=-5.0):
    tm = build_thermo_model({"R1": ("A <=> B", -5.0, 1.0), "R2": ("B <=> C", dg2, 1.0)},
                            {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2), "C": (1e-6, 1e-2)},
                            exchanges={"A": (-10, 10)}, demand=("C", 1.0), solver=solver)
    problem = ThermoProblem(tm, ProblemOptions(solver=solver, uphill=uphill))
    if uphill:
        problem.set_objective({v: 1.0 for v in problem.u_vars}, "min")
    return problem, problem.solve()


def test_untampered_solution_passes():
    problem, sol = solved()
    cert = check_solution(problem.certificate_input(sol))
    assert cert.passed and cert.n_flux_carrying == 2
    # the recomputed energies equal the solver's own within 1e-6 kJ/mol
    assert np.allclose(cert.recomputed_energies, sol.energies, atol=1e-6)
    problem.remove()


def test_changed_concentration_is_caught():
    problem, sol = solved()
    bad = copy.deepcopy(sol)
    # put B at its upper bound 10 mM: R1 = -5 + RT ln(1e-2/1e-3) = +0.71 kJ/mol > 0, uphill
    bad.log_conc[bad.metabolite_ids.index("B")] = math.log(1e-2)
    with pytest.raises(CertificateError, match="second law.*R1"):
        check_solution(problem.certificate_input(bad))
    problem.remove()


def test_concentration_out_of_bounds_is_caught():
    problem, sol = solved()
    bad = copy.deepcopy(sol)
    bad.log_conc[bad.metabolite_ids.index("C")] = math.log(1e-1)
    with pytest.raises(CertificateError, match="concentration bounds: C"):
        check_solution(problem.certificate_input(bad))
    problem.remove()


def test_unbalanced_flux_is_caught():
    problem, sol = solved()
    bad = copy.deepcopy(sol)
    bad.fluxes[bad.reaction_ids.index("R2")] *= 0.5
    with pytest.raises(CertificateError, match="mass balance"):
        check_solution(problem.certificate_input(bad))
    problem.remove()


def test_uphill_reaction_passes_only_when_listed():
    # R2 at +40: 40 + RT ln(C/B) >= 40 - 22.8 > 0, so R2 must run uphill
    problem, sol = solved(uphill=True, dg2=40.0)
    assert sol.uphill == ["R2"]
    assert check_solution(problem.certificate_input(sol, allowed_uphill=["R2"])).passed
    with pytest.raises(CertificateError, match="R2"):
        check_solution(problem.certificate_input(sol, allowed_uphill=[]))
    problem.remove()
