"""Side-by-side timing of the feasibility engine against plain and loopless flux balance.

Networks: the bundled ancestral network and cobra's bundled genome-scale models iJO1366 (E. coli,
2,583 reactions) and "salmonella" (S. Typhimurium LT2, 3,357 reactions), both loaded offline from
cobra's package data. They carry no reaction energies: the script gives them SYNTHETIC standard
energies from a fixed seed, built so that a loopless flux solution is downhill at mid-range
concentrations (so the instance is feasible and the timings mean something):

1. a loopless flux solution v* (cobra's CycleFreeFlux LP) at the maximal growth rate;
2. chemical potentials mu (kJ/mol) closest in L1 to random normal targets (seed 20240601,
   sd 20 kJ/mol; other seeds with --seeds) such that every internal reaction carrying flux in
   v* has S_j^T mu <= -1 in its direction (such mu exist because v* has no internal cycle,
   Schellenberger et al. 2011);
3. Delta_r G'deg_j = S_j^T mu - RT sum_i S_ij ln(1e-4): at 0.1 mM of every compound
   (mid-range of 1 uM .. 10 mM) each reaction carrying flux in v* is downhill by >= 1 kJ/mol.

The minimal uphill set is timed on an instance that needs uphill steps: the bundled network in
bare chemistry, and each genome-scale model PERTURBED (:func:`perturb_energies`, seed 11): two
steps every steady state needs and three more that carry flux in v* made uphill at every
concentration, so that at least two steps must be driven.

Timed, per network and per solver (GLPK, HiGHS): plain flux balance (LP), cobra's loopless flux
balance (add_loopless, MILP; its build and its solve, in a child process killed at the time
limit), our feasibility (build + solve + certificate + tables; also with the quick routes off,
the exact MILP alone), feasibility and the minimal uphill set on the instance needing uphill
steps, a 20-point H2 scan (build once + 20 solves), and first the time of applying each mode to
networks of 1,000 to 20,000 reactions (the bundled network's reactions copied). Medians of
repeated runs; ratios to plain flux balance and to loopless on the same solver; a task that hits
the time limit is printed as "undetermined within N s", never as a time.

A summary at the end gives, per network and solver, the ratios the engine is judged by: our
feasibility and our minimal uphill set against loopless flux balance on the same solver, and the
minimal uphill set against the feasibility check of the same instance (target: at most 5 with
HiGHS).

Usage: python scripts/bench_engine.py [--repeats 3] [--skip-genome] [--skip-bundled]
       [--skip-rewrites] [--genome-models iJO1366,salmonella] [--time-limit 300]
       [--seeds 20240601,7,3] [--solvers glpk,highs]
"""

from __future__ import annotations

import argparse
import logging
import math
import statistics
import sys
import time
from dataclasses import replace

import numpy as np

SEED = 20240601
MID_CONCENTRATION = 1e-4
CONC_RANGE = (1e-6, 1e-2)
H2_RANGE = (1e-9, 1e-2)
PROTON_AND_WATER = {"h_c", "h_p", "h_e", "h2o_c", "h2o_p", "h2o_e"}


#: Genome-scale models of cobra's own package data (loaded offline): E. coli iJO1366 and the
#: Salmonella Typhimurium LT2 reconstruction shipped as "salmonella".
GENOME_MODELS = ("iJO1366", "salmonella")
#: Seed of the choice of steps made uphill in the perturbed instances.
PERTURB_SEED = 11
#: Perturbed instances: this many steps that every steady state needs in one direction, and this
#: many more that carry flux in the loopless solution, are made uphill at every concentration.
PERTURB_REQUIRED, PERTURB_OTHER = 2, 3


def synthetic_genome_model(solver_module, seed: int = SEED, name: str = "iJO1366",
                           perturb: bool = False):
    """A genome-scale model with synthetic, feasible-by-construction reaction energies (see
    module text); ``perturb``: then some steps are made uphill (:func:`perturb_energies`)."""
    import cobra
    from cobra.flux_analysis import loopless_solution
    from scipy.optimize import linprog
    from scipy.sparse import coo_matrix, hstack, identity, vstack

    from tfa.conditions import Conditions
    from tfa.network.thermo_model import ReactionEnergy, ThermoModel

    cobra.Configuration().solver = solver_module
    model = cobra.io.load_model(name)
    biomass = [r for r in model.reactions if r.objective_coefficient != 0][0]
    optimum = model.slim_optimize()
    v_star = loopless_solution(model).fluxes
    boundary = {r.id for r in model.boundary}
    internal = [r for r in model.reactions if r.id not in boundary and r.id != biomass.id]
    mets = list(model.metabolites)
    m_index = {m.id: i for i, m in enumerate(mets)}
    carrying = [r for r in internal if abs(v_star[r.id]) > 1e-7]
    rows, cols, vals = [], [], []
    for k, r in enumerate(carrying):
        sign = 1.0 if v_star[r.id] > 0 else -1.0
        for m, c in r.metabolites.items():
            rows.append(k)
            cols.append(m_index[m.id])
            vals.append(sign * c)
    n_m, n_c = len(mets), len(carrying)
    a_dir = coo_matrix((vals, (rows, cols)), shape=(n_c, n_m))
    rng = np.random.default_rng(seed)
    target = rng.normal(0.0, 20.0, n_m)
    eye = identity(n_m)
    # variables [mu, t]; minimise sum t with t >= |mu - target|; direction rows: S^T mu <= -1
    a_ub = vstack([hstack([a_dir, coo_matrix((n_c, n_m))]),
                   hstack([eye, -eye]), hstack([-eye, -eye])]).tocsr()
    b_ub = np.concatenate([-np.ones(n_c), target, -target])
    cost = np.concatenate([np.zeros(n_m), np.ones(n_m)])
    res = linprog(cost, A_ub=a_ub, b_ub=b_ub, bounds=[(-1000, 1000)] * n_m + [(0, None)] * n_m,
                  method="highs")
    if res.status != 0:
        raise RuntimeError(f"synthetic potentials: {res.message}")
    mu = res.x[:n_m]
    conditions = Conditions()
    rt = conditions.RT
    x_mid = math.log(MID_CONCENTRATION)
    energies = {}
    for r in internal:
        chem = sum(c * mu[m_index[m.id]] for m, c in r.metabolites.items())
        activity = sum(c for m, c in r.metabolites.items() if m.id not in PROTON_AND_WATER)
        energies[r.id] = ReactionEnergy(r.id, chem - rt * activity * x_mid, 2.0, "placeholder",
                                        f"SYNTHETIC energy (seed {seed}), not data")
    lo, hi = math.log(CONC_RANGE[0]), math.log(CONC_RANGE[1])
    log_bounds = {m.id: (lo, hi) for m in mets}
    biomass.lower_bound = 0.5 * optimum
    no_activity = {m.id for m in mets if m.id.split("_")[0] in ("h", "h2o")}
    tm = ThermoModel(model, conditions, energies, log_bounds, no_activity=no_activity,
                     mode="native", environment_name=f"{name}, synthetic energies",
                     demand_id=biomass.id, feed_ids={"H2": "h2_c"} if "h2_c" in model.metabolites else {})
    if perturb:
        perturb_energies(tm, v_star, seed=PERTURB_SEED)
    return tm


def perturb_energies(tm, v_star, seed: int = PERTURB_SEED) -> list[str]:
    """Make some steps uphill at every concentration in the direction they carry flux in the
    loopless solution v*: ``PERTURB_REQUIRED`` steps that every steady state meeting the demand
    needs in that direction (steady-state flux ranges, so each must be in every uphill set) and
    ``PERTURB_OTHER`` more that carry flux in v* (the network may reroute around them). Returns
    the ids. Delta_r G'deg is raised (or lowered) until the least Delta_r G' over the
    concentration box is +5 kJ/mol in that direction."""
    from dataclasses import replace as with_value

    from tfa.problem.flux_ranges import steady_state_flux_ranges

    model = tm.model
    ids = [r.id for r in model.reactions]
    m_index = {m.id: i for i, m in enumerate(model.metabolites)}
    rows, cols, vals = [], [], []
    for j, r in enumerate(model.reactions):
        for m, c in r.metabolites.items():
            rows.append(m_index[m.id]), cols.append(j), vals.append(float(c))
    lower = np.array([r.lower_bound for r in model.reactions])
    upper = np.array([r.upper_bound for r in model.reactions])
    carrying = [j for j, rid in enumerate(ids) if rid in tm.energies and abs(v_star[rid]) > 1e-7]
    lo, hi = steady_state_flux_ranges(np.array(rows), np.array(cols), np.array(vals),
                                      len(m_index), lower, upper, np.array(carrying))
    required = [j for j, a, b in zip(carrying, lo, hi) if a > 1e-6 or b < -1e-6]
    rng = np.random.default_rng(seed)
    chosen = list(rng.choice(required, PERTURB_REQUIRED, replace=False))
    others = [j for j in carrying if j not in required]
    chosen += list(rng.choice(others, PERTURB_OTHER, replace=False))
    rt = tm.RT
    for j in chosen:
        rid = ids[j]
        e = tm.energies[rid]
        d = 1.0 if v_star[rid] > 0 else -1.0
        stoich = [(m.id, c) for m, c in model.reactions.get_by_id(rid).metabolites.items()
                  if m.id not in tm.no_activity]
        terms = [(tm.log_bounds[m][0] * c, tm.log_bounds[m][1] * c) for m, c in stoich]
        # the least d * Delta_r G' over the box, at Delta_r G'deg = 0
        least = sum(min(d * a, d * b) for a, b in terms) * rt
        tm.energies[rid] = with_value(e, standard=d * (5.0 - least),
                                      provenance=e.provenance + "; PERTURBED uphill")
    return [ids[j] for j in chosen]


def replicated_network(n_reactions: int):
    """The bundled network with its internal reactions copied until it has about
    ``n_reactions``: each copy has its own compounds, except those with a role (carriers,
    nucleotides, water, H+, H2, phosphate), which all copies share, as in a genome-scale model."""
    import cobra

    from tfa.network.bundled import load_bundled_network
    from tfa.network.checks import is_boundary_reaction
    from tfa.network.roles import metabolite_role

    model = load_bundled_network()
    shared = {m.id for m in model.metabolites if metabolite_role(m) is not None}
    internal = [r for r in model.reactions if not is_boundary_reaction(r)]
    copies = max(0, (n_reactions - len(model.reactions)) // len(internal))
    new_mets: dict = {}
    added = []
    for k in range(copies):
        for r in internal:
            reaction = cobra.Reaction(f"{r.id}__{k}", lower_bound=r.lower_bound, upper_bound=r.upper_bound)
            terms = {}
            for m, c in r.metabolites.items():
                if m.id in shared:
                    terms[m] = c
                    continue
                mid = f"{m.id}__{k}"
                if mid not in new_mets:
                    new_mets[mid] = m.copy()
                    new_mets[mid].id = mid
                terms[new_mets[mid]] = c
            reaction.add_metabolites(terms)
            reaction.notes = dict(r.notes)
            added.append(reaction)
    model.add_reactions(added)
    return model


def bench_rewrites(sizes=(1000, 5000, 20000)) -> list:
    """Time of applying each mode (and undoing it) to replicated networks of growing size."""
    from tfa.network.rewrites import apply_mode
    from tfa.modes import STANDARD_MODES as MODES

    rows = []
    print("\n== applying a mode (one batch), seconds: apply / apply and undo", flush=True)
    for size in sizes:
        model = replicated_network(size)
        line = []
        for mode in MODES:
            started = time.perf_counter()
            with apply_mode(model, mode):
                applied = time.perf_counter() - started
            undone = time.perf_counter() - started
            line.append(f"{mode} {applied:.2f}/{undone:.2f}")
            rows.append((len(model.reactions), mode, applied, undone))
        print(f"  {len(model.reactions):6d} reactions: " + ", ".join(line), flush=True)
    return rows


class _Undetermined:
    """Stands for a task that hit its time limit (printed as such, never as a time)."""

    def __init__(self, message: str) -> None:
        self.message = message

    def __repr__(self) -> str:
        return self.message


def timed(func, repeats: int) -> tuple[object, object]:
    """Median wall time of ``repeats`` calls and the last result; a task that hits its time
    limit gives an ``_Undetermined`` marker instead of a time."""
    from tfa.errors import UndeterminedError

    times = []
    result = None
    for _ in range(repeats):
        t = time.perf_counter()
        try:
            result = func()
        except UndeterminedError as err:
            return _Undetermined(f"undetermined ({err})"), None
        times.append(time.perf_counter() - t)
    return statistics.median(times), result


def _median_or_undetermined(values: list):
    """Median of floats, or the first _Undetermined marker among them."""
    for v in values:
        if not isinstance(v, float):
            return v
    return statistics.median(values)


def loopless_in_child(model, solver: str, time_limit: float) -> tuple:
    """cobra's loopless flux balance (``add_loopless`` with its default Fast-SNP null space, Saa &
    Nielsen 2016, Bioinformatics 32:3807; formulation of Schellenberger, Lewis & Palsson 2011),
    timed in a forked child killed after ``time_limit`` s (a GLPK call cannot be interrupted
    from Python). Returns (build seconds, solve seconds), each a float or ``_Undetermined``.

    The MILP is solved by the same single solver call as ours (:func:`tfa.problem.solvers.optimize`,
    a real optimisation: maximal demand). When ``add_loopless`` does not finish on the given
    solver within the limit (with GLPK its Fast-SNP linear programs are slow), its constraints are
    built once more with HiGHS, untimed, and the solve alone is timed on the given solver.
    """
    import multiprocessing

    from tfa.problem.solvers import optimize, use_solver

    context = multiprocessing.get_context("fork")

    def child(conn, build_with: str) -> None:
        from cobra.flux_analysis.loopless import add_loopless

        use_solver(model, build_with)
        started = time.perf_counter()
        add_loopless(model)
        conn.send(("build", time.perf_counter() - started))
        use_solver(model, solver)
        started = time.perf_counter()
        status = optimize(model.solver, time_limit)
        conn.send(("solve", time.perf_counter() - started, status))

    def run(build_with: str) -> dict:
        receive, send = context.Pipe(duplex=False)
        process = context.Process(target=child, args=(send, build_with))
        process.start()
        got: dict = {}
        # the build gets the time limit; the solve its own limit (enforced by the solver) + 60 s
        for wait in (time_limit, time_limit + 60):
            try:
                if not receive.poll(wait):
                    break
                message = receive.recv()
            except EOFError:        # the child failed; its traceback is on stderr
                break
            got[message[0]] = message[1:]
        process.kill()
        process.join()
        return got

    limit = f"undetermined within {time_limit:g} s"
    got = run(solver)
    build = got["build"][0] if "build" in got else _Undetermined(limit)
    if "build" not in got and solver != "highs":
        got = run("highs")
    if "solve" not in got:
        return build, _Undetermined(limit)
    seconds, status = got["solve"]
    return build, (seconds if status == "optimal" else _Undetermined(f"{limit} ({status})"))


def bench_network(label: str, tm, solver: str, repeats: int, time_limit: float,
                  uphill_tm=None) -> dict:
    """Time the tasks on one ThermoModel with one solver; the minimal uphill set (and a
    feasibility check beside it) on ``uphill_tm``, an instance of the same network that needs
    uphill steps (the bundled network's bare chemistry, a perturbed genome-scale instance)."""
    from tfa.analyses.feasibility import feasibility
    from tfa.analyses.hydrogen import h2_scan
    from tfa.analyses.uphill import minimal_uphill_set
    from tfa.problem import ProblemOptions, ThermoProblem
    from tfa.problem.solvers import use_solver

    model = tm.model
    use_solver(model, solver)
    opts = ProblemOptions(solver=solver, time_limit=time_limit)

    class _Printing(dict):
        def __setitem__(self, key, value):
            super().__setitem__(key, value)
            shown = f"{value:.3f} s" if isinstance(value, float) and not key.startswith("  (") else value
            logging.getLogger("bench").info("%s, %s: %s %s", label, solver, key, shown)

    out = _Printing()

    out["flux balance (LP)"], _ = timed(lambda: model.slim_optimize(), repeats)

    builds, solves = [], []
    for _ in range(repeats):
        build, solve = loopless_in_child(model, solver, time_limit)
        builds.append(build)
        solves.append(solve)
    out["loopless: add_loopless (build)"] = _median_or_undetermined(builds)
    out["loopless: MILP solve"] = _median_or_undetermined(solves)
    ll = [b + v for b, v in zip(builds, solves) if isinstance(b, float) and isinstance(v, float)]
    out["loopless flux balance (MILP)"] = (statistics.median(ll) if len(ll) == repeats
                                           else _Undetermined("undetermined (a part hit its limit)"))

    def build_only():
        problem = ThermoProblem(tm, opts)
        seconds = problem.build_seconds
        problem.remove()
        return seconds

    builds = [build_only() for _ in range(repeats)]
    out["  build of our problem"] = statistics.median(builds)
    out["our feasibility"], res = timed(lambda: feasibility(tm, opts, diagnose=False), repeats)
    out["  (feasible)"] = getattr(res, "feasible", None)
    exact_only = replace(opts, quick_routes=False)
    out["  feasibility, exact MILP only"], _ = timed(
        lambda: feasibility(tm, exact_only, diagnose=False), repeats)
    if uphill_tm is not None:
        use_solver(uphill_tm.model, solver)
        out["feasibility, needing uphill steps"], res = timed(
            lambda: feasibility(uphill_tm, opts, diagnose=False), repeats)
        out["  (feasible, needing uphill steps)"] = getattr(res, "feasible", None)
        out["our minimal uphill set"], res = timed(lambda: minimal_uphill_set(uphill_tm, opts),
                                                   repeats)
        out["  (uphill set size)"] = len(res.sets[0]) if getattr(res, "sets", None) else None
        out["  (uphill set status)"] = (res.verification.get("status")
                                        if res is not None else None)
    h2 = {k.lower(): v for k, v in tm.feed_ids.items()}.get("h2")
    if h2:
        levels = np.logspace(math.log10(H2_RANGE[0]), math.log10(H2_RANGE[1]), 20)
        out["our 20-point H2 scan"], res = timed(
            lambda: h2_scan(tm, levels, opts, with_driving_force=False, with_uphill=False), 1)
        out["  (feasible points)"] = int(sum(res.table["feasible"])) if res is not None else None
    return out


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--skip-genome", action="store_true")
    parser.add_argument("--skip-bundled", action="store_true")
    parser.add_argument("--skip-rewrites", action="store_true")
    parser.add_argument("--rewrite-sizes", default="1000,5000,20000",
                        help="network sizes (reactions) of the mode-rewrite timing")
    parser.add_argument("--solvers", default="glpk,highs")
    parser.add_argument("--time-limit", type=float, default=300.0)
    parser.add_argument("--genome-models", default=",".join(GENOME_MODELS),
                        help="cobra's bundled genome-scale models to time (iJO1366, salmonella)")
    parser.add_argument("--seeds", default=str(SEED),
                        help="comma-separated seeds of the synthetic iJO1366 energies")
    args = parser.parse_args(argv)
    logging.basicConfig(level=logging.WARNING, format="%(message)s")
    logging.getLogger("bench").setLevel(logging.INFO)
    from tfa.problem.solvers import resolve_solver

    if not args.skip_rewrites:
        bench_rewrites(tuple(int(x) for x in args.rewrite_sizes.split(",")))
    networks = []
    if not args.skip_bundled:
        try:
            from tfa.network.bundled import load_bundled_network
            from tfa.network.energies import prepare
            from tfa.network.environment import bundled_environment
            networks.append(("bundled ancestral network", lambda solver: (
                prepare(load_bundled_network(), bundled_environment(), "native"),
                prepare(load_bundled_network(), bundled_environment(), "no_atp_bare"))))
        except ImportError as err:
            print(f"bundled network skipped: {err}")
    if not args.skip_genome:
        for name in args.genome_models.split(","):
            for seed in (int(s) for s in args.seeds.split(",")):
                networks.append((f"{name} (SYNTHETIC energies, seed {seed})",
                                 lambda solver, seed=seed, name=name: (
                                     synthetic_genome_model(resolve_solver(solver)[1], seed, name),
                                     synthetic_genome_model(resolve_solver(solver)[1], seed, name,
                                                            perturb=True))))
    rows = []
    for label, make in networks:
        for solver in args.solvers.split(","):
            tm, uphill_tm = make(solver)
            print(f"\n== {label}, solver {solver}: {len(tm.model.reactions)} reactions, "
                  f"{len(tm.energies)} with energy", flush=True)
            result = bench_network(label, tm, solver, args.repeats, args.time_limit, uphill_tm)
            fba = result["flux balance (LP)"]
            ll = result["loopless flux balance (MILP)"]
            for task, value in result.items():
                if isinstance(value, float) and not task.startswith("  ("):
                    ratio_ll = f"x{value / ll:7.2f} loopless" if isinstance(ll, float) else ""
                    print(f"  {task:34s} {value:9.3f} s   x{value / fba:9.1f} FBA   {ratio_ll}",
                          flush=True)
                else:
                    print(f"  {task:34s} {value}", flush=True)
            rows.append((label, solver, result))
    print_summary(rows)
    return 0


def print_summary(rows: list) -> None:
    """Per network and solver: the ratios the engine is judged by (times in s)."""
    def ratio(a, b):
        return f"{a / b:8.2f}" if isinstance(a, float) and isinstance(b, float) and b > 0 else \
            f"{'n/a':>8s}"

    def shown(value):
        return f"{value:9.2f}" if isinstance(value, float) else f"{'undet.':>9s}"

    print("\n== summary (times in s; 'n/a' where a task hit its time limit; 'uphill' on the "
          "instance needing uphill steps, 'feas.u' the feasibility check of that instance)")
    print(f"  {'network':40s} {'solver':6s} {'loopless':>9s} {'ours':>9s} {'ours/ll':>8s} "
          f"{'feas.u':>9s} {'uphill':>9s} {'up/ll':>8s} {'up/feas.u':>9s} {'exact':>9s} "
          f"{'build':>7s} {'scan':>9s}")
    for label, solver, result in rows:
        ll = result.get("loopless flux balance (MILP)")
        ours = result.get("our feasibility")
        feas_u = result.get("feasibility, needing uphill steps")
        uphill = result.get("our minimal uphill set")
        scan = result.get("our 20-point H2 scan")
        build = result.get("  build of our problem")
        exact = result.get("  feasibility, exact MILP only")
        print(f"  {label[:40]:40s} {solver:6s} {shown(ll)} {shown(ours)} {ratio(ours, ll)} "
              f"{shown(feas_u)} {shown(uphill)} {ratio(uphill, ll)} {ratio(uphill, feas_u):>9s} "
              f"{shown(exact)} {build:7.2f} {shown(scan) if scan is not None else f'{chr(45):>9s}'}")


if __name__ == "__main__":
    sys.exit(main())
