"""An environment applied to a network: the one rule for bounds and exchanges
(:func:`apply_environment`), and what it set (:class:`AppliedEnvironment`)."""

from __future__ import annotations

import math
from dataclasses import dataclass

import cobra

from ..errors import NetworkFileError
from .environment import Environment


@dataclass(frozen=True)
class AppliedEnvironment:
    """What :func:`apply_environment` set on a network.

    Attributes
    ----------
    log_bounds : dict
        Metabolite id -> (ln lower, ln upper) of its concentration (mol/L; gases bar); a fed
        compound has lower == upper.
    feed_ids : dict
        Feed key of the environment -> metabolite id.
    demand_id : str or None
        The demand reaction.
    no_activity : frozenset
        Water and H+: no concentration variable.
    """

    log_bounds: dict[str, tuple[float, float]]
    feed_ids: dict[str, str]
    demand_id: str | None
    no_activity: frozenset[str]


def apply_environment(model: cobra.Model, environment: Environment,
                      no_activity: set[str]) -> AppliedEnvironment:
    """Apply an environment to a network: the one rule for bounds and exchanges.

    Sets the flux bounds of every boundary reaction (:meth:`Environment.exchange_bounds`: fed
    compounds, water and H+ open, outlets export only, the demand at its flux, the rest closed;
    undone on leaving an enclosing ``with model:``) and returns the ln-concentration bounds of
    every compound with an activity term (:meth:`Environment.metabolite_bounds`).

    Raises
    ------
    NetworkFileError
        A feed or demand that names nothing in the network, empty bounds, a fed compound without
        an exchange.
    """
    if not isinstance(environment, Environment):
        raise NetworkFileError(f"environment: expected an Environment (read with "
                               f"Environment.from_toml), got {type(environment).__name__}")
    concentration = environment.metabolite_bounds(model, no_activity)
    bounds = {m: (math.log(lo), math.log(hi)) for m, (lo, hi) in concentration.items()}
    feed_ids = {str(key): environment.resolve(model, key).id for key in environment.feed}
    feed_ids.update({key: met_id for met_id, (key, _) in environment.fluid_feed(model).items()})
    environment.apply_exchange_bounds(model, no_activity)
    return AppliedEnvironment(bounds, feed_ids, environment.demand_reaction, frozenset(no_activity))
