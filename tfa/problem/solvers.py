"""Solver selection and the translation of solver statuses into plain words.

Two mixed-integer solvers are reachable through optlang: GLPK (always installed with cobra) and
HiGHS (``highspy``, through :mod:`tfa.problem.highs_interface`). The default is chosen from the
measurement in ``scripts/bench_engine.py`` (see :data:`DEFAULT_SOLVER`).
"""

from __future__ import annotations

import logging
import math
from types import ModuleType

from optlang import interface as optlang_status

from ..errors import ComputationError, InputError, UndeterminedError

log = logging.getLogger(__name__)

#: Solver chosen when none is given, from scripts/bench_engine.py (2 shared cores, medians of 3,
#: one run side by side, 2026-12-02, quick routes on). Bundled network: feasibility HiGHS 0.21 s,
#: GLPK 0.29 s; 20-point H2 scan 0.81 / 0.28 s. iJO1366 with synthetic energies: feasibility
#: 1.5 / 1.4 s, scan 5.5 / 4.1 s; the exact MILP alone 1.7 / 26 s. HiGHS proves minimal uphill
#: sets (an optimisation, no quick route) far sooner: bare chemistry of the bundled network in
#: under 1 s, where GLPK can stay undetermined after 60 s. Hence HiGHS.
DEFAULT_SOLVER = "highs"

SOLVER_NAMES = ("glpk", "highs")

#: GLPK backtracking when the question is only "is there a point?" (the problem has no
#: objective and the first integer point found ends the search): best projection (GLP_BT_BPH),
#: which heads for integer points. Measured through tfa.problem.builder (integrality tolerance
#: 1e-9), bundled network at H2 1e-9 / 1e-5 / 1e-3 mol/L: 0.19 / 0.18 / 0.20 s, against 0.16 /
#: 0.18 / 0.20 s for GLPK's default (best local bound) and 12.6 / 28.6 / >60 s for depth first;
#: iJO1366 with synthetic energies: 28-31 s, as with the default (28 s). No better choice was
#: found; at GLPK's default integrality tolerance (1e-5) the iJO1366 search takes 4-5 s, but its
#: points can fail the certificate, so that search is only one of the quick routes, whose points
#: are repaired at exact 0/1 values (tfa.problem.builder.ThermoProblem._loose_point).
GLPK_ANY_POINT_BACKTRACKING = "GLP_BT_BPH"
#: GLPK's MIP presolve (glp_intopt's ``presolve``) for yes/no questions: off. It returned points
#: that break a row by about 1e-6 and let the search time out where it finds a point at once
#: without it: the bundled network's native question at demand 10, three hash seeds (column
#: orders): undetermined after 20 s with it, 1.7-3.0 s without (the loose search: 0.01 s without,
#: 20 s with). Optimisations keep it on the first try (the bundled network's minimal uphill set
#: with H2 in place of carriers at demand 1e-6: best set 5, unproven, after 120 s without it; 1,
#: proven, in seconds with it); every point is confirmed by its fixed-direction linear program
#: and the search repeated without the presolve when it is not.
GLPK_MIP_PRESOLVE = False


class InfeasibleProblem(ComputationError):
    """The question has the answer 'no': no point satisfies every constraint."""


def highs_available() -> bool:
    """True when ``highspy`` can be imported."""
    import importlib.util

    return importlib.util.find_spec("highspy") is not None


def available_solvers() -> list[str]:
    """Names of the solvers that can be used here."""
    names = ["glpk"]
    if highs_available():
        names.append("highs")
    return names


def resolve_solver(name: str | None) -> tuple[str, ModuleType]:
    """The optlang interface module for a solver name (``None`` or "auto": the default).

    Raises
    ------
    InputError
        For an unknown name or a solver that is not installed, naming the alternatives.
    """
    if name in (None, "", "auto"):
        if DEFAULT_SOLVER in available_solvers():
            name = DEFAULT_SOLVER
        else:
            log.warning("the default solver %s cannot be imported (install the package's "
                        "dependencies: highspy, scipy); falling back to GLPK, which is much slower "
                        "on minimal uphill sets", DEFAULT_SOLVER)
            name = "glpk"
    name = name.lower()
    if name == "glpk":
        import optlang.glpk_interface as glpk_interface

        return "glpk", glpk_interface
    if name in ("highs", "hybrid"):
        if not highs_available():
            raise InputError("solver 'highs' needs the package highspy, which is not installed; "
                             "install it or choose --solver glpk")
        from . import highs_interface

        return "highs", highs_interface
    raise InputError(f"unknown solver {name!r}; choose one of {', '.join(available_solvers())}")


def solver_name_of(model_solver) -> str:
    """'glpk' or 'highs' for an optlang model, else the module name."""
    module = model_solver.interface.__name__
    if module.endswith("glpk_interface"):
        return "glpk"
    if module.endswith("highs_interface"):
        return "highs"
    return module.rsplit(".", 1)[-1]


def use_solver(cobra_model, name: str | None) -> str:
    """Attach the named solver to a cobra model (copying the problem only when it changes)."""
    resolved, module = resolve_solver(name)
    if solver_name_of(cobra_model.solver) != resolved:
        log.info("switching the model's solver to %s", resolved)
        cobra_model.solver = module
    return resolved


PLAIN_STATUS = {
    optlang_status.INFEASIBLE: "no point satisfies all constraints (infeasible)",
    optlang_status.UNBOUNDED: "the objective is unbounded",
    optlang_status.INFEASIBLE_OR_UNBOUNDED: "no point satisfies all constraints (infeasible)",
    optlang_status.NUMERIC: "the solver ran into numerical trouble",
    optlang_status.ITERATION_LIMIT: "the solver hit its iteration limit",
    optlang_status.NODE_LIMIT: "the solver hit its node limit",
    optlang_status.ABORTED: "the solver was interrupted",
    optlang_status.SPECIAL: "the solver stopped for an unusual reason",
    optlang_status.UNDEFINED: "the solver gave no answer",
    optlang_status.SUBOPTIMAL: "the solver stopped with a solution that is not proven optimal",
}


def check_status(status: str, what: str, time_limit: float | None) -> None:
    """Turn a solver status that is not 'optimal' into a plain-words error.

    Raises
    ------
    InfeasibleProblem
        When the problem is proven infeasible (a legitimate 'no' the analyses handle).
    UndeterminedError
        When the time limit (or another limit) stopped the solver before a proof:
        "undetermined within N s", never a guess.
    ComputationError
        For any other status.
    """
    if status == optlang_status.OPTIMAL:
        return
    if status in (optlang_status.INFEASIBLE, optlang_status.INFEASIBLE_OR_UNBOUNDED):
        raise InfeasibleProblem(f"{what}: {PLAIN_STATUS[optlang_status.INFEASIBLE]}")
    if status in (optlang_status.TIME_LIMIT, optlang_status.FEASIBLE, optlang_status.SUBOPTIMAL):
        limit = "the time limit" if time_limit is None else f"{time_limit:g} s"
        raise UndeterminedError(f"{what}: undetermined within {limit} (the solver stopped before it "
                                "could prove an answer); raise the time limit to try again")
    if status in (optlang_status.ITERATION_LIMIT, optlang_status.NODE_LIMIT):
        raise UndeterminedError(f"{what}: undetermined ({PLAIN_STATUS[status]}); raise the limit "
                                "or simplify the network")
    words = PLAIN_STATUS.get(status, f"the solver reported {status!r}")
    raise ComputationError(f"{what}: {words}; try the other solver (--solver glpk or highs)")


def optimize(model_solver, time_limit: float | None, first_point: bool = False,
             presolve: bool = True) -> str:
    """Solve an optlang model once, within ``time_limit`` seconds; return its optlang status.

    HiGHS (and any other interface): ``model_solver.optimize()``. GLPK: one call of
    ``glp_intopt`` (``glp_simplex`` for a problem without integer columns), its MIP presolve off
    (:data:`GLPK_MIP_PRESOLVE`), instead of optlang's GLPK ``optimize``, which solves the relaxation once before the
    branch and bound and repeats the whole solve (up to four branch-and-bound runs) whenever the
    answer is "infeasible" or the time limit is hit: an infeasible answer cost four times a
    feasible one and a time limit of N s could run for 4N s.

    ``first_point``: the question is whether any point exists (no objective); GLPK searches by
    :data:`GLPK_ANY_POINT_BACKTRACKING` and the first integer point found is the answer (status
    OPTIMAL). Leave it False for a real optimisation. HiGHS stops at its first integer point by
    itself when there is no objective.

    ``presolve=False`` solves a mixed-integer problem without the solver's MIP presolve: GLPK's
    returned points that break a row by about 1e-6 and "optimal" answers that were not
    (:meth:`tfa.problem.builder.ThermoProblem.solve` falls back to it when a point is not
    confirmed by the linear program with its directions fixed).
    """
    model_solver.configuration.timeout = None if time_limit is None else int(math.ceil(time_limit))
    if solver_name_of(model_solver) != "glpk":
        if presolve:
            return model_solver.optimize()
        configuration = model_solver.configuration
        saved = configuration.presolve
        configuration.presolve = False
        try:
            return model_solver.optimize()
        finally:
            configuration.presolve = saved
    return _optimize_glpk(model_solver, time_limit, first_point, presolve)


def has_point(model_solver) -> bool:
    """True when the last solve left a point of the problem (an incumbent), whatever its status."""
    if solver_name_of(model_solver) == "glpk":
        import swiglpk as glpk

        lp = model_solver.problem
        if glpk.glp_get_num_int(lp) == 0:
            return glpk.glp_get_status(lp) in (glpk.GLP_OPT, glpk.GLP_FEAS)
        return glpk.glp_mip_status(lp) in (glpk.GLP_OPT, glpk.GLP_FEAS)
    info = getattr(model_solver.problem, "info", None)
    return info is not None and int(info.primal_solution_status) == 2   # HiGHS: feasible


def best_bound(model_solver, status: str) -> float | None:
    """The solver's proven bound on the objective after the last solve (None when it gives none).

    HiGHS reports its dual bound (``mip_dual_bound``) for a mixed-integer problem, the objective
    for a linear one. GLPK gives no bound on a search stopped early; at a proven optimum (its
    relative gap tolerance is 0 here) the bound is the objective.
    """
    if solver_name_of(model_solver) == "glpk":
        if status == optlang_status.OPTIMAL:
            return float(model_solver.objective.value)
        return None
    problem = model_solver.problem
    info = getattr(problem, "info", None)
    if info is None:
        return None
    direction = float(getattr(problem, "direction", 1.0))
    if problem.integer_vars:
        value = float(info.mip_dual_bound)
    elif status == optlang_status.OPTIMAL:
        value = float(info.objective_function_value)
    else:
        return None
    return value * direction if math.isfinite(value) else None


def _glpk_simplex_parameters(model_solver, limit_ms: int):
    """GLPK simplex parameters: presolve on, quiet, the time limit, and the model's own
    feasibility tolerance (``tol_bnd``, set from the problem's tolerances)."""
    import swiglpk as glpk

    smcp = glpk.glp_smcp()
    glpk.glp_init_smcp(smcp)
    settings = getattr(model_solver.configuration, "_smcp", None)
    if settings is not None:
        smcp.tol_bnd = settings.tol_bnd
    smcp.presolve = glpk.GLP_OFF
    smcp.msg_lev = glpk.GLP_MSG_OFF
    smcp.tm_lim = limit_ms
    return smcp


def _optimize_glpk(model_solver, time_limit: float | None, first_point: bool,
                   presolve: bool = True) -> str:
    import swiglpk as glpk

    model_solver.update()
    lp = model_solver.problem
    glpk.glp_scale_prob(lp, glpk.GLP_SF_AUTO)
    limit_ms = 2**31 - 1 if time_limit is None else int(min(2**31 - 1, math.ceil(time_limit * 1000)))
    if glpk.glp_get_num_int(lp) == 0:
        code = glpk.glp_simplex(lp, _glpk_simplex_parameters(model_solver, limit_ms))
        if code in (glpk.GLP_EBADB, glpk.GLP_ESING, glpk.GLP_ECOND) or (
                code == 0 and glpk.glp_get_status(lp) == glpk.GLP_NOFEAS):
            # a warm start can end in a wrong "no feasible point" (seen on a four-reaction
            # network after other problems were solved in the process): once more from a
            # fresh basis, whose answer stands
            glpk.glp_adv_basis(lp, 0)
            code = glpk.glp_simplex(lp, _glpk_simplex_parameters(model_solver, limit_ms))
        solved_status = glpk.glp_get_status
    else:
        iocp = glpk.glp_iocp()
        glpk.glp_init_iocp(iocp)
        settings = model_solver.configuration._iocp
        for name in ("tol_int", "tol_obj", "mip_gap", "fp_heur"):
            setattr(iocp, name, getattr(settings, name))
        presolve = presolve and (GLPK_MIP_PRESOLVE or not first_point)
        iocp.msg_lev = glpk.GLP_MSG_OFF
        iocp.tm_lim = limit_ms
        if first_point:
            iocp.bt_tech = getattr(glpk, GLPK_ANY_POINT_BACKTRACKING)
        if not presolve:   # without its presolver glp_intopt starts from an optimal LP basis
            # from a basis built afresh (glp_adv_basis), not the one the last problem left: the
            # search then does not depend on what was solved before (on the bundled network the
            # native question took 0.3 s from a fresh problem and ran past 30 s after a problem
            # was built and removed; 0.8 s with the fresh basis, 1.8 s from the standard basis)
            glpk.glp_adv_basis(lp, 0)
            code = glpk.glp_simplex(lp, _glpk_simplex_parameters(model_solver, limit_ms))
            if code != 0:  # the basis left by the last problem did not serve: a fresh one
                glpk.glp_adv_basis(lp, 0)
                code = glpk.glp_simplex(lp, _glpk_simplex_parameters(model_solver, limit_ms))
            if code == 0 and glpk.glp_get_status(lp) != glpk.GLP_OPT:
                relaxed = glpk.glp_get_status(lp)
                model_solver._status = (optlang_status.INFEASIBLE
                                        if relaxed in (glpk.GLP_NOFEAS, glpk.GLP_INFEAS)
                                        else optlang_status.UNDEFINED)
                return model_solver._status
            presolve = code != 0   # no optimal basis: glp_intopt's presolver starts afresh
        iocp.presolve = glpk.GLP_ON if presolve else glpk.GLP_OFF
        code = glpk.glp_intopt(lp, iocp)
        solved_status = glpk.glp_mip_status
    found = solved_status(lp) in (glpk.GLP_OPT, glpk.GLP_FEAS)
    if first_point and found:        # any integer point answers the question, whatever the code
        status = optlang_status.OPTIMAL
    elif code == 0:
        status = {glpk.GLP_OPT: optlang_status.OPTIMAL, glpk.GLP_FEAS: optlang_status.FEASIBLE,
                  glpk.GLP_NOFEAS: optlang_status.INFEASIBLE, glpk.GLP_INFEAS: optlang_status.INFEASIBLE,
                  glpk.GLP_UNBND: optlang_status.UNBOUNDED}.get(solved_status(lp), optlang_status.UNDEFINED)
    elif code == glpk.GLP_EMIPGAP:  # optimal within the relative gap tolerance (as HiGHS's "Optimal")
        status = optlang_status.OPTIMAL
    elif code == glpk.GLP_ENOPFS:   # the presolver proved that no primal feasible point exists
        status = optlang_status.INFEASIBLE
    elif code == glpk.GLP_ENODFS:   # no dual feasible point: unbounded or infeasible
        status = optlang_status.INFEASIBLE_OR_UNBOUNDED
    elif code in (glpk.GLP_ETMLIM, glpk.GLP_ESTOP):
        status = (optlang_status.FEASIBLE if solved_status(lp) == glpk.GLP_FEAS
                  else optlang_status.TIME_LIMIT)
    else:
        log.debug("glp_intopt/glp_simplex returned %d; solving through optlang instead", code)
        return model_solver.optimize()
    model_solver._status = status
    return status
