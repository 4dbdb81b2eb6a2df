"""A demand no steady state can meet: how much the stoichiometry and flux bounds allow, and the
error that says so in plain words.

The largest demand flux is a plain flux-balance linear program (maximise the demand's flux
subject to S v = 0 and the flux bounds; Orth, Thiele & Palsson 2010, Nat. Biotechnol. 28:245),
without any thermodynamic row: when even that cannot reach the demand's lower bound, no energy
can help.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..errors import ComputationError
from ..network.thermo_model import ThermoModel
from ..problem.scaling import FLUX_REACH
from .results import verification


class ImpossibleDemandError(ComputationError):
    """The demand cannot be met by the stoichiometry and flux bounds, whatever the energies.

    ``verification``: how that was established (the plain flux-balance linear program)."""

    def __init__(self, message: str, verification: dict | None = None) -> None:
        super().__init__(message)
        self.verification = verification or {}



def demand_capacity(tm: ThermoModel, blocked: Sequence[str] = ()) -> float:
    """Largest demand flux the stoichiometry and flux bounds allow (plain LP, no energies), with
    the ``blocked`` reactions held at zero as the problem holds them."""
    model = tm.model
    if tm.demand_id is None:
        return float("nan")
    with model:
        for rid in blocked:
            model.reactions.get_by_id(rid).bounds = (0.0, 0.0)
        demand = model.reactions.get_by_id(tm.demand_id)
        demand.lower_bound = min(0.0, demand.upper_bound)
        model.objective = demand
        model.objective_direction = "max"
        value = model.slim_optimize(error_value=float("nan"))
    return float(value)


def impossible_demand_message(tm: ThermoModel, blocked: Sequence[str] = ()) -> str:
    """Plain words for a demand that no steady state can meet, with the largest possible flux
    (with the ``blocked`` reactions, those without an energy under the "block" policy, closed)."""
    if tm.demand_id is None:
        return ("no steady state satisfies the flux bounds even without thermodynamics: check "
                "the bounds of the exchange reactions and forced fluxes")
    required = tm.model.reactions.get_by_id(tm.demand_id).lower_bound
    capacity = demand_capacity(tm, blocked)
    if np.isnan(capacity):
        return ("no steady state satisfies the flux bounds even without thermodynamics and with no "
                f"demand on {tm.demand_id}: check the forced fluxes and the feed")
    if capacity >= required * (1 - 1e-9):
        return (f"the demand cannot be met within the flux reach: {tm.demand_id} can carry "
                f"{capacity:g} ignoring thermodynamics, but not with every flux at most "
                f"{FLUX_REACH:g} times the demand ({required:g}); check for fluxes that must be "
                "that large")
    closed = (f" with the {len(blocked)} reaction(s) without an energy blocked (the 'block' "
              "policy; 'free' leaves them open)" if blocked else "")
    return (f"the demand cannot be met even ignoring thermodynamics: {tm.demand_id} must carry at "
            f"least {required:g}, but the stoichiometry and feed allow at most {capacity:g}{closed}; "
            "lower the demand or open the missing feed/exchange")


def impossible_demand(tm: ThermoModel, what: str, blocked: Sequence[str] = ()) -> ImpossibleDemandError:
    """The error for a demand no steady state meets, with its verification: the uphill-set
    problem (every step allowed uphill) has no point, and cobra's flux balance, a linear program
    without any of the thermodynamic rows, gives the largest demand flux."""
    message = impossible_demand_message(tm, blocked)
    check = (f"{what} has no point with every step allowed uphill; a plain flux-balance linear "
             f"program (cobra) gives the largest demand flux")
    return ImpossibleDemandError(message, verification("proven", check))
