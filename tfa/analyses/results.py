"""The shared base of every analysis result: conditions, data provenance, certificates,
``to_frame()`` and ``to_dict()`` (for JSON)."""

from __future__ import annotations

import logging
from collections import Counter
from dataclasses import dataclass, field

import pandas as pd

from ..conditions import Conditions
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, Solution, ThermoProblem
from ..verify.certificate import Certificate, check_solution

log = logging.getLogger(__name__)


@dataclass(kw_only=True)
class AnalysisResult:
    """Common part of every result.

    Attributes
    ----------
    conditions : Conditions
        Temperature, pH, ionic strength, pressure of the environment.
    provenance : dict
        Mode, environment, where the energies come from, reactions without an energy, options,
        solver and problem size.
    certificates : list of Certificate
        One passed independent check per solution behind the result (empty when no optimisation
        was needed).
    verification : dict
        What kind of answer this is and what backs it: ``status`` (one of
        :data:`VERIFICATION_STATUSES`), ``check`` (plain words: what was checked, by what), and
        for optimisations the solver's ``bound`` and relative ``gap``.
    """

    conditions: Conditions
    provenance: dict = field(default_factory=dict)
    certificates: list[Certificate] = field(default_factory=list)
    verification: dict = field(default_factory=dict)

    analysis: str = "analysis"

    def to_frame(self) -> pd.DataFrame:  # pragma: no cover - every subclass overrides it
        raise NotImplementedError

    def tables(self) -> dict[str, pd.DataFrame]:
        """Every table of the result by file stem, columns from :mod:`tfa.vocabulary`."""
        return {self.analysis.replace(" ", "_").replace("-", "_"): self.to_frame()}

    def summary(self) -> str:
        """One or two lines in plain words."""
        return self.analysis

    def to_dict(self) -> dict:
        """Plain dictionary for JSON output."""
        frame = self.to_frame()
        return {
            "analysis": self.analysis,
            "summary": self.summary(),
            "conditions": self.conditions.to_dict(),
            "provenance": self.provenance,
            "certificates": [c.to_dict() for c in self.certificates],
            "verification": dict(self.verification),
            "table": frame.to_dict(orient="records"),
        }


#: Kinds of answer: "certified" (a returned point passed the independent numpy check), "proven"
#: (a solver's proof, of infeasibility or of optimality, confirmed by a second route named in the
#: check, or an optimum whose bound the solver proved), "solver proof" (a solver's proof of
#: infeasibility that no second route confirmed), "best found" (a limit stopped the search: the
#: best point found, certified, with the solver's bound and gap), "computed" (arithmetic, no
#: optimisation).
VERIFICATION_STATUSES = ("certified", "proven", "solver proof", "best found", "computed")
#: A network with at most this many reactions with an energy has an "infeasible" answer re-asked
#: of the other solver (ProblemOptions.confirm_infeasible "auto"); beyond it the second solver
#: can take far longer than the first (GLPK on iJO1366, scripts/bench_engine.py).
CONFIRM_AUTO_LIMIT = 1000
#: Time limit of that second asking, s (at most the problem's own limit).
CONFIRM_TIME_LIMIT = 60.0


def verification(status: str, check: str, **details) -> dict:
    """The ``verification`` entry of a result.

    >>> verification("proven", "no point (HiGHS); confirmed by GLPK")["status"]
    'proven'
    """
    if status not in VERIFICATION_STATUSES:
        raise ValueError(f"unknown verification status {status!r}")
    return {"status": status, "check": check, **details}


def weakest(entries: list[dict], labels: list[str]) -> dict:
    """One verification for several answers: the weakest status among them (in the order
    certified/computed < proven < solver proof < best found) and each part's check, labelled.

    >>> weakest([{"status": "certified", "check": "a"}, {"status": "proven", "check": "b"}],
    ...         ["native", "h2_only"])["status"]
    'proven'
    """
    order = {"computed": 0, "certified": 0, "proven": 1, "solver proof": 2, "best found": 3}
    parts = [(label, e) for label, e in zip(labels, entries) if e]
    if not parts:
        return {}
    status = max((e["status"] for _, e in parts), key=lambda s: order.get(s, 4))
    return verification(status, "; ".join(f"{label}: {e['status']} ({e['check']})"
                                          for label, e in parts))


def certificate_words(certificate: Certificate, what: str = "the steady state") -> str:
    """What the independent check of one point verified, in plain words."""
    return (f"{what} passed the independent numpy check: mass balance {certificate.mass_balance_residual:.1e}"
            f" (tolerance {certificate.flux_tolerance:.1e}), flux and concentration bounds, "
            + (f"{certificate.carrier_checks} carrier state(s) ([cofactors]: ratios, pool totals, "
               "phosphorylation floor), " if certificate.carrier_checks else "")
            + f"and the second law on {certificate.n_flux_carrying} reaction(s) carrying flux (tolerance "
            f"{certificate.energy_tolerance:.1e} kJ/mol)")


def optimum_words(solution: Solution, objective: str, integral: bool = False) -> tuple[str, dict]:
    """Status and details of an optimum from the solver's bound: "proven" when the bound meets
    the value (for a count, when the bound rounded up does), else "best found"."""
    value, bound = solution.objective, solution.bound
    details: dict = {"objective": value, "bound": bound}
    if value is not None and bound is not None:
        gap = abs(value - bound)
        details["gap"] = gap / max(1.0, abs(value))
        closed = (gap < 0.5) if integral else details["gap"] <= 1e-6
    else:
        closed = solution.proven
        details["gap"] = 0.0 if closed else None
    if solution.proven and closed:
        return "proven", details
    return "best found", details


def confirm_infeasible(tm: ThermoModel, options: ProblemOptions, what: str,
                       on_point=None) -> tuple[str, str]:
    """Ask a yes/no question that one solver answered "no point" of the other solver.

    Returns (outcome, words): "confirmed" (no point either), "undetermined" (the other solver hit
    :data:`CONFIRM_TIME_LIMIT`), "skipped" (not asked: ``options.confirm_infeasible`` or the size
    rule of :data:`CONFIRM_AUTO_LIMIT`, or the other solver is not installed) or "point" (the
    other solver found a point, certified; ``on_point(problem, solution, certificate)`` is called
    with it while its problem exists, and the first answer was wrong).
    """
    import dataclasses

    from ..errors import UndeterminedError
    from ..problem.solvers import InfeasibleProblem, available_solvers, resolve_solver

    first = resolve_solver(options.solver)[0]
    other = "glpk" if first == "highs" else "highs"
    policy = options.confirm_infeasible
    if policy == "never" or (policy == "auto" and len(tm.energies) > CONFIRM_AUTO_LIMIT):
        return "skipped", (f"not re-asked of {other} (more than {CONFIRM_AUTO_LIMIT} reactions with "
                           "an energy)" if policy == "auto" else f"not re-asked of {other}")
    if other not in available_solvers():
        return "skipped", f"not re-asked: {other} is not installed"
    limit = min(CONFIRM_TIME_LIMIT, options.time_limit or CONFIRM_TIME_LIMIT)
    copy = dataclasses.replace(tm, model=tm.model.copy())
    second = dataclasses.replace(options, solver=other, time_limit=limit)
    with ThermoProblem(copy, second) as problem:
        try:
            solution = problem.solve(f"{what}, asked of {other}")
        except InfeasibleProblem:
            return "confirmed", f"confirmed by {other} (no point either)"
        except UndeterminedError:
            return "undetermined", f"{other} undetermined within {limit:g} s"
        certificate = certify(problem, solution)
        if on_point is not None:
            on_point(problem, solution, certificate)
    log.warning("%s: %s found no point but %s found a certified one; the certified point is the "
                "answer", what, first, other)
    return "point", f"{first} found no point, {other} found one (certified), which is the answer"


def provenance_of(tm: ThermoModel, options: ProblemOptions | None = None,
                  problem: ThermoProblem | None = None) -> dict:
    """Where the numbers come from: mode, environment, energy sources, options, solver."""
    sources = Counter(e.source for e in tm.energies.values())
    internal = [r.id for r in tm.internal_reactions()]
    missing = [rid for rid in internal if rid not in tm.energies]
    out = {
        "mode": tm.mode,
        "environment": tm.environment_name,
        "model": tm.model.id,
        "energy_sources": dict(sources),
        "reactions_without_energy": missing,
        "demand": tm.demand_id,
        "feed": dict(tm.feed_ids),
    }
    if options is not None:
        out["options"] = options.to_dict()
    if problem is not None:
        out["problem"] = problem.describe()
    return out


def certify(problem: ThermoProblem, solution: Solution, allowed_uphill: list[str] | None = None,
            min_driving_force: float | None = None) -> Certificate:
    """Run the independent numpy check on a solution; raises CertificateError when it fails."""
    return check_solution(problem.certificate_input(solution, allowed_uphill, min_driving_force))


def reaction_table(problem: ThermoProblem, solution: Solution, certificate: Certificate) -> pd.DataFrame:
    """Per reaction: flux, ΔrG'°, ΔrG' (recomputed by the certificate), direction (kJ/mol)."""
    standard = dict(zip(problem.energy_ids, problem.standard))
    recomputed = dict(zip(problem.energy_ids, certificate.recomputed_energies))
    rows = []
    for rid, v in zip(solution.reaction_ids, solution.fluxes):
        rows.append({
            "reaction": rid,
            "flux": float(v),
            "delta_g_standard_kJ_per_mol": standard.get(rid, float("nan")),
            "delta_g_kJ_per_mol": recomputed.get(rid, float("nan")),
            "direction": "forward" if v > certificate.flux_threshold else
            ("backward" if v < -certificate.flux_threshold else "none"),
            "has_energy": rid in standard,
        })
    return pd.DataFrame(rows)


def concentration_table(solution: Solution) -> pd.DataFrame:
    """Per compound with an activity term: its activity (mol/L over 1 mol/L; gases bar over
    1 bar) and the natural logarithm of it."""
    import numpy as np

    return pd.DataFrame({"compound": solution.metabolite_ids, "ln_activity": solution.log_conc,
                         "activity": np.exp(solution.log_conc)})
