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
    """

    conditions: Conditions
    provenance: dict = field(default_factory=dict)
    certificates: list[Certificate] = field(default_factory=list)

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
            "table": frame.to_dict(orient="records"),
        }


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
