"""The steady state an answer rests on, in one canonical form: the least total flux with the same
directions at the same concentrations.

A certified point of the thermodynamic flux problem fixes concentrations and a direction for each
reaction; its fluxes are one choice among many (a solver may return by-products and detours that
nothing requires). With the concentrations (hence every ΔrG') unchanged, any flux vector that
keeps each reaction at zero or in the direction it ran is again a steady state with every
reaction downhill (or uphill only where the point allowed it). Among those, :func:`least_flux_state`
takes the one of least total flux, min Σ_j |v_j| subject to S v = 0, the flux bounds and the
demand (parsimonious flux balance, N. E. Lewis et al., Mol. Syst. Biol. 6 (2010) 390, here with
the directions fixed: a linear program), and re-checks it with numpy alone: mass balance, flux
bounds, and that every reaction with an energy carrying flux runs in the direction the certified
point gave it (so the certified second-law check carries over).

Units: fluxes in the network's flux unit.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping

import numpy as np

from ..errors import ComputationError

#: A flux below this (relative to the largest flux bound of 1) counts as zero.
ZERO_FLUX = 1e-9
#: Tolerance of the numpy re-check of mass balance and bounds, relative to the demand flux.
CHECK_TOLERANCE = 1e-6


@dataclass
class LeastFluxState:
    """The canonical fluxes and how they were checked.

    Attributes
    ----------
    fluxes : dict
        Reaction id -> net flux [flux unit].
    total_before, total_after : float
        Σ |v| of the certified point and of the least-flux state.
    check : str
        What the numpy re-check verified, in words.
    """

    fluxes: dict[str, float]
    total_before: float
    total_after: float
    check: str


def least_flux_state(model, fluxes: Mapping[str, float], energies: set[str] | frozenset[str] = frozenset(),
                     ) -> LeastFluxState:
    """Least total flux over the directions of a certified point (see the module docstring).

    Parameters
    ----------
    model : cobra.Model
        The network as solved (bounds as in the problem; the demand's lower bound in place).
    fluxes : mapping
        Reaction id -> flux of the certified point [flux unit].
    energies : set of str
        Reactions with an energy (their direction must be kept; it is re-checked).

    Returns
    -------
    LeastFluxState

    Raises
    ------
    ComputationError
        When the linear program fails or its point does not pass the re-check (then the caller
        keeps the certified point).

    Examples
    --------
    A -> B by two parallel reactions and a detour A -> C -> B; the demand takes 1 of B. The
    certified point runs 1 through R1 and 2 round the detour and back (R3, R4, R5 back to A);
    the least flux over the same directions is R1 alone (hand-derived):

    >>> import cobra
    >>> m = cobra.Model("p")
    >>> a, b, c = (cobra.Metabolite(i) for i in "abc")
    >>> rs = [cobra.Reaction(i, lower_bound=-10, upper_bound=10) for i in
    ...       ("EX_a", "R1", "R3", "R4", "R5", "DM_b")]
    >>> m.add_reactions(rs)
    >>> for r, st in zip(rs, ({a: -1}, {a: -1, b: 1}, {a: -1, c: 1}, {c: -1, b: 1},
    ...                       {b: -1, a: 1}, {b: -1})):
    ...     r.add_metabolites(st)
    >>> m.reactions.DM_b.lower_bound = 1
    >>> s = least_flux_state(m, {"EX_a": -1, "R1": 1, "R3": 2, "R4": 2, "R5": 2, "DM_b": 1})
    >>> {k: round(v, 6) for k, v in s.fluxes.items() if abs(v) > 1e-9}
    {'EX_a': -1.0, 'R1': 1.0, 'DM_b': 1.0}
    """
    from cobra.util.array import create_stoichiometric_matrix
    from scipy.optimize import linprog

    ids = [r.id for r in model.reactions]
    v0 = np.array([float(fluxes.get(rid, 0.0)) for rid in ids])
    scale = max(1.0, float(np.max(np.abs(v0)))) if len(v0) else 1.0
    lower = np.array([r.lower_bound for r in model.reactions], float)
    upper = np.array([r.upper_bound for r in model.reactions], float)
    direction = np.where(v0 > ZERO_FLUX * scale, 1, np.where(v0 < -ZERO_FLUX * scale, -1, 0))
    lo = np.where(direction > 0, np.maximum(lower, 0.0), np.where(direction < 0, lower, 0.0))
    hi = np.where(direction > 0, upper, np.where(direction < 0, np.minimum(upper, 0.0), 0.0))
    # a reaction forced to carry flux (lower bound > 0 or upper < 0) keeps its bound
    lo = np.where((direction == 0) & (lower > 0), lower, lo)
    hi = np.where((direction == 0) & (upper < 0), upper, hi)
    lo, hi = np.minimum(lo, v0), np.maximum(hi, v0)   # the certified point stays feasible
    s = create_stoichiometric_matrix(model, array_type="dense")
    cost = np.where(direction >= 0, 1.0, -1.0)
    out = linprog(cost, A_eq=s, b_eq=np.zeros(s.shape[0]), bounds=list(zip(lo, hi)),
                  method="highs")
    if out.status != 0 or out.x is None:
        raise ComputationError(f"least-flux state: the linear program gave no point ({out.message})")
    v = np.asarray(out.x, float)
    # the numpy re-check, independent of the solver
    tol = CHECK_TOLERANCE * scale
    residual = float(np.max(np.abs(s @ v))) if s.size else 0.0
    bounds = float(max(np.max(lower - v), np.max(v - upper), 0.0)) if len(v) else 0.0
    flipped = [rid for rid, x, d in zip(ids, v, direction)
               if rid in energies and abs(x) > tol and np.sign(x) != d]
    if residual > tol or bounds > tol or flipped:
        raise ComputationError(f"least-flux state failed the re-check: |Sv| {residual:.1e}, bound "
                               f"excess {bounds:.1e}, direction changed: {', '.join(flipped) or 'none'}")
    v[np.abs(v) <= ZERO_FLUX * scale] = 0.0
    check = (f"least total flux over the certified point's directions and concentrations "
             f"(linear program, HiGHS via scipy); re-checked with numpy: mass balance "
             f"{residual:.1e}, flux bounds, every reaction with an energy runs in its certified "
             "direction or not at all")
    return LeastFluxState(dict(zip(ids, map(float, v))), float(np.abs(v0).sum()),
                          float(np.abs(v).sum()), check)


def at_least_flux(model, fluxes: Mapping[str, float], energies: set[str], words: str,
                  check: str) -> tuple[dict, str, str, str | None]:
    """A certified point in its least-flux form (:func:`least_flux_state`) with the words and
    check that say so: (fluxes, words, check, None), or the point as it is with the reason when
    the least-flux form fails its re-check: (fluxes, words, check, reason)."""
    try:
        least = least_flux_state(model, fluxes, energies)
    except ComputationError as err:
        return dict(fluxes), words, check, str(err)
    return (least.fluxes, words + ", at its least total flux over the same directions and "
            "concentrations", f"{least.check}; the point: {check}", None)
