"""The thermodynamic flux problem on the cobra model's optlang problem, built in bulk.

Formulation (thermodynamics-based flux analysis, Henry, Broadbelt & Hatzimanikatis 2007,
Biophys. J. 92:1792; the binary direction variables are those of loopless flux balance,
Schellenberger, Lewis & Palsson 2011, Biophys. J. 100:544). Units: kJ/mol, ln(mol/L) or ln(bar).

- x_i = ln c_i for every compound with an activity term, within its log bounds (fed compounds
  have lower == upper);
- g_j = ΔrG'°_j + eps_j + RT sum_i S_ij x_i for every internal reaction with an energy;
  the slack lives in compound space, eps = A z with ||z||_1 <= k (A the factor of the energies
  over their named sources, :mod:`tfa.network.compound_space`), so it moves formation energies,
  never one reaction alone;
- binaries f_j, b_j: v_fwd_j <= U_j f_j, v_rev_j <= L_j b_j, f_j + b_j <= 1;
- g_j <= -delta + M_f,j (1 - f_j) and -g_j <= -delta + M_b,j (1 - b_j), M from interval bounds
  (:mod:`tfa.problem.bigm`), never a blanket constant;
- optional: uphill binaries u_j (v_fwd_j <= U_j (f_j + u_j), v_rev_j <= L_j (b_j + u_j)) for the
  minimal uphill set; a driving-force variable B replacing delta (max-min driving force,
  Noor et al. 2014, PLoS Comput. Biol. 10:e1003483).

The problem is built once; scans change only variable bounds, and a run over many draws of the
energies changes only the energies' right-hand sides, the g bounds and the big-M coefficients
(:meth:`ThermoProblem.set_standard`, on a problem built with an ``energy_spread`` that covers the
draws). Every variable and constraint added is removed again by :meth:`ThermoProblem.remove` (or
on leaving a ``with`` block).
"""

from __future__ import annotations

import logging
import math
import time
from typing import Mapping

import numpy as np
from optlang.symbolics import Zero

from ..errors import InputError, MissingDataError
from ..network.thermo_model import ThermoModel
from ..verify.certificate import CertificateInput
from .bigm import direction_big_m, energy_intervals
from .concentration_rows import concentration_rows
from .bulk import remove_rows_and_columns, set_rows
from .flux_ranges import flux_caps, steady_state_flux_ranges
from .scaling import flux_scale, scaled_bounds
from .options import (FLUX_RANGES_AUTO_LIMIT, GLPK_FEASIBILITY_PUMP, HIGHS_HEURISTIC_EFFORT,
                      SOLVER_TOLERANCES, ProblemOptions, Solution)
from .energy_change import EnergyChange
from .search import PointSearch
from .solvers import use_solver

log = logging.getLogger(__name__)

class ThermoProblem(PointSearch, EnergyChange):
    """The thermodynamic flux problem attached to a ThermoModel's cobra model.

    Use as a context manager (or call :meth:`remove`) so the model is left as it was;
    tests/test_engine_small.py solves hand-derived networks with it.
    """

    def __init__(self, thermo_model: ThermoModel, options: ProblemOptions | None = None, *,
                 energy_spread: Mapping[str, float] | None = None) -> None:
        """``energy_spread``: reaction id -> how far its ΔrG'° may later move (kJ/mol, >= 0)
        through :meth:`set_standard`; the rows and directions are built for the widened
        intervals and then tightened to the energies of now."""
        self.thermo_model = thermo_model
        self.options = options or ProblemOptions()
        self._energy_spread = energy_spread
        self.model = thermo_model.model
        started = time.perf_counter()
        self.solver_name = use_solver(self.model, self.options.solver)
        self.solver = self.model.solver
        self.tolerances = SOLVER_TOLERANCES.get(self.solver_name, SOLVER_TOLERANCES["glpk"])
        self._variables: list = []
        self._constraints: list = []
        self._extra_constraints: list = []
        self._saved_bounds: list[tuple] = []
        self._saved_objective = self.solver.objective
        self._removed = False
        self._collect_arrays()
        self._build()
        self.build_seconds = time.perf_counter() - started
        log.info("built the thermodynamic problem (%d reactions with energy, %d compounds) in %.2f s",
                 len(self.energy_ids), len(self.metabolite_ids), self.build_seconds)

    # ------------------------------------------------------------------ arrays
    def _collect_arrays(self) -> None:
        tm, opts = self.thermo_model, self.options
        model = self.model
        self.reactions = list(model.reactions)
        self.reaction_ids = [r.id for r in self.reactions]
        self.reaction_index = {rid: j for j, rid in enumerate(self.reaction_ids)}
        metabolites = list(model.metabolites)
        met_index = {m.id: i for i, m in enumerate(metabolites)}
        self.n_metabolites = len(metabolites)
        rows, cols, vals = [], [], []
        for j, r in enumerate(self.reactions):
            if r.lower_bound > r.upper_bound:
                raise InputError(f"reaction {r.id}: lower flux bound {r.lower_bound} exceeds upper bound "
                                 f"{r.upper_bound}; fix the bounds in the network or environment")
            if not (math.isfinite(r.lower_bound) and math.isfinite(r.upper_bound)):
                raise InputError(f"reaction {r.id}: flux bounds must be finite for the direction "
                                 "constraints; give finite bounds (e.g. -1000, 1000)")
            for met, coef in r.metabolites.items():
                rows.append(met_index[met.id])
                cols.append(j)
                vals.append(float(coef))
        self.stoich = (np.array(rows, int), np.array(cols, int), np.array(vals, float))

        # one classification for the whole problem: only internal reactions have an energy, so
        # only they fall under the unknown-energy policy (never the demand, exchanges or sinks)
        self.reaction_kinds = tm.reaction_kinds()
        self.energy_ids = []
        self.unknown_energy_ids = []
        for r in self.reactions:
            kind = self.reaction_kinds[r.id]
            if kind != "internal":
                if r.id in tm.energies:
                    log.warning("%s reaction %s carries an energy; it is ignored", kind, r.id)
                continue
            (self.energy_ids if r.id in tm.energies else self.unknown_energy_ids).append(r.id)
        if opts.unknown_energy == "block":
            for rid in self.unknown_energy_ids:
                r = model.reactions.get_by_id(rid)
                if r.lower_bound > 0 or r.upper_bound < 0:
                    raise InputError(f"reaction {rid} has no energy and its bounds ({r.lower_bound:g}, "
                                     f"{r.upper_bound:g}) require flux, so the 'block' policy cannot "
                                     "block it; give it an energy or use the 'free' policy")
        lower, upper = self.flux_bounds()
        self.flux_scale = flux_scale(lower, upper, self.reaction_ids)
        self.scaled_lower, self.scaled_upper = scaled_bounds(lower, upper, self.flux_scale)
        standard = []
        sigma = []
        for rid in self.energy_ids:
            e = tm.energies[rid]
            if e.standard is None or not math.isfinite(e.standard):
                raise MissingDataError(f"reaction {rid}: its standard energy is not a number; give a "
                                       "value or remove it from the energies so it is treated as unknown")
            s = 0.0 if e.uncertainty is None or not math.isfinite(e.uncertainty) else abs(e.uncertainty)
            standard.append(float(e.standard))
            sigma.append(s)
        self.standard = np.array(standard, float)
        self.sigma = np.array(sigma, float)
        self.energy_reaction_index = np.array([self.reaction_index[r] for r in self.energy_ids], int)

        no_activity = set(tm.no_activity)
        self.metabolite_ids = []
        m_index: dict[str, int] = {}
        t_rows, t_cols, t_vals = [], [], []
        for k, rid in enumerate(self.energy_ids):
            for met, coef in model.reactions.get_by_id(rid).metabolites.items():
                if met.id in no_activity:
                    continue
                if met.id not in m_index:
                    m_index[met.id] = len(self.metabolite_ids)
                    self.metabolite_ids.append(met.id)
                t_rows.append(k)
                t_cols.append(m_index[met.id])
                t_vals.append(float(coef))
        self.metabolite_index = m_index
        self.thermo = (np.array(t_rows, int), np.array(t_cols, int), np.array(t_vals, float))
        lo, hi = [], []
        for mid in self.metabolite_ids:
            bounds = opts.log_bound_overrides.get(mid, tm.log_bounds.get(mid))
            if bounds is None:
                raise InputError(f"compound {mid} has no concentration bounds; give conc_min and "
                                 "conc_max for it (or a default range in the environment)")
            a, b = float(bounds[0]), float(bounds[1])
            if not (math.isfinite(a) and math.isfinite(b)):
                raise InputError(f"compound {mid}: concentration bounds must be positive and finite, "
                                 f"got ln bounds ({a}, {b})")
            if a > b + 1e-12:
                raise InputError(f"compound {mid}: contradictory concentration bounds, lower "
                                 f"{math.exp(a):.3g} > upper {math.exp(b):.3g}; swap or fix them")
            lo.append(a)
            hi.append(max(a, b))
        self.envelope_lower = np.array(lo, float)
        self.envelope_upper = np.array(hi, float)
        self._compound_slack(tm, opts)
        self.built_standard = self.standard.copy()
        spread = dict(self._energy_spread or {})
        self.energy_spread = np.array([float(spread.get(rid, 0.0)) for rid in self.energy_ids])
        if not np.all(self.energy_spread >= 0):
            raise InputError("energy_spread: every half-width must be a number >= 0 (kJ/mol)")
        self.g_lower, self.g_upper = energy_intervals(
            self.standard, self.slack_width + self.energy_spread, *self.thermo,
            self.envelope_lower, self.envelope_upper, tm.RT)
        self.big_m = direction_big_m(self.g_lower, self.g_upper, opts.min_driving_force)
        reach = float(np.max(np.maximum(-self.g_lower, self.g_upper))) if len(self.energy_ids) else 0.0
        if len(self.energy_ids) and not opts.driving_force and opts.min_driving_force > reach:
            raise InputError(f"the least driving force {opts.min_driving_force:g} kJ/mol is larger than "
                             f"any |ΔrG'| the reactions can reach within their concentration "
                             f"bounds (at most {reach:.4g} kJ/mol), so no reaction could run; choose a "
                             "smaller --min-driving-force")
        #: Energy scale of the certificate's tolerance: the largest |ΔrG'| in the box, kJ/mol.
        self.energy_scale = max(1.0, reach)

    def _compound_slack(self, tm: ThermoModel, opts: ProblemOptions) -> None:
        """The uncertainty slack in compound space: eps = A z with ‖z‖₁ <= k.

        A = [N F | R] is the factor of the reaction energies over their named sources
        (:func:`tfa.network.compound_space.energy_covariance`), z the sources' deviations in units
        of their σ. Every allowed eps is a change of the compounds' formation energies (and of
        values that stand alone), so the slack can never make a set of reactions with zero net
        stoichiometry (a loop) all downhill: Σ eps over the loop is 0 like Σ ΔrG'°. The L1 ball
        keeps the problem a MILP; a single source can move by k σ, and eps_j stays within
        k·max_s |A_js| (the half-width used for the big-M bounds).
        """
        self.slack_factor = np.zeros((len(self.energy_ids), 0))
        self.slack_names: list[str] = []
        self.slack_labels: list[str] = []
        if opts.uncertainty_k <= 0 or not self.energy_ids:
            self.slack_width = np.zeros(len(self.energy_ids))
            return
        from ..network.compound_space import energy_covariance

        cov = energy_covariance(tm, reaction_ids=self.energy_ids)
        factor = cov.factor
        keep = np.flatnonzero(np.any(np.abs(factor) > 0.0, axis=0))
        self.slack_factor = factor[:, keep]
        self.slack_names = [cov.factor_names[i] for i in keep]
        labels = cov.factor_labels
        self.slack_labels = [labels[i] for i in keep]
        self.slack_width = (opts.uncertainty_k * np.max(np.abs(self.slack_factor), axis=1)
                            if keep.size else np.zeros(len(self.energy_ids)))

    # ------------------------------------------------------------------ build
    def _build(self) -> None:
        opts, solver, rt = self.options, self.solver, self.thermo_model.RT
        iface = solver.interface
        var = iface.Variable
        n_e = len(self.energy_ids)
        self.x_vars = [var(f"tfa_x_{i}", lb=a, ub=b)
                       for i, (a, b) in enumerate(zip(self.envelope_lower, self.envelope_upper))]
        self.g_vars = [var(f"tfa_g_{j}", lb=float(self.g_lower[j]), ub=float(self.g_upper[j]))
                       for j in range(n_e)]
        self.eps_vars = [var(f"tfa_e_{j}", lb=-float(w), ub=float(w)) if w > 0 else None
                         for j, w in enumerate(self.slack_width)]
        k = float(opts.uncertainty_k)
        n_z = self.slack_factor.shape[1]
        self.z_plus = [var(f"tfa_zp_{s}", lb=0.0, ub=k) for s in range(n_z)]
        self.z_minus = [var(f"tfa_zn_{s}", lb=0.0, ub=k) for s in range(n_z)]
        flux_lower, flux_upper = self.scaled_lower, self.scaled_upper   # in units of the flux scale
        bound_fwd = np.maximum(flux_upper[self.energy_reaction_index], 0.0)
        bound_bwd = np.maximum(-flux_lower[self.energy_reaction_index], 0.0)
        upper, lower = self._flux_caps(flux_lower, flux_upper, bound_fwd, bound_bwd)
        self.flux_cap_forward, self.flux_cap_backward = upper, lower
        if opts.driving_force:
            fwd_ok = upper > 0
            bwd_ok = lower > 0
        else:
            fwd_ok = self.big_m.forward_possible & (upper > 0)
            bwd_ok = self.big_m.backward_possible & (lower > 0)
        # 0/1 variables are declared integer in [0, 1] (GLPK resets the bounds of a "binary"
        # column to [0, 1], which would undo the fixing of an impossible direction at 0)
        self.f_vars = [var(f"tfa_f_{j}", lb=0, ub=1 if fwd_ok[j] else 0, type="integer")
                       for j in range(n_e)]
        self.b_vars = [var(f"tfa_b_{j}", lb=0, ub=1 if bwd_ok[j] else 0, type="integer")
                       for j in range(n_e)]
        self.u_vars = ([var(f"tfa_u_{j}", lb=0, ub=1, type="integer") for j in range(n_e)]
                       if opts.uphill else [])
        self.b_var = None
        if opts.driving_force:
            g_abs = float(np.max(np.maximum(-self.g_lower, self.g_upper))) if n_e else 1.0
            self.driving_force_upper = max(g_abs, opts.min_driving_force)
            self.b_var = var("tfa_B", lb=-self.driving_force_upper - 1.0, ub=self.driving_force_upper)
        share_vars, carrier_rows, self.concentration_checks = concentration_rows(self, var)
        new_vars = (self.x_vars + self.g_vars + [v for v in self.eps_vars if v is not None]
                    + self.z_plus + self.z_minus
                    + self.f_vars + self.b_vars + self.u_vars
                    + ([self.b_var] if self.b_var is not None else []) + share_vars)
        solver.add(new_vars)
        self._variables = new_vars
        if self.solver_name == "highs":
            # measured on iJO1366 with synthetic energies (scripts/bench_engine.py), zero-
            # objective feasibility MILP: without presolve 23 s with HiGHS's default heuristic
            # effort (0.05), 6.7 s with 0.25; with presolve (now on) seeds 20240601 / 11 took
            # 1.3 / 6.0 s with 0.05, 2.1 / 5.1 s with 0.25, 1.5 / 5.6 s with 1.0: kept at 0.25
            solver.problem.settings.setdefault("highs_options", {})["mip_heuristic_effort"] = \
                HIGHS_HEURISTIC_EFFORT
        elif self.solver_name == "glpk":
            _tune_glpk(solver)
        tolerances = solver.configuration.tolerances
        for name, value in self.tolerances.items():
            try:
                setattr(tolerances, name, value)
            except Exception:  # noqa: BLE001 - an interface without that tolerance keeps its own
                log.debug("solver %s has no %s tolerance", self.solver_name, name)

        con = iface.Constraint
        rows: list[tuple] = list(carrier_rows)   # (name, lb, ub, coefficients)
        t_rows, t_cols, t_vals = self.thermo
        per_reaction: list[dict] = [dict() for _ in range(n_e)]
        for k, i, s in zip(t_rows, t_cols, t_vals):
            d = per_reaction[k]
            xv = self.x_vars[i]
            d[xv] = d.get(xv, 0.0) - rt * s
        delta = opts.min_driving_force
        b_hi = getattr(self, "driving_force_upper", 0.0)
        definition_rows: list[int] = []
        direction_rows: dict[tuple[int, int], int] = {}
        self.direction_open = (np.asarray(fwd_ok, bool), np.asarray(bwd_ok, bool))
        for j in range(n_e):
            rid = self.energy_ids[j]
            reaction = self.reactions[self.energy_reaction_index[j]]
            coefs = per_reaction[j]
            coefs[self.g_vars[j]] = 1.0
            if self.eps_vars[j] is not None:
                coefs[self.eps_vars[j]] = -1.0
            std = float(self.standard[j])
            definition_rows.append(len(rows))
            rows.append((f"tfa_def_{j}", std, std, coefs))
            u = self.u_vars[j] if self.u_vars else None
            # a row wherever the bound lets flux through; a cap of 0 (no steady state uses the
            # direction) makes it v <= 0
            if bound_fwd[j] > 0:
                c = {reaction.forward_variable: 1.0, self.f_vars[j]: -float(upper[j])}
                if u is not None:
                    c[u] = -float(upper[j])
                rows.append((f"tfa_fwd_{j}", None, 0.0, c))
            if bound_bwd[j] > 0:
                c = {reaction.reverse_variable: 1.0, self.b_vars[j]: -float(lower[j])}
                if u is not None:
                    c[u] = -float(lower[j])
                rows.append((f"tfa_rev_{j}", None, 0.0, c))
            if upper[j] > 0 and lower[j] > 0:
                rows.append((f"tfa_dir_{j}", None, 1.0, {self.f_vars[j]: 1.0, self.b_vars[j]: 1.0}))
            if opts.driving_force:
                if fwd_ok[j]:
                    m = float(self.g_upper[j]) + b_hi
                    rows.append((f"tfa_gf_{j}", None, m,
                                 {self.g_vars[j]: 1.0, self.b_var: 1.0, self.f_vars[j]: m}))
                if bwd_ok[j]:
                    m = b_hi - float(self.g_lower[j])
                    rows.append((f"tfa_gb_{j}", None, m,
                                 {self.g_vars[j]: -1.0, self.b_var: 1.0, self.b_vars[j]: m}))
            else:
                m_f = float(self.big_m.forward[j])
                m_b = float(self.big_m.backward[j])
                if fwd_ok[j] and m_f > 0:
                    direction_rows[(j, 1)] = len(rows)
                    rows.append((f"tfa_gf_{j}", None, m_f - delta, {self.g_vars[j]: 1.0, self.f_vars[j]: m_f}))
                if bwd_ok[j] and m_b > 0:
                    direction_rows[(j, -1)] = len(rows)
                    rows.append((f"tfa_gb_{j}", None, m_b - delta, {self.g_vars[j]: -1.0, self.b_vars[j]: m_b}))
            del rid
        if self.z_plus:
            for j, e in enumerate(self.eps_vars):
                if e is None:
                    continue
                c = {e: 1.0}
                for s_ in np.flatnonzero(self.slack_factor[j]):
                    c[self.z_plus[s_]] = -float(self.slack_factor[j, s_])
                    c[self.z_minus[s_]] = float(self.slack_factor[j, s_])
                rows.append((f"tfa_slack_{j}", 0.0, 0.0, c))
            rows.append(("tfa_slack_norm", None, float(opts.uncertainty_k),
                         {v: 1.0 for v in self.z_plus + self.z_minus}))
        constraints = [con(Zero, lb=lb, ub=ub, name=name, sloppy=True) for name, lb, ub, _ in rows]
        solver.add(constraints, sloppy=True)
        solver.update()
        self._constraints = constraints
        set_rows(solver, constraints, [r[3] for r in rows])
        self._definition_rows = [constraints[i] for i in definition_rows]
        self._direction_rows = {key: constraints[i] for key, i in direction_rows.items()}

        self._set_scaled_flux_bounds()
        self.set_objective({})
        if np.any(self.energy_spread > 0):
            self.set_standard(self.standard)

    def _set_scaled_flux_bounds(self) -> None:
        """Give the flux columns the scaled bounds (:mod:`tfa.problem.scaling`; the unknown-energy
        policy included); the cobra reactions keep their own bounds, restored on removal."""
        for r, lo, hi in zip(self.reactions, self.scaled_lower, self.scaled_upper):
            lo, hi = float(lo), float(hi)
            for v, a, b in ((r.forward_variable, max(lo, 0.0), max(hi, 0.0)),
                            (r.reverse_variable, max(-hi, 0.0), max(-lo, 0.0))):
                if v.lb != a or v.ub != b:
                    self._saved_bounds.append((v, v.lb, v.ub))
                    v.set_bounds(a, b)

    # ------------------------------------------------------------------ changes
    def set_objective(self, coefficients: dict, direction: str = "min") -> None:
        """Replace the objective by a linear one (empty: a pure feasibility problem, whose
        answer is the first point found)."""
        self._objective_is_zero = not coefficients
        objective = self.solver.interface.Objective(Zero, direction=direction, sloppy=True)
        self.solver.objective = objective
        if coefficients:
            objective.set_linear_coefficients(coefficients)
        self.solver.update()

    def set_log_bounds(self, metabolite_id: str, lower: float, upper: float) -> None:
        """Change the ln-concentration bounds of one compound within its build-time envelope."""
        try:
            i = self.metabolite_index[metabolite_id]
        except KeyError:
            raise InputError(f"compound {metabolite_id} has no activity term in any reaction with an "
                             "energy, so its concentration does not matter here") from None
        lo_env, hi_env = self.envelope_lower[i], self.envelope_upper[i]
        if lower < lo_env - 1e-9 or upper > hi_env + 1e-9:
            raise InputError(f"compound {metabolite_id}: bounds ({math.exp(lower):.3g}, "
                             f"{math.exp(upper):.3g}) lie outside the range the problem was built for "
                             f"({math.exp(lo_env):.3g}, {math.exp(hi_env):.3g}); rebuild with "
                             "log_bound_overrides covering them")
        if lower > upper:
            raise InputError(f"compound {metabolite_id}: lower bound above upper bound")
        xv = self.x_vars[i]
        xv.set_bounds(float(lower), float(upper))

    def fix_slack(self, z: np.ndarray | None) -> None:
        """Fix the sources' deviations at ``z`` (σ units; None frees them again), so one built
        problem answers for the energies ḡ + A z: ‖z‖₁ must stay within the k it was built with
        (the big-M bounds cover that ball)."""
        if z is None:
            for v in self.z_plus + self.z_minus:
                v.set_bounds(0.0, float(self.options.uncertainty_k))
            return
        z = np.asarray(z, float)
        if z.shape != (len(self.z_plus),):
            raise InputError(f"fix_slack: {len(self.z_plus)} deviations expected, got {z.shape}")
        if float(np.sum(np.abs(z))) > self.options.uncertainty_k + 1e-9:
            raise InputError(f"fix_slack: ‖z‖₁ = {np.sum(np.abs(z)):.4g} exceeds the k = "
                             f"{self.options.uncertainty_k:g} the problem was built for")
        for p, m, value in zip(self.z_plus, self.z_minus, z):
            p.set_bounds(max(float(value), 0.0), max(float(value), 0.0))
            m.set_bounds(max(-float(value), 0.0), max(-float(value), 0.0))

    def log_bounds_of(self, metabolite_id: str) -> tuple[float, float]:
        """Current (ln lo, ln hi) of one compound."""
        xv = self.x_vars[self.metabolite_index[metabolite_id]]
        return float(xv.lb), float(xv.ub)

    def start_from_last_point(self) -> bool:
        """Hand the point of the last solve (a point of the problem, e.g. from
        :meth:`solve_fixed`) to the next mixed-integer solve as its starting point (HiGHS; GLPK
        takes none through this interface). Returns whether the solver took it."""
        values = getattr(self, "_last_values", None)
        if self.solver_name != "highs" or not values:
            return False
        self.solver.problem.settings["mip_start"] = dict(values)
        return True

    def add_constraint(self, coefficients: dict, lb: float | None, ub: float | None, name: str):
        """Add a linear constraint (integer cuts, fixed directions); removed with the problem."""
        c = self.solver.interface.Constraint(Zero, lb=lb, ub=ub, name=name, sloppy=True)
        self.solver.add([c], sloppy=True)
        self.solver.update()
        c.set_linear_coefficients(coefficients)
        self._extra_constraints.append(c)
        return c

    def remove_constraint(self, constraint) -> None:
        """Remove a constraint added by :meth:`add_constraint`."""
        self.solver.remove([constraint])
        self._extra_constraints.remove(constraint)

    @property
    def blocked_ids(self) -> list[str]:
        """Reactions the problem holds at zero flux: those without an energy under the "block"
        policy (none under "free")."""
        return list(self.unknown_energy_ids) if self.options.unknown_energy == "block" else []

    # ------------------------------------------------------------------ solve
    def flux_bounds(self) -> tuple[np.ndarray, np.ndarray]:
        """Lower and upper flux bounds of every reaction as the problem sees them (read from the
        cobra model; zero for reactions without an energy under the "block" policy)."""
        lower = np.array([r.lower_bound for r in self.reactions], float)
        upper = np.array([r.upper_bound for r in self.reactions], float)
        for rid in self.blocked_ids:
            j = self.reaction_index[rid]
            lower[j] = upper[j] = 0.0
        return lower, upper

    def _flux_caps(self, flux_lower, flux_upper, bound_fwd, bound_bwd) -> tuple[np.ndarray, np.ndarray]:
        """U_j, L_j of the direction rows per :attr:`ProblemOptions.flux_caps`."""
        policy = self.options.flux_caps
        if policy == "auto":
            small = len(self.energy_ids) <= FLUX_RANGES_AUTO_LIMIT
            policy = "ranges" if self.solver_name == "glpk" and small else "bounds"
        self.flux_cap_policy = "bounds"
        if policy == "bounds":
            return bound_fwd, bound_bwd
        started = time.perf_counter()
        ranges = steady_state_flux_ranges(*self.stoich, self.n_metabolites, flux_lower, flux_upper,
                                          self.energy_reaction_index, self.options.time_limit)
        if ranges is None:   # no steady state at all: the solve will say so in plain words
            return bound_fwd, bound_bwd
        self.flux_cap_policy = "ranges"
        log.info("flux caps from steady-state flux ranges in %.2f s", time.perf_counter() - started)
        return flux_caps(*ranges, bound_fwd, bound_bwd)

    # ------------------------------------------------------------------ certificate
    def certificate_input(self, solution: Solution, allowed_uphill: list[str] | None = None,
                          min_driving_force: float | None = None) -> CertificateInput:
        """Plain arrays for :func:`tfa.verify.certificate.check_solution` (bounds read from the
        cobra model and the current compound bounds, energies from the ThermoModel)."""
        lower, upper = self.flux_bounds()
        x_lo = np.array([v.lb for v in self.x_vars], float)
        x_hi = np.array([v.ub for v in self.x_vars], float)
        delta = self.options.min_driving_force if min_driving_force is None else min_driving_force
        return CertificateInput(
            reaction_ids=list(self.reaction_ids), fluxes=solution.fluxes, flux_lower=lower,
            flux_upper=upper, stoich_rows=self.stoich[0], stoich_cols=self.stoich[1],
            stoich_values=self.stoich[2], n_metabolites=self.n_metabolites,
            metabolite_ids=list(self.metabolite_ids), log_conc=solution.log_conc, log_lower=x_lo,
            log_upper=x_hi, energy_reaction_index=self.energy_reaction_index,
            standard=self.standard, sigma=self.sigma, slack=solution.slack,
            uncertainty_k=self.options.uncertainty_k, slack_factor=self.slack_factor,
            slack_coordinates=solution.slack_coordinates, thermo_rows=self.thermo[0],
            thermo_cols=self.thermo[1], thermo_values=self.thermo[2], rt=self.thermo_model.RT,
            min_driving_force=delta, allowed_uphill=list(allowed_uphill or []),
            flux_scale=self.flux_scale, energy_scale=self.energy_scale,
            log_rows=self.concentration_checks.rows, pools=self.concentration_checks.pools)

    # ------------------------------------------------------------------ cleanup
    def remove(self) -> None:
        """Take every variable and constraint of this problem off the model; restore bounds and
        the objective."""
        if self._removed:
            return
        self._removed = True
        solver = self.solver
        for v, lb, ub in reversed(self._saved_bounds):
            v.set_bounds(lb, ub)
        try:
            solver.objective = self._saved_objective
        except Exception:  # noqa: BLE001 - the saved objective may reference removed variables
            solver.objective = solver.interface.Objective(Zero, sloppy=True)
        remove_rows_and_columns(solver, self._extra_constraints + self._constraints, self._variables)

    def __enter__(self) -> "ThermoProblem":
        return self

    def __exit__(self, *exc) -> None:
        self.remove()

    def describe(self) -> dict:
        """Size and provenance of the problem, for reports."""
        return {
            "solver": self.solver_name,
            "reactions_with_energy": len(self.energy_ids),
            "reactions_without_energy": list(self.unknown_energy_ids),
            "unknown_energy_policy": self.options.unknown_energy,
            "flux_caps": self.flux_cap_policy,
            "compounds_with_activity": len(self.metabolite_ids),
            "build_seconds": self.build_seconds,
        }


def _tune_glpk(solver) -> None:
    """Set GLPK's feasibility pump heuristic for the MILPs (see GLPK_FEASIBILITY_PUMP)."""
    iocp = getattr(solver.configuration, "_iocp", None)
    if iocp is None:
        return
    import swiglpk

    iocp.fp_heur = swiglpk.GLP_ON if GLPK_FEASIBILITY_PUMP else swiglpk.GLP_OFF
