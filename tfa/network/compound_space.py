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
  Σ_rare (n_g s)²): (i) the fit part s²xᵀM⁻¹x through a Cholesky factor of M⁻¹ shared by every
  estimate (``group fit:<i>``); (ii) the cross-validated residual s, carried by the compound's
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
        """σ of each compound's ΔfG'°, kJ/mol."""
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
    chol = _fit_cholesky(id(fit), fit.inverse)
    x = np.zeros(len(fit.columns) + 1)
    x[0] = 1.0
    index = {c: i + 1 for i, c in enumerate(fit.columns)}
    for g, n in counts.items():
        if g in index:
            x[index[g]] = n
    fit_row = s * (x @ chol)
    variance = float(fit_row @ fit_row)
    for i, value in enumerate(fit_row):
        b.add(key, f"group fit:{i}", "the group-contribution fit", float(value))
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


_CHOLESKY: dict[int, np.ndarray] = {}


def _fit_cholesky(token: int, inverse: np.ndarray) -> np.ndarray:
    """Lower Cholesky factor L of M⁻¹ (L Lᵀ = M⁻¹), cached per fit."""
    if token not in _CHOLESKY:
        _CHOLESKY[token] = np.linalg.cholesky((inverse + inverse.T) / 2.0)
    return _CHOLESKY[token]


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
