"""Ranges: minimum and maximum of every reaction's Delta_r G' and every compound's concentration
over the feasible set (thermodynamic variability analysis, Henry, Broadbelt & Hatzimanikatis
2007, Biophys. J. 92:1792). Two MILPs per quantity on one problem built once; each optimum is
certified. A MILP is skipped when an earlier certified solution already sits on the bound of
the quantity's box (nothing feasible lies beyond it), which saves most concentration solves.
Units: kJ/mol and mol/L (or bar).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from .results import AnalysisResult, certify, optimum_words, provenance_of, verification


@dataclass(kw_only=True)
class RangesResult(AnalysisResult):
    """Per reaction: min/max Delta_r G'; per compound: min/max concentration."""

    reactions: pd.DataFrame = field(default_factory=pd.DataFrame)
    compounds: pd.DataFrame = field(default_factory=pd.DataFrame)
    solves_saved: int = 0
    analysis: str = "ranges"

    def to_frame(self) -> pd.DataFrame:
        """Both tables stacked: kind ("reaction" or "compound"), id, min, max, unit."""
        a = self.reactions.rename(columns={"reaction": "id", "dg_min_kJ": "min", "dg_max_kJ": "max"})
        a.insert(0, "kind", "reaction")
        a["unit"] = "kJ/mol"
        b = self.compounds.rename(columns={"compound": "id", "c_min": "min", "c_max": "max"})
        b.insert(0, "kind", "compound")
        b["unit"] = "mol/L or bar"
        cols = ["kind", "id", "min", "max", "unit"]
        return pd.concat([a[cols], b[cols]], ignore_index=True)

    def summary(self) -> str:
        return f"ranges of {len(self.reactions)} reaction energies and {len(self.compounds)} concentrations"


def ranges(tm: ThermoModel, options: ProblemOptions | None = None,
           reactions: list[str] | None = None, compounds: list[str] | None = None) -> RangesResult:
    """Min and max of Delta_r G' (kJ/mol) per reaction and of c per compound over the feasible set.

    Raises
    ------
    InfeasibleProblem
        When the network is infeasible (no feasible set to range over), in plain words.
    """
    options = options or ProblemOptions()
    result = RangesResult(conditions=tm.conditions)
    with ThermoProblem(tm, options) as problem:
        result.provenance = provenance_of(tm, options, problem)
        r_ids = reactions if reactions is not None else list(problem.energy_ids)
        c_ids = compounds if compounds is not None else list(problem.metabolite_ids)
        r_index = {rid: j for j, rid in enumerate(problem.energy_ids)}
        incumbents = _Incumbents(problem)
        statuses: list[str] = []

        def extreme(kind: str, index: int, direction: str, what: str) -> float:
            known = incumbents.attained_box_bound(kind, index, direction)
            if known is not None:
                return known
            var = problem.g_vars[index] if kind == "g" else problem.x_vars[index]
            problem.set_objective({var: 1.0}, direction)
            try:
                sol = problem.solve(what)
            except InfeasibleProblem:
                raise InfeasibleProblem(
                    "ranges: the network is infeasible, so there is no feasible set to range over "
                    "(run the feasibility analysis for the diagnosis)") from None
            result.certificates.append(certify(problem, sol))
            incumbents.update(sol)
            statuses.append(optimum_words(sol, what)[0])
            return float(sol.objective)

        rows = []
        for rid in r_ids:
            if rid not in r_index:
                continue
            j = r_index[rid]
            rows.append({"reaction": rid,
                         "dg_min_kJ": extreme("g", j, "min", f"least Delta_r G' of {rid}"),
                         "dg_max_kJ": extreme("g", j, "max", f"largest Delta_r G' of {rid}")})
        result.reactions = pd.DataFrame(rows, columns=["reaction", "dg_min_kJ", "dg_max_kJ"])
        rows = []
        for cid in c_ids:
            if cid not in problem.metabolite_index:
                continue
            i = problem.metabolite_index[cid]
            rows.append({"compound": cid,
                         "c_min": math.exp(extreme("x", i, "min", f"least concentration of {cid}")),
                         "c_max": math.exp(extreme("x", i, "max", f"largest concentration of {cid}"))})
        result.compounds = pd.DataFrame(rows, columns=["compound", "c_min", "c_max"])
        result.solves_saved = incumbents.saved
        best = [s for s in statuses if s != "proven"]
        result.verification = verification(
            "best found" if best else "proven",
            f"each of {len(statuses)} extremes solved is attained by a point that passed the "
            f"independent numpy check, its optimality proven by {problem.solver_name}"
            + (f" ({len(best)} not proven)" if best else "")
            + f"; {incumbents.saved} extremes are bounds of the box attained by such a point")
    return result


class _Incumbents:
    """Best values of every g_j and ln c_i seen in certified solutions so far.

    An extreme needs no solve of its own when a certified solution already attains the bound of
    the variable's box (the interval bound of g_j, or the concentration bound): no feasible point
    can lie beyond the box, so that incumbent is the optimum. The shortcut is exact.
    """

    #: Two values closer than this (kJ/mol or ln units) count as equal.
    TOLERANCE = 1e-7

    def __init__(self, problem: ThermoProblem):
        self.box = {
            "g": (np.array([v.lb for v in problem.g_vars], dtype=float),
                  np.array([v.ub for v in problem.g_vars], dtype=float)),
            "x": (np.array([v.lb for v in problem.x_vars], dtype=float),
                  np.array([v.ub for v in problem.x_vars], dtype=float)),
        }
        self.low = {k: np.full(len(lo), np.inf) for k, (lo, _) in self.box.items()}
        self.high = {k: np.full(len(lo), -np.inf) for k, (lo, _) in self.box.items()}
        self.saved = 0

    def update(self, sol) -> None:
        for kind, values in (("g", np.asarray(sol.energies, dtype=float)),
                             ("x", np.asarray(sol.log_conc, dtype=float))):
            if values.size == self.low[kind].size:
                self.low[kind] = np.minimum(self.low[kind], values)
                self.high[kind] = np.maximum(self.high[kind], values)

    def attained_box_bound(self, kind: str, index: int, direction: str) -> float | None:
        lo, hi = self.box[kind]
        if direction == "min" and self.low[kind][index] <= lo[index] + self.TOLERANCE:
            self.saved += 1
            return float(lo[index])
        if direction == "max" and self.high[kind][index] >= hi[index] - self.TOLERANCE:
            self.saved += 1
            return float(hi[index])
        return None
