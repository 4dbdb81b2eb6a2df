"""Correlated uncertainty of reaction energies and reproducible draws of them.

Reactions that share a compound share that compound's error, so their ΔrG'° vary together. With
every reaction written over thermodynamic compounds (``ReactionEnergy.compound_terms``: compound
id -> net coefficient ν), and standard uncertainties σ_k of the compounds' ΔfG'° taken as
independent, the reaction energies g = N f have the covariance

    Σ = N C Nᵀ + D,     C = diag(σ_k²),   D = diag(s_j²),

where N (reactions × compounds) holds the coefficients and D carries, per reaction, the part of
its stated variance that is not compound based (literature or reconciled values, whose own
correlations are not handed over): s_j² = max(0, σ_j² − Σ_k N_jk² σ_k²). So the diagonal of Σ
equals each reaction's stated σ_j² and only the compound-based part is shared. This is the law of
propagation of uncertainty for linear functions of correlated inputs (JCGM 100:2008, "GUM",
section 5.2) applied to ΔrG'° = Σ ν ΔfG'°.

Draws: g = ḡ + F z with the factor F = [N·diag(σ_k) | diag(s_j)] (so F Fᵀ = Σ exactly and is
positive semi-definite by construction; no decomposition, hence the same numbers on every
machine). Draw i takes its seed sequence from ``numpy.random.SeedSequence(seed).spawn``'s i-th
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

import hashlib
import logging
import math
from dataclasses import dataclass, field, replace
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from ..errors import InputError
from ..network.thermo_model import ThermoModel

log = logging.getLogger(__name__)

#: Compound sources whose σ is an independent per-compound uncertainty (reconciled compounds
#: carry correlations of their own fit and stay reaction-level).
COMPOUND_BASED_SOURCES = ("species", "estimated")


@dataclass
class EnergyCovariance:
    """Mean, covariance and draw factor of the ΔrG'° of a set of reactions (kJ/mol).

    g = ḡ + N F z + R w: N the reactions' coefficients over the compounds, F the compounds'
    factor over the named sources (:mod:`tfa.network.compound_space`), R the reaction-level
    terms (only where a value stands alone), z and w standard normal numbers keyed by name.

    Attributes
    ----------
    reaction_ids : reactions, in the order of every array
    mean : ΔrG'° as prepared
    sigma : stated standard uncertainty of each reaction
    compound_ids : compounds, columns of ``loadings`` and rows of ``compound_factor``
    loadings : N, reactions × compounds, net coefficients
    compound_factor : F, compounds × sources (kJ/mol per unit normal)
    source_names : name of each column of F (the key of its normal number)
    reaction_loadings : R, reactions × reaction-level terms
    reaction_term_names : name of each column of R
    source_labels : plain words for each source, then each reaction-level term
    """

    reaction_ids: list[str]
    mean: np.ndarray
    sigma: np.ndarray
    compound_ids: list[str]
    loadings: np.ndarray
    compound_factor: np.ndarray
    source_names: list[str]
    reaction_loadings: np.ndarray
    reaction_term_names: list[str]
    source_labels: list[str] = field(default_factory=list)

    @property
    def compound_sigma(self) -> np.ndarray:
        """σ of each compound's ΔfG'° (kJ/mol)."""
        return np.sqrt(np.sum(self.compound_factor ** 2, axis=1))

    @property
    def independent_sigma(self) -> np.ndarray:
        """σ of each reaction's reaction-level terms (kJ/mol; 0 where it has none)."""
        return np.sqrt(np.sum(self.reaction_loadings ** 2, axis=1))

    @property
    def factor(self) -> np.ndarray:
        """[N F | R], reactions × (sources + reaction terms); its product with its transpose is Σ."""
        return np.hstack([self.loadings @ self.compound_factor, self.reaction_loadings])

    @property
    def energy_map(self) -> np.ndarray:
        """[N | E]: what the reaction energies are made of, the compounds and (E, a 0/1 matrix)
        the reaction-level terms. Every y with yᵀ[N | E] = 0 (a vector of its left null space) is
        an identity of the energies: yᵀg = yᵀḡ in every draw."""
        indicator = (np.abs(self.reaction_loadings) > 0).astype(float)
        return np.hstack([self.loadings, indicator])

    @property
    def covariance(self) -> np.ndarray:
        """Σ = N F Fᵀ Nᵀ + R Rᵀ, kJ²/mol²."""
        f = self.factor
        return f @ f.T

    def correlation(self) -> np.ndarray:
        """Correlation matrix (0 where a reaction has σ = 0, 1 on its diagonal)."""
        cov = self.covariance
        s = np.sqrt(np.diag(cov))
        with np.errstate(divide="ignore", invalid="ignore"):
            corr = cov / np.outer(s, s)
        corr[~np.isfinite(corr)] = 0.0
        np.fill_diagonal(corr, 1.0)
        return corr

    @property
    def factor_names(self) -> list[str]:
        """Name of each column of :attr:`factor`: the sources, then the reaction-level terms."""
        return list(self.source_names) + list(self.reaction_term_names)

    @property
    def factor_labels(self) -> list[str]:
        """Plain words for each column of :attr:`factor`."""
        labels = list(self.source_labels) or list(self.source_names)
        labels += [name.replace("reaction:", "reaction value ", 1)
                   for name in self.reaction_term_names]
        return labels

    def normals(self, seed: int, index: int) -> np.ndarray:
        """The standard normal numbers of draw ``index`` (one per :attr:`factor_names`)."""
        return keyed_normals(seed, index, self.factor_names)

    def draw(self, seed: int, index: int) -> np.ndarray:
        """Draw number ``index`` of the run seeded ``seed``: ḡ + N F z + R w, kJ/mol."""
        z = self.normals(seed, index)
        k = len(self.source_names)
        return self.mean + self.loadings @ (self.compound_factor @ z[:k]) + self.reaction_loadings @ z[k:]

    def to_frame(self) -> pd.DataFrame:
        """One row per reaction: ΔrG'°, stated σ, σ from Σ, shared and independent parts."""
        cov = self.covariance
        shared = np.sqrt(np.maximum(np.diag(cov) - self.independent_sigma ** 2, 0.0))
        return pd.DataFrame({
            "reaction": self.reaction_ids,
            "delta_g_standard_kJ_per_mol": self.mean,
            "sigma_kJ_per_mol": self.sigma,
            "sigma_from_covariance_kJ_per_mol": np.sqrt(np.diag(cov)),
            "shared_sigma_kJ_per_mol": shared,
            "independent_sigma_kJ_per_mol": self.independent_sigma,
        })


def _name_key(name: str) -> int:
    """A stable 63-bit number for a name (the same in every process and on every machine)."""
    return int.from_bytes(hashlib.sha256(name.encode("utf-8")).digest()[:8], "big") >> 1


def keyed_normals(seed: int, index: int, names: Sequence[str]) -> np.ndarray:
    """One standard normal number per name for draw ``index`` of the run seeded ``seed``.

    The number of a name does not depend on the other names asked for:

    >>> a = keyed_normals(3, 0, ["H2", "CO2tot", "formate"])
    >>> b = keyed_normals(3, 0, ["formate", "H2"])
    >>> bool(a[2] == b[0] and a[0] == b[1])
    True
    """
    if seed is None or int(seed) < 0:
        raise InputError(f"the seed must be a whole number >= 0, got {seed!r}")
    out = np.empty(len(names))
    for k, name in enumerate(names):
        sequence = np.random.SeedSequence(int(seed), spawn_key=(int(index), _name_key(str(name))))
        out[k] = np.random.default_rng(sequence).standard_normal()
    return out


def compound_sigmas(thermo_model: ThermoModel) -> dict[str, float]:
    """σ of ΔfG'° (kJ/mol) of every compound whose error is independent per compound, keyed as in
    ``ReactionEnergy.compound_terms`` (read from the model's compound energy table, when the
    network layer attached one; empty otherwise, and then every reaction varies on its own)."""
    table = getattr(thermo_model, "compound_table", None)
    out: dict[str, float] = {}
    if table is None:
        return out
    for ce in table.compounds.values():
        if ce.source in COMPOUND_BASED_SOURCES and ce.key and math.isfinite(ce.uncertainty):
            out[ce.key] = float(ce.uncertainty)
    return out


def energy_covariance(thermo_model: ThermoModel, compound_sigma: Mapping[str, float] | None = None,
                      reaction_ids: Sequence[str] | None = None, tolerance: float = 1e-9) -> EnergyCovariance:
    """Covariance Σ = N C Nᵀ + D of the reactions' ΔrG'° (see the module docstring).

    Parameters
    ----------
    thermo_model : ThermoModel
        Energies with ``uncertainty`` and ``compound_terms``.
    compound_sigma : mapping, optional
        σ_k per compound (kJ/mol); default :func:`compound_sigmas` of the model.
    reaction_ids : reactions to include (default: every reaction with an energy, sorted).
    tolerance : float
        Relative tolerance, kJ²/mol², by which a reaction's compound part may exceed its stated
        variance (rounding) before it is an error.

    Returns
    -------
    EnergyCovariance

    Examples
    --------
    Two reactions that share compound B (A -> B and B -> C) with σ_A = 1, σ_B = 2, σ_C = 3
    kJ/mol: Var = 1 + 4 = 5 and 4 + 9 = 13, Cov = (+1)(−1)σ_B² = −4 (GUM section 5.2):

    >>> from tfa.network.thermo_model import ReactionEnergy
    >>> e = {"R1": ReactionEnergy("R1", -10.0, 5 ** 0.5, "species", "", {"A": -1, "B": 1}),
    ...      "R2": ReactionEnergy("R2", 3.0, 13 ** 0.5, "species", "", {"B": -1, "C": 1})}
    >>> class Stub: energies = e
    >>> cov = energy_covariance(Stub(), {"A": 1.0, "B": 2.0, "C": 3.0})
    >>> cov.covariance.round(6).tolist()
    [[5.0, -4.0], [-4.0, 13.0]]
    """
    energies = thermo_model.energies
    ids = sorted(energies) if reaction_ids is None else list(reaction_ids)
    missing = [r for r in ids if r not in energies]
    if missing:
        raise InputError(f"reaction(s) {', '.join(missing[:5])} have no energy; leave them out of "
                         "the covariance")
    mean = np.array([float(energies[r].standard) for r in ids])
    sigma = np.array([0.0 if energies[r].uncertainty is None or not math.isfinite(energies[r].uncertainty)
                      else abs(float(energies[r].uncertainty)) for r in ids])
    table = getattr(thermo_model, "compound_table", None)
    if compound_sigma is None and table is not None:
        return _compound_space_covariance(energies, ids, mean, sigma, table, tolerance)
    sigmas = dict(compound_sigmas(thermo_model) if compound_sigma is None else compound_sigma)
    used = sorted({k for r in ids for k in energies[r].compound_terms if k in sigmas})
    n = _loadings(energies, ids, used)
    c_sigma = np.array([abs(float(sigmas[k])) for k in used])
    shared_var = (n ** 2) @ (c_sigma ** 2)
    residual = sigma ** 2 - shared_var
    too_big = residual < -tolerance * np.maximum(1.0, sigma ** 2)
    if np.any(too_big):
        j = int(np.flatnonzero(too_big)[0])
        log.warning("reaction %s: its compounds' σ give %.3g kJ/mol, more than its stated σ %.3g; "
                    "the compound part is used as is", ids[j], math.sqrt(shared_var[j]), sigma[j])
    independent = np.sqrt(np.maximum(residual, 0.0))
    return EnergyCovariance(ids, mean, sigma, used, n, np.diag(c_sigma), list(used),
                            np.diag(independent), [f"reaction:{r}" for r in ids])


def _loadings(energies, ids: Sequence[str], compounds: Sequence[str]) -> np.ndarray:
    """N: reactions × compounds, the net coefficients of each reaction over the compounds."""
    index = {k: i for i, k in enumerate(compounds)}
    n = np.zeros((len(ids), len(compounds)))
    for j, rid in enumerate(ids):
        for k, coef in energies[rid].compound_terms.items():
            if k in index:
                n[j, index[k]] += float(coef)
    return n


def _compound_space_covariance(energies, ids, mean, sigma, table, tolerance) -> EnergyCovariance:
    """The covariance of reactions written over a compound table's compounds: every source in
    compound space (:mod:`tfa.network.compound_space`), reaction-level terms only where a value
    stands alone."""
    from ..network.compound_space import canonical_stoichiometry, compound_space

    used = sorted({k for r in ids for k in energies[r].compound_terms})
    space = compound_space(table, used)
    n = _loadings(energies, ids, space.keys)
    shared_var = np.sum((n @ space.factor) ** 2, axis=1)
    terms: dict[str, int] = {}
    entries: list[tuple[int, int, float]] = []
    for j, rid in enumerate(ids):
        e = energies[rid]
        extra = sigma[j] ** 2 - shared_var[j]
        if not e.compound_terms:
            name = f"reaction:{rid}"
        elif extra > 1e-6 * max(1.0, sigma[j] ** 2) and any(f.startswith("class check:") for f in e.audit_flags):
            name = "reaction:" + canonical_stoichiometry(e.compound_terms)
        else:
            continue
        if extra <= 0:
            continue
        column = terms.setdefault(name, len(terms))
        entries.append((j, column, math.sqrt(extra)))
    r = np.zeros((len(ids), len(terms)))
    for j, column, value in entries:
        r[j, column] = value
    return EnergyCovariance(ids, mean, sigma, list(space.keys), n, space.factor,
                            list(space.source_names), r, list(terms), list(space.source_labels))


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
