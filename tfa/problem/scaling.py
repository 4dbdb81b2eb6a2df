"""The flux scale of a problem: solvers see fluxes in units of the largest required flux.

A flux is *required* when its bounds exclude zero (a demand's lower bound, a forced uptake).
Solvers work to absolute tolerances (1e-9 here), so the same network asked for a demand of 1e-6
or of 10 must reach them as the same numbers. Inside the problem every flux is divided by the
flux scale s, the largest required flux (1 when none is required), so the demand is of order 1:

    v' = v / s,   lower' = max(lower / s, -R),   upper' = min(upper / s, R)

with R = :data:`FLUX_REACH`. Mass balance S v = 0 is homogeneous, so it is unchanged. The cap R
is part of the problem: fluxes are sought up to R times the largest required flux. It is what
lets the 0/1 direction variables close a direction: with the integrality tolerance t of the
solver, a closed direction can pass up to t * R (scaled) in a mixed-integer point, 1e-5 of the
demand here, and every point is then solved again as a linear program with the directions fixed
(:meth:`tfa.problem.builder.ThermoProblem.solve`), which passes none.

Required fluxes that differ by more than :data:`MAX_REQUIRED_SPAN` cannot all be resolved at
that tolerance and are refused with a message (:func:`flux_scale`).

Units: those of the network's flux bounds (e.g. mmol/g/h); s carries them, v' has none.
"""

from __future__ import annotations

import numpy as np

from ..errors import InputError

#: Fluxes are sought up to this multiple of the flux scale (the largest required flux).
FLUX_REACH = 1e4
#: Largest ratio between required fluxes that the solvers resolve: with fluxes scaled to the
#: largest, the smallest must stay well above the flux a closed direction can pass in a
#: mixed-integer point (integrality tolerance 1e-9 times FLUX_REACH = 1e-5).
MAX_REQUIRED_SPAN = 1e4


def required_fluxes(lower: np.ndarray, upper: np.ndarray) -> np.ndarray:
    """The flux each reaction must carry at least in magnitude: lower if lower > 0, -upper if
    upper < 0, else 0 (same units as the bounds).

    >>> required_fluxes(np.array([0.01, -5.0, -3.0]), np.array([1000.0, 5.0, -2.0])).tolist()
    [0.01, 0.0, 2.0]
    """
    lower = np.asarray(lower, float)
    upper = np.asarray(upper, float)
    return np.where(lower > 0, lower, np.where(upper < 0, -upper, 0.0))


def flux_scale(lower: np.ndarray, upper: np.ndarray, reaction_ids: list[str]) -> float:
    """The flux scale s: the largest required flux, 1 when none is required.

    Raises
    ------
    InputError
        When the required fluxes span more than :data:`MAX_REQUIRED_SPAN`, naming the smallest
        and the largest.

    Examples
    --------
    A demand of 1e-6 is the scale; a second required flux of 800 next to a demand of 1e-3 spans
    8e5 and is refused:

    >>> flux_scale(np.array([1e-6, -10.0]), np.array([1e3, 10.0]), ["DM", "EX"])
    1e-06
    >>> flux_scale(np.array([1e-3, 800.0]), np.array([1e3, 1e3]), ["DM", "ATPM"])
    Traceback (most recent call last):
    ...
    tfa.errors.InputError: the required fluxes span from 0.001 (DM) to 800 (ATPM), a ratio of 8e+05; ...
    """
    need = required_fluxes(lower, upper)
    positive = np.flatnonzero(need > 0)
    if positive.size == 0:
        return 1.0
    big = positive[np.argmax(need[positive])]
    small = positive[np.argmin(need[positive])]
    span = need[big] / need[small]
    if span > MAX_REQUIRED_SPAN:
        raise InputError(
            f"the required fluxes span from {need[small]:g} ({reaction_ids[small]}) to "
            f"{need[big]:g} ({reaction_ids[big]}), a ratio of {span:.3g}; the solvers resolve "
            f"required fluxes within a ratio of {MAX_REQUIRED_SPAN:g} of each other (tolerance "
            "1e-9 on fluxes scaled to the largest): raise the smaller or lower the larger bound")
    return float(need[big])


def scaled_bounds(lower: np.ndarray, upper: np.ndarray, scale: float,
                  reach: float = FLUX_REACH) -> tuple[np.ndarray, np.ndarray]:
    """Bounds divided by the flux scale and capped at +/- ``reach`` (a required flux is at most
    1 after scaling, so the cap never cuts one off).

    >>> lo, hi = scaled_bounds(np.array([1e-6, -1000.0]), np.array([1000.0, 1000.0]), 1e-6)
    >>> lo.tolist(), hi.tolist()
    ([1.0, -10000.0], [10000.0, 10000.0])
    """
    lo = np.maximum(np.asarray(lower, float) / scale, -reach)
    hi = np.minimum(np.asarray(upper, float) / scale, reach)
    return lo, hi
