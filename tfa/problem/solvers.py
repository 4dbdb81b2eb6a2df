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

#: Solver chosen when none is given, from scripts/bench_engine.py (2 shared cores, loaded):
#: on the bundled network HiGHS solves every analysis in seconds (bare-chemistry uphill set,
#: 2 alternatives + 20-point scan + threshold: ~7-11 s) where GLPK does not prove the
#: bare-chemistry minimal uphill set within 120 s; on iJO1366 with synthetic energies GLPK is
#: faster for one feasibility solve (28 s against 7-150 s for HiGHS, which varies with column
#: order). The networks this tool is for are of the bundled kind, hence HiGHS when installed.
DEFAULT_SOLVER = "highs"

SOLVER_NAMES = ("glpk", "highs")

#: Relative gap at which GLPK stops when the question is only "is there a point?": any gap, so
#: the first integer point found ends the search (GLPK returns GLP_EMIPGAP with it).
GLPK_ANY_POINT_GAP = 1e300
#: GLPK backtracking for such searches: best projection (GLP_BT_BPH), which heads for integer
#: points, instead of best local bound, which with the total-flux guide of
#: tfa.problem.builder.GLPK_SEARCH_GUIDE wandered among low-flux nodes. Measured (feasibility,
#: guided): bundled network, native mode 0.17 s (best local bound 24.8 s, depth first 0.47 s);
#: iJO1366 with synthetic energies, seeds 20240601 / 11 / 7 / 3, branch and bound alone:
#: 4.3 / 4.1 / 4.1 / 4.2 s (depth first 4.6 / 4.5 / 4.1 / 4.7 s).
GLPK_ANY_POINT_BACKTRACKING = "GLP_BT_BPH"


class InfeasibleProblem(ComputationError):
    """The question has the answer 'no': no point satisfies every constraint."""


def highs_available() -> bool:
    """True when ``highspy`` can be imported."""
    try:
        from . import highs_interface  # noqa: F401
    except ImportError:
        return False
    return True


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


def optimize(model_solver, time_limit: float | None, first_point: bool = False) -> str:
    """Solve an optlang model once, within ``time_limit`` seconds; return its optlang status.

    HiGHS (and any other interface): ``model_solver.optimize()``. GLPK: one call of
    ``glp_intopt`` (``glp_simplex`` for a problem without integer columns) with GLPK's presolver
    on, instead of optlang's GLPK ``optimize``, which solves the relaxation once before the
    branch and bound and repeats the whole solve (up to four branch-and-bound runs) whenever the
    answer is "infeasible" or the time limit is hit: an infeasible answer cost four times a
    feasible one and a time limit of N s could run for 4N s.

    ``first_point``: the question is whether any point exists, the objective only guides the
    search; GLPK stops at the first integer point (:data:`GLPK_ANY_POINT_GAP`) and the status is
    OPTIMAL. Leave it False for a real optimisation. (HiGHS is given no objective for such
    questions and stops at its first integer point by itself.)
    """
    model_solver.configuration.timeout = None if time_limit is None else int(math.ceil(time_limit))
    if solver_name_of(model_solver) != "glpk":
        return model_solver.optimize()
    return _optimize_glpk(model_solver, time_limit, first_point)


def _optimize_glpk(model_solver, time_limit: float | None, first_point: bool) -> str:
    import swiglpk as glpk

    model_solver.update()
    lp = model_solver.problem
    glpk.glp_scale_prob(lp, glpk.GLP_SF_AUTO)
    limit_ms = 2**31 - 1 if time_limit is None else int(min(2**31 - 1, math.ceil(time_limit * 1000)))
    if glpk.glp_get_num_int(lp) == 0:
        smcp = glpk.glp_smcp()
        glpk.glp_init_smcp(smcp)
        smcp.presolve = glpk.GLP_ON
        smcp.msg_lev = glpk.GLP_MSG_OFF
        smcp.tm_lim = limit_ms
        code = glpk.glp_simplex(lp, smcp)
        solved_status = glpk.glp_get_status
    else:
        iocp = glpk.glp_iocp()
        glpk.glp_init_iocp(iocp)
        settings = model_solver.configuration._iocp
        for name in ("tol_int", "tol_obj", "mip_gap", "fp_heur"):
            setattr(iocp, name, getattr(settings, name))
        iocp.presolve = glpk.GLP_ON
        iocp.msg_lev = glpk.GLP_MSG_OFF
        iocp.tm_lim = limit_ms
        if first_point:
            iocp.mip_gap = GLPK_ANY_POINT_GAP
            iocp.bt_tech = getattr(glpk, GLPK_ANY_POINT_BACKTRACKING)
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
        status = optlang_status.TIME_LIMIT
    else:
        log.debug("glp_intopt/glp_simplex returned %d; solving through optlang instead", code)
        return model_solver.optimize()
    model_solver._status = status
    return status
