"""The fewest energy-coupled steps: which ATP couplings are indispensable for the demand.

On the network of the ``coupling_choice`` mode every ATP-coupled step j has a twin j' that is its
bare chemistry (:func:`tfa.network.currency_rewrites.coupling_choices`). With the direction
binaries f, b of the thermodynamic flux problem (Henry, Broadbelt & Hatzimanikatis 2007,
Biophys. J. 92:1792) each step keeps or drops its coupling:

    f_j + b_j + f_j' + b_j' <= 1                  (one enzyme: coupled, or bare, one direction)

and a coupling is *kept* when j carries flux in the direction that spends phosphoanhydride bonds
(s_j = f_j when j spends ATP forward, b_j when backward). Every step, coupled or bare, runs
downhill by at least the least driving force. The MILP minimises

    count:   sum_j s_j + (1 / (P + 1)) sum_j m_j        (m_j: j runs coupled the ATP-making way;
                                                        P pairs: the second term breaks ties only)
    energy:  sum_j c_j v_j,   c_j = d_j (ΔrG'°_j' - ΔrG'°_j) > 0

with c_j the coupling energy per mole (kJ/mol, the transformed standard energy of the
hydrolysis the coupling adds, at the setting) and v_j the flux in the spending direction d_j.
Steps that make ATP (an ATP synthase, acetate kinase) are energy conservation: not counted, but
listed. Alternative optima come from integer cuts sum_{j in S} s_j <= |S| - 1 (Balas & Jeroslow
1972, SIAM J. Appl. Math. 23:61), enumerated until the next optimum is worse (or two beyond
those asked for) and sorted (smallest first, then by reaction ids): when the enumeration ends
(``exhausted``) the order does not depend on the solver.

Every solution is certified by the independent numpy check (mass balance, bounds, the second law
recomputed from the concentrations), and the set is recounted from the certified fluxes.
Units: kJ/mol, the network's flux unit.
"""

from __future__ import annotations

import logging
from dataclasses import dataclass, field, replace

import pandas as pd

from ..errors import InputError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from .precursor_demand import per_precursor
from .results import AnalysisResult, certificate_words, certify, optimum_words, provenance_of, verification

log = logging.getLogger(__name__)

#: The objectives of :func:`fewest_couplings`.
COUPLING_OBJECTIVES = ("count", "energy")
#: Optimal sets enumerated beyond those listed, so that the listed ones are the first in the stable
#: order whenever the enumeration ends (``exhausted``) within them.
ENUMERATION_MARGIN = 2
#: Columns of the ``fewest_couplings`` table (one row per coupling of each set, per demand).
COUPLING_COLUMNS = ["precursor", "set", "reaction", "direction", "coupling_role", "bonds",
                    "coupling_energy_kJ_per_mol", "flux"]
#: Columns of the ``coupling_counts`` table (one row per demand).
COUPLING_COUNT_COLUMNS = ["precursor", "feasible", "couplings_kept", "sets_found", "exhausted",
                          "coupling_sets", "message", "verification", "checked_by"]
#: The ``precursor`` entry of the whole demand.
WHOLE_DEMAND = "(whole demand)"


@dataclass
class CouplingPair:
    """An ATP-coupled step and its bare twin.

    ``bonds``: phosphoanhydride bonds the coupled step spends per unit of forward flux (negative:
    it makes them); ``coupling_energy``: ΔrG'°(bare) - ΔrG'°(coupled) in the forward direction,
    kJ/mol (the hydrolysis energy the coupling adds, sign as the bonds)."""

    reaction: str
    twin: str
    bonds: float
    coupling_energy: float

    @property
    def spends_forward(self) -> bool:
        return self.bonds > 0


@dataclass(kw_only=True)
class CouplingResult(AnalysisResult):
    """The fewest couplings for one demand.

    Attributes
    ----------
    precursor : str
        The compound demanded, or :data:`WHOLE_DEMAND`.
    feasible : bool
        False when no choice of couplings meets the demand with every step downhill.
    size : int
        Couplings kept in each optimal set (count objective), or in the least-energy set.
    sets : list of list of str
        Optimal sets of kept couplings (spending ATP), in the stable order.
    made_by : list of list of str
        Per set: coupled steps that ran the ATP-making way (energy conservation).
    energies : list of float
        Per set: sum of flux x coupling energy over the kept couplings (flux unit x kJ/mol).
    fluxes : list of dict
        Per set: reaction -> flux of each coupled step listed.
    exhausted : bool
        Every optimal set is listed.
    message : str
    pairs : dict
        Reaction id -> :class:`CouplingPair`.
    """

    precursor: str = WHOLE_DEMAND
    feasible: bool = False
    objective: str = "count"
    size: int = 0
    sets: list[list[str]] = field(default_factory=list)
    made_by: list[list[str]] = field(default_factory=list)
    energies: list[float] = field(default_factory=list)
    fluxes: list[dict[str, float]] = field(default_factory=list)
    exhausted: bool = False
    message: str = ""
    pairs: dict[str, CouplingPair] = field(default_factory=dict)
    analysis: str = "fewest couplings"

    def rows(self) -> list[dict]:
        out = []
        for k, members in enumerate(self.sets):
            for rid, role in [(r, "spends ATP") for r in members] + \
                             [(r, "makes ATP") for r in self.made_by[k]]:
                pair = self.pairs[rid]
                v = self.fluxes[k].get(rid, 0.0)
                direction = "forward" if v >= 0 else "backward"
                sign = 1.0 if v >= 0 else -1.0
                out.append({"precursor": self.precursor, "set": k + 1, "reaction": rid,
                            "direction": direction, "coupling_role": role,
                            "bonds": sign * pair.bonds,
                            "coupling_energy_kJ_per_mol": sign * pair.coupling_energy,
                            "flux": v})
        return out

    def count_row(self) -> dict:
        return {"precursor": self.precursor, "feasible": self.feasible,
                "couplings_kept": self.size if self.feasible else None,
                "sets_found": len(self.sets), "exhausted": self.exhausted,
                "coupling_sets": "; ".join(", ".join(s) or "(none)" for s in self.sets),
                "message": self.message, "verification": self.verification.get("status", ""),
                "checked_by": self.verification.get("check", "")}

    def to_frame(self) -> pd.DataFrame:
        return pd.DataFrame(self.rows(), columns=COUPLING_COLUMNS)

    def summary(self) -> str:
        return f"{self.precursor}: {self.message}"


def coupling_pairs(tm: ThermoModel) -> dict[str, CouplingPair]:
    """The ATP-coupled steps of a ``coupling_choice`` network whose step and twin both have an
    energy (others cannot be judged and are left out, with a log line)."""
    pairs = {}
    for reaction in tm.model.reactions:
        notes = reaction.notes or {}
        original = notes.get("bare_of")
        if not original:
            continue
        if original not in tm.energies or reaction.id not in tm.energies:
            log.info("coupling of %s not judged: %s has no energy", original,
                     original if original not in tm.energies else reaction.id)
            continue
        bonds = float(notes.get("bonds", 0.0))
        energy = tm.energies[reaction.id].standard - tm.energies[original].standard
        pairs[original] = CouplingPair(original, reaction.id, bonds, energy)
    return pairs


def fewest_couplings(tm: ThermoModel, options: ProblemOptions | None = None,
                     objective: str = "count", alternatives: int = 2,
                     precursor: str = WHOLE_DEMAND) -> CouplingResult:
    """The fewest ATP couplings (or the least coupling energy) with which the demand is met with
    every step downhill (see the module text for the MILP).

    Parameters
    ----------
    tm : ThermoModel
        The network prepared in a mode with the rewrite ``atp_coupling_optional``.
    options : ProblemOptions
    objective : {"count", "energy"}
        Fewest couplings kept, or least sum of flux x coupling energy [flux unit x kJ/mol].
    alternatives : int
        Optimal sets listed (up to :data:`ENUMERATION_MARGIN` more are enumerated for the order).
    precursor : str
        Label of the demand (the caller has set the demand reaction).

    Returns
    -------
    CouplingResult
        Certified sets; ``feasible`` False when no choice of couplings meets the demand.

    Examples
    --------
    tests/test_couplings.py: A -> B -> C -> D where three steps may each be ATP-coupled and only
    B -> C is uphill by itself (+10 kJ/mol, hand-derived): the answer is {B -> C} alone.
    """
    if objective not in COUPLING_OBJECTIVES:
        raise InputError(f"objective '{objective}': use one of {', '.join(COUPLING_OBJECTIVES)}")
    if not any((r.notes or {}).get("bare_of") for r in tm.model.reactions):
        raise InputError(f"mode {tm.mode}: the network has no bare twins of ATP-coupled steps; ask "
                         "in the coupling_choice mode (or a mode with atp_coupling_optional)")
    options = replace(options or ProblemOptions(), uphill=False, driving_force=False)
    pairs = coupling_pairs(tm)
    result = CouplingResult(conditions=tm.conditions, precursor=precursor, objective=objective,
                            pairs=pairs)
    with ThermoProblem(tm, options) as problem:
        result.provenance = provenance_of(tm, options, problem)
        index = {rid: j for j, rid in enumerate(problem.energy_ids)}
        spend, make, spend_flux = {}, {}, {}
        for rid, pair in pairs.items():
            j, t = index[rid], index[pair.twin]
            problem.add_constraint({problem.f_vars[j]: 1.0, problem.b_vars[j]: 1.0,
                                    problem.f_vars[t]: 1.0, problem.b_vars[t]: 1.0},
                                   None, 1.0, f"tfa_couple_{j}")
            reaction = problem.reactions[problem.energy_reaction_index[j]]
            if pair.spends_forward:
                spend[rid], make[rid] = problem.f_vars[j], problem.b_vars[j]
                spend_flux[rid] = reaction.forward_variable
            else:
                spend[rid], make[rid] = problem.b_vars[j], problem.f_vars[j]
                spend_flux[rid] = reaction.reverse_variable
        if objective == "count":
            weights = {v: 1.0 for v in spend.values()}
            weights.update({v: 1.0 / (len(pairs) + 1) for v in make.values()})
        else:
            weights = {spend_flux[rid]: abs(pair.coupling_energy) for rid, pair in pairs.items()}
        found: list[tuple] = []
        checks = []
        limit = max(1, alternatives) + (ENUMERATION_MARGIN if objective == "count" else 0)
        best_value = None
        for k in range(limit):
            problem.set_objective(weights, "min")
            try:
                sol = problem.solve(f"fewest couplings ({precursor})", accept_best=True)
            except InfeasibleProblem:
                if k == 0:
                    result.feasible = False
                    result.message = ("infeasible: no choice of ATP couplings meets the demand "
                                      "with every step downhill")
                    result.verification = verification(
                        "solver proof", f"no point: {problem.solver_name}")
                    return result
                result.exhausted = True
                checks.append(f"no further set: {problem.solver_name} proved it")
                break
            cert = certify(problem, sol)
            result.certificates.append(cert)
            kept, made, flux = _recount(problem, sol, pairs)
            value = len(kept) if objective == "count" else _energy(kept, flux, pairs)
            if k == 0:
                best_value = value
                status, details = optimum_words(sol, "couplings", integral=objective == "count")
                result.verification = verification(status, "", **details)
            elif (value > best_value + 1e-9 if objective == "count"
                  else False):
                result.exhausted = True
                checks.append(f"no further set of {best_value}: the next best has {value}")
                break
            found.append((kept, made, flux, _energy(kept, flux, pairs)))
            if not kept:
                result.exhausted = True
                break
            problem.add_constraint({spend[r]: 1.0 for r in kept}, None, len(kept) - 1,
                                   f"tfa_couple_cut_{k}")
        else:
            checks.append(f"enumeration stopped after {limit} sets")
    if objective == "energy":
        found.sort(key=lambda item: (round(item[3], 9), len(item[0]), item[0]))
    else:
        found.sort(key=lambda item: (len(item[0]), item[0]))
    checks.append(_recheck(tm, options, pairs, found[0][0] + found[0][1]))
    shown = found[:max(1, alternatives)]
    result.feasible = True
    result.sets = [s[0] for s in shown]
    result.made_by = [s[1] for s in shown]
    result.fluxes = [s[2] for s in shown]
    result.energies = [s[3] for s in shown]
    result.size = len(result.sets[0])
    listed = "; ".join("{" + (", ".join(s) or "none") + "}" for s in result.sets)
    more = len(found) - len(shown)
    if objective == "count":
        result.message = (f"{result.size} ATP coupling(s) kept at the least ({len(found)} optimal "
                          f"set(s){', all listed' if result.exhausted else ''}): {listed}"
                          + (f" and {more} more" if more > 0 else ""))
    else:
        result.message = ("least coupling energy (flux x ΔrG'° of the coupling, flux unit x kJ/mol): "
                          + "; ".join("{" + (", ".join(s) or "none") + f"}} {e:.3g}"
                                      for s, e in zip(result.sets, result.energies))
                          + " (the best first, then the next best)")
    result.verification["check"] = "; ".join(
        [f"every set's steady state: {certificate_words(result.certificates[0])}",
         "each set recounted from the certified fluxes (coupled and bare copy never both used)"]
        + checks)
    return result


def _recount(problem: ThermoProblem, sol, pairs: dict[str, CouplingPair]
             ) -> tuple[list[str], list[str], dict[str, float]]:
    """Kept couplings (spending ATP) and coupled steps making ATP, read from the fluxes alone;
    raises when a step and its twin both carry flux (the solution would not be a choice)."""
    tolerance = 1e-9 * problem.flux_scale
    kept, made, flux = [], [], {}
    for rid, pair in sorted(pairs.items()):
        v, w = sol.flux(rid), sol.flux(pair.twin)
        if abs(v) > tolerance and abs(w) > tolerance:
            from ..errors import ComputationError

            raise ComputationError(f"fewest couplings: {rid} ran both coupled and bare; a solver "
                                   "fault, try the other solver (--solver glpk or highs)")
        if abs(v) <= tolerance:
            continue
        flux[rid] = v
        (kept if (v > 0) == pair.spends_forward else made).append(rid)
    return kept, made, flux


def _recheck(tm: ThermoModel, options: ProblemOptions, pairs: dict[str, CouplingPair],
             coupled: list[str]) -> str:
    """The first set checked on its own network: the steps in ``coupled`` keep their coupling
    (their bare twins blocked), every other ATP-coupled step runs bare (the coupled step blocked),
    and the plain feasibility problem (no coupling rows, no objective) must find a certified
    steady state. Raises ComputationError when it does not."""
    from ..errors import ComputationError
    from .feasibility import feasibility

    keep = set(coupled)
    with tm.model:
        for rid, pair in pairs.items():
            blocked = pair.twin if rid in keep else rid
            tm.model.reactions.get_by_id(blocked).bounds = (0.0, 0.0)
        answer = feasibility(tm, options, diagnose=False)
    if not answer.feasible:
        raise ComputationError(f"fewest couplings: the set {', '.join(sorted(keep)) or '(none)'} "
                               "did not meet the demand when re-solved on its own network; a "
                               "solver fault, try the other solver (--solver glpk or highs)")
    return ("the first set re-solved on its own network (those couplings kept, every other step "
            f"bare, no coupling rows): {answer.verification.get('status', '')}")


def _energy(kept: list[str], flux: dict[str, float], pairs: dict[str, CouplingPair]) -> float:
    return float(sum(abs(flux[r]) * abs(pairs[r].coupling_energy) for r in kept))


def coupling_answers(tm: ThermoModel, options: ProblemOptions | None = None,
                     objective: str = "count", alternatives: int = 2,
                     precursors: bool = True, progress=None) -> list[CouplingResult]:
    """:func:`fewest_couplings` for the whole demand and, with ``precursors``, for each compound
    of the demand alone (a demand that even the stoichiometry cannot meet says so);
    ``progress(done, total)`` before each precursor."""
    from ..errors import ComputationError

    def run(model: ThermoModel, label: str) -> CouplingResult:
        try:
            return fewest_couplings(model, options, objective, alternatives, label)
        except ComputationError as err:
            return CouplingResult(conditions=model.conditions, precursor=label, feasible=False,
                                  message=f"not answered: {err}",
                                  verification=verification("solver proof", str(err)))

    answers = [run(tm, WHOLE_DEMAND)]
    if precursors:
        answers += per_precursor(tm, run, progress=progress)
    return answers


def coupling_tables(answers: list[CouplingResult]) -> dict[str, pd.DataFrame]:
    """The ``fewest_couplings`` and ``coupling_counts`` tables of several answers."""
    rows = [row for a in answers for row in a.rows()]
    return {"fewest_couplings": pd.DataFrame(rows, columns=COUPLING_COLUMNS),
            "coupling_counts": pd.DataFrame([a.count_row() for a in answers],
                                            columns=COUPLING_COUNT_COLUMNS)}

