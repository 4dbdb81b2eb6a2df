"""Ranges: minimum and maximum of every reaction's Delta_r G' and every compound's concentration
over the feasible set (thermodynamic variability analysis, Henry, Broadbelt & Hatzimanikatis
2007, Biophys. J. 92:1792). Two MILPs per quantity on one problem built once; each optimum is
certified. Units: kJ/mol and mol/L (or bar).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import pandas as pd

from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, ThermoProblem
from ..problem.solvers import InfeasibleProblem
from .results import AnalysisResult, certify, provenance_of


@dataclass(kw_only=True)
class RangesResult(AnalysisResult):
    """Per reaction: min/max Delta_r G'; per compound: min/max concentration."""

    reactions: pd.DataFrame = field(default_factory=pd.DataFrame)
    compounds: pd.DataFrame = field(default_factory=pd.DataFrame)
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

        def extreme(var, direction: str, what: str) -> float:
            problem.set_objective({var: 1.0}, direction)
            try:
                sol = problem.solve(what)
            except InfeasibleProblem:
                raise InfeasibleProblem(
                    "ranges: the network is infeasible, so there is no feasible set to range over "
                    "(run the feasibility analysis for the diagnosis)") from None
            result.certificates.append(certify(problem, sol))
            return float(sol.objective)

        rows = []
        for rid in r_ids:
            if rid not in r_index:
                continue
            g = problem.g_vars[r_index[rid]]
            rows.append({"reaction": rid,
                         "dg_min_kJ": extreme(g, "min", f"least Delta_r G' of {rid}"),
                         "dg_max_kJ": extreme(g, "max", f"largest Delta_r G' of {rid}")})
        result.reactions = pd.DataFrame(rows, columns=["reaction", "dg_min_kJ", "dg_max_kJ"])
        rows = []
        for cid in c_ids:
            if cid not in problem.metabolite_index:
                continue
            x = problem.x_vars[problem.metabolite_index[cid]]
            rows.append({"compound": cid,
                         "c_min": math.exp(extreme(x, "min", f"least concentration of {cid}")),
                         "c_max": math.exp(extreme(x, "max", f"largest concentration of {cid}"))})
        result.compounds = pd.DataFrame(rows, columns=["compound", "c_min", "c_max"])
    return result
