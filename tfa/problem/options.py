"""Options of the thermodynamic flux problem, the tolerances and limits the searches use, and a
solution as the solver returns it (before its certificate).

Units: kJ/mol, seconds; fluxes in the network's unit.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from optlang import interface as optlang_status

from ..errors import InputError
from ..util.numbers import MAX_DRIVING_FORCE, MAX_K_SIGMA, MAX_TIME_LIMIT, read_number

#: Statuses of a search stopped by a limit (time, iterations, nodes), after which the best point
#: found may be returned (ThermoProblem.solve with accept_best).
STOPPED_BY_A_LIMIT = (optlang_status.TIME_LIMIT, optlang_status.FEASIBLE, optlang_status.SUBOPTIMAL,
                      optlang_status.ITERATION_LIMIT, optlang_status.NODE_LIMIT)
#: Mixed-integer points tried before a problem whose points its fixed-direction linear program
#: never confirms is given up (a ComputationError): the first with the MIP presolve, the rest
#: without, each further one with the previous pattern cut off.
MAX_UNCONFIRMED_POINTS = 12
#: Share of the time left that the loose search may take (the exact MILP gets the rest): GLPK's
#: loose search ran into a 60 s limit on the bundled network's native question where the exact
#: MILP alone answered in 0.4 s (both without GLPK's MIP presolve).
LOOSE_TIME_SHARE = 0.25
#: Integrality tolerance of the loose search among the quick routes (GLPK's own default); its
#: points are only candidates: their 0/1 values are fixed and the rest solved again exactly.
LOOSE_INTEGRALITY = 1e-5
#: Default least driving force delta, kJ/mol. It is four orders of magnitude above what solver
#: tolerances (~1e-6 on variables, times RT*|S| ~ 10) can fake, so a certified sign is real, and
#: well below the standard uncertainty of reaction energies (1-5 kJ/mol), so it does not move
#: the answer (common practice in thermodynamics-based flux analysis uses 0 to 1 kJ/mol).
DEFAULT_MIN_DRIVING_FORCE = 0.1
#: Default time limit of one solve, s.
DEFAULT_TIME_LIMIT = 300.0
UNKNOWN_ENERGY_POLICIES = ("free", "block")
#: Solver tolerances set on the model's solver: feasibility tight enough that thresholds agree
#: with their analytic values to 1e-6 relative; integrality 1e-9 (GLPK) or 1e-7 (HiGHS), so a
#: mixed-integer point can pass at most that times U (1e-5 or 1e-3 of the flux scale) through a
#: closed direction, and every point is solved again with its 0/1 values fixed
#: (ThermoProblem.solve), which passes none. At 1e-9 HiGHS with its presolve proved a wrong
#: minimum: 3 uphill steps on the perturbed Salmonella instance of scripts/bench_engine.py, where
#: a set of 2 passes the certificate (HiGHS finds it at 1e-7, or without its presolve); GLPK at
#: 1e-7 left the bundled network's native question at demand 10 undetermined after 120 s (0.3 s
#: at 1e-9).
SOLVER_TOLERANCES = {"glpk": {"feasibility": 1e-9, "integrality": 1e-9},
                     "highs": {"feasibility": 1e-9, "integrality": 1e-7}}
#: HiGHS ``mip_heuristic_effort`` for our MILPs (HiGHS default 0.05); see ThermoProblem._build.
HIGHS_HEURISTIC_EFFORT = 0.25
#: Flux caps of the direction rows: "ranges" (steady-state flux ranges, :mod:`tfa.problem.flux_ranges`),
#: "bounds" (the reactions' own bounds) or "auto": ranges with GLPK when at most this many
#: reactions carry an energy, else bounds. Measured on the bundled network (138 reactions with an
#: energy; the ranges take 0.02 s): with GLPK the "H2 only" mode is proven infeasible in 0.12 s
#: with ranges and undetermined after 120 s with bounds; with HiGHS native feasibility takes
#: 1.3 s with ranges and 0.23 s with bounds. On iJO1366 (2,252) the ranges cost 2.6 s, more than
#: its whole feasibility question (about 1.4 s).
FLUX_RANGES_AUTO_LIMIT = 1000
FLUX_CAP_POLICIES = ("auto", "ranges", "bounds")
#: GLPK feasibility pump (``fp_heur``) for our MILPs: off, as GLPK's default; measured on iJO1366
#: with synthetic energies it changed nothing (45 s on, 44 s off).
GLPK_FEASIBILITY_PUMP = False


@dataclass
class ProblemOptions:
    """Options of the thermodynamic flux problem.

    Attributes
    ----------
    solver : str or None
        "glpk", "highs" or None (the measured default, :data:`tfa.problem.solvers.DEFAULT_SOLVER`).
    min_driving_force : float
        delta, kJ/mol: a reaction that carries flux must have -g >= delta in its direction.
    uncertainty_k : float
        Size of the uncertainty slack: the energies' sources may deviate by k standard units in
        total (L1 norm in whitened compound space; 0: energies taken as exact).
    unknown_energy : str
        "free" (reactions without an energy carry flux without a thermodynamic constraint; they
        are reported) or "block" (they carry no flux).
    time_limit : float or None
        Seconds per solve; hitting it raises ``UndeterminedError``.
    uphill : bool
        Add the uphill binaries u_j (minimal uphill set).
    driving_force : bool
        Replace delta by a variable B (max-min driving force).
    log_bound_overrides : dict
        Metabolite id -> (ln lo, ln hi) used instead of the model's bounds at build time (the
        envelope of an H2 scan or threshold; later bound changes must stay inside it).
    quick_routes : bool
        For yes/no questions (no objective), try two quick routes to a point before the exact
        MILP (:meth:`ThermoProblem.solve`): the flux pattern of least total flux, and the MILP at
        a loose integrality tolerance with its 0/1 values then fixed exactly.
    confirm_infeasible : str
        Re-ask an "infeasible" yes/no answer of the other solver: "auto" (for networks with at
        most :data:`tfa.analyses.results.CONFIRM_AUTO_LIMIT` reactions with an energy),
        "always" or "never"; the answer's ``verification`` says what was done.
    flux_caps : str
        U_j and L_j of the direction rows: "ranges" (the largest flux any steady state gives the
        reaction, two linear programs per reaction with an energy), "bounds" (its flux bounds), or
        "auto" (ranges with GLPK up to :data:`FLUX_RANGES_AUTO_LIMIT` reactions with an energy,
        else bounds; measured choice). Computed at build time: changing flux bounds later needs a
        new problem.
    """

    solver: str | None = None
    min_driving_force: float = DEFAULT_MIN_DRIVING_FORCE
    uncertainty_k: float = 0.0
    unknown_energy: str = "free"
    time_limit: float | None = DEFAULT_TIME_LIMIT
    uphill: bool = False
    driving_force: bool = False
    log_bound_overrides: dict[str, tuple[float, float]] = field(default_factory=dict)
    quick_routes: bool = True
    flux_caps: str = "auto"
    confirm_infeasible: str = "auto"

    def __post_init__(self) -> None:
        if self.flux_caps not in FLUX_CAP_POLICIES:
            raise InputError(f"flux_caps must be one of {', '.join(FLUX_CAP_POLICIES)}, got "
                             f"{self.flux_caps!r}")
        if self.confirm_infeasible not in ("auto", "always", "never"):
            raise InputError(f"confirm_infeasible must be auto, always or never, got "
                             f"{self.confirm_infeasible!r}")
        if self.unknown_energy not in UNKNOWN_ENERGY_POLICIES:
            raise InputError(f"unknown_energy must be 'free' or 'block', got {self.unknown_energy!r}")
        read_number(self.min_driving_force, "the least driving force [kJ/mol]", minimum=0.0,
                    maximum=MAX_DRIVING_FORCE)
        read_number(self.uncertainty_k, "the multiple k of σ", minimum=0.0, maximum=MAX_K_SIGMA)
        if self.time_limit is not None:
            read_number(self.time_limit, "the time limit [s]", above=0.0, maximum=MAX_TIME_LIMIT)

    def to_dict(self) -> dict:
        """Plain dictionary for provenance."""
        return {
            "solver": self.solver,
            "min_driving_force_kJ": self.min_driving_force,
            "uncertainty_k": self.uncertainty_k,
            "unknown_energy": self.unknown_energy,
            "time_limit_s": self.time_limit,
            "quick_routes": self.quick_routes,
            "flux_caps": self.flux_caps,
            "confirm_infeasible": self.confirm_infeasible,
        }


@dataclass
class Solution:
    """One solution of the problem, as numpy arrays (read from the solver, not yet certified).

    Attributes
    ----------
    reaction_ids, fluxes : all reactions and their net fluxes (forward minus reverse)
    metabolite_ids, log_conc : compounds with an activity term and ln c (mol/L or bar)
    energy_ids, energies, slack : reactions with an energy, g_j (kJ/mol, solver's value), eps_j
    forward, backward : the direction binaries (bool)
    uphill : reactions whose uphill binary is 1 (uphill problems only)
    driving_force : B for driving-force problems, else None
    objective : objective value (None for a pure feasibility problem)
    solver, seconds : solver name and wall time of the solve
    bound : the solver's proven bound on the objective (None for a pure feasibility problem)
    proven : False when a limit stopped the search and this is the best point found
    confirmed_by : how the point was obtained as a point of the problem: "linear program with the
        directions fixed" for every point returned by :meth:`ThermoProblem.solve`
    slack_coordinates : z, the deviations of the energies' sources in units of their σ (the
        slack is eps = A z, ‖z‖₁ <= k); empty without slack
    """

    reaction_ids: list[str]
    fluxes: np.ndarray
    metabolite_ids: list[str]
    log_conc: np.ndarray
    energy_ids: list[str]
    energies: np.ndarray
    slack: np.ndarray
    forward: np.ndarray
    backward: np.ndarray
    uphill: list[str]
    driving_force: float | None
    objective: float | None
    solver: str
    seconds: float
    bound: float | None = None
    proven: bool = True
    confirmed_by: str = ""
    slack_coordinates: np.ndarray | None = None

    def flux(self, reaction_id: str) -> float:
        """Net flux of one reaction."""
        return float(self.fluxes[self.reaction_ids.index(reaction_id)])

    def concentration(self, metabolite_id: str) -> float:
        """Concentration (mol/L or bar) of one compound."""
        return float(np.exp(self.log_conc[self.metabolite_ids.index(metabolite_id)]))
