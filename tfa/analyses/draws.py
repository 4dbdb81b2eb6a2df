"""Many draws of the reaction energies answered on one built problem.

A robustness run asks the same yes/no question (and, where the answer is no, the minimal uphill
set) for hundreds of draws of ΔrG'° that differ only in the energies. Building the
thermodynamic flux problem for each draw cost more than solving it (measured on the bundled
network, native mode: a fresh build and solve 0.3-1.1 s per draw, the solve alone on a reused
problem 0.01 s for a draw whose relaxation has no point and 0.2-1.9 s otherwise;
scripts/bench_robustness.py). :class:`DrawSolver` builds the uphill-set problem once per mode
and worker, with the big-M rows of every direction that ±:data:`SPREAD_SIGMAS` σ of the draws
allows, and for each draw only changes what a fresh build would make differently
(:meth:`tfa.problem.builder.ThermoProblem.set_standard`: the energies' right-hand sides, the g
bounds, the big-M coefficients and the directions the new intervals forbid). A draw farther out
than that spread (probability below 1e-8 per reaction and draw for normal draws) is answered on
a fresh build.

Per draw, in this order:

1. the flux pattern of the mean energies' certified steady state, as a linear program with its
   directions fixed (any point it finds is a point of the problem);
2. otherwise the problem's own search (:meth:`~tfa.problem.builder.ThermoProblem.solve`, the
   uphill binaries held at 0);
3. a point from either is checked by the independent certificate against the draw's energies
   (:func:`tfa.analyses.results.certify`): "certified";
4. "no point" is asked again of the other solver on its own reused problem
   (:meth:`DrawSolver.confirm_no_point`, :data:`DRAW_CONFIRMATION`): "proven" when its linear
   relaxation has no point either, "solver proof" when only a branch and bound would decide;
5. for a "no", the minimal uphill set on the same problem (:func:`tfa.analyses.uphill.
   minimal_uphill_set`, the first minimal set found; its size is proven minimal).

The answer for a draw does not depend on the draws solved before it in the same worker: every
draw starts from the same problem with only its energies changed, and the pattern tried first is
that of the mean energies, the same in every worker.
"""

from __future__ import annotations

import logging
from contextlib import contextmanager
from dataclasses import replace

import numpy as np

from ..errors import InputError, UndeterminedError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, ThermoProblem
from ..problem.solvers import InfeasibleProblem, available_solvers, resolve_solver
from .results import CONFIRM_AUTO_LIMIT, CONFIRM_TIME_LIMIT, certify
from .uncertainty import with_energies

log = logging.getLogger(__name__)

#: Half-width of the energies a reused problem is built for, in σ of the draws per reaction.
SPREAD_SIGMAS = 6.0
#: How the other solver confirms a draw's "no point": its linear relaxation (the least-flux
#: linear program of the problem with the 0/1 variables continuous) has no point either, which
#: proves there is none. Measured on the bundled network, native mode: GLPK's relaxation has no
#: point in about 70 % of the "no" draws (0.02-0.2 s each); in the others only a branch and bound
#: decides, which took GLPK 3-35 s per draw (90 % of a run's time when it was asked). Those draws
#: keep the first solver's proof and say so ("solver proof"), whatever the machine's load.
DRAW_CONFIRMATION = "the other solver's linear relaxation has no point either"


@contextmanager
def _downhill_only(problem: ThermoProblem):
    """The uphill binaries held at 0 (the plain feasibility problem on the uphill-set build),
    restored afterwards."""
    saved = [(v, v.lb, v.ub) for v in problem.u_vars]
    try:
        for v in problem.u_vars:
            v.set_bounds(0, 0)
        yield problem
    finally:
        for v, lb, ub in saved:
            v.set_bounds(lb, ub)


class DrawSolver:
    """The answers for draws of ΔrG'° in one mode, on problems built once (see the module text).

    Parameters
    ----------
    tm : ThermoModel
        The prepared model of the mode (mean energies); the solver owns its cobra model.
    options : ProblemOptions
    reaction_ids : the reactions of a draw vector, in order
    sigma : ndarray
        The σ of the draws per reaction (kJ/mol), in ``reaction_ids`` order: the problem is
        built for ±:data:`SPREAD_SIGMAS` σ around the model's energies.
    """

    def __init__(self, tm: ThermoModel, options: ProblemOptions, reaction_ids: list[str],
                 sigma: np.ndarray) -> None:
        import pickle

        self.tm = tm
        self.options = replace(options, uphill=True, driving_force=False)
        position = {rid: k for k, rid in enumerate(reaction_ids)}
        self.reaction_ids = list(reaction_ids)
        self._model_bytes = pickle.dumps(tm.model, protocol=pickle.HIGHEST_PROTOCOL)
        spread = {rid: SPREAD_SIGMAS * float(sigma[k]) for rid, k in position.items()}
        self.problem = ThermoProblem(tm, self.options, energy_spread=spread)
        self._columns = np.array([position.get(rid, -1) for rid in self.problem.energy_ids], int)
        self.mean_standard = self.problem.standard.copy()
        self._mean_pattern = self._pattern_of_mean()
        self._other: ThermoProblem | None = None

    def _standard_of(self, values: np.ndarray) -> np.ndarray:
        out = self.mean_standard.copy()
        have = self._columns >= 0
        out[have] = np.asarray(values, float)[self._columns[have]]
        return out

    def _pattern_of_mean(self) -> tuple[np.ndarray, np.ndarray] | None:
        """The flux pattern of a certified steady state at the mean energies (None when there is
        none: the first route is then skipped)."""
        problem = self.problem
        try:
            with _downhill_only(problem):
                solution = problem.solve(f"feasibility at the mean energies ({self.tm.mode})")
            certify(problem, solution)
            return problem.flux_pattern(solution)
        except (InfeasibleProblem, UndeterminedError):
            return None

    def covers(self, values: np.ndarray) -> bool:
        """Whether a draw lies within the spread the problem was built for."""
        standard = self._standard_of(values)
        return bool(np.all(np.abs(standard - self.problem.built_standard)
                           <= self.problem.energy_spread + 1e-9))

    def outcome(self, values: np.ndarray, diagnose: bool = True) -> dict:
        """The answer for one draw (``values`` in ``reaction_ids`` order), as the keys of
        :func:`tfa.analyses.jobs.outcome`: ``feasible``, ``demand_impossible``,
        ``verification`` and, with ``diagnose``, ``uphill_set_size`` and ``uphill_set``."""
        problem = self.problem
        if not self.covers(values):
            raise InputError("the draw lies beyond the spread the reused problem was built for")
        problem.set_standard(self._standard_of(values))
        out: dict = {"demand_impossible": False}
        feasible = dict(out, feasible=True, verification="certified",
                        **({"uphill_set_size": 0, "uphill_set": []} if diagnose else {}))
        with _downhill_only(problem):
            solution = self._point(f"feasibility of a draw ({self.tm.mode})")
        if solution is not None:
            certify(problem, solution)
            return feasible
        confirmation = self.confirm_no_point(problem.standard)
        if confirmation == "point":
            return feasible
        out.update(feasible=False,
                   verification="proven" if confirmation == "confirmed" else "solver proof")
        if diagnose:
            from .demand import ImpossibleDemandError
            from .uphill import minimal_uphill_set

            drawn = with_energies(self.tm, dict(zip(problem.energy_ids, problem.standard.tolist())))
            try:
                found = minimal_uphill_set(drawn, self.options, try_downhill_first=False,
                                           canonical=False, problem=problem)
            except ImpossibleDemandError:
                out.update(demand_impossible=True, uphill_set_size=None, uphill_set=None)
                return out
            members = sorted(found.sets[0]) if found.sets else []
            out["uphill_set_size"], out["uphill_set"] = int(found.size), members
        return out

    def _point(self, what: str):
        """A point of the problem: the mean's pattern first, then the problem's search; None
        when the search proves there is none."""
        problem = self.problem
        if self._mean_pattern is not None:
            try:
                return problem.solve_with_pattern(*self._mean_pattern, what=what)
            except InfeasibleProblem:
                pass
        try:
            return problem.solve(what)
        except InfeasibleProblem:
            return None

    def confirm_no_point(self, standard: np.ndarray) -> str:
        """Ask the other solver, on its own problem reused like the first, whether these
        energies have a point (:data:`DRAW_CONFIRMATION`; the policy of
        :func:`tfa.analyses.results.confirm_infeasible`: ``options.confirm_infeasible`` and its
        size rule). Returns "confirmed" (its relaxation has no point), "point" (it found one,
        certified: the first answer was wrong), "undetermined" (only a branch and bound would
        decide) or "skipped"."""
        first = resolve_solver(self.options.solver)[0]
        other = "glpk" if first == "highs" else "highs"
        policy = self.options.confirm_infeasible
        if (policy == "never" or other not in available_solvers()
                or (policy == "auto" and len(self.tm.energies) > CONFIRM_AUTO_LIMIT)):
            return "skipped"
        if self._other is None:
            import pickle

            copy = replace(self.tm, model=pickle.loads(self._model_bytes))
            limit = min(CONFIRM_TIME_LIMIT, self.options.time_limit or CONFIRM_TIME_LIMIT)
            second = replace(self.options, solver=other, time_limit=limit, uphill=False)
            spread = dict(zip(self.problem.energy_ids, self.problem.energy_spread.tolist()))
            self._other = ThermoProblem(copy, second, energy_spread=spread)
        self._other.set_standard(standard)
        try:
            solution = self._other.least_flux_point(f"feasibility of a draw, asked of {other}")
        except InfeasibleProblem:
            return "confirmed"
        except UndeterminedError:
            return "undetermined"
        if solution is None:
            return "undetermined"
        certify(self._other, solution)
        log.warning("a draw (%s): %s found no point but %s found a certified one, which is the "
                    "answer", self.tm.mode, first, other)
        return "point"
