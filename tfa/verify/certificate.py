"""Independent check of every solution, with numpy alone (no solver, no optlang, no cobra).

The optimisation layer hands over plain arrays (:class:`CertificateInput`): the stoichiometric
matrix, the flux bounds, the concentration bounds, the standard reaction energies and the
returned fluxes, log concentrations and energy slacks. The check recomputes each reaction's
transformed Gibbs energy from the returned concentrations

    g_j = Delta_r G'deg_j + eps_j + RT * sum_i S_ij * ln c_i          (kJ/mol)

(Alberty 2003, eq. 4.1-4; the form used by Henry, Broadbelt & Hatzimanikatis 2007,
Biophys. J. 92:1792) and verifies, within stated tolerances:

1. mass balance: |S v|_inf <= 1e-6 s (steady state);
2. flux bounds: lower - 1e-6 s <= v <= upper + 1e-6 s;
3. concentration bounds: ln c_min <= x <= ln c_max (to 1e-6);
4. uncertainty slack: eps = A z with ||z||_1 <= k in compound space (or |eps_j| <= k sigma_j
   when no factor is given) (to 1e-6 E);
5. second law: a reaction carrying flux (|v| > 1e-9 s) forward has g_j <= -delta, backward
   g_j >= +delta (to 1e-6 E), except the reactions listed as allowed uphill (minimal uphill sets).

Every tolerance is relative to a scale handed over with the arrays: the flux scale s (the
largest required flux, :mod:`tfa.problem.scaling`), so that a demand of 1e-6 is checked as
strictly as one of 10, and the energy scale E (the largest |Delta_r G'| the concentration box
allows, at least 1 kJ/mol), the size of the numbers the solver balanced. A flux above 1e-9 s
counts as carried: the points checked come from linear programs whose closed directions are
fixed at zero flux, so a flux through a closed direction is an error, not noise.

A failed check raises :class:`tfa.errors.CertificateError`; a solution that fails is never a
result. This module imports nothing from ``tfa`` but :mod:`tfa.errors`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import CertificateError

#: Tolerance of the mass balance and flux bounds, relative to the flux scale.
FLUX_RELATIVE_TOLERANCE = 1e-6
#: A flux above this, relative to the flux scale, counts as carried (second law checked).
FLUX_CARRYING_TOLERANCE = 1e-9
#: Tolerance on recomputed reaction energies and slacks, relative to the energy scale (solver
#: feasibility 1e-9 on rows whose coefficients reach RT*|S| ~ 10 and big-M ~ the energy scale).
ENERGY_RELATIVE_TOLERANCE = 1e-6
#: Tolerance on log concentrations.
LOG_TOLERANCE = 1e-6


@dataclass
class CertificateInput:
    """Plain arrays describing one solution and the problem it claims to solve.

    Attributes
    ----------
    reaction_ids : list of str
        All reactions (columns of the stoichiometric matrix).
    fluxes, flux_lower, flux_upper : ndarray
        Net fluxes and their bounds (same order as ``reaction_ids``), any consistent unit.
    stoich_rows, stoich_cols, stoich_values : ndarray
        The full stoichiometric matrix in coordinate form (metabolite row, reaction column, coef).
    n_metabolites : int
        Number of rows of the full stoichiometric matrix.
    metabolite_ids : list of str
        Compounds with an activity term (the entries of ``log_conc``).
    log_conc, log_lower, log_upper : ndarray
        Returned ln c (mol/L or bar) and its bounds.
    energy_reaction_index : ndarray of int
        For each reaction with an energy, its column in ``reaction_ids``.
    standard, sigma, slack : ndarray
        Delta_r G'deg (kJ/mol), its standard uncertainty, and the returned slack eps.
    uncertainty_k : float
        Allowed slack in multiples of sigma.
    thermo_rows, thermo_cols, thermo_values : ndarray
        Activity stoichiometry in coordinate form (energy-reaction row, ``metabolite_ids`` column).
    rt : float
        R*T, kJ/mol.
    min_driving_force : float
        delta, kJ/mol: the least -g in the flux direction that counts as downhill
        (the max-min driving force B for driving-force solutions).
    allowed_uphill : list of str
        Reactions allowed to run against their gradient (minimal uphill set solutions).
    check_mass_balance : bool
        False for a fixed pathway (directions given, no steady state asked).
    flux_scale : float
        The flux scale s (units of the fluxes): flux tolerances are relative to it.
    energy_scale : float
        The energy scale E, kJ/mol: energy tolerances are relative to it.
    log_rows : list of (columns, coefficients, lower or None, upper or None, text)
        Linear rows on ln c beyond the bounds (carrier ratios, the phosphorylation floor):
        lower <= sum a_i x_i <= upper, checked to 1e-6.
    pools : list of (columns, total, allowed relative excess, text)
        Pool totals: sum_i exp(x_i) <= total (1 + excess), checked on the concentrations.
    slack_factor, slack_coordinates : ndarray or None
        A (reactions with an energy × sources) and z: with a factor, the slack must be
        eps = A z with ‖z‖₁ <= k (slack in compound space) instead of |eps_j| <= k sigma_j.
    """

    reaction_ids: list[str]
    fluxes: np.ndarray
    flux_lower: np.ndarray
    flux_upper: np.ndarray
    stoich_rows: np.ndarray
    stoich_cols: np.ndarray
    stoich_values: np.ndarray
    n_metabolites: int
    metabolite_ids: list[str]
    log_conc: np.ndarray
    log_lower: np.ndarray
    log_upper: np.ndarray
    energy_reaction_index: np.ndarray
    standard: np.ndarray
    sigma: np.ndarray
    slack: np.ndarray
    uncertainty_k: float
    thermo_rows: np.ndarray
    thermo_cols: np.ndarray
    thermo_values: np.ndarray
    rt: float
    min_driving_force: float
    allowed_uphill: list[str] = field(default_factory=list)
    check_mass_balance: bool = True
    flux_scale: float = 1.0
    energy_scale: float = 1.0
    log_rows: list = field(default_factory=list)
    pools: list = field(default_factory=list)
    slack_factor: np.ndarray | None = None
    slack_coordinates: np.ndarray | None = None


@dataclass
class Certificate:
    """Outcome of a passed check: the largest violation found in each test (all within tolerance)."""

    passed: bool
    mass_balance_residual: float
    flux_bound_violation: float
    concentration_bound_violation: float
    slack_violation: float
    second_law_violation: float
    flux_threshold: float
    n_flux_carrying: int
    recomputed_energies: np.ndarray
    uphill_reactions: list[str]
    flux_tolerance: float = 0.0
    energy_tolerance: float = 0.0
    carrier_checks: int = 0

    def summary(self) -> str:
        """One line for reports."""
        return (
            f"certificate passed: |Sv| = {self.mass_balance_residual:.2e}, "
            f"{self.n_flux_carrying} reactions carrying flux, "
            f"worst second-law excess {self.second_law_violation:.2e} kJ/mol"
        )

    def to_dict(self) -> dict:
        """Plain dictionary for JSON (without the recomputed energy array)."""
        return {
            "passed": self.passed,
            "mass_balance_residual": self.mass_balance_residual,
            "flux_bound_violation": self.flux_bound_violation,
            "concentration_bound_violation": self.concentration_bound_violation,
            "slack_violation": self.slack_violation,
            "second_law_violation": self.second_law_violation,
            "flux_threshold": self.flux_threshold,
            "flux_tolerance": self.flux_tolerance,
            "energy_tolerance_kJ": self.energy_tolerance,
            "n_flux_carrying": self.n_flux_carrying,
            "carrier_checks": self.carrier_checks,
            "uphill_reactions": list(self.uphill_reactions),
        }


def recompute_energies(data: CertificateInput) -> np.ndarray:
    """Transformed reaction energies g = Delta_r G'deg + eps + RT * S^T x, kJ/mol.

    Equation: Delta_r G' = Delta_r G'deg + RT sum_i nu_i ln a_i (Alberty 2003, eq. 4.1-4).

    Examples
    --------
    ATP hydrolysis, Delta_r G'deg = -32.5 kJ/mol at 298.15 K, pH 7 (Alberty 2003, table 8.2, from
    memory), with ATP at 3 mM, ADP at 0.3 mM and phosphate at 10 mM: Delta_r G' = -32.5 +
    RT ln(0.3e-3 * 10e-3 / 3e-3) = -32.5 - 17.1 = -49.6 kJ/mol.

    >>> import numpy as np
    >>> d = CertificateInput(["hyd"], np.zeros(1), np.zeros(1), np.zeros(1), np.zeros(0, int),
    ...     np.zeros(0, int), np.zeros(0), 0, ["atp", "adp", "pi"],
    ...     np.log([3e-3, 0.3e-3, 10e-3]), np.full(3, -20.0), np.zeros(3), np.array([0]),
    ...     np.array([-32.5]), np.array([0.3]), np.zeros(1), 0.0, np.zeros(3, int),
    ...     np.arange(3), np.array([-1.0, 1.0, 1.0]), 8.314462618e-3 * 298.15, 0.1)
    >>> round(float(recompute_energies(d)[0]), 1)
    -49.6
    """
    n_energy = len(data.energy_reaction_index)
    terms = np.asarray(data.thermo_values, float) * np.asarray(data.log_conc, float)[data.thermo_cols]
    activity = np.bincount(np.asarray(data.thermo_rows, int), weights=terms, minlength=n_energy)
    return np.asarray(data.standard, float) + np.asarray(data.slack, float) + data.rt * activity


def check_solution(data: CertificateInput) -> Certificate:
    """Check a solution independently of the solver; raise CertificateError when it fails.

    Returns
    -------
    Certificate
        The largest deviation found in each test (each within its tolerance).

    Raises
    ------
    CertificateError
        Naming each failed test, the worst offending reaction or compound, and the amount.
    """
    failures: list[str] = []
    v = np.asarray(data.fluxes, float)
    if not (np.isfinite(data.flux_scale) and data.flux_scale > 0):
        raise CertificateError(f"the flux scale must be positive, got {data.flux_scale}")
    flux_tol = FLUX_RELATIVE_TOLERANCE * data.flux_scale
    carrying = FLUX_CARRYING_TOLERANCE * data.flux_scale
    energy_tol = ENERGY_RELATIVE_TOLERANCE * max(1.0, data.energy_scale)

    # 1. steady state
    residual = 0.0
    if data.check_mass_balance and len(data.stoich_values):
        products = np.asarray(data.stoich_values, float) * v[np.asarray(data.stoich_cols, int)]
        sv = np.bincount(np.asarray(data.stoich_rows, int), weights=products,
                         minlength=data.n_metabolites)
        residual = float(np.max(np.abs(sv))) if sv.size else 0.0
        if residual > flux_tol:
            failures.append(f"mass balance: |S v| = {residual:.3g} in row {int(np.argmax(np.abs(sv)))} "
                            f"exceeds {flux_tol:.1g}")

    # 2. flux bounds
    lower = np.asarray(data.flux_lower, float)
    upper = np.asarray(data.flux_upper, float)
    bound_excess = np.maximum(lower - v, v - upper) if v.size else np.zeros(0)
    flux_violation = float(max(0.0, np.max(bound_excess))) if v.size else 0.0
    if flux_violation > flux_tol:
        j = int(np.argmax(bound_excess))
        failures.append(f"flux bounds: reaction {data.reaction_ids[j]} has flux {v[j]:.6g} outside "
                        f"[{lower[j]:.6g}, {upper[j]:.6g}]")

    # 3. concentration bounds
    x = np.asarray(data.log_conc, float)
    excess = np.maximum(np.asarray(data.log_lower) - x, x - np.asarray(data.log_upper)) if x.size \
        else np.zeros(0)
    conc_violation = float(max(0.0, np.max(excess))) if x.size else 0.0
    if conc_violation > LOG_TOLERANCE:
        i = int(np.argmax(excess))
        failures.append(f"concentration bounds: {data.metabolite_ids[i]} has ln c = {x[i]:.6g} outside "
                        f"[{data.log_lower[i]:.6g}, {data.log_upper[i]:.6g}]")

    # 3b. carrier states: linear rows on ln c and pool totals (on the concentrations themselves)
    for cols, coefs, lo, hi, text in data.log_rows:
        value = float(np.dot(np.asarray(coefs, float), x[np.asarray(cols, int)]))
        if (lo is not None and value < lo - LOG_TOLERANCE) or (hi is not None and value > hi + LOG_TOLERANCE):
            failures.append(f"carrier state: {text} fails (value {value:.6g})")
    for cols, total, excess, text in data.pools:
        value = float(np.sum(np.exp(x[np.asarray(cols, int)])))
        if value > total * (1.0 + excess):
            failures.append(f"carrier pool: {text} fails (the forms add up to {value:.6g} mol/L)")

    # 4. uncertainty slack
    slack = np.asarray(data.slack, float)
    factor = data.slack_factor
    if factor is not None and np.asarray(factor).size:
        z = np.asarray(data.slack_coordinates if data.slack_coordinates is not None else [], float)
        if z.shape != (np.asarray(factor).shape[1],):
            z = np.zeros(np.asarray(factor).shape[1])
        norm_excess = float(np.sum(np.abs(z)) - data.uncertainty_k)
        mismatch = np.abs(slack - np.asarray(factor, float) @ z) if slack.size else np.zeros(0)
        slack_violation = max(0.0, norm_excess, float(np.max(mismatch)) if mismatch.size else 0.0)
        if norm_excess > LOG_TOLERANCE:
            failures.append(f"uncertainty slack: the sources move by {np.sum(np.abs(z)):.6g} "
                            f"standard units in total, more than k = {data.uncertainty_k:g}")
        elif mismatch.size and float(np.max(mismatch)) > energy_tol:
            j = int(np.argmax(mismatch))
            rid = data.reaction_ids[int(data.energy_reaction_index[j])]
            failures.append(f"uncertainty slack: reaction {rid} uses {slack[j]:.4g} kJ/mol, not "
                            "the change its compounds' deviations give")
        slack_excess = np.zeros(0)
    else:
        allowed = data.uncertainty_k * np.asarray(data.sigma, float)
        slack_excess = np.abs(slack) - allowed
        slack_violation = float(max(0.0, np.max(slack_excess))) if slack.size else 0.0
    if slack_excess.size and slack_violation > energy_tol:
        j = int(np.argmax(slack_excess))
        rid = data.reaction_ids[int(data.energy_reaction_index[j])]
        failures.append(f"uncertainty slack: reaction {rid} uses {slack[j]:.4g} kJ/mol, more than "
                        f"k*sigma = {allowed[j]:.4g}")

    # 5. second law, from energies recomputed here
    g = recompute_energies(data)
    v_energy = v[np.asarray(data.energy_reaction_index, int)] if len(g) else np.zeros(0)
    uphill = set(data.allowed_uphill)
    ids = [data.reaction_ids[int(j)] for j in data.energy_reaction_index]
    exempt = np.array([rid in uphill for rid in ids], dtype=bool)
    forward = (v_energy > carrying) & ~exempt
    backward = (v_energy < -carrying) & ~exempt
    delta = data.min_driving_force
    excess_g = np.zeros(len(g))
    excess_g[forward] = g[forward] + delta
    excess_g[backward] = delta - g[backward]
    law_violation = float(max(0.0, np.max(excess_g))) if len(g) else 0.0
    if law_violation > energy_tol:
        bad = np.flatnonzero(excess_g > energy_tol)
        worst = bad[np.argsort(-excess_g[bad])][:5]
        listed = ", ".join(f"{ids[j]} (flux {v_energy[j]:.4g}, Delta_r G' = {g[j]:.3f} kJ/mol)"
                           for j in worst)
        failures.append(f"second law: {len(bad)} reaction(s) carry flux up their gradient "
                        f"(required |Delta_r G'| >= {delta:.3g} kJ/mol downhill): {listed}")

    if failures:
        raise CertificateError("the solution failed its independent check, so it is not reported: "
                               + "; ".join(failures))
    n_carrying = int(np.sum(np.abs(v_energy) > carrying)) if len(g) else 0
    return Certificate(True, residual, flux_violation, conc_violation, slack_violation,
                       law_violation, carrying, n_carrying, g, sorted(uphill), flux_tol, energy_tol,
                       len(data.log_rows) + len(data.pools))
