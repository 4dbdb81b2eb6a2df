"""Solver selection and the translation of solver statuses into plain words.

Two mixed-integer solvers are reachable through optlang: GLPK (always installed with cobra) and
HiGHS (``highspy``, through :mod:`tfa.problem.highs_interface`). The default is chosen from the
measurement in ``scripts/bench_engine.py`` (see :data:`DEFAULT_SOLVER`).
"""

from __future__ import annotations

import logging
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
