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
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from ..errors import ComputationError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, Solution, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from .results import AnalysisResult, certify, provenance_of

log = logging.getLogger(__name__)


class ImpossibleDemandError(ComputationError):
    """The demand cannot be met by the stoichiometry and flux bounds, whatever the energies."""


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
        Per set: reaction -> d_j * Delta_r G' (kJ/mol) at the concentrations that make the set's
        total uphill energy smallest (positive = uphill; d_j the flux direction, +1 or -1).
    directions : list of dict
        Per set: reaction -> +1 (forward) or -1 (backward).
    exhausted : bool
        True when no further set of the same size exists.
    """

    size: int = 0
    sets: list[list[str]] = field(default_factory=list)
    uphill_by: list[dict[str, float]] = field(default_factory=list)
    directions: list[dict[str, int]] = field(default_factory=list)
    exhausted: bool = False
    analysis: str = "minimal uphill set"

    def to_frame(self) -> pd.DataFrame:
        rows = []
        for k, members in enumerate(self.sets):
            for rid in members:
                rows.append({"set": k + 1, "reaction": rid,
                             "direction": "forward" if self.directions[k].get(rid, 1) > 0 else "backward",
                             "uphill_by_kJ_per_mol": self.uphill_by[k].get(rid, float("nan"))})
        return pd.DataFrame(rows, columns=["set", "reaction", "direction", "uphill_by_kJ_per_mol"])

    def summary(self) -> str:
        if self.size == 0:
            return "no reaction needs to run uphill: the network is feasible as it stands"
        listed = "; ".join(", ".join(s) for s in self.sets)
        return (f"at least {self.size} reaction(s) must run uphill (coupled to an energy source); "
                f"{len(self.sets)} minimal set(s): {listed}")


def demand_capacity(tm: ThermoModel) -> float:
    """Largest demand flux the stoichiometry and flux bounds allow (plain LP, no energies)."""
    model = tm.model
    if tm.demand_id is None:
        return float("nan")
    with model:
        demand = model.reactions.get_by_id(tm.demand_id)
        demand.lower_bound = min(0.0, demand.upper_bound)
        model.objective = demand
        model.objective_direction = "max"
        value = model.slim_optimize(error_value=float("nan"))
    return float(value)


def impossible_demand_message(tm: ThermoModel) -> str:
    """Plain words for a demand that no steady state can meet, with the largest possible flux."""
    if tm.demand_id is None:
        return ("no steady state satisfies the flux bounds even without thermodynamics: check "
                "the bounds of the exchange reactions and forced fluxes")
    required = tm.model.reactions.get_by_id(tm.demand_id).lower_bound
    capacity = demand_capacity(tm)
    if np.isnan(capacity):
        return ("no steady state satisfies the flux bounds even without thermodynamics and with no "
                f"demand on {tm.demand_id}: check the forced fluxes and the feed")
    return (f"the demand cannot be met even ignoring thermodynamics: {tm.demand_id} must carry at "
            f"least {required:g}, but the stoichiometry and feed allow at most {capacity:g}; lower "
            "the demand or open the missing feed/exchange")


def _uphill_amounts(problem: ThermoProblem, members: list[str], sol: Solution,
                    options: ProblemOptions) -> tuple[dict[str, float], dict[str, int], Solution]:
    """Fix the set, minimise sum d_j g_j over it; return amounts, directions and the solution."""
    index = {rid: j for j, rid in enumerate(problem.energy_ids)}
    directions = {}
    for rid in members:
        directions[rid] = 1 if sol.flux(rid) >= 0 else -1
    # fix every 0/1 variable at its value in the minimal-set solution: what remains is a linear
    # program over concentrations and fluxes (the best concentrations for this flux pattern)
    member_set = set(members)
    fixed = [(v, 1.0 if problem.energy_ids[j] in member_set else 0.0)
             for j, v in enumerate(problem.u_vars)]
    fixed += [(v, 1.0 if on else 0.0) for v, on in zip(problem.f_vars, sol.forward)]
    fixed += [(v, 1.0 if on else 0.0) for v, on in zip(problem.b_vars, sol.backward)]
    saved = [(v, v.lb, v.ub) for v, _ in fixed]
    for v, value in fixed:
        v.set_bounds(value, value)
    try:
        problem.set_objective({problem.g_vars[index[r]]: float(directions[r]) for r in members}, "min")
        best = problem.solve("least uphill energy of the set")
    finally:
        for v, lb, ub in saved:
            v.set_bounds(lb, ub)
    amounts = {r: float(directions[r] * best.energies[index[r]]) for r in members}
    return amounts, directions, best


def minimal_uphill_set(tm: ThermoModel, options: ProblemOptions | None = None,
                       alternatives: int = 1, try_downhill_first: bool = True) -> UphillResult:
    """Fewest reactions that must run against their gradient for the demand to be met.

    Parameters
    ----------
    tm : ThermoModel
    options : ProblemOptions
    alternatives : int
        Up to this many alternative minimal sets (integer cuts).
    try_downhill_first : bool
        First solve with every u_j fixed at 0 (the plain feasibility problem, on the same build):
        when that is feasible the minimal set is empty and proven so at once; the minimisation
        follows only when it is not (pass False when infeasibility is already known).

    Raises
    ------
    ImpossibleDemandError
        When no steady state meets the demand even ignoring thermodynamics (plain words, with the
        largest possible demand flux).
    """
    options = replace(options or ProblemOptions(), uphill=True, driving_force=False)
    result = UphillResult(conditions=tm.conditions)
    impossible = False
    with ThermoProblem(tm, options) as problem:
        result.provenance = provenance_of(tm, options, problem)
        count = {v: 1.0 for v in problem.u_vars}
        size = None
        if try_downhill_first:
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
                result.certificates.append(certify(problem, sol))
                result.sets, result.uphill_by, result.directions = [[]], [{}], [{}]
                result.exhausted = True
                return result
        for k in range(max(1, alternatives)):
            problem.set_objective(count, "min")
            try:
                sol = problem.solve("minimal uphill set")
            except InfeasibleProblem:
                if k == 0:
                    impossible = True
                else:
                    result.exhausted = True
                break
            members = sorted(sol.uphill)
            if size is None:
                size = len(members)
            elif len(members) > size:
                result.exhausted = True
                break
            result.certificates.append(certify(problem, sol, allowed_uphill=members))
            if members:
                amounts, directions, best = _uphill_amounts(problem, members, sol, options)
                result.certificates.append(certify(problem, best, allowed_uphill=members))
            else:
                amounts, directions = {}, {}
            result.sets.append(members)
            result.uphill_by.append(amounts)
            result.directions.append(directions)
            if not members:
                result.exhausted = True
                break
            if k + 1 < alternatives:
                index = {rid: j for j, rid in enumerate(problem.energy_ids)}
                problem.add_constraint({problem.u_vars[index[r]]: 1.0 for r in members}, None,
                                       len(members) - 1, f"tfa_cut_{k}")
        result.size = size or 0
    if impossible:
        raise ImpossibleDemandError(impossible_demand_message(tm))
    return result
