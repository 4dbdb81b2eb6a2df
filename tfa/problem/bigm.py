"""Interval bounds of reaction energies and the big-M constants derived from them.

For reaction j, g_j = ΔrG'°_j + eps_j + RT sum_i S_ij x_i with x_i in [lo_i, hi_i] and
|eps_j| <= k sigma_j. Interval arithmetic (R. E. Moore, Interval Analysis, Prentice-Hall, 1966)
gives the exact range of this linear form over the box:

    g_lo_j = ΔrG'°_j - k sigma_j + RT sum_i min(S_ij lo_i, S_ij hi_i)
    g_hi_j = ΔrG'°_j + k sigma_j + RT sum_i max(S_ij lo_i, S_ij hi_i)

The direction constraints of thermodynamics-based flux analysis (Henry, Broadbelt &
Hatzimanikatis 2007, Biophys. J. 92:1792) are g_j <= -delta + M_f (1 - f_j) and
-g_j <= -delta + M_b (1 - b_j). The smallest M that leaves the constraint redundant when the
binary is 0 is M_f = g_hi + delta and M_b = delta - g_lo. A direction is possible only when
g_lo <= -delta (forward) or g_hi >= delta (backward); for a possible direction the big-M never
exceeds the interval width g_hi - g_lo. Units: kJ/mol throughout.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


def energy_intervals(standard: np.ndarray, slack: np.ndarray, rows: np.ndarray, cols: np.ndarray,
                     values: np.ndarray, log_lower: np.ndarray, log_upper: np.ndarray,
                     rt: float) -> tuple[np.ndarray, np.ndarray]:
    """Exact lower and upper bounds of each g_j over the concentration and slack boxes.

    Parameters
    ----------
    standard : ndarray
        ΔrG'° per reaction, kJ/mol.
    slack : ndarray
        Half-width k sigma of the uncertainty slack per reaction, kJ/mol.
    rows, cols, values : ndarray
        Activity stoichiometry in coordinate form (reaction row, compound column, coefficient).
    log_lower, log_upper : ndarray
        Bounds of ln c per compound (c in mol/L or bar).
    rt : float
        R*T, kJ/mol.

    Returns
    -------
    (g_lo, g_hi) : tuple of ndarray, kJ/mol

    Examples
    --------
    A <=> B with ΔrG'° = -5 kJ/mol at 298.15 K and both compounds between 1 uM and 10 mM:
    RT ln(1e4) = 22.83 kJ/mol, so g ranges over -5 -/+ 22.83 (interval arithmetic, Moore 1966).

    >>> import numpy as np
    >>> lo, hi = energy_intervals(np.array([-5.0]), np.zeros(1), np.array([0, 0]),
    ...     np.array([0, 1]), np.array([-1.0, 1.0]), np.log([1e-6, 1e-6]), np.log([1e-2, 1e-2]),
    ...     8.314462618e-3 * 298.15)
    >>> round(float(lo[0]), 2), round(float(hi[0]), 2)
    (-27.83, 17.83)
    """
    values = np.asarray(values, float)
    cols = np.asarray(cols, int)
    rows = np.asarray(rows, int)
    at_lo = values * np.asarray(log_lower, float)[cols]
    at_hi = values * np.asarray(log_upper, float)[cols]
    n = len(standard)
    low = np.bincount(rows, weights=np.minimum(at_lo, at_hi), minlength=n)
    high = np.bincount(rows, weights=np.maximum(at_lo, at_hi), minlength=n)
    standard = np.asarray(standard, float)
    slack = np.asarray(slack, float)
    return standard - slack + rt * low, standard + slack + rt * high


@dataclass
class BigM:
    """Big-M constants and the directions the energy box allows, per reaction (kJ/mol)."""

    forward: np.ndarray
    backward: np.ndarray
    forward_possible: np.ndarray
    backward_possible: np.ndarray


def direction_big_m(g_lo: np.ndarray, g_hi: np.ndarray, delta: float) -> BigM:
    """Smallest big-M for the forward and backward direction constraints.

    M_f = max(0, g_hi + delta) (forward possible iff g_lo <= -delta), M_b = max(0, delta - g_lo)
    (backward possible iff g_hi >= delta); a direction that every point of the box allows needs
    no relaxation (M = 0); an impossible direction gets M = 0 and its binary is fixed at 0.

    Examples
    --------
    >>> m = direction_big_m(np.array([-27.83, 1.0]), np.array([17.83, 30.0]), 0.1)
    >>> [round(float(v), 2) for v in m.forward], [round(float(v), 2) for v in m.backward]
    ([17.93, 0.0], [27.93, 0.0])
    >>> m.forward_possible.tolist(), m.backward_possible.tolist()
    ([True, False], [True, True])
    """
    g_lo = np.asarray(g_lo, float)
    g_hi = np.asarray(g_hi, float)
    fwd_ok = g_lo <= -delta
    bwd_ok = g_hi >= delta
    m_f = np.where(fwd_ok, np.maximum(g_hi + delta, 0.0), 0.0)
    m_b = np.where(bwd_ok, np.maximum(delta - g_lo, 0.0), 0.0)
    return BigM(m_f, m_b, fwd_ok, bwd_ok)
