"""Feasibility: does a steady state exist that meets the demand from the feed, with every
reaction that carries flux running downhill (ΔrG' <= -delta in its direction)?

The thermodynamics-based flux problem of Henry, Broadbelt & Hatzimanikatis (2007, Biophys. J.
92:1792) with the direction binaries of loopless flux balance (Schellenberger, Lewis & Palsson
2011, Biophys. J. 100:544), built by :class:`tfa.problem.builder.ThermoProblem`. When no such
steady state exists, the diagnosis is the minimal uphill set (:mod:`tfa.analyses.uphill`); when
even the stoichiometry cannot meet the demand, the message says so with the largest possible
demand flux.
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field

import pandas as pd

from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, Solution, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from .results import (AnalysisResult, certificate_words, certify, concentration_table,
                      confirm_infeasible, provenance_of, reaction_table, verification)
from .demand import ImpossibleDemandError
from .uphill import UPHILL_TABLE_COLUMNS, UphillResult, minimal_uphill_set

log = logging.getLogger(__name__)


#: Columns of the ``feasibility`` table (one row per mode).
FEASIBILITY_COLUMNS = ["mode", "feasible", "uphill_set_size", "demand_impossible", "message",
                       "verification", "checked_by"]
#: Columns of the ``uphill_sets`` table (one row per member of a set, per mode).
UPHILL_SET_COLUMNS = ["mode", *UPHILL_TABLE_COLUMNS]


@dataclass(kw_only=True)
class FeasibilityResult(AnalysisResult):
    """Answer of the feasibility question for one mode.

    Attributes
    ----------
    feasible : bool
    mode : str
    message : str
        Plain words: the answer and, when infeasible, the diagnosis.
    solution : Solution or None
        A certified steady state (feasible only).
    diagnosis : UphillResult or None
        The minimal uphill set when infeasible (None when the demand is impossible outright).
    demand_impossible : bool
        True when even the stoichiometry cannot meet the demand.
    reactions_without_energy : list of str
        Internal reactions left free (or blocked) for want of an energy.
    """

    feasible: bool = False
    mode: str = "native"
    message: str = ""
    solution: Solution | None = None
    diagnosis: UphillResult | None = None
    demand_impossible: bool = False
    reactions_without_energy: list[str] = field(default_factory=list)
    _reactions: pd.DataFrame | None = None
    _concentrations: pd.DataFrame | None = None
    analysis: str = "feasibility"

    def to_frame(self) -> pd.DataFrame:
        """Per reaction: flux, ΔrG'°, recomputed ΔrG' and direction (feasible), or
        the minimal uphill set (infeasible)."""
        if self._reactions is not None:
            return self._reactions
        if self.diagnosis is not None:
            return self.diagnosis.to_frame()
        return pd.DataFrame(columns=["reaction", "flux", "delta_g_standard_kJ_per_mol",
                                     "delta_g_kJ_per_mol", "direction"])

    def concentrations(self) -> pd.DataFrame:
        """Per compound: activity and its logarithm at the certified steady state (empty when
        infeasible)."""
        return self._concentrations if self._concentrations is not None else pd.DataFrame()

    @property
    def uphill_set_size(self) -> int | None:
        """Size of the minimal uphill set: 0 when feasible, None when not computed."""
        if self.diagnosis is not None:
            return self.diagnosis.size
        return 0 if self.feasible else None

    def row(self) -> dict:
        """The answer as one row of the ``feasibility`` table."""
        return {"mode": self.mode, "feasible": self.feasible,
                "uphill_set_size": self.uphill_set_size,
                "demand_impossible": self.demand_impossible, "message": self.message,
                "verification": self.verification.get("status", ""),
                "checked_by": self.verification.get("check", "")}

    def uphill_rows(self) -> list[dict]:
        """The minimal uphill sets as rows of the ``uphill_sets`` table (empty when feasible)."""
        if self.diagnosis is None:
            return []
        return [{"mode": self.mode, **row}
                for row in self.diagnosis.to_frame().to_dict(orient="records")]

    def tables(self) -> dict[str, pd.DataFrame]:
        return {"feasibility": pd.DataFrame([self.row()], columns=FEASIBILITY_COLUMNS),
                "uphill_sets": pd.DataFrame(self.uphill_rows(), columns=UPHILL_SET_COLUMNS)}

    def summary(self) -> str:
        return f"{self.mode}: {self.message}"


def feasibility(tm: ThermoModel, options: ProblemOptions | None = None,
                diagnose: bool = True, alternatives: int = 1, canonical: bool = True,
                count_limit: int = 0, progress=None) -> FeasibilityResult:
    """Is there a steady state meeting the demand with every reaction carrying flux downhill?

    Parameters
    ----------
    tm : ThermoModel
    options : ProblemOptions
    diagnose : bool
        When infeasible, compute the minimal uphill set as the diagnosis.
    alternatives : int
        Up to this many minimal uphill sets of the same size in the diagnosis (integer cuts).

    Returns
    -------
    FeasibilityResult
        Certified solution when feasible; plain-words message and diagnosis when not.

    Raises
    ------
    UndeterminedError
        When the time limit stops the solver before an answer ("undetermined within N s").
    """
    options = options or ProblemOptions()
    result = FeasibilityResult(conditions=tm.conditions, mode=tm.mode)
    infeasible = False
    with ThermoProblem(tm, options) as problem:
        result.provenance = provenance_of(tm, options, problem)
        result.reactions_without_energy = list(problem.unknown_energy_ids)
        solver = problem.solver_name
        try:
            sol = problem.solve(f"feasibility ({tm.mode})")
        except InfeasibleProblem as err:
            infeasible = True
            proof = str(err)
        else:
            _feasible(result, problem, sol, certify(problem, sol), options)
    if not infeasible:
        return result
    outcome, words = confirm_infeasible(
        tm, options, f"feasibility ({tm.mode})",
        on_point=lambda problem, sol, cert: _feasible(result, problem, sol, cert, options))
    if outcome == "point":
        result.verification["check"] += f"; {words}"
        return result
    how = ("its linear relaxation has none" if "relaxation has none" in proof
           else "its loose search has none" if "loose search has none" in proof
           else "branch and bound")
    check = f"no point: {solver} ({how}); {words}"
    status = "proven" if outcome == "confirmed" else "solver proof"
    result.feasible = False
    if not diagnose:
        result.message = ("infeasible: no steady state meets the demand with every reaction "
                          "downhill")
        result.verification = verification(status, check)
        return result
    try:
        diagnosis = minimal_uphill_set(tm, options, alternatives=alternatives,
                                       try_downhill_first=False, canonical=canonical,
                                       count_limit=count_limit, progress=progress)
    except ImpossibleDemandError as err:
        result.demand_impossible = True
        result.message = f"infeasible: {err}"
        result.verification = verification(status, f"{check}; {err.verification['check']}")
        return result
    result.diagnosis = diagnosis
    result.certificates.extend(diagnosis.certificates)
    members = diagnosis.sets[0] if diagnosis.sets else []
    amounts = diagnosis.uphill_by[0] if diagnosis.uphill_by else {}
    short = diagnosis.short_by[0] if diagnosis.short_by else {}
    listed = ", ".join(_uphill_words(r, amounts.get(r, float("nan")), short.get(r)) for r in members)
    best = diagnosis.verification.get("status") == "best found"
    result.message = (f"infeasible: no steady state meets the demand with every reaction "
                      f"downhill; {'at most' if best else 'at least'} {diagnosis.size} "
                      f"reaction(s) must be driven uphill (coupled to an energy source): {listed}"
                      f"; energy to supply {diagnosis.energy_to_supply(0):.3g} kJ per mol of "
                      f"demand; {sets_words(diagnosis)}")
    if best:
        bound = diagnosis.verification.get("bound")
        result.message += (" (the best set found within the time limit; at least "
                           f"{0 if bound is None else math.ceil(bound - 1e-6)} proven)")
    result.verification = verification(status, f"{check}; diagnosis: {diagnosis.verification['check']}",
                                       diagnosis_status=diagnosis.verification.get("status"))
    return result


def _feasible(result: FeasibilityResult, problem: ThermoProblem, sol: Solution, cert,
              options: ProblemOptions) -> None:
    """Fill a feasible answer from a certified point."""
    result.certificates.append(cert)
    result.feasible = True
    result.solution = sol
    result._reactions = reaction_table(problem, sol, cert)
    result._concentrations = concentration_table(sol)
    free = len(problem.unknown_energy_ids)
    result.message = ("feasible: a steady state meets the demand with every reaction that "
                      "carries flux running downhill"
                      + (f" ({free} internal reaction(s) without an energy were left "
                         f"{'free' if options.unknown_energy == 'free' else 'blocked'})"
                         if free else ""))
    result.verification = verification("certified", certificate_words(cert)
                                       + f" ({sol.solver}, {sol.confirmed_by})")


def sets_words(diagnosis: UphillResult) -> str:
    """Which set is shown and how many there are: "the first of 4 sets of this size in the order
    of reaction ids", "the only set of this size", "the first of at least 20 ..."."""
    words = diagnosis.count_words()
    if words.startswith("the only"):
        return words
    order = "in the order of reaction ids" if diagnosis.ordered else "in the order found"
    return f"the first of {words} {order}"


def _uphill_words(reaction: str, uphill_by: float, short_by: float | None) -> str:
    """One member of a minimal uphill set in words: how far uphill it runs (never negative) and,
    when it runs downhill by less than the least driving force, by how much it falls short."""
    if short_by is not None and uphill_by <= 0.0:
        return f"{reaction} (short of the least driving force by {short_by:.2g} kJ/mol)"
    return f"{reaction} (uphill by {uphill_by:.1f} kJ/mol)"
