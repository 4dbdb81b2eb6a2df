"""Distance to a flipped verdict: the smallest change of the energies, in units of their
uncertainty, that turns a mode's answer from feasible to infeasible or back, and what carries it.

The energies move in whitened compound space (:mod:`tfa.network.compound_space`): g = ḡ + A z,
A = [N F | R] the factor of the reaction energies over their named sources (compounds' species
data, reaction values, groups of estimates), z the sources' deviations in units of their σ. The
distance is the L1 norm ‖z‖₁ = Σ_s |z_s| (the norm of the ``--k-sigma`` slack, so the problem
stays a MILP); "the verdict holds unless the energies move by 1.8σ" means the sources together
must move 1.8 of their standard deviations. For one reaction whose error is one source of σ the
distance is the margin over σ: (−δ − ΔrG'_best)/σ for a feasible reaction (ΔrG'_best its energy
at the most favourable concentrations), (ΔrG'_best + δ)/σ for an infeasible one.

- **Infeasible verdict** (exact): minimise ‖z‖₁ over the thermodynamic flux problem with the
  compound-space slack (:class:`tfa.problem.builder.ThermoProblem`, ``uncertainty_k`` =
  :data:`MARGIN_CAP`, objective Σ(z⁺ + z⁻)); the point found is certified by the independent
  check and the minimum is the solver's (``proven`` when the bound meets it).
- **Feasible verdict** (a flip found and verified; not proven smallest): flipping means blocking
  every steady state, a universal condition, so the search accumulates cuts. While the network
  is feasible at g = ḡ + A z, the steady state found uses a set of reactions with directions d;
  its max-min driving force B(g) = max_x min_j −d_j g_j(x) is a linear program whose dual λ (a
  convex weight on its reactions) gives the bound B(g) ≤ φ_λ(g) = Σ_j λ_j(−d_j g_j) +
  Σ_i max(c_i ln lo_i, c_i ln hi_i), c_i = −RT Σ_j λ_j d_j S_ij, valid for every g (weak
  duality; Noor et al. 2014 for the max-min driving force). φ_λ(ḡ + A z) ≤ δ − ε blocks that
  way of running; the least ‖z‖₁ meeting every cut so far is a linear program (z = z⁺ − z⁻).
  The loop stops when the network is infeasible at ḡ + A z (the flip, verified by solving the
  full problem again at the moved energies) or after :data:`MAX_ROUNDS` rounds.

The sources that carry the change are ranked by |z_s|.

Units: kJ/mol; distances in standard deviations (σ) of the sources.

References
----------
[1] E. Noor, A. Bar-Even, A. Flamholz, E. Reznik, W. Liebermeister, R. Milo, PLoS Comput. Biol.
    10 (2014) e1003483 (max-min driving force).
[2] JCGM 100:2008 (GUM), section 5.2 (whitened coordinates of correlated inputs).
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np
import pandas as pd

from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from .results import AnalysisResult, certificate_words, certify, provenance_of, verification
from .uncertainty import with_energies

log = logging.getLogger(__name__)

#: Largest distance searched, σ (the cap of --k-sigma, tfa.util.numbers.MAX_K_SIGMA).
MARGIN_CAP = 10.0
#: Growing caps of the exact search of an infeasible verdict, σ.
CAPS = (0.5, 1.0, 2.0, 4.0, MARGIN_CAP)
#: Rounds of cuts of a feasible verdict's search.
MAX_ROUNDS = 12
#: How far below δ a cut puts a blocked way of running, kJ/mol (so the solvers see it blocked).
CUT_EPSILON = 1e-3
#: Sources named as carrying a change.
CARRIERS_SHOWN = 3

MARGIN_COLUMNS = ["mode", "feasible", "margin_sigma", "margin_status", "carried_by", "rounds",
                  "verification"]
SOURCE_COLUMNS = ["mode", "source", "label", "deviation_sigma", "share"]


@dataclass(kw_only=True)
class MarginResult(AnalysisResult):
    """Distance to a flipped verdict of one mode.

    Attributes
    ----------
    mode : str
    feasible : bool — the verdict at the stated energies
    distance : float — ‖z‖₁ of the change found, σ (NaN when none within :data:`MARGIN_CAP`)
    status : "proven" (exact minimum), "best found" (a verified flip, maybe not the smallest)
        or "none within 10 σ"
    sources : list of (name, label, z_s) — the sources that move, largest |z_s| first
    reaction_change : dict — reaction -> change of its ΔrG'° in the flip, kJ/mol
    rounds : int — linear programs of cuts (feasible verdicts) or 1
    """

    mode: str = "native"
    feasible: bool = False
    distance: float = math.nan
    status: str = ""
    sources: list = field(default_factory=list)
    reaction_change: dict = field(default_factory=dict)
    rounds: int = 0
    analysis: str = "verdict margins"

    def carried_by(self, n: int = CARRIERS_SHOWN) -> list[str]:
        """The labels of the sources carrying most of the change (largest |z| first)."""
        return [label for _, label, _ in self.sources[:n]]

    def row(self) -> dict:
        total = sum(abs(z) for _, _, z in self.sources) or 1.0
        carried = ", ".join(f"{label} ({abs(z) / total:.0%})" for _, label, z in
                            self.sources[:CARRIERS_SHOWN])
        return {"mode": self.mode, "feasible": self.feasible, "margin_sigma": self.distance,
                "margin_status": self.status, "carried_by": carried, "rounds": self.rounds,
                "verification": self.verification.get("status", "")}

    def source_rows(self) -> list[dict]:
        total = sum(abs(z) for _, _, z in self.sources) or 1.0
        return [{"mode": self.mode, "source": name, "label": label, "deviation_sigma": z,
                 "share": abs(z) / total} for name, label, z in self.sources]

    def to_frame(self) -> pd.DataFrame:
        return pd.DataFrame([self.row()], columns=MARGIN_COLUMNS)

    def tables(self) -> dict[str, pd.DataFrame]:
        return {"verdict_margins": self.to_frame(),
                "verdict_margin_sources": pd.DataFrame(self.source_rows(), columns=SOURCE_COLUMNS)}

    def sentence(self) -> str:
        """The verdict's margin in words."""
        verdict = "feasible" if self.feasible else "infeasible"
        if not math.isfinite(self.distance):
            return (f"{self.mode}: the verdict ({verdict}) holds for every change of the energies "
                    f"up to {MARGIN_CAP:g}σ")
        bound = "" if self.status == "proven" else "at most "
        carriers = self.carried_by()
        mostly = f", mostly {_words(carriers)}" if carriers else ""
        return (f"{self.mode}: the verdict ({verdict}) holds unless the energies move by "
                f"{bound}{self.distance:.2g}σ{mostly}")

    def summary(self) -> str:
        return self.sentence()


def _words(items: list[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def verdict_margin(tm: ThermoModel, options: ProblemOptions | None = None,
                   feasible: bool | None = None,
                   progress: Callable[[str], None] | None = None) -> MarginResult:
    """The smallest change of the energies (σ, L1 in whitened compound space) that flips the
    verdict of ``tm`` (module text).

    Parameters
    ----------
    tm : ThermoModel
    options : ProblemOptions — solver, time limit, least driving force (its slack is ignored)
    feasible : the verdict when already known (else it is computed)
    progress : called with a few words before each solve (e.g. "within 2σ", "round 3")

    Returns
    -------
    MarginResult

    Examples
    --------
    One reaction A -> B (ΔrG'° = −10 kJ/mol, σ = 2 kJ/mol, A and B fixed at 1 mM, δ = 0.1):
    feasible, and it flips when ΔrG'° reaches −0.1, a change of 9.9 kJ/mol = 4.95σ
    (tests/test_margins.py).
    """
    from .feasibility import feasibility

    options = options or ProblemOptions()
    base = _options(options, 0.0)
    if feasible is None:
        feasible = feasibility(tm, base, diagnose=False).feasible
    result = MarginResult(conditions=tm.conditions, mode=tm.mode, feasible=bool(feasible))
    result.provenance = provenance_of(tm, options)
    tell = progress or (lambda _text: None)
    if feasible:
        _to_infeasible(tm, base, result, tell)
    else:
        _to_feasible(tm, options, result, tell)
    return result


def _options(options: ProblemOptions, k: float) -> ProblemOptions:
    from dataclasses import replace

    return replace(options, uncertainty_k=k, uphill=False, driving_force=False)


def _to_feasible(tm: ThermoModel, options: ProblemOptions, result: MarginResult,
                 tell: Callable[[str], None]) -> None:
    """Infeasible verdict: the exact MILP min ‖z‖₁ with the compound-space slack, within caps
    of growing size (:data:`CAPS`): the first cap with a point holds the global minimum (any
    smaller change lies within it too), and small caps give tight big-M bounds."""
    from .results import optimum_words

    for rounds, cap in enumerate(CAPS, start=1):
        tell(f"within {cap:g}σ")
        with ThermoProblem(tm, _options(options, cap)) as problem:
            problem.set_objective({v: 1.0 for v in problem.z_plus + problem.z_minus}, "min")
            try:
                sol = problem.solve(f"distance to a feasible verdict ({tm.mode})", accept_best=True)
            except InfeasibleProblem:
                continue
            _fill_feasible(problem, sol, result, optimum_words)
            result.rounds = rounds
            return
    result.status = f"none within {MARGIN_CAP:g} σ"
    result.verification = verification(
        "solver proof", f"no steady state even with the energies moved by {MARGIN_CAP:g}σ")
    result.rounds = len(CAPS)


def _fill_feasible(problem: ThermoProblem, sol, result: MarginResult, optimum_words) -> None:
    """The answer of an infeasible verdict from the least-change point ``sol``."""
    cert = certify(problem, sol)
    result.certificates.append(cert)
    z = np.asarray(sol.slack_coordinates, float)
    result.distance = float(np.sum(np.abs(z)))
    status, details = optimum_words(sol, "the distance")
    result.status = status
    result.sources = _ranked(problem.slack_names, problem.slack_labels, z)
    result.reaction_change = {rid: float(e) for rid, e in zip(problem.energy_ids, sol.slack)
                              if abs(e) > 1e-9}
    result.verification = verification(
        status, certificate_words(cert, "the steady state at the moved energies")
        + f"; least ‖z‖₁ by {sol.solver}", **details)


def _to_infeasible(tm: ThermoModel, options: ProblemOptions, result: MarginResult,
                   tell: Callable[[str], None]) -> None:
    """Feasible verdict: cuts from the steady states found, until none is left (module text).
    One problem is built (slack up to :data:`MARGIN_CAP`) and each round fixes its deviations."""
    from scipy.optimize import linprog

    delta = options.min_driving_force
    with ThermoProblem(tm, _options(options, MARGIN_CAP)) as problem:
        a = problem.slack_factor
        names, labels = problem.slack_names, problem.slack_labels
        ids = list(problem.energy_ids)
        mean = np.asarray(problem.standard, float)
        n_z = a.shape[1]
        if n_z == 0:   # no source of uncertainty: no change of the energies to search
            result.status = f"none within {MARGIN_CAP:g} σ"
            result.verification = verification(
                "proven", "the energies carry no uncertainty (every σ is 0), so no change of "
                "them is searched")
            return
        cuts_a: list[np.ndarray] = []
        cuts_b: list[float] = []
        z = np.zeros(n_z)
        for rounds in range(1, MAX_ROUNDS + 1):
            tell(f"round {rounds}")
            problem.fix_slack(z)
            try:
                sol = problem.solve(f"distance to an infeasible verdict ({tm.mode})")
            except InfeasibleProblem as err:
                result.distance = float(np.sum(np.abs(z)))
                result.status = "best found"
                result.sources = _ranked(names, labels, z)
                result.reaction_change = {rid: float(d) for rid, d in zip(ids, a @ z)
                                          if abs(d) > 1e-9}
                result.rounds = rounds - 1
                result.verification = verification(
                    "best found", f"no steady state at the moved energies ({problem.solver_name}: "
                    f"{err}); the change was found by {rounds - 1} round(s) of cuts and is not "
                    "proven the smallest")
                return
            result.certificates.append(certify(problem, sol))
            moved = with_energies(tm, dict(zip(ids, (mean + a @ z).tolist())), uncertainty=0.0)
            cut = _cut(moved, sol, ids, delta)
            if cut is None:
                break
            weights, constant = cut   # φ(g) = weights · g + constant
            # φ(ḡ + A z) <= δ − ε  <=>  (weightsᵀ A) z <= δ − ε − φ(ḡ)
            cuts_a.append(weights @ a)
            cuts_b.append(delta - CUT_EPSILON - (weights @ mean + constant))
            a_ub = np.array(cuts_a)
            lp = linprog(np.ones(2 * n_z), A_ub=np.hstack([a_ub, -a_ub]), b_ub=np.array(cuts_b),
                         bounds=[(0, MARGIN_CAP)] * (2 * n_z), method="highs")
            if lp.status != 0 or float(np.sum(lp.x)) > MARGIN_CAP:
                break
            z = lp.x[:n_z] - lp.x[n_z:]
    result.rounds = len(cuts_a)
    result.status = f"none within {MARGIN_CAP:g} σ"
    result.verification = verification(
        "best found", f"no change of at most {MARGIN_CAP:g}σ found that leaves the network "
        f"infeasible ({len(cuts_a)} round(s) of cuts)")


def _cut(tm: ThermoModel, solution, ids: list[str], delta: float):
    """(w, c) with B(g) <= w·g + c for every g, for the way of running of ``solution``: the
    dual of its max-min driving force linear program (module text); None if it has none."""
    from scipy.optimize import linprog

    index = {rid: j for j, rid in enumerate(ids)}
    carrying = [(rid, v) for rid, v in zip(solution.reaction_ids, solution.fluxes)
                if rid in index and abs(v) > 1e-9]
    if not carrying:
        return None
    no_activity = set(tm.no_activity)
    mets: list[str] = []
    m_index: dict[str, int] = {}
    rows = []
    for rid, v in carrying:
        d = 1.0 if v > 0 else -1.0
        coefs = {}
        for met, s in tm.model.reactions.get_by_id(rid).metabolites.items():
            if met.id in no_activity:
                continue
            if met.id not in m_index:
                m_index[met.id] = len(mets)
                mets.append(met.id)
            coefs[m_index[met.id]] = coefs.get(m_index[met.id], 0.0) + float(s)
        rows.append((rid, d, coefs))
    rt = tm.RT
    lo = np.array([tm.log_bounds[m][0] for m in mets], float)
    hi = np.array([tm.log_bounds[m][1] for m in mets], float)
    g0 = np.array([tm.energies[rid].standard for rid, _, _ in rows], float)
    # variables [x, B]; maximise B: d_j (g0_j + RT S_j x) + B <= 0
    n_x = len(mets)
    a_ub = np.zeros((len(rows), n_x + 1))
    b_ub = np.zeros(len(rows))
    for j, (rid, d, coefs) in enumerate(rows):
        for i, s in coefs.items():
            a_ub[j, i] = d * rt * s
        a_ub[j, n_x] = 1.0
        b_ub[j] = -d * g0[j]
    cost = np.zeros(n_x + 1)
    cost[n_x] = -1.0
    lp = linprog(cost, A_ub=a_ub, b_ub=b_ub, bounds=list(zip(lo, hi)) + [(None, None)],
                 method="highs")
    if lp.status != 0:
        return None
    lam = np.maximum(-np.asarray(lp.ineqlin.marginals, float), 0.0)
    if lam.sum() <= 0:
        return None
    lam = lam / lam.sum()
    weights = np.zeros(len(ids))
    c = np.zeros(n_x)
    for j, (rid, d, coefs) in enumerate(rows):
        weights[index[rid]] += -lam[j] * d
        for i, s in coefs.items():
            c[i] += -rt * lam[j] * d * s
    constant = float(np.sum(np.maximum(c * lo, c * hi)))
    return weights, constant


def _ranked(names: list[str], labels: list[str], z: np.ndarray) -> list[tuple[str, str, float]]:
    order = np.argsort(-np.abs(z), kind="stable")
    return [(names[i], labels[i], float(z[i])) for i in order if abs(z[i]) > 1e-9]
