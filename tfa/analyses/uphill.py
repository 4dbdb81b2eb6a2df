"""Minimal uphill set: the fewest reactions that must run against their gradient (coupled to an
energy source) for the demand to be met.

Binaries u_j relax the thermodynamic direction constraint of reaction j
(v_fwd_j <= U_j (f_j + u_j), v_rev_j <= L_j (b_j + u_j)); the MILP minimises sum_j u_j.
Alternative optima come from integer cuts sum_{j in S} u_j <= |S| - 1 (Balas & Jeroslow 1972,
SIAM J. Appl. Math. 23:61). For each set, a second problem with the set and the flux
pattern of the first solution fixed (all 0/1 variables fixed: a linear program) finds the
concentrations that minimise the total uphill energy sum_{j in S} d_j g_j (d_j the flux
direction), and reports each member's d_j g_j (kJ/mol; positive = uphill).
Formulation after thermodynamics-based flux analysis (Henry, Broadbelt & Hatzimanikatis 2007,
Biophys. J. 92:1792).
"""

from __future__ import annotations

import logging
from contextlib import contextmanager
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..errors import ComputationError, UndeterminedError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, Solution, ThermoProblem
from ..problem.solvers import InfeasibleProblem, optimize
from .demand import impossible_demand
from .set_order import list_as_found, list_in_order
from .results import (AnalysisResult, certificate_words, certify, concentration_table,
                      optimum_words, provenance_of, reaction_table, verification)

log = logging.getLogger(__name__)


#: Columns of a table of minimal uphill sets (one row per member of a set).
UPHILL_TABLE_COLUMNS = ["set", "reaction", "direction", "uphill_by_kJ_per_mol",
                        "short_by_kJ_per_mol", "flux_per_demand",
                        "energy_to_supply_kJ_per_mol_demand"]


@dataclass(kw_only=True)
class UphillResult(AnalysisResult):
    """Minimal uphill sets.

    Attributes
    ----------
    size : int
        Number of reactions in a minimal set (0: the network runs downhill throughout).
    sets : list of list of str
        Alternative minimal sets (all of ``size``), at most the number asked for.
    uphill_by : list of dict
        Per set: reaction -> how far it runs uphill, max(0, d_j * ΔrG') (kJ/mol, never
        negative; d_j the flux direction, +1 or -1), at the concentrations that make the set's
        total uphill energy smallest.
    directions : list of dict
        Per set: reaction -> +1 (forward) or -1 (backward).
    exhausted : bool
        True when no further set of the same size exists.
    short_by : list of dict
        Per set: reaction -> d_j * ΔrG' + delta, by how much the step misses the least
        driving force delta at those concentrations (kJ/mol; positive for every member of a
        proven minimal set, which is why it must be driven: a member can run slightly downhill,
        by less than delta).
    lower_bound : int
        Steps known to be uphill in every solution before the search (a direction that every
        steady state meeting the demand uses and that the concentration bounds make uphill).
    points : list of (DataFrame, DataFrame)
        Per set: the certified steady state behind it (per reaction: flux, ΔrG'° and the
        recomputed ΔrG'; per compound: activity), at the concentrations of ``uphill_by``.
    count : int
        Minimal sets found in all (the listed ones and those only counted); all of them when
        ``exhausted``, else a lower bound.
    ordered : bool
        True when ``sets`` are the first in the order of reaction ids (sorted ids compared
        lexicographically), each proven so; False for the solver's order.
    flux_per_demand : list of dict
        Per set: reaction -> |v_j| / v_demand at the steady state of least energy to supply
        (:func:`_energy_to_supply`); times ``uphill_by`` it is the energy to supply to the step
        per unit of demand (kJ per mol of demand).
    """

    size: int = 0
    sets: list[list[str]] = field(default_factory=list)
    uphill_by: list[dict[str, float]] = field(default_factory=list)
    directions: list[dict[str, int]] = field(default_factory=list)
    exhausted: bool = False
    short_by: list[dict[str, float]] = field(default_factory=list)
    lower_bound: int = 0
    points: list[tuple[pd.DataFrame, pd.DataFrame]] = field(default_factory=list)
    count: int = 0
    ordered: bool = True
    flux_per_demand: list[dict[str, float]] = field(default_factory=list)
    analysis: str = "minimal uphill set"

    def energy_to_supply(self, k: int = 0) -> float:
        """Energy to supply to the uphill steps of set ``k``, kJ per mol of demand:
        sum_j (|v_j| / v_demand) max(0, d_j ΔrG'_j).

        >>> r = UphillResult(conditions=None, sets=[["A"]], uphill_by=[{"A": 10.0}],
        ...                  flux_per_demand=[{"A": 2.0}])
        >>> r.energy_to_supply()      # hand example: 2 x 10 kJ/mol
        20.0
        """
        if k >= len(self.sets):
            return float("nan")
        weights = self.flux_per_demand[k] if k < len(self.flux_per_demand) else {}
        return float(sum(weights.get(r, float("nan")) * self.uphill_by[k].get(r, float("nan"))
                         for r in self.sets[k]))

    def count_words(self) -> str:
        """How many minimal sets there are, in words ("4 sets of this size", "at least 20 ...")."""
        from .set_order import count_words

        return count_words(max(self.count, len(self.sets)), self.exhausted)

    def to_frame(self) -> pd.DataFrame:
        rows = []
        for k, members in enumerate(self.sets):
            for rid in members:
                weight = (self.flux_per_demand[k].get(rid, float("nan"))
                          if k < len(self.flux_per_demand) else float("nan"))
                per_mole = self.uphill_by[k].get(rid, float("nan"))
                rows.append({"set": k + 1, "reaction": rid,
                             "direction": "forward" if self.directions[k].get(rid, 1) > 0 else "backward",
                             "uphill_by_kJ_per_mol": per_mole,
                             "short_by_kJ_per_mol": (self.short_by[k].get(rid, float("nan"))
                                                     if k < len(self.short_by) else float("nan")),
                             "flux_per_demand": weight,
                             "energy_to_supply_kJ_per_mol_demand": weight * per_mole})
        return pd.DataFrame(rows, columns=UPHILL_TABLE_COLUMNS)

    def summary(self) -> str:
        if self.size == 0:
            return "no reaction needs to run uphill: the network is feasible as it stands"
        listed = "; ".join(", ".join(s) for s in self.sets)
        best = self.verification.get("status") == "best found"
        order = "in the order of reaction ids" if self.ordered else "in the order found"
        return (f"{'at most' if best else 'at least'} {self.size} reaction(s) must run uphill "
                f"(coupled to an energy source); {self.count_words()}; "
                f"{'best set(s) found' if best else 'the first ' + str(len(self.sets))} {order}: "
                f"{listed}; energy to supply to the first: {self.energy_to_supply(0):.3g} kJ per "
                "mol of demand"
                + (f" (the solver proved at least {self.verification.get('bound')})" if best else ""))


def _uphill_amounts(problem: ThermoProblem, members: list[str], sol: Solution
                    ) -> tuple[dict[str, float], dict[str, float], dict[str, int], Solution]:
    """Fix the set and the flux pattern, minimise sum d_j g_j over the set (a linear program);
    return how far each member runs uphill (never negative), by how much it misses the least
    driving force, the directions and the solution."""
    index = {rid: j for j, rid in enumerate(problem.energy_ids)}
    directions = {rid: 1 if sol.flux(rid) >= 0 else -1 for rid in members}
    uphill = np.isin(problem.energy_ids, members)
    forward = np.array([directions.get(r, 0) > 0 for r in problem.energy_ids])
    backward = np.array([directions.get(r, 0) < 0 for r in problem.energy_ids])
    problem.set_objective({problem.g_vars[index[r]]: float(directions[r]) for r in members}, "min")
    best = problem.solve_fixed(sol.forward, sol.backward, uphill, "least uphill energy of the set",
                               uphill_open=(forward, backward))
    delta = problem.options.min_driving_force
    signed = {r: float(directions[r] * best.energies[index[r]]) for r in members}
    amounts = {r: max(0.0, v) for r, v in signed.items()}
    short = {r: v + delta for r, v in signed.items()}
    return amounts, short, directions, best


def forced_uphill(problem: ThermoProblem) -> list[str]:
    """Steps uphill in every solution, known before any search: a direction that every steady
    state meeting the bounds uses (least flux along it > 0, one linear program each,
    :func:`tfa.problem.flux_ranges.least_signed_fluxes`) and that no concentration in the box
    makes downhill by the least driving force (interval bounds of ΔrG',
    :mod:`tfa.problem.bigm`). Every uphill set contains them."""
    from ..problem.flux_ranges import least_signed_fluxes

    wanted, signs = [], []
    for j, rid in enumerate(problem.energy_ids):
        col = problem.energy_reaction_index[j]
        if problem.scaled_upper[col] > 0 and not problem.big_m.forward_possible[j]:
            wanted.append(col), signs.append(1.0)
        if problem.scaled_lower[col] < 0 and not problem.big_m.backward_possible[j]:
            wanted.append(col), signs.append(-1.0)
    least = least_signed_fluxes(*problem.stoich, problem.n_metabolites, problem.scaled_lower,
                                problem.scaled_upper, np.array(wanted, int), np.array(signs),
                                problem.options.time_limit)
    if least is None:
        return []
    return sorted({problem.reaction_ids[c] for c, v in zip(wanted, least) if v > FORCED_FLUX})


#: Least flux (units of the flux scale) along a direction for it to count as used by every
#: steady state (far above the solvers' 1e-9, far below any required flux).
FORCED_FLUX = 1e-6


#: Rounds of the first-set heuristic (:func:`_start_set`): each reroutes the least-flux pattern
#: around the steps the previous round let run uphill.
START_ROUNDS = 3
#: Cost per unit of (scaled) flux through a step that an earlier round let run uphill.
REROUTE_COST = 10.0


def _start_set(problem: ThermoProblem, forced: list[str]) -> Solution | None:
    """A first uphill set, as a point of the problem, from the flux pattern of least total flux.

    1. The linear relaxation of the uphill-set problem (0/1 variables continuous), minimising
       the number of uphill steps plus 1e-3 of the total flux: a flux pattern P.
    2. Over concentrations and slacks alone (a linear program, :func:`_fewest_violations`), the
       least weighted excess s_j >= d_j g_j + delta of the steps of P, reweighted three times
       (w_j = 1 / (s_j + 0.1), which drives most s_j to zero): the steps with s_j > 0 form a set.
    3. Up to :data:`START_ROUNDS` rounds, each making flux through the steps of the sets found so
       far (other than those uphill in every solution) cost :data:`REROUTE_COST` per unit, so
       that the pattern goes round them where it can; the smallest set is kept.
    4. :meth:`ThermoProblem.solve_fixed` on its pattern with that set uphill: a point of the
       problem, or None. The set's size is an upper bound of the minimum.
    """
    binaries = problem.f_vars + problem.b_vars + problem.u_vars
    base = {v: 1.0 for v in problem.u_vars}
    for r in problem.reactions:
        base[r.forward_variable] = base[r.reverse_variable] = 1e-3
    avoided: set[int] = set()
    best = None
    forced_set = set(forced)
    try:
        for _ in range(START_ROUNDS):
            objective = dict(base)
            for j in avoided:
                reaction = problem.reactions[problem.energy_reaction_index[j]]
                objective[reaction.forward_variable] = objective[reaction.reverse_variable] = REROUTE_COST
            problem.set_objective(objective, "min")
            for v in binaries:
                v.type = "continuous"
            try:
                status = optimize(problem.solver, problem.options.time_limit)
                relaxed = problem._read_solution(0.0) if status == "optimal" else None
            finally:
                for v in binaries:
                    v.type = "integer"
            if relaxed is None:
                break
            forward, backward = problem.flux_pattern(relaxed)
            uphill = _fewest_violations(problem, forward, backward, forced_set)
            if uphill is None:
                break
            if best is None or uphill.sum() < best[2].sum():
                best = (forward, backward, uphill)
            if uphill.sum() <= len(forced):
                break
            avoided |= {int(j) for j in np.flatnonzero(uphill)
                        if problem.energy_ids[j] not in forced_set}
        if best is None:
            return None
        forward, backward, uphill = best
        problem.set_objective({v: 1.0 for v in problem.u_vars}, "min")
        try:
            return problem.solve_fixed(forward & ~uphill, backward & ~uphill, uphill,
                                       "a first uphill set", uphill_open=(forward, backward))
        except InfeasibleProblem:
            return None
    finally:
        problem.set_objective({v: 1.0 for v in problem.u_vars}, "min")


def _fewest_violations(problem: ThermoProblem, forward: np.ndarray, backward: np.ndarray,
                       forced: set[str]) -> np.ndarray | None:
    """Steps of a flux pattern to let run uphill so that the rest can run downhill: an L1
    linear program over ln c and the slacks eps, reweighted (Candes, Wakin & Boyd 2008, J.
    Fourier Anal. Appl. 14:877). Returns a mask over the reactions with an energy, or None."""
    from scipy.optimize import linprog
    from scipy.sparse import coo_matrix

    steps = np.flatnonzero(forward | backward)
    if steps.size == 0:
        return np.zeros(len(problem.energy_ids), bool)
    d = np.where(forward[steps], 1.0, -1.0)
    n_x, n_s = len(problem.metabolite_ids), steps.size
    position = {int(j): k for k, j in enumerate(steps)}
    rows, cols, vals = [], [], []
    for k_row, i, coef in zip(*problem.thermo):
        k = position.get(int(k_row))
        if k is not None:
            rows.append(k), cols.append(int(i)), vals.append(d[k] * problem.thermo_model.RT * coef)
    width = problem.slack_width[steps]
    # columns: x (n_x), eps of each step (n_s), s (n_s); rows: d g_j - s_j <= -delta
    rows += list(range(n_s)) * 2
    cols += [n_x + k for k in range(n_s)] + [n_x + n_s + k for k in range(n_s)]
    vals += list(d) + [-1.0] * n_s
    a = coo_matrix((vals, (rows, cols)), shape=(n_s, n_x + 2 * n_s)).tocsr()
    b = -problem.options.min_driving_force - d * problem.standard[steps]
    x_lo = np.array([v.lb for v in problem.x_vars])
    x_hi = np.array([v.ub for v in problem.x_vars])
    bounds = ([(a_, b_) for a_, b_ in zip(x_lo, x_hi)] + [(-w, w) for w in width]
              + [(0, None)] * n_s)
    weights = np.ones(n_s)
    excess = None
    for _ in range(4):
        cost = np.concatenate([np.zeros(n_x + n_s), weights])
        res = linprog(cost, A_ub=a, b_ub=b, bounds=bounds, method="highs")
        if res.status != 0:
            return None
        excess = res.x[n_x + n_s:]
        weights = 1.0 / (excess + 0.1)
    mask = np.zeros(len(problem.energy_ids), bool)
    mask[steps[excess > 1e-7]] = True
    for rid in forced:
        mask[problem.energy_ids.index(rid)] = True
    return mask


def _least_set(problem: ThermoProblem, start: Solution | None, forced: list[str], count: dict,
               checks: list[str], started: bool) -> Solution:
    """A set of the least size: the first set when it meets the lower bound, else the MILP
    (started from the first set), keeping the first set when the search ends with a larger one.
    ``sol.bound`` is the larger of the solver's bound and the steps uphill in every solution.

    Raises InfeasibleProblem when no set exists (the demand is impossible) and UndeterminedError
    when the time limit stops the search before any set is found."""
    problem.set_objective(count, "min")
    if start is not None and len(start.uphill) <= len(forced):
        start.objective, start.bound, start.proven = float(len(start.uphill)), float(len(forced)), True
        checks.append(f"set of {len(forced)} step(s) uphill in every solution, found by the "
                      "least-flux pattern: lower and upper bound meet")
        return start
    if started:
        checks.append(f"HiGHS started from a set of {len(start.uphill)}")
    try:
        sol = problem.solve("minimal uphill set", accept_best=True)
    except UndeterminedError:
        if start is None:
            raise
        sol = start      # nothing better found in time: the first set
        sol.objective, sol.bound, sol.proven = float(len(start.uphill)), None, False
    if start is not None and len(start.uphill) < len(sol.uphill):
        # the first set is smaller: a search stopped early, or a wrong proof (the first set is a
        # point of the problem): keep it, not proven
        if sol.proven:
            checks.append(f"{problem.solver_name} claimed a minimum of {len(sol.uphill)}, "
                          f"contradicted by a set of {len(start.uphill)}")
            log.warning("minimal uphill set: %s claimed %d, a certified set of %d exists",
                        problem.solver_name, len(sol.uphill), len(start.uphill))
        start.objective, start.proven = float(len(start.uphill)), False
        start.bound = float(len(forced))
        sol = start
    sol.bound = float(len(forced)) if sol.bound is None else max(sol.bound, float(len(forced)))
    return sol


def _record(result: UphillResult, problem: ThermoProblem, members: list[str], sol: Solution) -> None:
    """Add one set to the result: its certificate, how far each member runs uphill (per mole) and
    the energy to supply to it per unit of demand."""
    cert = certify(problem, sol, allowed_uphill=members)
    result.certificates.append(cert)
    amounts, short, directions, supply = {}, {}, {}, {}
    point = sol
    if members:
        amounts, short, directions, best = _uphill_amounts(problem, members, sol)
        cert = certify(problem, best, allowed_uphill=members)
        result.certificates.append(cert)
        supply, point = _energy_to_supply(problem, members, sol, best, directions)
        if point is not best:
            cert = certify(problem, point, allowed_uphill=members)
            result.certificates.append(cert)
    # the certified point behind the set (for its energy budget and carbon routes)
    result.points.append((reaction_table(problem, point, cert), concentration_table(point)))
    result.sets.append(list(members))
    result.uphill_by.append(amounts)
    result.short_by.append(short)
    result.directions.append(directions)
    result.flux_per_demand.append(supply)


def _energy_to_supply(problem: ThermoProblem, members: list[str], sol: Solution, best: Solution,
                      directions: dict[str, int]) -> tuple[dict[str, float], Solution]:
    """Flux of each member per unit of demand flux at the steady state of least energy to supply.

    The energy to supply to the uphill steps is E = sum_{j in S} (|v_j| / v_demand) d_j ΔrG'_j
    (kJ per mol of demand; d_j the direction, ΔrG'_j in kJ/mol; Henry, Broadbelt &
    Hatzimanikatis 2007 for the problem). It is bilinear in fluxes and concentrations; here the
    concentrations (and energy slacks) are held at those of least per-mole uphill energy
    (``best``) and a linear program over the fluxes with the set's flux pattern minimises E: an
    upper bound of the least E over all steady states of the pattern. Hand example: one uphill
    step at +10 kJ/mol carrying twice the demand flux costs 20 kJ per mol of demand.

    Returns (member -> |v_j| / v_demand, the point); the fluxes of ``best`` when the linear
    program finds no point (within the solver's tolerance of a fixed point)."""
    index = {rid: j for j, rid in enumerate(problem.energy_ids)}
    demand = problem.thermo_model.demand_id
    cost = {}
    for r in members:
        reaction = problem.reactions[problem.energy_reaction_index[index[r]]]
        column = reaction.forward_variable if directions[r] > 0 else reaction.reverse_variable
        cost[column] = max(0.0, float(directions[r] * best.energies[index[r]]))
    point = best
    if any(c > 0 for c in cost.values()):
        fixed = [(v, value) for v, value in zip(problem.x_vars, best.log_conc)]
        fixed += [(v, value) for v, value in zip(problem.eps_vars, best.slack) if v is not None]
        saved = [(v, v.lb, v.ub) for v, _ in fixed]
        forward = np.array([directions.get(r, 0) > 0 for r in problem.energy_ids])
        backward = np.array([directions.get(r, 0) < 0 for r in problem.energy_ids])
        try:
            for v, value in fixed:
                v.set_bounds(min(max(float(value), v.lb), v.ub), min(max(float(value), v.lb), v.ub))
            problem.set_objective(cost, "min")
            point = problem.solve_fixed(sol.forward, sol.backward,
                                        np.isin(problem.energy_ids, members),
                                        "least energy to supply to the set",
                                        uphill_open=(forward, backward))
        except InfeasibleProblem:
            log.info("least energy to supply: no point with the concentrations fixed; the "
                     "fluxes of the least per-mole point are used")
            point = best
        finally:
            for v, lb, ub in reversed(saved):
                v.set_bounds(lb, ub)
    v_demand = abs(point.flux(demand)) if demand in point.reaction_ids else float("nan")
    return ({r: abs(point.flux(r)) / v_demand if v_demand > 0 else float("nan") for r in members},
            point)


@contextmanager
def _uphill_problem(tm: ThermoModel, options: ProblemOptions, problem: ThermoProblem | None):
    """The uphill-set problem: built here and removed afterwards, or the one given, left with
    its u_j bounds and objective as they were."""
    if problem is None:
        with ThermoProblem(tm, options) as built:
            yield built
        return
    if not problem.u_vars:
        raise ComputationError("the problem given for the minimal uphill set has no uphill "
                               "binaries; build it with ProblemOptions(uphill=True)")
    saved = [(v, v.lb, v.ub) for v in problem.u_vars]
    try:
        yield problem
    finally:
        for v, lb, ub in saved:
            v.set_bounds(lb, ub)
        problem.set_objective({})


def minimal_uphill_set(tm: ThermoModel, options: ProblemOptions | None = None,
                       alternatives: int = 1, try_downhill_first: bool = True,
                       canonical: bool = True, count_limit: int = 0,
                       progress=None, problem: ThermoProblem | None = None) -> UphillResult:
    """Fewest reactions that must run against their gradient for the demand to be met.

    What is known is used before the search (measured on genome-scale instances with
    ``scripts/bench_engine.py``): the steps uphill in every solution (:func:`forced_uphill`, a
    lower bound fixed at 1), and a first set from the flux pattern of least total flux
    (:func:`_start_set`, an upper bound, handed to HiGHS as its start). When the two bounds meet
    the set is proven minimal without a branch and bound; otherwise the MILP minimises
    sum_j u_j. A limit that stops the search returns the best set found ("best found" in
    ``verification``, with the proven bound) instead of nothing.

    Parameters
    ----------
    tm : ThermoModel
    options : ProblemOptions
    alternatives : int
        Up to this many minimal sets listed (integer cuts).
    canonical : bool
        List the sets in the order of reaction ids (:mod:`tfa.analyses.set_order`; a few more
        mixed-integer solves per set); False: in the order the solver finds them.
    count_limit : int
        Count the minimal sets up to this many in all (:data:`tfa.analyses.set_order.COUNT_LIMIT`
        is the assessment's); at most ``alternatives`` are listed. 0: count only those listed.
    progress : callable, optional
        ``progress(text)`` while the sets are put in order and counted (a progress display).
    try_downhill_first : bool
        First solve with every u_j fixed at 0 (the plain feasibility problem, on the same build):
        when that is feasible the minimal set is empty and proven so at once; the minimisation
        follows only when it is not (pass False when infeasibility is already known).
    problem : ThermoProblem, optional
        A problem already built for ``tm`` with the uphill binaries (``options.uphill``), e.g.
        one reused over many draws of the energies (:mod:`tfa.analyses.draws`); it is left as
        it was found (the u_j bounds and the objective restored), not removed.

    Raises
    ------
    ImpossibleDemandError
        When no steady state meets the demand even ignoring thermodynamics (plain words, with the
        largest possible demand flux).
    UndeterminedError
        When the time limit stops the search before any set is found.
    """
    options = replace(options or ProblemOptions(), uphill=True, driving_force=False)
    result = UphillResult(conditions=tm.conditions)
    impossible = False
    with _uphill_problem(tm, options, problem) as problem:
        result.provenance = provenance_of(tm, options, problem)
        count = {v: 1.0 for v in problem.u_vars}
        index = {rid: j for j, rid in enumerate(problem.energy_ids)}
        # steps uphill in every solution: when there are any, the network is infeasible as it
        # stands and the downhill-only question need not be asked
        forced = forced_uphill(problem)
        if try_downhill_first and not forced:
            for v in problem.u_vars:
                v.set_bounds(0, 0)
            try:
                sol = problem.solve("feasibility without uphill steps")
            except InfeasibleProblem:
                sol = None
            finally:
                for v in problem.u_vars:
                    v.set_bounds(0, 1)
            if sol is not None:
                cert = certify(problem, sol)
                result.certificates.append(cert)
                result.sets, result.uphill_by, result.directions = [[]], [{}], [{}]
                result.short_by, result.flux_per_demand = [{}], [{}]
                result.exhausted, result.count = True, 1
                result.verification = verification("certified", certificate_words(cert),
                                                   bound=0, gap=0.0)
                return result
        result.lower_bound = len(forced)
        for rid in forced:
            problem.u_vars[index[rid]].lb = 1
        problem.set_objective(count, "min")
        start = _start_set(problem, forced)
        # the point of the last solve is the first set's: HiGHS starts its search from it
        started = start is not None and problem.start_from_last_point()
        checks: list[str] = []
        try:
            sol = _least_set(problem, start, forced, count, checks, started)
        except InfeasibleProblem:
            sol = None
            impossible = True
        if sol is not None:
            size = len(sol.uphill)
            status, details = optimum_words(sol, "uphill steps", integral=True)
            result.verification = verification(status, "", **details)
            result.size = size
            if size == 0:
                _record(result, problem, [], sol)
                result.exhausted, result.count = True, 1
            elif canonical and status == "proven":
                list_in_order(result, problem, size, alternatives, count_limit, checks, _record,
                              first=sol, progress=progress)
            else:
                list_as_found(result, problem, sol, alternatives, checks, _record)
            words = [f"each set's steady state passed the independent numpy check ({len(result.certificates)} points)",
                     f"{result.lower_bound} step(s) uphill in every solution (flux ranges)"]
            words += checks
            bound = result.verification.get("bound")
            words.append(f"minimality {'proven' if status == 'proven' else 'not proven'}: "
                         f"bound {bound} (the larger of {problem.solver_name}'s and the steps "
                         "uphill in every solution)")
            result.verification["check"] = "; ".join(words)
    if impossible:
        raise impossible_demand(tm, "the uphill-set problem", problem.blocked_ids)
    return result
