"""An optlang solver interface for HiGHS (LP and MILP), for use as ``model.solver``.

optlang 1.9 reaches HiGHS only through its ``hybrid`` interface, which refuses to import
unless the quadratic solver OSQP is installed as well. This module is the same matrix-based
optlang interface (``optlang.matrix_interface``) with the HiGHS call alone, so a cobra model
can use HiGHS through optlang with nothing but ``highspy`` installed::

    from tfa.problem import highs_interface
    model.solver = highs_interface      # cobra accepts an optlang interface module

Only linear objectives are supported (LP, MILP). Reference: Q. Huangfu, J. A. J. Hall,
Parallelizing the dual revised simplex method, Math. Prog. Comp. 10 (2018) 119-142 (HiGHS).
"""

from __future__ import annotations

import logging

import numpy as np
import optlang.matrix_interface as mi
from optlang import interface
from optlang.container import Container
from optlang.exceptions import SolverError
from optlang.symbolics import Real, Zero, add, mul

import highspy as hs

log = logging.getLogger(__name__)

#: HiGHS model-status strings -> optlang status.
_STATUS_MAP = {
    "Optimal": interface.OPTIMAL,
    "Not Set": interface.ABORTED,
    "Load error": interface.SPECIAL,
    "Model error": interface.SPECIAL,
    "Presolve error": interface.SPECIAL,
    "Solve error": interface.SPECIAL,
    "Postsolve error": interface.SPECIAL,
    "Empty": interface.UNDEFINED,
    "Infeasible": interface.INFEASIBLE,
    "Primal infeasible or unbounded": interface.INFEASIBLE_OR_UNBOUNDED,
    "Unbounded": interface.UNBOUNDED,
    "Bound on objective reached": interface.OPTIMAL,
    "Target for objective reached": interface.SUBOPTIMAL,
    "Time limit reached": interface.TIME_LIMIT,
    "Iteration limit reached": interface.ITERATION_LIMIT,
    "Solution limit reached": interface.NODE_LIMIT,
    "Interrupted by user": interface.ABORTED,
    "Unknown": interface.UNDEFINED,
}

_LP_METHODS = ("auto", "simplex", "interior point")
_SOLVER_OPTION = {"simplex": "simplex", "interior point": "ipm", "auto": "choose"}
_PRESOLVE_OPTION = {True: "on", False: "off", "auto": "choose"}
_VAR_TYPES = np.array([hs.HighsVarType.kContinuous, hs.HighsVarType.kInteger])


class _OrderedNameSet(dict):
    """A set of names that iterates in insertion order (optlang's matrix problem uses plain
    sets, whose order changes with Python's hash seed, and MILP solve times change with the
    column order: measured 7 s to 90 s for one iJO1366 problem)."""

    def add(self, name) -> None:
        self[name] = None

    def remove(self, name) -> None:
        del self[name]

    def discard(self, name) -> None:
        self.pop(name, None)


class HighsProblem(mi.MatrixProblem):
    """The matrix form of the problem, solved by HiGHS (LP and MILP only)."""

    def __init__(self) -> None:
        super().__init__()
        self.variables = _OrderedNameSet()
        self.integer_vars = _OrderedNameSet()
        self.constraints = _OrderedNameSet()
        self.settings["presolve"] = "auto"

    def _options(self) -> "hs.HighsOptions":
        options = hs.HighsOptions()
        options.primal_feasibility_tolerance = self.settings["primal_inf_tolerance"]
        options.dual_feasibility_tolerance = self.settings["dual_inf_tolerance"]
        options.mip_feasibility_tolerance = self.settings["mip_tolerance"]
        options.presolve = _PRESOLVE_OPTION[self.settings["presolve"]]
        options.solver = _SOLVER_OPTION[self.settings["lp_method"]]
        limit = self.settings["time_limit"]
        options.time_limit = float("inf") if not limit else float(limit)
        options.log_to_console = self.settings["verbose"] > 0
        options.output_flag = self.settings["verbose"] > 0
        options.threads = self.settings["threads"]
        options.random_seed = 0
        for name, value in self.settings.get("highs_options", {}).items():
            setattr(options, name, value)
        return options

    def build(self, add_variable_constraints: bool = False) -> mi.SparseProblem:
        """The matrix form, assembled with numpy (same result as optlang's generic build for a
        linear problem, a few times faster on genome-scale models)."""
        if self.obj_quadratic_coefs or add_variable_constraints:
            return super().build(add_variable_constraints)
        from scipy.sparse import csc_matrix

        variables = list(self.variables)
        constraints = list(self.constraints)
        vmap = {name: i for i, name in enumerate(variables)}
        cmap = {name: i for i, name in enumerate(constraints)}
        nv, nc = len(variables), len(constraints)
        q = np.zeros(nv)
        for name, coef in self.obj_linear_coefs.items():
            q[vmap[name]] = coef
        q *= self.direction
        vbounds = np.empty((nv, 2))
        vbounds[:, 0] = np.fromiter((self.variable_lbs[n] for n in variables), float, count=nv)
        vbounds[:, 1] = np.fromiter((self.variable_ubs[n] for n in variables), float, count=nv)
        integer = np.fromiter((n in self.integer_vars for n in variables), int, count=nv)
        if nc == 0 or not self.constraint_coefs:
            return mi.SparseProblem(None, q, None, None, vbounds, integer)
        keys = list(self.constraint_coefs)
        n = len(keys)
        rows = np.fromiter((cmap[k[0]] for k in keys), np.int64, count=n)
        cols = np.fromiter((vmap[k[1]] for k in keys), np.int64, count=n)
        vals = np.fromiter(self.constraint_coefs.values(), float, count=n)
        a = csc_matrix((vals, (rows, cols)), shape=(nc, nv))
        bounds = np.empty((nc, 2))
        bounds[:, 0] = np.fromiter((self.constraint_lbs[c] for c in constraints), float, count=nc)
        bounds[:, 1] = np.fromiter((self.constraint_ubs[c] for c in constraints), float, count=nc)
        return mi.SparseProblem(None, q, a, bounds, vbounds, integer)

    def solve(self) -> None:
        if self.obj_quadratic_coefs:
            raise SolverError("the HiGHS interface of tfa solves linear problems only")
        d = float(self.direction)
        sp = self.build()
        lp = hs.HighsLp()
        lp.sense_ = hs.ObjSense.kMinimize
        lp.num_col_ = len(self.variables)
        lp.num_row_ = len(self.constraints)
        lp.col_cost_ = sp.q
        lp.col_lower_ = sp.vbounds[:, 0] if lp.num_col_ else np.zeros(0)
        lp.col_upper_ = sp.vbounds[:, 1] if lp.num_col_ else np.zeros(0)
        if sp.A is not None:
            lp.a_matrix_.format_ = hs.MatrixFormat.kColwise
            lp.a_matrix_.start_ = sp.A.indptr
            lp.a_matrix_.index_ = sp.A.indices
            lp.a_matrix_.value_ = sp.A.data
            lp.row_lower_ = sp.bounds[:, 0]
            lp.row_upper_ = sp.bounds[:, 1]
        if self.integer_vars:
            lp.integrality_ = list(_VAR_TYPES[sp.integer])
        self.primals, self.cprimals = {}, {}
        highs = hs.Highs()
        highs.passOptions(self._options())
        highs.passModel(lp)
        start = self.settings.pop("mip_start", None)
        if start and self.integer_vars:
            # a known point (name -> value) for the branch and bound to start from (one solve)
            given = hs.HighsSolution()
            given.col_value = [float(start.get(name, 0.0)) for name in self.variables]
            highs.setSolution(given)
        if highs.run() == hs.HighsStatus.kError and highs.getModelStatus() == hs.HighsModelStatus.kNotset:
            # HiGHS keeps one thread scheduler per process; another user of highspy in the same
            # process (a notebook) may have started it with another thread count, and HiGHS then
            # refuses to run ("Not Set", read as interrupted). Start it anew for this instance.
            log.debug("HiGHS refused to run (thread scheduler of another instance); restarting it")
            hs.Highs.resetGlobalScheduler(True)
            highs.run()
        self.status = highs.modelStatusToString(highs.getModelStatus())
        info = highs.getInfo()
        sol = highs.getSolution()
        primals = np.array(sol.col_value)
        cprimals = np.array(sol.row_value)
        if primals.size == len(self.variables):
            self.primals = dict(zip(self.variables, primals))
            self.cprimals = dict(zip(self.constraints, cprimals))
            if not self.integer_vars and sol.dual_valid:
                self.vduals = dict(zip(self.variables, np.array(sol.col_dual) * d))
                self.duals = dict(zip(self.constraints, np.array(sol.row_dual) * d))
        self.obj_value = info.objective_function_value * self.direction
        self.info = info
        self._solution = None

    def still_valid(self, A, bounds) -> bool:  # noqa: N803 - optlang's signature
        return False


class Variable(mi.Variable):
    pass


class Constraint(mi.Constraint):
    _INDICATOR_CONSTRAINT_SUPPORT = False


class Objective(mi.Objective):
    pass


class Configuration(mi.Configuration):
    """optlang's matrix configuration, with HiGHS's own presolve by default ("auto" = HiGHS
    decides, which means on). optlang's default, False, turned HiGHS's presolve off: measured on
    iJO1366 with synthetic energies (scripts/bench_engine.py, seeds 20240601 / 11) a feasibility
    MILP took 8.0 / 8.8 s without presolve and 2.1 / 5.1 s with it."""

    lp_methods = _LP_METHODS

    def __init__(self, lp_method="auto", presolve="auto", **kwargs) -> None:
        super().__init__(lp_method=lp_method, presolve=presolve, **kwargs)


class Model(mi.Model):
    """optlang's matrix model with HiGHS, and removal of many rows and columns in one pass.

    optlang's matrix interface re-reads each removed constraint's expression by scanning every
    coefficient of the matrix, and re-indexes its containers after each removed item: taking the
    7,800 rows and 9,000 columns of the thermodynamic problem of iJO1366 off again took 180 s
    (the solve took 0.6 s). Here the removed rows' expressions are collected in one pass over
    the coefficients (detached constraints keep correct expressions, so cobra can add them back)
    and the containers are rebuilt once.
    """

    ProblemClass = HighsProblem
    status_map = _STATUS_MAP

    def _remove_constraints(self, constraints) -> None:
        names = {c.name for c in constraints}
        for name in names:
            if name not in self._constraints:
                raise LookupError(f"Constraint {name} not in solver")
        terms: dict[str, list] = {name: [] for name in names}
        variables = self._variables
        for (cname, vname), coef in self.problem.constraint_coefs.items():
            if cname in names:
                terms[cname].append(mul((Real(coef), variables[vname])))
        for c in constraints:
            c._expression = add(terms[c.name]) if terms[c.name] else Zero
            c._problem = None
        self._constraints = Container(c for c in self._constraints if c.name not in names)
        for name in names:
            self.problem.constraints.discard(name)
        self.problem.prune()

    def _remove_variables(self, variables) -> None:
        names = {v.name for v in variables}
        if self.objective is not None:
            self.objective._expression = self.objective.expression.xreplace(
                {v: 0 for v in variables})
        for v in variables:
            del self._variables_to_constraints_mapping[v.name]
            v.problem = None
        self._variables = Container(v for v in self._variables if v.name not in names)
        for name in names:
            self.problem.variables.discard(name)
        self.problem.prune()
