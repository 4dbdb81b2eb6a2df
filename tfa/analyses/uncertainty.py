"""Correlated uncertainty of reaction energies and reproducible draws of them.

Every reaction is written over thermodynamic compounds (``ReactionEnergy.compound_terms``:
compound id -> net coefficient ν), and every source of energy contributes to one factor F over
those compounds (:mod:`tfa.network.compound_space`: species data, the reconciliation of reaction
values, group-contribution estimates correlated through their groups). The reaction energies
g = ḡ + N F z then have the covariance

    Σ = N F Fᵀ Nᵀ + R Rᵀ,

N (reactions × compounds) the coefficients, R the reaction-level terms of values that stand
alone (a term per restated conversion, shared by every reaction restating it). Every identity of
the stoichiometry (yᵀN = 0) holds in every draw. This is the law of propagation of uncertainty
for linear functions of correlated inputs (JCGM 100:2008, "GUM", section 5.2) applied to
ΔrG'° = Σ ν ΔfG'°. Without a compound table (a hand-made model) or with explicit compound σ_k,
the older rule applies: F = diag(σ_k) and R = diag(s_j), s_j² = max(0, σ_j² − Σ_k N_jk² σ_k²).

Draws: g = ḡ + [N F | R] z (so the factor's square is Σ exactly and positive semi-definite by
construction). Draw i takes its seed sequence from ``numpy.random.SeedSequence(seed).spawn``'s i-th
child, and within it one standard normal number per *name* (a compound key, or
``reaction:<id>`` for an independent part), from that child's child numbered by a stable hash of
the name. So draw i depends only on (seed, i) — never on which process computes it or in which
order — and a compound has the same error in draw i of every mode, whatever other reactions the
mode's rewrite adds. For a covariance given as a matrix, :func:`psd_factor` uses an
eigen-decomposition with negative eigenvalues clipped (PSD guard).

Units: kJ/mol throughout.

References
----------
[1] JCGM 100:2008, Evaluation of measurement data — Guide to the expression of uncertainty in
    measurement (GUM), section 5.2 (correlated input quantities).
[2] C. S. Henry, L. J. Broadbelt, V. Hatzimanikatis, Biophys. J. 92 (2007) 1792-1805 (reaction
    energies from compound energies).
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field, replace
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from ..errors import InputError
from ..network.compound_space import (COMPOUND_BASED_SOURCES, EnergyCovariance,  # noqa: F401
                                      compound_sigmas, energy_covariance)
from ..network.thermo_model import ThermoModel
from ..util.keyed_random import _name_key, keyed_normals  # noqa: F401

log = logging.getLogger(__name__)

def psd_factor(covariance: np.ndarray, tolerance: float = 1e-10) -> np.ndarray:
    """A factor F with F Fᵀ ≈ Σ for a symmetric matrix Σ, negative eigenvalues clipped to 0.

    Eigenvalues below ``-tolerance * max(|λ|)`` mean Σ is not a covariance and raise
    :class:`~tfa.errors.InputError`; smaller negative ones are rounding and become 0 (PSD guard).

    >>> f = psd_factor(np.array([[4.0, 2.0], [2.0, 1.0]]))   # rank one
    >>> (f @ f.T).round(12).tolist()
    [[4.0, 2.0], [2.0, 1.0]]
    """
    cov = np.asarray(covariance, float)
    if cov.ndim != 2 or cov.shape[0] != cov.shape[1]:
        raise InputError(f"a covariance must be a square matrix, got shape {cov.shape}")
    if not np.allclose(cov, cov.T, atol=1e-12 * max(1.0, float(np.abs(cov).max(initial=0.0)))):
        raise InputError("a covariance must be symmetric")
    values, vectors = np.linalg.eigh(cov)
    scale = float(np.abs(values).max(initial=0.0))
    if scale > 0 and values.min() < -tolerance * scale:
        raise InputError(f"the covariance is not positive semi-definite (eigenvalue {values.min():.3g}); "
                         "check the uncertainties")
    return vectors * np.sqrt(np.clip(values, 0.0, None))[None, :]


def draw_energies(thermo_model: ThermoModel | EnergyCovariance, n: int, seed: int,
                  start: int = 0) -> tuple[list[str], np.ndarray]:
    """``n`` draws of ΔrG'° (kJ/mol): (reaction ids, array n × reactions).

    Row i is draw number ``start + i`` of the run seeded ``seed``; it is the same whichever other
    draws are made or in which order. With every σ = 0 each row equals the mean exactly.

    >>> from tfa.network.thermo_model import ReactionEnergy
    >>> class Stub: energies = {"R1": ReactionEnergy("R1", -10.0, 0.0, "species", "", {"A": 1})}
    >>> ids, draws = draw_energies(Stub(), 3, seed=1)
    >>> ids, draws.tolist()
    (['R1'], [[-10.0], [-10.0], [-10.0]])
    """
    if n < 0:
        raise InputError(f"the number of draws must be >= 0, got {n}")
    cov = thermo_model if isinstance(thermo_model, EnergyCovariance) else energy_covariance(thermo_model)
    out = np.empty((n, len(cov.reaction_ids)))
    for i in range(n):
        out[i] = cov.draw(seed, start + i)
    return list(cov.reaction_ids), out


def with_energies(thermo_model: ThermoModel, values: Mapping[str, float],
                  uncertainty: float | None = None) -> ThermoModel:
    """A shallow copy of ``thermo_model`` (same cobra model) whose ΔrG'° are ``values``.

    Reactions not in ``values`` keep theirs. ``uncertainty`` replaces every σ when given (a drawn
    value is one realisation, so robustness runs pass 0 for the problem's slack to stay off).
    """
    unknown = [r for r in values if r not in thermo_model.energies]
    if unknown:
        raise InputError(f"reaction(s) {', '.join(unknown[:5])} have no energy in the model")
    energies = {}
    for rid, e in thermo_model.energies.items():
        changes = {}
        if rid in values:
            changes["standard"] = float(values[rid])
        if uncertainty is not None:
            changes["uncertainty"] = float(uncertainty)
        energies[rid] = replace(e, **changes) if changes else e
    copy = replace(thermo_model, energies=energies)
    for extra in ("compound_table", "all_energies"):
        if hasattr(thermo_model, extra):
            setattr(copy, extra, getattr(thermo_model, extra))
    return copy
