"""How a point of the thermodynamic flux problem is found: the quick routes of a yes/no question
(the least-flux pattern, the loose search repaired at exact 0/1 values), the exact MILP, and the
confirmation of every point by the linear program with its 0/1 values fixed.

:class:`PointSearch` is a mixin of :class:`tfa.problem.builder.ThermoProblem`: it uses the
variables, rows and options the builder made.
"""

from __future__ import annotations

import logging
import time

import numpy as np
from optlang import interface as optlang_status

from .options import (LOOSE_INTEGRALITY, LOOSE_TIME_SHARE, MAX_UNCONFIRMED_POINTS,
                      STOPPED_BY_A_LIMIT, Solution)
from .solvers import InfeasibleProblem, best_bound, check_status, has_point, optimize

log = logging.getLogger(__name__)


class PointSearch:
    """The searches of :class:`~tfa.problem.builder.ThermoProblem` (see the module text)."""

    def solve(self, what: str = "the thermodynamic flux problem", accept_best: bool = False) -> Solution:
        """Solve; return the solution or raise InfeasibleProblem / UndeterminedError in plain words.

        A yes/no question (no objective) first takes the quick routes, each ending in a linear
        program with every 0/1 variable fixed, so any point they find is a point of the problem:

        1. :meth:`_least_flux_point`, two linear programs;
        2. :meth:`_loose_point`, the MILP at a loose integrality tolerance, then repaired.

        The exact MILP runs within the time left when neither finds a point. A relaxation
        without a point proves there is none (InfeasibleProblem) on the way.

        Every point returned is confirmed as a point of the problem by a linear program with its
        0/1 values fixed and every closed direction's flux column fixed at zero
        (:meth:`solve_fixed`): a mixed-integer point whose 0/1 variables sit within the
        integrality tolerance of 0 may pass a little flux through a closed direction, and GLPK's
        MIP presolve has returned points that break a row by about 1e-6. When that linear
        program finds no point, the MILP is solved once more without the MIP presolve, then
        the directions that carry flux are tried; a point none of these confirms is a
        ComputationError, never a result.

        ``accept_best``: when a limit stops the search of an optimisation after it found a point,
        return the best point found (``proven`` False, ``bound`` the solver's bound, when it gives
        one) instead of raising UndeterminedError.
        """
        started = time.perf_counter()
        limit = self.options.time_limit

        def time_left() -> float | None:
            return None if limit is None else max(limit - (time.perf_counter() - started), 1.0)

        if (self._objective_is_zero and self.options.quick_routes
                and all(v.ub == 0 for v in self.u_vars)):
            for route in (self._least_flux_point, self._loose_point):
                solution = route(what, time_left())
                if solution is not None:
                    solution.seconds = time.perf_counter() - started
                    return solution
        cuts: list = []
        try:
            for attempt in range(MAX_UNCONFIRMED_POINTS):
                presolve = attempt == 0
                status = optimize(self.solver, time_left(), first_point=self._objective_is_zero,
                                  presolve=presolve)
                best = (accept_best and not self._objective_is_zero
                        and status in STOPPED_BY_A_LIMIT and has_point(self.solver))
                if not best:
                    check_status(status, what, self.options.time_limit)
                bound = None if self._objective_is_zero else best_bound(self.solver, status)
                point = self._read_solution(0.0)
                solution = self._confirmed(point, what, time_left())
                if solution is not None:
                    solution.bound = bound
                    solution.proven = not best
                    solution.seconds = time.perf_counter() - started
                    return solution
                # the point lies within the solver's tolerance of the problem but its pattern has
                # no exact point: solve again without the MIP presolve, then without that pattern
                log.info("%s: a %s point was not confirmed by its fixed-direction linear program "
                         "(attempt %d)", what, self.solver_name, attempt + 1)
                if attempt > 0:
                    cuts.append(self._exclude_pattern(point, f"tfa_unconfirmed_{attempt}"))
        finally:
            for c in cuts:
                self.remove_constraint(c)
        from ..errors import ComputationError

        raise ComputationError(
            f"{what}: the {self.solver_name} solver kept returning points that the linear program "
            f"with their directions fixed does not confirm ({MAX_UNCONFIRMED_POINTS} tries; a "
            "numerical fault of the solver); try the other solver (--solver glpk or highs)")

    def _confirmed(self, point: Solution, what: str, time_limit: float | None) -> Solution | None:
        """The point of the problem behind a mixed-integer point: :meth:`solve_fixed` on its 0/1
        values, then on the directions that carry flux; None when neither has a point."""
        uphill = np.isin(self.energy_ids, point.uphill) if self.u_vars else None
        for forward, backward in ((point.forward, point.backward), self.flux_pattern(point)):
            try:
                return self.solve_fixed(forward, backward, uphill, what=what, time_limit=time_limit)
            except InfeasibleProblem:
                continue
        return None

    def _exclude_pattern(self, point: Solution, name: str):
        """A no-good cut: at least one 0/1 variable differs from the point's (Balas & Jeroslow
        1972, SIAM J. Appl. Math. 23:61); removed again by :meth:`solve`."""
        uphill = set(point.uphill)
        coefficients, ones = {}, 0
        pairs = list(zip(self.f_vars, point.forward)) + list(zip(self.b_vars, point.backward))
        pairs += [(v, rid in uphill) for v, rid in zip(self.u_vars, self.energy_ids)]
        for v, on in pairs:
            if v.ub < 1:
                continue
            coefficients[v] = -1.0 if on else 1.0
            ones += int(bool(on))
        return self.add_constraint(coefficients, 1.0 - ones, None, name)

    def least_flux_point(self, what: str, time_limit: float | None = None) -> Solution | None:
        """The first quick route of :meth:`solve` alone (:meth:`_least_flux_point`): a point of
        the problem from the least-flux pattern, None when that pattern has none (nothing
        proven), InfeasibleProblem when the linear relaxation has no point (which proves there
        is none). For a cheap second opinion on "no point" (:mod:`tfa.analyses.draws`)."""
        return self._least_flux_point(what, time_limit)

    def _least_flux_point(self, what: str, time_limit: float | None) -> Solution | None:
        """A point of the problem from the flux pattern of least total flux, or None.

        1. The linear relaxation (direction binaries continuous in [0, 1]) minimising the total
           flux sum_j (v_fwd_j + v_rev_j), the objective of parsimonious flux balance (Lewis et
           al. 2010, Mol. Syst. Biol. 6:390), which leaves out most internal cycles. When it is
           infeasible, so is the problem (a relaxation): InfeasibleProblem.
        2. The directions that carry flux there, fixed as in :meth:`solve_with_pattern` (a linear
           program). A point found is a point of the full problem, certified like any other;
           when there is none, nothing is proven and None is returned.

        Measured with scripts/bench_engine.py (iJO1366, synthetic energies, GLPK): 0.3 s for
        both steps against 25-31 s for the exact MILP's first integer point. On the bundled
        network (native mode) it was downhill at none of 8 H2 levels from 1e-9 to 1e-2 mol/L.
        """
        relaxed = self.f_vars + self.b_vars
        self.set_objective({v: 1.0 for r in self.reactions
                            for v in (r.forward_variable, r.reverse_variable)})
        try:
            for v in relaxed:
                v.type = "continuous"
            try:
                status = optimize(self.solver, time_limit)
                pattern = (self.flux_pattern(self._read_solution(0.0))
                           if status == optlang_status.OPTIMAL else None)
            finally:
                for v in relaxed:
                    v.type = "integer"
            # the pattern's linear program keeps the total flux as its objective: the point
            # reported is the least-flux one of its pattern
            solution = self._repaired(status, pattern, what, time_limit, "the least-flux relaxation")
        finally:
            self.set_objective({})
        if solution is not None:
            solution.objective = None
        return solution

    def _loose_point(self, what: str, time_limit: float | None) -> Solution | None:
        """A point of the problem from the MILP at :data:`LOOSE_INTEGRALITY`, or None.

        At that tolerance a 0/1 variable may sit at 1e-5 and let 1e-5 U of flux through a closed
        direction, so the search ends sooner, but its point may break the second law (the
        certificate catches it). Its 0/1 values (rounded) are fixed and the rest solved again as
        a linear program at exact 0/1 values (:meth:`solve_with_pattern`). A loose search without
        a point proves there is none (it searches a larger set): InfeasibleProblem.

        Measured on the bundled network with GLPK, native mode, H2 1e-9 to 1e-2 mol/L: every
        level found and repaired in 0.1-1.9 s, where the exact search was undetermined after
        40 s at some levels (its time depends on the order of rows and columns).
        """
        tolerances = self.solver.configuration.tolerances
        try:
            tolerances.integrality = LOOSE_INTEGRALITY
        except Exception:  # noqa: BLE001 - an interface without that tolerance: no loose route
            return None
        try:
            box = None if time_limit is None else max(1.0, LOOSE_TIME_SHARE * time_limit)
            status = optimize(self.solver, box, first_point=True)
            found = self._read_solution(0.0) if status == optlang_status.OPTIMAL else None
        finally:
            tolerances.integrality = self.tolerances["integrality"]
        pattern = None if found is None else (found.forward, found.backward)
        return self._repaired(status, pattern, what, time_limit, "the loose search")

    def _repaired(self, status: str, pattern: tuple[np.ndarray, np.ndarray] | None, what: str,
                  time_limit: float | None, source: str) -> Solution | None:
        """The end of a quick route: its search without a point proves infeasibility (it searched
        a larger set); otherwise :meth:`solve_with_pattern` on the directions it found, or None
        when they have no point (nothing proven)."""
        if status in (optlang_status.INFEASIBLE, optlang_status.INFEASIBLE_OR_UNBOUNDED):
            raise InfeasibleProblem(f"{what}: no point satisfies all constraints (infeasible: "
                                    f"{source} has none)")
        if pattern is None:
            log.debug("%s: %s ended %s", what, source, status)
            return None
        try:
            return self.solve_with_pattern(*pattern, what=what, time_limit=time_limit)
        except InfeasibleProblem:
            log.debug("%s: the directions of %s have no point", what, source)
            return None

    def flux_pattern(self, solution: Solution, tolerance: float = 1e-9) -> tuple[np.ndarray, np.ndarray]:
        """The directions in which a solution's reactions with an energy carry flux (|v| above
        ``tolerance`` times the flux scale).

        Only these directions constrain the energies; a direction binary at 1 on a reaction
        without flux is an arbitrary choice of the solver, and fixing it would ask for a sign of
        ΔrG' that nothing needs (measured on iJO1366 with synthetic energies: fixing every
        binary of one H2 level failed at each next level, fixing only the carried directions
        did not).
        """
        v = solution.fluxes[self.energy_reaction_index]
        limit = tolerance * self.flux_scale
        return v > limit, v < -limit

    def solve_with_pattern(self, forward: np.ndarray, backward: np.ndarray,
                           what: str = "the thermodynamic flux problem",
                           time_limit: float | None = None) -> Solution:
        """Solve with every direction binary fixed to a given flux pattern (a linear program).

        A solution found this way is a solution of the full problem (the pattern is one of its
        choices), so it proves feasibility; InfeasibleProblem here proves nothing about other
        patterns. Used to carry a certified pattern (:meth:`flux_pattern`) from one scan point to
        the next; a direction not in the pattern carries no flux.
        """
        return self.solve_fixed(forward, backward, None, what, time_limit)

    def solve_fixed(self, forward: np.ndarray, backward: np.ndarray, uphill: np.ndarray | None,
                    what: str = "the thermodynamic flux problem",
                    time_limit: float | None = None,
                    uphill_open: tuple[np.ndarray, np.ndarray] | None = None) -> Solution:
        """The linear program of one pattern: every 0/1 variable fixed (direction binaries to
        ``forward``/``backward``, uphill binaries to ``uphill``, or 0 when None) and the flux
        column of every closed direction fixed at zero, so that no flux passes where the pattern
        closes the way (a column bound is exact; a row is met only to the solver's tolerance).
        The 0/1 variables are made continuous for the solve (GLPK then runs its simplex method,
        HiGHS its LP solver) and restored afterwards. Keeps the objective.

        An uphill step (``uphill`` True) may carry flux either way, or only in the directions
        ``uphill_open`` (forward mask, backward mask) leaves open.

        Raises InfeasibleProblem when the pattern has no point (which proves nothing about other
        patterns).
        """
        n_e = len(self.energy_ids)
        up = np.zeros(n_e, bool) if uphill is None or not self.u_vars else np.asarray(uphill, bool)
        fixed = []
        for j in range(n_e):
            f_on = bool(forward[j]) and self.f_vars[j].ub >= 1
            b_on = bool(backward[j]) and self.b_vars[j].ub >= 1
            fixed.append((self.f_vars[j], 1.0 if f_on else 0.0))
            fixed.append((self.b_vars[j], 1.0 if b_on else 0.0))
            if self.u_vars:
                fixed.append((self.u_vars[j], 1.0 if up[j] else 0.0))
            reaction = self.reactions[self.energy_reaction_index[j]]
            up_f = up[j] and (uphill_open is None or bool(uphill_open[0][j]))
            up_b = up[j] and (uphill_open is None or bool(uphill_open[1][j]))
            for column, open_ in ((reaction.forward_variable, f_on or up_f),
                                  (reaction.reverse_variable, b_on or up_b)):
                if open_ or column.ub == 0:
                    continue
                if column.lb > 0:   # the pattern closes a direction whose flux is required
                    raise InfeasibleProblem(f"{what}: the pattern closes the required flux of "
                                            f"{reaction.id}")
                fixed.append((column, 0.0))
        saved = [(v, v.lb, v.ub) for v, _ in fixed]
        binaries = self.f_vars + self.b_vars + self.u_vars
        try:
            for v in binaries:
                v.type = "continuous"
            for v, value in fixed:
                v.set_bounds(value, value)
            started = time.perf_counter()
            status = optimize(self.solver, time_limit or self.options.time_limit)
            check_status(status, what, self.options.time_limit)
            solution = self._read_solution(time.perf_counter() - started)
            solution.confirmed_by = "linear program with the directions fixed"
            return solution
        finally:
            for v, lb, ub in reversed(saved):
                v.set_bounds(lb, ub)
            for v in binaries:
                v.type = "integer"

    def _read_solution(self, seconds: float) -> Solution:
        primal = self.solver.primal_values
        self._last_values = primal
        fluxes = self.flux_scale * np.array([primal[r.id] - primal[r.reverse_id]
                                             for r in self.reactions], float)
        x = np.array([primal[v.name] for v in self.x_vars], float)
        g = np.array([primal[v.name] for v in self.g_vars], float)
        eps = np.array([primal[v.name] if v is not None else 0.0 for v in self.eps_vars], float)
        z = np.array([primal[p.name] - primal[m.name] for p, m in
                      zip(getattr(self, "z_plus", []), getattr(self, "z_minus", []))], float)
        f = np.array([primal[v.name] > 0.5 for v in self.f_vars], bool)
        b = np.array([primal[v.name] > 0.5 for v in self.b_vars], bool)
        uphill = [self.energy_ids[j] for j, v in enumerate(self.u_vars) if primal[v.name] > 0.5]
        b_value = float(primal[self.b_var.name]) if self.b_var is not None else None
        objective = None if self._objective_is_zero else float(self.solver.objective.value)
        return Solution(list(self.reaction_ids), fluxes, list(self.metabolite_ids), x,
                        list(self.energy_ids), g, eps, f, b, uphill, b_value, objective,
                        self.solver_name, seconds, slack_coordinates=z)
