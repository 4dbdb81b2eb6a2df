"""One uncertainty model over compounds: every source of energy contributes to one factor F over
the thermodynamic compounds of a network, so that reaction energies drawn as Sᵀ·ΔfG'° obey every
identity of the stoichiometry exactly.

The model
---------
The transformed formation energies of the compounds a network's reactions are written over
(``ReactionEnergy.compound_terms``: database keys, ``reconciled:<id>``, ``estimated:<id>``) are

    f = f̄ + F z,        z ~ N(0, I),

with one column of F per named source of error (the *sources*), each a standard normal number
that every compound, every reaction and every mode of a run share. The reaction energies of any
draw are g = ḡ + N F z with N the reactions' net coefficients over the compounds, so any
combination of reactions whose coefficients cancel over the compounds (a vector y with yᵀN = 0,
e.g. PTA + ACK − ACD) has yᵀg = yᵀḡ in every draw: Hess's law holds draw by draw. The sources:

- **species data** (one source per compound key, named by the key): σ of its ΔfG'° at the
  environment (:mod:`tfa.thermo.uncertainty`), carrier potentials included (their reduced form's
  energy −nFE carries the potential's σ). Taken as independent per compound, as in Henry et al.
  (2007).
- **reconciled compounds** (one source per literature value, ``value:<id>``): the reconciliation
  solves u = (A W^½)⁺ W^½ b (:mod:`tfa.thermo.reconcile`), so a standard normal error z_r of each
  weighted value moves u by the column r of P = (A W^½)⁺ and the covariance is P Pᵀ = (AᵀWA)⁺
  exactly (no decomposition). A reaction that restates a value is moved by that value's own
  source: every reaction restating the same value shares it. Conserved moieties: only
  identified combinations are used by reactions, and for them vᵀP Pᵀv is their variance. The
  temperature term of each value (ΔT times the entropy σ of the value, ``value-temperature:<id>``)
  enters through the same P, so it, too, is shared by everything that uses the value (in
  quadrature over the values; the per-reaction σ of :mod:`tfa.network.energies` adds the value
  terms linearly, which is larger).
- **group-contribution estimates** (:mod:`tfa.thermo.group_contribution`, σ² = s²(1 + xᵀM⁻¹x) +
  Σ_rare (n_g s)²): (i) the fit part s²xᵀM⁻¹x through the training values, s·xᵀM⁻¹Zᵀ (Z the
  design matrix; one source per training species, ``group fit:<species>``, shared by every
  estimate); (ii) the cross-validated residual s, carried by the compound's
  groups in proportion to their counts, s·n_g/‖n‖ on ``group:<g>``, so every estimate keeps its
  σ while two estimates correlate by the cosine of their group vectors and homologous steps that
  share all groups but one nearly cancel (our modelling choice: the residual of a group model is
  structural, shared by molecules built of the same groups; component contribution propagates
  the group-parameter covariance the same way, Noor et al. 2013); (iii) a group seen in fewer
  than three training species adds n_g s on ``rare group:<g>``. What an estimate's σ holds beyond
  these (the temperature term, protonation states) is its own source (named by its key).
- **reaction-level terms**, only where a value stands alone: a reaction whose stated σ holds more
  than its compounds give because its estimate lies outside its reaction class's range
  (:mod:`tfa.thermo.reaction_classes`) gets the difference as a term named by its canonical
  stoichiometry (``reaction:<canonical>``), shared by every reaction restating the same
  conversion; a reaction with no compound terms (a hand-made energy) has one named by its id.

Units: kJ/mol.

References
----------
[1] JCGM 100:2008 (GUM), section 5.2: propagation of correlated uncertainties, Cov = N C Nᵀ.
[2] C. S. Henry, L. J. Broadbelt, V. Hatzimanikatis, Biophys. J. 92 (2007) 1792-1805.
[3] E. Noor, H. S. Haraldsdóttir, R. Milo, R. M. T. Fleming, PLoS Comput. Biol. 9 (2013)
    e1003098 (component contribution: group-parameter covariance carried to reactions).
[4] R. Penrose, Proc. Cambridge Philos. Soc. 51 (1955) 406-413 (the pseudo-inverse).
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from ..errors import InputError
from ..util.keyed_random import keyed_normals
from .thermo_model import ThermoModel

log = logging.getLogger(__name__)

#: Relative tolerance below which a stated σ² and the compounds' variance are the same.
VARIANCE_TOLERANCE = 1e-6


@dataclass
class CompoundSpace:
    """The factor F of the compounds' ΔfG'° (kJ/mol): compounds × sources.

    Attributes
    ----------
    keys : compound keys, rows of ``factor`` (as in ``ReactionEnergy.compound_terms``)
    factor : ndarray, keys × sources, kJ/mol per unit normal
    source_names : name of each column (the key of its keyed normal number)
    source_labels : plain words for each column (what a reader is told carries a change)
    """

    keys: list[str]
    factor: np.ndarray
    source_names: list[str]
    source_labels: list[str] = field(default_factory=list)

    @property
    def sigma(self) -> np.ndarray:
        """σ of each compound's ΔfG'°, kJ/mol: σ_k = (Σ_s F_ks²)^½, the sources being independent
        standard normal numbers (JCGM 100:2008, GUM, eq. 10).

        >>> CompoundSpace(["A", "B"], np.array([[3.0, 4.0], [0.0, 2.0]]), ["s1", "s2"]).sigma.tolist()
        [5.0, 2.0]
        """
        return np.sqrt(np.sum(self.factor ** 2, axis=1))

    def covariance(self) -> np.ndarray:
        """F Fᵀ, kJ²/mol²."""
        return self.factor @ self.factor.T


class _Builder:
    def __init__(self) -> None:
        self.keys: list[str] = []
        self.key_index: dict[str, int] = {}
        self.sources: dict[str, int] = {}
        self.labels: list[str] = []
        self.entries: list[tuple[int, int, float]] = []

    def key(self, key: str) -> int:
        if key not in self.key_index:
            self.key_index[key] = len(self.keys)
            self.keys.append(key)
        return self.key_index[key]

    def add(self, key: str, source: str, label: str, loading: float) -> None:
        if loading == 0.0 or not math.isfinite(loading):
            return
        if source not in self.sources:
            self.sources[source] = len(self.labels)
            self.labels.append(label)
        self.entries.append((self.key(key), self.sources[source], float(loading)))

    def build(self) -> CompoundSpace:
        factor = np.zeros((len(self.keys), len(self.labels)))
        for i, s, value in self.entries:
            factor[i, s] += value
        return CompoundSpace(list(self.keys), factor, list(self.sources), list(self.labels))


def compound_space(table, keys: Sequence[str]) -> CompoundSpace:
    """The factor of the compounds ``keys`` from a network's compound energy table.

    Parameters
    ----------
    table : tfa.network.compound_table.CompoundEnergyTable
        The energies of the network's compounds at the environment.
    keys : compound keys to cover (those the reactions are written over).

    Returns
    -------
    CompoundSpace
        Rows in the order of ``keys``.
    """
    b = _Builder()
    for k in keys:
        b.key(k)
    by_key: dict[str, object] = {}
    estimate_of: dict[str, object] = {}
    for ce in table.compounds.values():
        if ce.key:
            by_key.setdefault(ce.key, ce)
        if ce.estimate_key:
            estimate_of.setdefault(ce.estimate_key, ce)
    rec = table.reconciliation
    reconciled_rows = _reconciled_rows(table) if rec is not None else {}
    gc = None
    for key in keys:
        ce = by_key.get(key)
        if ce is not None and ce.source == "reconciled" and key in reconciled_rows:
            for source, label, loading in reconciled_rows[key]:
                b.add(key, source, label, loading)
            continue
        if key in estimate_of and (ce is None or ce.source in ("estimated", "reconciled")):
            owner = estimate_of[key]
            gc = gc or _group_model()
            sigma = table.database.formation_energy(key, table.conditions).uncertainty
            _estimate_rows(b, key, owner.metabolite, owner.group_counts, sigma, gc)
            continue
        if ce is not None and ce.source == "species":
            sigma = ce.uncertainty
        else:
            try:
                sigma = table.database.formation_energy(key, table.conditions).uncertainty
            except Exception:  # noqa: BLE001 - a key the data cannot price has no error to draw
                log.info("compound %s: no σ found for the compound space", key)
                continue
        if sigma and math.isfinite(sigma):
            b.add(key, key, f"{key} (species data)", abs(float(sigma)))
    return b.build()


def _reconciled_rows(table) -> dict[str, list[tuple[str, str, float]]]:
    """Key of each reconciled compound -> [(source, label, loading)] from P = (A W^½)⁺."""
    from ..constants import T_REF
    from ..thermo.reconcile import (ENTROPY_SIGMA_NO_ENTHALPY, ENTROPY_SIGMA_WITH_ENTHALPY,
                                    RANK_TOLERANCE)

    rec = table.reconciliation
    if rec.matrix.size == 0:
        return {}
    sigma_r = np.array([r.sigma for r in rec.residuals], float)
    pinv = np.linalg.pinv(rec.matrix / sigma_r[:, None], rcond=RANK_TOLERANCE)
    delta_t = abs(table.conditions.temperature - T_REF)
    rates = np.array([ENTROPY_SIGMA_WITH_ENTHALPY if v.delta_h_standard is not None
                      else ENTROPY_SIGMA_NO_ENTHALPY for v in rec.values])
    out: dict[str, list[tuple[str, str, float]]] = {}
    for i, m in enumerate(rec.unknowns):
        ce = table.compounds.get(m)
        if ce is None or ce.source != "reconciled":
            continue
        rows = []
        for r, value in enumerate(rec.values):
            if pinv[i, r] != 0.0:
                rows.append((f"value:{value.id}", f"reaction value {value.id}", float(pinv[i, r])))
                if delta_t > 0:
                    rows.append((f"value-temperature:{value.id}",
                                 f"temperature dependence of reaction value {value.id}",
                                 float(pinv[i, r] * delta_t * rates[r] / sigma_r[r])))
        out[ce.key or m] = rows
    return out


def _group_model():
    from ..thermo.group_contribution import fitted_model

    return fitted_model()


def _estimate_rows(b: _Builder, key: str, name: str, counts: Mapping[str, int], sigma: float,
                   gc) -> None:
    """Rows of one group-contribution estimate (module text: fit, residual by groups, rare
    groups, and the rest of its σ as its own source)."""
    from ..thermo.group_contribution import RARE_GROUP_SPECIES

    fit = gc.fits["G"]
    s = gc.cross_validation().rmse
    influence, species = _fit_influence(gc)
    x = np.zeros(len(fit.columns) + 1)
    x[0] = 1.0
    index = {c: i + 1 for i, c in enumerate(fit.columns)}
    for g, n in counts.items():
        if g in index:
            x[index[g]] = n
    fit_row = s * (x @ influence)
    variance = float(fit_row @ fit_row)
    for sid, value in zip(species, fit_row):
        b.add(key, f"group fit:{sid}", f"training value {sid} of the group fit", float(value))
    norm = math.sqrt(sum(float(n) ** 2 for n in counts.values()))
    for g, n in sorted(counts.items()):
        if norm > 0:
            b.add(key, f"group:{g}", f"group {g}", s * float(n) / norm)
        if fit.species_seen.get(g, 0) < RARE_GROUP_SPECIES:
            b.add(key, f"rare group:{g}", f"rarely fitted group {g}", s * float(n))
            variance += (s * float(n)) ** 2
    variance += s * s if norm > 0 else 0.0
    rest = float(sigma) ** 2 - variance if math.isfinite(sigma) else 0.0
    if rest > VARIANCE_TOLERANCE * max(1.0, variance):
        b.add(key, key, f"{name} (estimate)", math.sqrt(rest))


_INFLUENCE: dict[int, tuple[np.ndarray, list[str]]] = {}


def _fit_influence(gc) -> tuple[np.ndarray, list[str]]:
    """M⁻¹Zᵀ of the ΔfG° group fit (groups × training species) and the species ids: the change
    of the group values per unit change of each training value, cached per fit. s²·M⁻¹ZᵀZM⁻¹
    is the fit's covariance s²M⁻¹ less the ridge's M⁻¹ΛM⁻¹ (Λ = 1e-3 on the groups; the small
    remainder stays in the estimate's own source)."""
    from ..thermo.group_contribution import _design

    token = id(gc)
    if token not in _INFLUENCE:
        fit = gc.fits["G"]
        design = _design(gc.counts, fit.columns)
        _INFLUENCE[token] = (fit.inverse @ design.T, [sp.id for sp in gc.species])
    return _INFLUENCE[token]


def canonical_stoichiometry(terms: Mapping[str, float]) -> str:
    """A name for a conversion that is the same for every multiple or reversal of it.

    >>> canonical_stoichiometry({"B": -2, "A": 2}) == canonical_stoichiometry({"A": -1, "B": 1})
    True
    """
    items = sorted((k, float(v)) for k, v in terms.items() if abs(float(v)) > 1e-12)
    if not items:
        return ""
    lead = items[0][1]
    return " ".join(f"{v / lead:+.6g} {k}" for k, v in items)


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
    def compound_space(self) -> CompoundSpace:
        """The compounds' factor F as a :class:`CompoundSpace` (rows :attr:`compound_ids`,
        columns :attr:`source_names`)."""
        return CompoundSpace(list(self.compound_ids), self.compound_factor, list(self.source_names),
                             list(self.source_labels))

    @property
    def compound_sigma(self) -> np.ndarray:
        """σ of each compound's ΔfG'° (kJ/mol): :attr:`CompoundSpace.sigma` of
        :attr:`compound_space`."""
        return self.compound_space.sigma

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


