"""Random tiny networks against an exact enumeration written here, at demands from 1e-9 to 1e3.

The enumeration uses no mixed-integer program. The thermodynamic flux problem (Henry, Broadbelt
& Hatzimanikatis 2007, Biophys. J. 92:1792) splits, once the flux direction of every reaction
with an energy is fixed, into two independent linear programs:

- fluxes: S v = 0 within the bounds, each v_j of the sign its direction gives (0 when closed);
- concentrations: d_j (Delta_r G'deg_j + RT sum_i S_ij ln c_i) <= -delta for every reaction run
  in direction d_j, ln c within its bounds (Alberty 2003, eq. 4.1-4, Delta_r G' = Delta_r G'deg
  + RT ln Q),

so one linear program per flux-sign pattern (3^n patterns for n reactions with an energy) and
one per set of direction constraints decide feasibility exactly; a reaction let run uphill drops
its constraint, so the minimal uphill sets are the smallest sets U within the support of a
flux-feasible pattern whose remaining constraints have a point. The linear programs here are
scipy's (its own HiGHS build, not tfa's interface), on fluxes divided by the demand so that the
same numbers reach the solver at every demand.
"""

from __future__ import annotations

import itertools
import math
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import linprog

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import feasibility, minimal_uphill_set  # noqa: E402
from tfa.analyses.demand import ImpossibleDemandError  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

DELTA = 0.1            # kJ/mol, the default least driving force
N_NETWORKS = 200
SEED = 20240617
DEMANDS = (1e-9, 1e-6, 1e-3, 1.0, 1e3)
INTERNAL = ("B", "C", "D")


def random_network(rng: np.random.Generator, demand: float, solver: str):
    """A fed compound A (1 mM), internal compounds B, C, D (1 uM .. 10 mM), a product P drained
    by a demand; 2 to 4 reversible reactions (flux bounds +/-100) with 1-2 substrates and 1-2
    products (coefficients 1 or 2), Delta_r G'deg ~ N(0, 12 kJ/mol), the first consuming A and
    the last making P; sometimes C may leave through an outlet."""
    species = ("A",) + INTERNAL + ("P",)
    n = int(rng.integers(2, 5))
    reactions = {}
    for k in range(n):
        while True:
            left = list(rng.choice(species[:-1], int(rng.integers(1, 3)), replace=False))
            right = list(rng.choice(species[1:], int(rng.integers(1, 3)), replace=False))
            if k == 0 and "A" not in left:
                left[0] = "A"
            if k == n - 1 and "P" not in right:
                right[-1] = "P"
            if not set(left) & set(right):
                break
        side = lambda names: " + ".join(f"{int(rng.integers(1, 3))} {m}" for m in names)  # noqa: E731
        reactions[f"R{k}"] = (f"{side(left)} <=> {side(right)}", float(rng.normal(0.0, 12.0)), 1.0)
    bounds = {"A": (1e-3, 1e-3), "P": (1e-6, 1e-2), **{m: (1e-6, 1e-2) for m in INTERNAL}}
    exchanges = {"A": (-100.0, 100.0)}
    if rng.random() < 0.3:
        exchanges["C"] = (0.0, 100.0)
    used = {m for text, _, _ in reactions.values() for m in species if f" {m}" in f" {text}"}
    bounds = {m: b for m, b in bounds.items() if m in used}
    exchanges = {m: b for m, b in exchanges.items() if m in used}
    return build_thermo_model(reactions, bounds, exchanges=exchanges, demand=("P", demand),
                              solver=solver, flux_bound=max(100.0, demand))


def exact_answers(tm) -> dict:
    """Feasibility, minimal uphill size and every minimal set, by enumeration (module text)."""
    model = tm.model
    rids = [r.id for r in model.reactions]
    mets = [m.id for m in model.metabolites]
    stoich = np.zeros((len(mets), len(rids)))
    for j, r in enumerate(model.reactions):
        for m, c in r.metabolites.items():
            stoich[mets.index(m.id), j] = c
    lower = np.array([r.lower_bound for r in model.reactions])
    upper = np.array([r.upper_bound for r in model.reactions])
    scale = max(lower.max(), 1e-300)
    energy = [rid for rid in rids if rid in tm.energies]
    x_ids = sorted(tm.log_bounds)
    x_bounds = [tm.log_bounds[m] for m in x_ids]

    def fluxes_possible(signs) -> bool:
        lo, hi = lower / scale, upper / scale
        lo, hi = lo.copy(), hi.copy()
        for rid, d in zip(energy, signs):
            j = rids.index(rid)
            if d > 0:
                lo[j], hi[j] = max(lo[j], 0.0), max(hi[j], 0.0)
            elif d < 0:
                lo[j], hi[j] = min(lo[j], 0.0), min(hi[j], 0.0)
            else:
                if lo[j] > 0 or hi[j] < 0:
                    return False
                lo[j] = hi[j] = 0.0
        res = linprog(np.zeros(len(rids)), A_eq=stoich, b_eq=np.zeros(len(mets)),
                      bounds=list(zip(lo, hi)), method="highs")
        return res.status == 0

    energy_cache: dict = {}

    def energies_possible(constraints: frozenset) -> bool:
        if constraints not in energy_cache:
            rows, rhs = [], []
            for rid, d in constraints:
                e = tm.energies[rid]
                row = np.zeros(len(x_ids))
                for m, c in model.reactions.get_by_id(rid).metabolites.items():
                    row[x_ids.index(m.id)] += d * tm.RT * c
                rows.append(row)
                rhs.append(-DELTA - d * e.standard)
            if not rows:
                energy_cache[constraints] = True
            else:
                res = linprog(np.zeros(len(x_ids)), A_ub=np.array(rows), b_ub=np.array(rhs),
                              bounds=x_bounds, method="highs")
                energy_cache[constraints] = res.status == 0
        return energy_cache[constraints]

    patterns = [s for s in itertools.product((1, -1, 0), repeat=len(energy)) if fluxes_possible(s)]
    if not patterns:
        return {"impossible": True}
    best, sets = math.inf, set()
    for signs in patterns:
        support = [(rid, d) for rid, d in zip(energy, signs) if d != 0]
        for k in range(len(support) + 1):
            if k > best:
                break
            for uphill in itertools.combinations(range(len(support)), k):
                kept = frozenset(c for i, c in enumerate(support) if i not in uphill)
                if energies_possible(kept):
                    members = frozenset(support[i][0] for i in uphill)
                    if k < best:
                        best, sets = k, set()
                    sets.add(members)
            # a pattern needs no more than its own smallest set
            if any(len(s) <= k for s in sets) and best <= k:
                break
    return {"impossible": False, "feasible": best == 0, "size": best,
            "sets": {tuple(sorted(s)) for s in sets}}


CASES = [(i, DEMANDS[i % len(DEMANDS)]) for i in range(N_NETWORKS)]


@pytest.mark.parametrize("solver", available_solvers())
@pytest.mark.parametrize("chunk", range(4))
def test_random_tiny_networks_agree_with_enumeration(solver, chunk):
    options = ProblemOptions(solver=solver, confirm_infeasible="never", time_limit=60)
    counts = {"feasible": 0, "infeasible": 0, "impossible": 0}
    for i, demand in CASES[chunk::4]:
        rng = np.random.default_rng([SEED, i])
        tm = random_network(rng, demand, solver)
        truth = exact_answers(tm)
        answer = feasibility(tm, options, diagnose=False)
        if truth["impossible"]:
            counts["impossible"] += 1
            assert not answer.feasible, (i, demand)
            with pytest.raises(ImpossibleDemandError):
                minimal_uphill_set(tm, options)
            continue
        assert answer.feasible == truth["feasible"], (i, demand, truth)
        counts["feasible" if truth["feasible"] else "infeasible"] += 1
        uphill = minimal_uphill_set(tm, options, alternatives=20)
        assert uphill.size == truth["size"], (i, demand, truth, uphill.sets)
        assert uphill.exhausted and uphill.verification["status"] in ("proven", "certified")
        assert {tuple(s) for s in uphill.sets} == truth["sets"], (i, demand)
        # listed in the order of reaction ids (sorted ids compared one by one), and counted
        assert [tuple(s) for s in uphill.sets] == sorted(truth["sets"]), (i, demand)
        assert uphill.count == len(truth["sets"]), (i, demand)
        for amounts in uphill.uphill_by:
            assert all(v >= 0.0 for v in amounts.values())
    # each chunk meets every kind of answer (the seed is fixed: this guards the generator)
    assert min(counts.values()) >= 1, counts
