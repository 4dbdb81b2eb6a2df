"""New reaction energies on a built thermodynamic flux problem.

:class:`EnergyChange` is a mixin of :class:`tfa.problem.builder.ThermoProblem`: it changes, in
place, what a fresh build for other ΔrG'° would make differently, so a run over many draws of the
energies (:mod:`tfa.analyses.draws`) builds the problem once. The rows and intervals follow the
builder's formulation (thermodynamics-based flux analysis, Henry, Broadbelt & Hatzimanikatis
2007, Biophys. J. 92:1792; interval bounds and big-M of :mod:`tfa.problem.bigm`).
"""

from __future__ import annotations

import numpy as np

from ..errors import InputError
from .bigm import direction_big_m, energy_intervals


class EnergyChange:
    """:meth:`set_standard` of :class:`~tfa.problem.builder.ThermoProblem` (module text)."""

    def set_standard(self, standard: np.ndarray) -> None:
        """Give the reactions with an energy new ΔrG'° (kJ/mol, in the order of
        :attr:`energy_ids`): the problem becomes the one a fresh build for these energies makes.

        Changed: the right-hand side of each energy's definition row, the bounds of g_j (the
        interval bounds of :func:`tfa.problem.bigm.energy_intervals`), the big-M coefficient and
        right-hand side of each direction row (:func:`tfa.problem.bigm.direction_big_m`), and the
        direction binaries the new intervals forbid (fixed at 0). :attr:`standard` follows, so the
        certificate checks a point against these energies. Every new value must lie within the
        ``energy_spread`` the problem was built with (its rows exist only for the directions
        that spread allows); outside it raises InputError and the caller builds afresh.
        Only for the feasibility and uphill-set problems (not the max-min driving force).
        """
        values = np.asarray(standard, float)
        if values.shape != self.standard.shape:
            raise InputError(f"set_standard: {len(self.standard)} energies expected, got {values.shape}")
        if self.options.driving_force:
            raise InputError("set_standard: the max-min driving force problem is built per energies")
        outside = np.flatnonzero(np.abs(values - self.built_standard) > self.energy_spread + 1e-9)
        if outside.size:
            raise InputError(f"set_standard: reaction {self.energy_ids[outside[0]]} moves "
                             f"{values[outside[0]] - self.built_standard[outside[0]]:+.3g} kJ/mol, "
                             f"beyond the spread of {self.energy_spread[outside[0]]:.3g} kJ/mol the "
                             "problem was built for; build it afresh")
        delta = self.options.min_driving_force
        g_lo, g_hi = energy_intervals(values, self.slack_width, *self.thermo, self.envelope_lower,
                                      self.envelope_upper, self.thermo_model.RT)
        big_m = direction_big_m(g_lo, g_hi, delta)
        fwd_open, bwd_open = self.direction_open
        for j, (row, g) in enumerate(zip(self._definition_rows, self.g_vars)):
            _fix_row(row, float(values[j]))
            g.set_bounds(float(g_lo[j]), float(g_hi[j]))
            for sign, binary, possible, built_open, m in (
                    (1, self.f_vars[j], big_m.forward_possible[j], fwd_open[j], g_hi[j] + delta),
                    (-1, self.b_vars[j], big_m.backward_possible[j], bwd_open[j], delta - g_lo[j])):
                binary.ub = 1 if (possible and built_open) else 0
                direction = self._direction_rows.get((j, sign))
                if direction is not None:
                    # a forbidden direction keeps a redundant row (M = the interval's reach)
                    m = max(float(m), 0.0)
                    direction.set_linear_coefficients({binary: m})
                    direction.ub = m - delta
        self.standard = values.copy()
        self.g_lower, self.g_upper, self.big_m = g_lo, g_hi, big_m


def _fix_row(row, value: float) -> None:
    """Set a row's lower and upper bound to ``value`` (in the order its current bounds allow:
    optlang refuses a lower bound above the upper one even for a moment)."""
    if row.ub is not None and value > row.ub:
        row.ub = value
        row.lb = value
    else:
        row.lb = value
        row.ub = value
