"""Ranges: minimum and maximum of every reaction's ΔrG' and every compound's concentration
over the feasible set (thermodynamic variability analysis, Henry, Broadbelt & Hatzimanikatis
2007, Biophys. J. 92:1792). Two MILPs per quantity on one problem built once; each optimum is
certified. A MILP is skipped when an earlier certified solution already sits on the bound of
the quantity's box (nothing feasible lies beyond it), which saves most concentration solves.
With ``workers`` > 1 the reactions are split into one part per worker process, each part on its
own problem (incumbents are shared within a part). Units: kJ/mol and activities (mol/L over
1 mol/L; gases bar over 1 bar).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np
import pandas as pd

from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from .results import AnalysisResult, certify, optimum_words, provenance_of, verification


#: Columns of the reaction ranges (``ranges``) and of the compound ranges (``ranges_compounds``).
REACTION_RANGE_COLUMNS = ["reaction", "delta_g_min_kJ_per_mol", "delta_g_max_kJ_per_mol"]
COMPOUND_RANGE_COLUMNS = ["compound", "activity_min", "activity_max"]
#: Called after each extreme: (extremes done, extremes in all).
RangeProgress = Callable[[int, int], None]


@dataclass(kw_only=True)
class RangesResult(AnalysisResult):
    """Per reaction: least and largest ΔrG' (kJ/mol); per compound: least and largest activity.

    ``uphill_allowed`` lists the reactions whose energies were left out (a minimal uphill set
    allowed to run uphill) when the network was infeasible as it stands.
    """

    reactions: pd.DataFrame = field(default_factory=lambda: pd.DataFrame(columns=REACTION_RANGE_COLUMNS))
    compounds: pd.DataFrame = field(default_factory=lambda: pd.DataFrame(columns=COMPOUND_RANGE_COLUMNS))
    solves_saved: int = 0
    uphill_allowed: list[str] = field(default_factory=list)
    analysis: str = "ranges"

    def to_frame(self) -> pd.DataFrame:
        """The reaction ranges (kJ/mol)."""
        return self.reactions

    def tables(self) -> dict[str, pd.DataFrame]:
        out = {"ranges": self.reactions}
        if len(self.compounds):
            out["ranges_compounds"] = self.compounds
        return out

    def summary(self) -> str:
        return f"ranges of {len(self.reactions)} reaction energies and {len(self.compounds)} concentrations"


def ranges(tm: ThermoModel, options: ProblemOptions | None = None,
           reactions: list[str] | None = None, compounds: list[str] | None = None,
           workers: int = 1, progress: RangeProgress | None = None) -> RangesResult:
    """Least and largest ΔrG' [kJ/mol] per reaction and activity per compound over the feasible
    steady states.

    Parameters
    ----------
    tm : ThermoModel
    options : ProblemOptions
    reactions : list of str, optional
        Reactions to range (default: every reaction with an energy).
    compounds : list of str, optional
        Compounds to range (default: every compound with an activity term; ``[]``: none).
    workers : int
        Worker processes (1: in this process).
    progress : callable, optional
        Called after each extreme (serial) or each part (workers) with (done, total).

    Raises
    ------
    InfeasibleProblem
        When the network is infeasible (no feasible set to range over), in plain words.
    """
    options = options or ProblemOptions()
    if workers > 1:
        return _ranges_in_parts(tm, options, reactions, compounds, workers, progress)
    result = RangesResult(conditions=tm.conditions)
    with ThermoProblem(tm, options) as problem:
        result.provenance = provenance_of(tm, options, problem)
        r_ids = [r for r in (reactions if reactions is not None else problem.energy_ids)
                 if r in problem.energy_ids]
        c_ids = [c for c in (compounds if compounds is not None else problem.metabolite_ids)
                 if c in problem.metabolite_index]
        r_index = {rid: j for j, rid in enumerate(problem.energy_ids)}
        incumbents = _Incumbents(problem)
        total = 2 * (len(r_ids) + len(c_ids))
        done = 0
        statuses: list[str] = []

        def extreme(kind: str, index: int, direction: str, what: str) -> float:
            nonlocal done
            done += 1
            if progress is not None:
                progress(done, total)
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
            j = r_index[rid]
            rows.append({"reaction": rid,
                         "delta_g_min_kJ_per_mol": extreme("g", j, "min", f"least ΔrG' of {rid}"),
                         "delta_g_max_kJ_per_mol": extreme("g", j, "max", f"largest ΔrG' of {rid}")})
        result.reactions = pd.DataFrame(rows, columns=REACTION_RANGE_COLUMNS)
        rows = []
        for cid in c_ids:
            i = problem.metabolite_index[cid]
            rows.append({"compound": cid,
                         "activity_min": math.exp(extreme("x", i, "min", f"least activity of {cid}")),
                         "activity_max": math.exp(extreme("x", i, "max", f"largest activity of {cid}"))})
        result.compounds = pd.DataFrame(rows, columns=COMPOUND_RANGE_COLUMNS)
        result.solves_saved = incumbents.saved
        best = [s for s in statuses if s != "proven"]
        result.verification = verification(
            "best found" if best else "proven",
            f"each of {len(statuses)} extremes solved is attained by a point that passed the "
            f"independent numpy check, its optimality proven by {problem.solver_name}"
            + (f" ({len(best)} not proven)" if best else "")
            + f"; {incumbents.saved} extremes are bounds of the box attained by such a point")
    return result


def _part(task) -> RangesResult:
    """One part of the ranges (a top-level function, so worker processes can run it)."""
    tm, options, reactions, compounds = task
    return ranges(tm, options, reactions=reactions, compounds=compounds)


def _ranges_in_parts(tm: ThermoModel, options: ProblemOptions, reactions: list[str] | None,
                     compounds: list[str] | None, workers: int,
                     progress: RangeProgress | None) -> RangesResult:
    """The ranges split into one part per worker process; each part certifies its own solutions.

    Measured on the shared 2-core machine, two workers were slower than one for the bundled
    network (65 s against 49 s), so one process stays the default.
    """
    from concurrent.futures import ProcessPoolExecutor

    from ..util.points import die_with_parent

    ids = [r for r in (reactions if reactions is not None else tm.energies) if r in tm.energies]
    size = max(1, -(-len(ids) // workers))
    parts = [ids[k:k + size] for k in range(0, len(ids), size)]
    # plain data for the workers: the compound table is not needed to range energies
    shipped = dataclasses.replace(tm, compound_table=None)
    tasks = [(shipped, options, part, []) for part in parts]
    if compounds is None or compounds:
        tasks.append((shipped, options, [], compounds))
    results = []
    # workers end with this process, even when it is killed (tfa.util.points.die_with_parent)
    with ProcessPoolExecutor(max_workers=min(workers, len(tasks)),
                             initializer=die_with_parent) as pool:
        for k, part in enumerate(pool.map(_part, tasks)):
            results.append(part)
            if progress is not None:
                progress(k + 1, len(tasks))
    out = RangesResult(conditions=tm.conditions)
    reaction_parts = [r.reactions for r in results if len(r.reactions)]
    compound_parts = [r.compounds for r in results if len(r.compounds)]
    if reaction_parts:
        out.reactions = pd.concat(reaction_parts, ignore_index=True)
    if compound_parts:
        out.compounds = pd.concat(compound_parts, ignore_index=True)
    for r in results:
        out.certificates.extend(r.certificates)
        out.solves_saved += r.solves_saved
    out.provenance = results[0].provenance if results else {}
    return out


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
