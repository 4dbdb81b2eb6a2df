"""Helpers for the engine tests: small cobra models built from a few equations, by hand.

Not a test module (no ``test_`` prefix); imported by tests/test_engine_*.py.
"""

from __future__ import annotations

import math

import cobra

from tfa.conditions import Conditions
from tfa.equation import parse_equation
from tfa.network.thermo_model import ReactionEnergy, ThermoModel
from tfa.problem.solvers import use_solver


def build_thermo_model(reactions: dict, bounds: dict, exchanges: dict | None = None,
                       demand: tuple | None = None, conditions: Conditions | None = None,
                       no_activity=(), feed_ids: dict | None = None, solver: str = "glpk",
                       flux_bound: float = 100.0) -> ThermoModel:
    """A ThermoModel from plain data.

    Parameters
    ----------
    reactions : dict
        id -> (equation, dG'deg kJ/mol or None for "no energy", sigma kJ/mol).
    bounds : dict
        metabolite -> (c_lo, c_hi) in mol/L (or bar); equal values fix (feed).
    exchanges : dict
        metabolite -> (lb, ub) of an exchange reaction EX_<met> (met <=> nothing).
    demand : (metabolite, lb)
        A demand reaction DM_<met> (met -> nothing) with lower bound lb.
    """
    model = cobra.Model("hand")
    use_solver(model, solver)
    mets: dict[str, cobra.Metabolite] = {}

    def met(name: str) -> cobra.Metabolite:
        if name not in mets:
            mets[name] = cobra.Metabolite(name, compartment="c")
        return mets[name]

    energies = {}
    new = []
    for rid, (text, dg0, sigma) in reactions.items():
        eq = parse_equation(text)
        r = cobra.Reaction(rid)
        r.add_metabolites({met(n): c for n, c in eq.stoichiometry().items()})
        r.bounds = (-flux_bound if eq.reversible else 0.0, flux_bound)
        new.append(r)
        if dg0 is not None:
            energies[rid] = ReactionEnergy(rid, float(dg0), float(sigma), "literature", "test data")
    for name, (lb, ub) in (exchanges or {}).items():
        r = cobra.Reaction(f"EX_{name}")
        r.add_metabolites({met(name): -1.0})
        r.bounds = (lb, ub)
        new.append(r)
    demand_id = None
    if demand is not None:
        name, lb = demand
        r = cobra.Reaction(f"DM_{name}")
        r.add_metabolites({met(name): -1.0})
        r.bounds = (lb, flux_bound)
        new.append(r)
        demand_id = r.id
    model.add_reactions(new)
    if demand_id:
        model.objective = demand_id
    log_bounds = {m: (math.log(lo), math.log(hi)) for m, (lo, hi) in bounds.items()}
    return ThermoModel(model, conditions or Conditions(), energies, log_bounds,
                       no_activity=set(no_activity), demand_id=demand_id,
                       feed_ids=dict(feed_ids or {}))
