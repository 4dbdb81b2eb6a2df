"""The neutral default environment of a network given without one.

Never the bundled vent setting: 25 °C, pH 7, ionic strength 0.1 mol/L, 1 bar; every exchange
open within the flux bounds the network file gives it; every concentration between 1 µM and
10 mM (or the ``conc_min``/``conc_max`` of its compounds table); nothing fixed (fed); the demand
is the reaction named with ``--demand`` or, for SBML and cobra JSON, the model's objective,
required to carry at least :data:`NEUTRAL_DEMAND_FLUX`. :func:`describe_neutral` says all of
that in one line.
"""

from __future__ import annotations

import difflib

import cobra

from ..conditions import Conditions
from ..errors import InputError
from .environment import DEFAULT_BOUNDS, Environment

#: Name of the neutral default environment.
NEUTRAL_NAME = "neutral default"
#: Its conditions: temperature [degC], pH, ionic strength [mol/L], pressure [bar].
NEUTRAL_CONDITIONS = {"celsius": 25.0, "ph": 7.0, "ionic_strength": 0.1, "pressure": 1.0}
#: Least flux of the demand reaction in the neutral default [flux unit of the network].
NEUTRAL_DEMAND_FLUX = 0.01


def objective_reaction(model: cobra.Model) -> str | None:
    """The one reaction the model maximises (its objective), or None.

    >>> m = cobra.Model("m"); r = cobra.Reaction("growth"); m.add_reactions([r]); m.objective = r
    >>> objective_reaction(m)
    'growth'
    """
    try:
        coefficients = cobra.util.solver.linear_reaction_coefficients(model)
    except Exception:  # noqa: BLE001 - an objective cobra cannot read: none
        return None
    positive = [r.id for r, c in coefficients.items() if c > 0]
    return positive[0] if len(positive) == 1 else None


def check_demand(model: cobra.Model, reaction_id: str) -> str:
    """The demand reaction named with ``--demand``, checked against the network.

    Raises
    ------
    InputError
        An id that is no reaction of the network (with close matches).
    """
    if reaction_id in model.reactions:
        return reaction_id
    close = difflib.get_close_matches(reaction_id, [r.id for r in model.reactions], n=3)
    hint = f"did you mean {', '.join(repr(c) for c in close)}?" if close else \
        "give a reaction id of the network"
    raise InputError(f"--demand {reaction_id}: not a reaction of network {model.id}; {hint}")


def neutral_environment(model: cobra.Model, demand: str | None = None,
                        use_objective: bool = True) -> Environment:
    """The neutral default environment of ``model`` (see the module text).

    Parameters
    ----------
    demand : str, optional
        The demand reaction (``--demand``); default the model's objective.
    use_objective : bool
        Take the objective as the demand when none is named (SBML and cobra JSON).
    """
    if demand is None and use_objective:
        demand = objective_reaction(model)
    environment = Environment(NEUTRAL_NAME, Conditions.from_celsius(
        NEUTRAL_CONDITIONS["celsius"], ph=NEUTRAL_CONDITIONS["ph"],
        ionic_strength=NEUTRAL_CONDITIONS["ionic_strength"],
        pressure=NEUTRAL_CONDITIONS["pressure"]),
        demand_reaction=demand, demand_flux=NEUTRAL_DEMAND_FLUX if demand else 0.0,
        network_exchanges=True)
    return _described(environment, model)


def _described(environment: Environment, model: cobra.Model) -> Environment:
    from dataclasses import replace

    return replace(environment, description=describe_neutral(environment, model.id))


def describe_neutral(environment: Environment, network_id: str) -> str:
    """The one line that says a neutral default is used, and what it is.

    >>> env = neutral_environment(cobra.Model("toy"))
    >>> print(describe_neutral(env, "toy"))  # doctest: +NORMALIZE_WHITESPACE
    no environment given for toy: a neutral default (25.0 degC, pH 7.00, I = 0.10 mol/L,
    1 bar; every exchange open within the network's own flux bounds; concentrations 1e-06 to
    0.01 mol/L; no demand: name one with --demand ID); give yours with --environment FILE
    """
    low, high = DEFAULT_BOUNDS
    if environment.demand_reaction:
        demand = f"demand {environment.demand_reaction} >= {environment.demand_flux:g}"
    else:
        demand = "no demand: name one with --demand ID"
    return (f"no environment given for {network_id}: a neutral default "
            f"({environment.conditions.describe()}; every exchange open within the network's own "
            f"flux bounds; concentrations {low:g} to {high:g} mol/L; {demand}); give yours with "
            "--environment FILE")


def with_demand(environment: Environment, model: cobra.Model, demand: str) -> Environment:
    """The environment with the demand reaction named on the command line (its flux kept, or
    :data:`NEUTRAL_DEMAND_FLUX` when it had none)."""
    from dataclasses import replace

    changed = replace(environment, demand_reaction=check_demand(model, demand),
                      demand_flux=environment.demand_flux or NEUTRAL_DEMAND_FLUX)
    return _described(changed, model) if environment.name == NEUTRAL_NAME else changed
