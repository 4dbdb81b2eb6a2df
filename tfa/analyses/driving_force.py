"""Max-min driving force (MDF): the largest B such that every reaction carrying flux has
-ΔrG' >= B in its direction (Noor et al. 2014, PLoS Comput. Biol. 10:e1003483).

- fixed pathway (directions given): a linear program over ln c (and eps within k sigma),
  maximise B subject to d_j (ΔrG'°_j + eps_j + RT sum_i S_ij x_i) + B <= 0;
- network: the network chooses its flux pattern; a MILP on the thermodynamic flux problem with
  delta replaced by the variable B (the direction constraints of thermodynamics-based flux
  analysis, Henry, Broadbelt & Hatzimanikatis 2007, Biophys. J. 92:1792).
B > 0 means every step runs downhill by at least B kJ/mol; B < 0 means the least uphill that
the most uphill step can be made.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd
from optlang.symbolics import Zero

from ..errors import InputError, MissingDataError
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions, ThermoProblem
from ..problem.solvers import InfeasibleProblem, check_status, optimize, resolve_solver
from ..verify.certificate import CertificateInput, check_solution
from .results import (AnalysisResult, certificate_words, certify, concentration_table,
                      optimum_words, provenance_of, verification)

#: Bottleneck: a reaction whose -d g lies within this of B, kJ/mol.
BOTTLENECK_TOLERANCE = 1e-6


@dataclass(kw_only=True)
class DrivingForceResult(AnalysisResult):
    """Max-min driving force and the reactions that limit it.

    Attributes
    ----------
    driving_force : float
        B, kJ/mol.
    bottlenecks : list of str
        Reactions whose driving force equals B at the optimum.
    table : DataFrame
        Per reaction carrying flux: direction, flux, ΔrG' at the optimum and its driving force
        -d ΔrG' (kJ/mol).
    concentrations : DataFrame
        Activity of every compound at the optimum (and its logarithm).
    """

    driving_force: float = float("nan")
    bottlenecks: list[str] = field(default_factory=list)
    table: pd.DataFrame = field(default_factory=pd.DataFrame)
    concentrations: pd.DataFrame = field(default_factory=pd.DataFrame)

    solution: object | None = None
    analysis: str = "driving force"

    def to_frame(self) -> pd.DataFrame:
        return self.table

    def summary(self) -> str:
        return (f"max-min driving force {self.driving_force:.2f} kJ/mol; bottleneck(s): "
                f"{', '.join(self.bottlenecks) or 'none'}")


def pathway_driving_force(tm: ThermoModel, directions: dict[str, int],
                          options: ProblemOptions | None = None) -> DrivingForceResult:
    """MDF of a fixed pathway: reaction id -> +1 (forward) or -1 (backward). A linear program.

    Raises
    ------
    InputError
        For an unknown reaction or a direction other than +1/-1.
    MissingDataError
        For a reaction without an energy.
    """
    options = options or ProblemOptions()
    if not directions:
        raise InputError("the pathway is empty: give reaction ids with direction +1 or -1")
    ids = list(directions)
    for rid in ids:
        if rid not in tm.model.reactions:
            raise InputError(f"pathway reaction {rid} is not in the network")
        if directions[rid] not in (1, -1):
            raise InputError(f"pathway reaction {rid}: direction must be +1 or -1, got {directions[rid]!r}")
        if rid not in tm.energies:
            raise MissingDataError(f"pathway reaction {rid} has no energy; its driving force is unknown")
    rt = tm.RT
    no_activity = set(tm.no_activity)
    met_ids: list[str] = []
    m_index: dict[str, int] = {}
    t_rows, t_cols, t_vals = [], [], []
    for k, rid in enumerate(ids):
        for met, coef in tm.model.reactions.get_by_id(rid).metabolites.items():
            if met.id in no_activity:
                continue
            if met.id not in m_index:
                if met.id not in tm.log_bounds:
                    raise InputError(f"compound {met.id} has no concentration bounds; give them")
                m_index[met.id] = len(met_ids)
                met_ids.append(met.id)
            t_rows.append(k)
            t_cols.append(m_index[met.id])
            t_vals.append(float(coef))
    standard = np.array([tm.energies[r].standard for r in ids], float)
    sigma = np.array([abs(tm.energies[r].uncertainty or 0.0) for r in ids], float)
    lo = np.array([tm.log_bounds[m][0] for m in met_ids], float)
    hi = np.array([tm.log_bounds[m][1] for m in met_ids], float)
    for m, a, b in zip(met_ids, lo, hi):
        if a > b:
            raise InputError(f"compound {m}: contradictory concentration bounds (lower above upper)")
    d = np.array([directions[r] for r in ids], float)
    name, module = resolve_solver(options.solver)
    lp = module.Model()
    xs = [module.Variable(f"x_{i}", lb=float(a), ub=float(b)) for i, (a, b) in enumerate(zip(lo, hi))]
    width = options.uncertainty_k * sigma
    eps = [module.Variable(f"e_{j}", lb=-float(w), ub=float(w)) if w > 0 else None
           for j, w in enumerate(width)]
    bvar = module.Variable("B", lb=-1e5, ub=1e5)
    lp.add(xs + [e for e in eps if e is not None] + [bvar])
    cons = [module.Constraint(Zero, ub=float(-d[j] * standard[j]), name=f"mdf_{j}", sloppy=True)
            for j in range(len(ids))]
    lp.add(cons, sloppy=True)
    lp.update()
    coefs: list[dict] = [{bvar: 1.0} for _ in ids]
    for k, i, s in zip(t_rows, t_cols, t_vals):
        coefs[k][xs[i]] = coefs[k].get(xs[i], 0.0) + d[k] * rt * s
    for j, e in enumerate(eps):
        if e is not None:
            coefs[j][e] = float(d[j])
    for c, cf in zip(cons, coefs):
        c.set_linear_coefficients(cf)
    lp.objective = module.Objective(Zero, direction="max", sloppy=True)
    lp.objective.set_linear_coefficients({bvar: 1.0})
    status = optimize(lp, options.time_limit)
    check_status(status, "driving force of the pathway", options.time_limit)
    b = float(bvar.primal)
    x = np.array([v.primal for v in xs], float)
    e_val = np.array([v.primal if v is not None else 0.0 for v in eps], float)
    n = len(ids)
    cert = check_solution(CertificateInput(
        reaction_ids=ids, fluxes=d, flux_lower=-np.ones(n), flux_upper=np.ones(n),
        stoich_rows=np.zeros(0, int), stoich_cols=np.zeros(0, int), stoich_values=np.zeros(0),
        n_metabolites=0, metabolite_ids=met_ids, log_conc=x, log_lower=lo, log_upper=hi,
        energy_reaction_index=np.arange(n), standard=standard, sigma=sigma, slack=e_val,
        uncertainty_k=options.uncertainty_k, thermo_rows=np.array(t_rows, int),
        thermo_cols=np.array(t_cols, int), thermo_values=np.array(t_vals, float), rt=rt,
        min_driving_force=b, check_mass_balance=False))
    g = cert.recomputed_energies
    force = -d * g
    table = pd.DataFrame({"reaction": ids, "direction": ["forward" if v > 0 else "backward" for v in d],
                          "delta_g_kJ_per_mol": g, "driving_force_kJ_per_mol": force})
    result = DrivingForceResult(conditions=tm.conditions, driving_force=b,
                                bottlenecks=[r for r, f in zip(ids, force) if f - b < BOTTLENECK_TOLERANCE * 10 + 1e-6],
                                table=table,
                                concentrations=pd.DataFrame({"compound": met_ids, "ln_activity": x,
                                                             "activity": np.exp(x)}))
    result.provenance = provenance_of(tm, options)
    result.provenance["solver"] = name
    result.provenance["pathway"] = dict(directions)
    result.certificates.append(cert)
    result.verification = verification(
        "proven", certificate_words(cert, "the concentrations") + f"; the optimum of a linear "
        f"program ({name}), whose optimality its solver proves", bound=b, gap=0.0)
    return result


def network_driving_force(tm: ThermoModel, options: ProblemOptions | None = None) -> DrivingForceResult:
    """MDF of the network's best flux pattern meeting the demand (MILP).

    Raises
    ------
    InfeasibleProblem
        When no steady state meets the demand even ignoring thermodynamics.
    """
    options = replace(options or ProblemOptions(), driving_force=True, uphill=False)
    result = DrivingForceResult(conditions=tm.conditions)
    with ThermoProblem(tm, options) as problem:
        result.provenance = provenance_of(tm, options, problem)
        problem.set_objective({problem.b_var: 1.0}, "max")
        try:
            sol = problem.solve("max-min driving force of the network", accept_best=True)
        except InfeasibleProblem:
            from .demand import impossible_demand_message

            raise InfeasibleProblem(f"driving force: {impossible_demand_message(tm, problem.blocked_ids)}"
                                   ) from None
        b = float(sol.driving_force)
        cert = certify(problem, sol, min_driving_force=b)
        result.certificates.append(cert)
        status, details = optimum_words(sol, "B")
        result.verification = verification(
            status, certificate_words(cert) + f" at B = {b:.4g} kJ/mol; optimality: "
            f"{problem.solver_name}'s bound {details.get('bound')}", **details)
        g = cert.recomputed_energies
        index = problem.energy_reaction_index
        v = sol.fluxes[index]
        carrying = np.abs(v) > cert.flux_threshold
        d = np.sign(v)
        force = -d * g
        ids = np.array(problem.energy_ids)
        table = pd.DataFrame({"reaction": ids[carrying],
                              "direction": np.where(d[carrying] > 0, "forward", "backward"),
                              "flux": v[carrying], "delta_g_kJ_per_mol": g[carrying],
                              "driving_force_kJ_per_mol": force[carrying]})
        result.table = table
        result.solution = sol
        result.driving_force = b
        result.bottlenecks = list(table.loc[table["driving_force_kJ_per_mol"] - b < 1e-5, "reaction"])
        result.concentrations = concentration_table(sol)
        if not carrying.any():
            result.provenance["note"] = ("no reaction with an energy carries flux: the driving "
                                         "force is unconstrained and B is reported at its cap")
    return result
