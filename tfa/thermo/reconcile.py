"""Reconciliation of literature reaction energies: formation energies of compounds that have no
species data, solved from reaction-level values that link them to compounds that have.

The problem
-----------
Unknowns ``u`` are the transformed standard formation energies ΔfG'° of the compounds without
species data at one *reference* condition (by default 25 °C, the pH and ionic strength most of
the literature values were measured at). Each literature value r (ΔrG'°_r at its own temperature
T_r, pH_r, I_r) gives one linear equation::

    Σ_u ν_ru (u + δ_u(r)) = ΔrG'°_r(T_ref) − Σ_k ν_rk ΔfG'°_k(T_ref, pH_r, I_r)

where k runs over the compounds with species data (their energies come from the thermodynamic
database at the value's own pH and ionic strength), and δ_u(r) carries unknown u from the reference
pH and ionic strength to those of value r through Alberty's Legendre transform of its reference
species (nH and charge z from the compounds table; single-species approximation)::

    δ_u(r) = nH RT ln10 (pH_r − pH_ref) − RTα (z² − nH) [f(I_r) − f(I_ref)],   f(I) = √I/(1 + 1.6√I)

Magnesium: a value measured with Mg2+ states its pMg; its known compounds then enter at that
pMg (their Mg-binding species, e.g. MgATP2−, MgHPO4, MgP2O7(2−), by Alberty's transform), which
amounts to carrying the value to the Mg-free reference of the unknowns: ΔrG'°(no Mg) =
ΔrG'°(pMg_r) − Σ_k ν_k [ΔfG'°_k(pMg_r) − ΔfG'°_k(no Mg)]. The unknowns' own Mg binding is not
known and is neglected (below 0.5 kJ/mol at pMg ≥ 3 for phosphate monoesters, log K about 2;
Alberty 2003, from memory).

The literature value is brought to 298.15 K by the Gibbs-Helmholtz equation with constant ΔrH'°
when ΔrH'° is given, ΔrG'°(T2) = ΔrG'°(T1)·T2/T1 + ΔrH'°(1 − T2/T1), and otherwise taken as
independent of temperature (ΔrS'° = 0, the documented approximation of this module).

Weights are 1/σ_r², with σ_r² = σ_lit² + Σ_k ν_rk² σ_k² (known compounds taken as independent).
The system is solved by weighted least squares. Conserved moieties (CoA, THF, a carrier that only
ever appears as a pair) make it rank-deficient: the minimum-norm solution is returned
(Moore-Penrose pseudo-inverse), with covariance C = (AᵀWA)⁺. Only combinations of unknowns that
lie in the row space of A are determined by the data ("identified"); a reaction whose
unknown-compound stoichiometry is not identified gets no reconciled value
(:meth:`Reconciliation.reaction_energy` raises :class:`~tfa.errors.MissingDataError`).

Disagreements: the residual e_r = b_r − (A x)_r of each value is compared with its own standard
deviation σ_r √(1 − h_r) (h_r the leverage, the diagonal of the weighted hat matrix). This
studentized residual equals the difference between the value and the prediction of all the other
values, divided by its standard deviation, so a value with |z| > 3 disagrees with the rest at
3σ. A value with leverage 1 is checked by no other and is reported as "unchecked".

Temperature dependence of a reconciled compound: its reference species receives an entropy S°
and a heat capacity Cp° from the same least-squares system applied to the reaction entropies,
ΔrS'° = (ΔrH'° − ΔrG'°)/T where ΔrH'° is given and ΔrS'° = 0 otherwise, and to the reaction heat
capacities, ΔrCp'° = 0, so that the species record, carried with constant Cp° like species data,
reproduces the stated (or assumed) temperature dependence of every literature reaction (the
known compounds' transformed S'° and Cp'° are taken from the database by central differences). The approximation costs an
uncertainty that grows with |T − 298.15 K|: :data:`ENTROPY_SIGMA_NO_ENTHALPY` (0.03 kJ/mol/K,
i.e. a reaction entropy of ±30 J/mol/K, common practice for biochemical reactions whose ΔrS'° is
unknown) or :data:`ENTROPY_SIGMA_WITH_ENTHALPY` (0.01 kJ/mol/K: the neglected ΔrCp'°, common
practice) per unit of each literature value used.

Units: kJ/mol, kJ/mol/K for entropies inside this module, K, mol/L.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003 (Legendre transform,
    extended Debye-Hueckel with B = 1.6, Gibbs-Helmholtz equation).
[2] R. Penrose, Proc. Cambridge Philos. Soc. 51 (1955) 406-413 (the generalized inverse: the
    minimum-norm least-squares solution).
[3] D. A. Belsley, E. Kuh, R. E. Welsch, Regression Diagnostics, Wiley, 1980 (leverage and
    studentized residuals).
[4] R. K. Thauer, K. Jungermann, K. Decker, Bacteriol. Rev. 41 (1977) 100-180 (reaction-level
    values of the kind reconciled here).
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field
from typing import Callable, Iterable, Mapping, Sequence

import numpy as np
import pandas as pd

from ..conditions import Conditions
from ..constants import LN10, R, T_REF
from ..errors import InputError, MissingDataError
from .legendre import DEBYE_HUCKEL_B, rt_alpha
from .literature import LiteratureValue

log = logging.getLogger(__name__)

#: Standard uncertainty of an unknown reaction entropy ΔrS'°, kJ/mol/K (common practice).
ENTROPY_SIGMA_NO_ENTHALPY = 0.03
#: Standard uncertainty left when ΔrH'° is given (neglected ΔrCp'°), kJ/mol/K (common practice).
ENTROPY_SIGMA_WITH_ENTHALPY = 0.01
#: A literature value whose studentized residual exceeds this disagrees with the rest.
DISAGREEMENT_Z = 3.0
#: Relative tolerance of the identifiability test and of the pseudo-inverse.
RANK_TOLERANCE = 1e-9

#: ``known_energy(compound, conditions) -> (ΔfG'°, σ)`` in kJ/mol.
KnownEnergy = Callable[[str, Conditions], "tuple[float, float]"]


@dataclass(frozen=True)
class UnknownSpecies:
    """The reference species of a compound without species data: H count and charge.

    ``None`` for either means the compound has no formula: its ΔfG'° is then taken as independent
    of pH and ionic strength (a flag is logged when the values' conditions differ).
    """

    n_h: float | None = None
    charge: float | None = None

    @property
    def defined(self) -> bool:
        return self.n_h is not None and self.charge is not None


def legendre_offset(species: UnknownSpecies, conditions: Conditions) -> float:
    """Legendre-transform term of a single species at ``conditions``, kJ/mol.

    Equation (Alberty 2003, eq. 4.4-10): ΔfG'°_j − ΔfG°_j = nH RT ln10 pH − RTα (z² − nH) √I/(1 + 1.6√I).
    Zero for a species whose nH or charge is unknown.

    Examples
    --------
    Water (nH = 2, z = 0) at 25 °C, pH 7: 79.91 kJ/mol at I = 0 and 81.53 kJ/mol at I = 0.25
    (Alberty 2003: ΔfG'°(H2O) = −157.28 and −155.66 kJ/mol from ΔfG° = −237.19 kJ/mol).

    >>> w = UnknownSpecies(n_h=2, charge=0)
    >>> [round(legendre_offset(w, Conditions(298.15, 7.0, i)) - 237.19, 2) for i in (0.0, 0.25)]
    [-157.28, -155.66]
    """
    if not species.defined:
        return 0.0
    t = conditions.temperature
    root = math.sqrt(conditions.ionic_strength)
    debye = rt_alpha(t) * root / (1.0 + DEBYE_HUCKEL_B * root)
    n_h, z = float(species.n_h), float(species.charge)  # type: ignore[arg-type]
    return n_h * R * t * LN10 * conditions.ph - (z * z - n_h) * debye


@dataclass(frozen=True)
class ValueResidual:
    """How one literature value fits the reconciled solution.

    ``residual`` = value − fitted (kJ/mol); ``sigma`` its total σ (literature and known compounds);
    ``leverage`` h (1 = checked by no other value); ``studentized`` = residual/(σ√(1 − h));
    ``status`` is "agrees", "disagrees" or "unchecked".
    """

    id: str
    residual: float
    sigma: float
    leverage: float
    studentized: float
    status: str
    source_key: str


@dataclass
class Reconciliation:
    """Result of :func:`reconcile`.

    Attributes
    ----------
    unknowns : tuple of str
        Compound ids solved for, in column order.
    reference : Conditions
        Conditions at which ``energies`` are transformed formation energies.
    energies : ndarray
        Minimum-norm ΔfG'° of the unknowns at ``reference``, kJ/mol. Individual entries of a
        compound inside a conserved moiety are arbitrary; only identified combinations mean something.
    covariance : ndarray
        (AᵀWA)⁺, kJ²/mol².
    entropies : ndarray
        Minimum-norm S° of the reference species, kJ/mol/K (same convention as the known species).
    species_energies : ndarray
        ΔfG° of the reference species (298.15 K, I = 0), kJ/mol: ``energies`` minus the Legendre term.
    values : tuple of LiteratureValue
        The values used, in row order.
    matrix : ndarray
        A, the unknown-compound stoichiometry of each value (rows) over ``unknowns`` (columns).
    residuals : list of ValueResidual
    species : dict
        Compound id -> UnknownSpecies, for every compound without species data that was passed,
        including those no literature value mentions (never identified).
    heat_capacities : ndarray
        Minimum-norm Cp° of the reference species, kJ/mol/K, such that every literature reaction
        has ΔrCp'° = 0 (its ΔrH'° and ΔrS'° constant, as the approximations above assume).
    """

    unknowns: tuple[str, ...]
    reference: Conditions
    energies: np.ndarray
    covariance: np.ndarray
    entropies: np.ndarray
    species_energies: np.ndarray
    values: tuple[LiteratureValue, ...]
    matrix: np.ndarray
    residuals: list[ValueResidual] = field(default_factory=list)
    species: dict[str, UnknownSpecies] = field(default_factory=dict)
    heat_capacities: np.ndarray = field(default_factory=lambda: np.zeros(0))

    def species_gibbs(self, compound: str, temperature: float) -> float:
        """ΔfG° (I = 0) of a compound's reference species at ``temperature``, kJ/mol.

        Equation (constant Cp°, as for species data): G(T) = G(Tr) − S°(T − Tr)
        + Cp°[(T − Tr) − T ln(T/Tr)].
        """
        i = self.unknowns.index(compound)
        t = float(temperature)
        cp = float(self.heat_capacities[i]) if self.heat_capacities.size else 0.0
        return float(self.species_energies[i] - self.entropies[i] * (t - T_REF)
                     + cp * ((t - T_REF) - t * math.log(t / T_REF)))

    # ----------------------------------------------------------------------------------- queries
    def vector(self, stoichiometry: Mapping[str, float]) -> np.ndarray:
        """The unknown-compound part of a stoichiometry as a vector over :attr:`unknowns`."""
        index = {u: i for i, u in enumerate(self.unknowns)}
        v = np.zeros(len(self.unknowns))
        for compound, nu in stoichiometry.items():
            if compound in index:
                v[index[compound]] += float(nu)
        return v

    def identified(self, stoichiometry: Mapping[str, float]) -> bool:
        """True when the combination Σ ν_u u is fixed by the literature values.

        Test: the vector v over the unknowns lies in the row space of A, i.e. ‖v − A⁺A v‖ is
        zero to :data:`RANK_TOLERANCE` (relative to ‖v‖). An empty combination is identified.
        """
        if any(abs(float(nu)) > 0 and c in self.species and c not in self.unknowns
               for c, nu in stoichiometry.items()):
            return False  # a compound without data that no literature value mentions
        v = self.vector(stoichiometry)
        norm = float(np.linalg.norm(v))
        if norm == 0.0:
            return True
        if self.matrix.size == 0:
            return False
        projector = np.linalg.pinv(self.matrix, rcond=RANK_TOLERANCE) @ self.matrix
        return float(np.linalg.norm(v - projector @ v)) <= 1e-7 * norm

    def compound_identified(self, compound: str) -> bool:
        """True when the compound's own ΔfG'° is fixed (it is in no undetermined moiety)."""
        return compound in self.unknowns and self.identified({compound: 1.0})

    def reaction_energy(self, stoichiometry: Mapping[str, float]) -> tuple[float, float]:
        """Σ ν_u u at the reference conditions and its standard uncertainty √(vᵀCv), kJ/mol.

        Raises
        ------
        MissingDataError
            When the combination is not identified by the literature values.
        """
        if not self.identified(stoichiometry):
            names = ", ".join(sorted(c for c, n in stoichiometry.items() if c in self.unknowns and n))
            raise MissingDataError(
                f"the literature values do not determine the combination of {names or 'compounds'} "
                "in this reaction (a conserved moiety left open); add a reaction-level value that "
                "links them to compounds with species data"
            )
        v = self.vector(stoichiometry)
        return float(v @ self.energies), float(math.sqrt(max(v @ self.covariance @ v, 0.0)))

    def value_weights(self, stoichiometry: Mapping[str, float]) -> np.ndarray:
        """Minimum-norm combination w of literature values with Aᵀw = v (how much of each is used)."""
        v = self.vector(stoichiometry)
        if self.matrix.size == 0:
            return np.zeros(0)
        return np.linalg.pinv(self.matrix.T, rcond=RANK_TOLERANCE) @ v

    def temperature_sigma(self, stoichiometry: Mapping[str, float], temperature: float) -> float:
        """Extra σ (kJ/mol) of an identified combination carried from 298.15 K to ``temperature``.

        Equation: σ_T = |T − 298.15| · Σ_r |w_r| s_r, with w the literature values the combination
        is made of (:meth:`value_weights`) and s_r = :data:`ENTROPY_SIGMA_WITH_ENTHALPY` when value r
        gives ΔrH'°, :data:`ENTROPY_SIGMA_NO_ENTHALPY` otherwise.

        Examples
        --------
        >>> rec = reconcile([LiteratureValue("v", {"x": 1.0}, -10.0, 1.0, Conditions())],
        ...                 lambda c, k: (0.0, 0.0), {"x": UnknownSpecies()})
        >>> round(rec.temperature_sigma({"x": 1.0}, 348.15), 2)   # 50 K * 0.03 kJ/mol/K
        1.5
        """
        w = self.value_weights(stoichiometry)
        rates = np.array([
            ENTROPY_SIGMA_WITH_ENTHALPY if v.delta_h_standard is not None else ENTROPY_SIGMA_NO_ENTHALPY
            for v in self.values
        ])
        return float(abs(temperature - T_REF) * np.sum(np.abs(w) * rates)) if w.size else 0.0

    def compound_sigma(self, compound: str) -> float:
        """√C_uu, kJ/mol (meaningful only when the compound is identified)."""
        i = self.unknowns.index(compound)
        return float(math.sqrt(max(self.covariance[i, i], 0.0)))

    def source_keys(self, stoichiometry: Mapping[str, float]) -> list[str]:
        """Source keys of the literature values that enter the combination."""
        w = self.value_weights(stoichiometry)
        keys = []
        for weight, value in zip(w, self.values):
            if abs(weight) > 1e-9 and value.source_key and value.source_key not in keys:
                keys.append(value.source_key)
        return keys

    def value_ids(self, stoichiometry: Mapping[str, float]) -> list[str]:
        """Ids of the literature values that enter the combination."""
        w = self.value_weights(stoichiometry)
        return [value.id for weight, value in zip(w, self.values) if abs(weight) > 1e-9]

    @property
    def disagreements(self) -> list[ValueResidual]:
        """Values whose studentized residual exceeds :data:`DISAGREEMENT_Z`, largest first."""
        bad = [r for r in self.residuals if r.status == "disagrees"]
        return sorted(bad, key=lambda r: -abs(r.studentized))

    def to_frame(self) -> pd.DataFrame:
        """One row per unknown compound: ΔfG'° at the reference, σ, identified, S°, ΔfG° of its species."""
        return pd.DataFrame({
            "compound": list(self.unknowns),
            "formation_delta_g_standard_kJ_per_mol": self.energies,
            "sigma_kJ_per_mol": [self.compound_sigma(u) for u in self.unknowns],
            "identified": [self.compound_identified(u) for u in self.unknowns],
            "species_entropy_kJ_per_mol_K": self.entropies,
            "species_formation_delta_g_kJ_per_mol": self.species_energies,
        })

    def residual_frame(self) -> pd.DataFrame:
        """One row per literature value: residual, σ, leverage, studentized residual, status."""
        return pd.DataFrame([r.__dict__ for r in self.residuals],
                            columns=["id", "residual", "sigma", "leverage", "studentized", "status",
                                     "source_key"])


def _reference_conditions(values: Sequence[LiteratureValue]) -> Conditions:
    """25 °C at the pH and ionic strength shared by most values (first in case of a tie)."""
    counts: dict[tuple[float, float], int] = {}
    for v in values:
        key = (round(v.conditions.ph, 6), round(v.conditions.ionic_strength, 6))
        counts[key] = counts.get(key, 0) + 1
    if not counts:
        return Conditions(T_REF, 7.0, 0.25)
    ph, ionic = max(counts, key=lambda k: counts[k])
    return Conditions(T_REF, ph, ionic)


def _known_derivative(known_energy: KnownEnergy, compound: str, conditions: Conditions) -> float:
    """d ΔfG'°/dT of a known compound at ``conditions`` by a central difference of ±0.5 K, kJ/mol/K."""
    h = 0.5
    up = known_energy(compound, conditions.with_(temperature=conditions.temperature + h))[0]
    down = known_energy(compound, conditions.with_(temperature=conditions.temperature - h))[0]
    return (up - down) / (2 * h)


def _second_derivative(f: Callable[[Conditions], float], conditions: Conditions) -> float:
    """d²f/dT² by a central difference of ±0.5 K."""
    h = 0.5
    t = conditions.temperature
    up = f(conditions.with_(temperature=t + h))
    mid = f(conditions)
    down = f(conditions.with_(temperature=t - h))
    return (up - 2.0 * mid + down) / (h * h)


def _offset_derivative(species: UnknownSpecies, conditions: Conditions) -> float:
    """d/dT of :func:`legendre_offset`, kJ/mol/K (central difference)."""
    h = 0.5
    up = legendre_offset(species, conditions.with_(temperature=conditions.temperature + h))
    down = legendre_offset(species, conditions.with_(temperature=conditions.temperature - h))
    return (up - down) / (2 * h)


def reconcile(
    values: Iterable[LiteratureValue],
    known_energy: KnownEnergy,
    unknowns: Mapping[str, UnknownSpecies | None],
    reference: Conditions | None = None,
) -> Reconciliation:
    """Solve for the ΔfG'° of compounds without species data from literature reaction values.

    Parameters
    ----------
    values : iterable of LiteratureValue
        Reaction-level values. A value that involves no unknown is skipped (nothing to solve).
    known_energy : callable
        ``known_energy(compound, conditions) -> (ΔfG'°, σ)``, kJ/mol, for every compound of a value
        that is not in ``unknowns`` (usually the thermodynamic database).
    unknowns : mapping
        Compound id -> :class:`UnknownSpecies` (nH and charge of its reference species) or None.
    reference : Conditions, optional
        Reference conditions of the result; default 25 °C at the pH and ionic strength most values
        share. Its temperature must be 298.15 K (values are carried there first).

    Returns
    -------
    Reconciliation

    Examples
    --------
    One unknown X fixed by two values of the reaction A -> X (ΔfG'°(A) = −100 kJ/mol) that read
    −10 ± 1 and −12 ± 2 kJ/mol: the weighted mean is (−10/1 − 12/4)/(1 + 1/4) = −10.4 kJ/mol,
    so ΔfG'°(X) = −110.4 ± 1/√1.25 = ±0.894 kJ/mol:

    >>> vals = [LiteratureValue(f"v{i}", {"A": -1, "X": 1}, g, s, Conditions(298.15, 7.0, 0.25))
    ...         for i, (g, s) in enumerate([(-10.0, 1.0), (-12.0, 2.0)])]
    >>> rec = reconcile(vals, lambda c, k: (-100.0, 0.0), {"X": None})
    >>> g, s = rec.reaction_energy({"X": 1})
    >>> round(g, 2), round(s, 3)
    (-110.4, 0.894)
    """
    values = tuple(values)
    species = {u: (s if s is not None else UnknownSpecies()) for u, s in unknowns.items()}
    used = [v for v in values if any(c in species and abs(n) > 0 for c, n in v.stoichiometry.items())]
    for v in values:
        if v not in used:
            log.info("literature value %s involves no compound without species data; not used", v.id)
    reference = reference or _reference_conditions(used)
    if abs(reference.temperature - T_REF) > 1e-6:
        raise InputError(f"reconciliation reference temperature must be {T_REF} K, got {reference.temperature}")
    names = tuple(u for u in species if any(u in v.stoichiometry for v in used))
    index = {u: i for i, u in enumerate(names)}
    n_rows, n_cols = len(used), len(names)
    a = np.zeros((n_rows, n_cols))
    b = np.zeros(n_rows)
    b_entropy = np.zeros(n_rows)
    b_cp = np.zeros(n_rows)
    variance = np.zeros(n_rows)
    undefined_warned: set[str] = set()
    for row, value in enumerate(used):
        at = value.conditions.with_(temperature=T_REF)
        rhs = value.at_reference_temperature()
        rhs_s = -value.entropy()  # Σ ν dG'/dT = −ΔrS'°
        rhs_cp = 0.0  # Σ ν Cp_u = −Σ_k ν Cp'_k + Σ_u ν T δ_u'' (ΔrCp'° = 0)
        var = value.sigma ** 2
        for compound, nu in value.stoichiometry.items():
            nu = float(nu)
            if compound in index:
                sp = species[compound]
                a[row, index[compound]] += nu
                rhs -= nu * (legendre_offset(sp, at) - legendre_offset(sp, reference))
                # dG'_u/dT = −S_u + d(offset)/dT; the unknown column carries −S_u
                rhs_s -= nu * _offset_derivative(sp, at)
                rhs_cp += nu * T_REF * _second_derivative(lambda k, sp=sp: legendre_offset(sp, k), at)
                if not sp.defined and compound not in undefined_warned and (
                        abs(at.ph - reference.ph) > 1e-9 or abs(at.ionic_strength - reference.ionic_strength) > 1e-9):
                    undefined_warned.add(compound)
                    log.warning("%s has no formula/charge: its ΔfG'° is taken as independent of pH and "
                                "ionic strength between literature values", compound)
            else:
                try:
                    g, s = known_energy(compound, at)
                except MissingDataError as err:
                    raise MissingDataError(
                        f"literature value {value.id}: compound {compound} has neither species data nor "
                        f"is it among the compounds to reconcile ({err})") from err
                rhs -= nu * g
                var += (nu * s) ** 2
                rhs_s -= nu * _known_derivative(known_energy, compound, at)
                # Cp'_k = −T d²ΔfG'°_k/dT²
                rhs_cp += nu * T_REF * _second_derivative(
                    lambda k, c=compound: known_energy(c, k)[0], at)
        b[row] = rhs
        b_entropy[row] = rhs_s
        b_cp[row] = rhs_cp
        variance[row] = var
    if n_rows:
        root_w = 1.0 / np.sqrt(variance)
        aw = a * root_w[:, None]
        pinv = np.linalg.pinv(aw, rcond=RANK_TOLERANCE)
        x = pinv @ (b * root_w)
        covariance = pinv @ pinv.T
        # entropy system: Σ ν (−S_u) = rhs_s  ->  S = −A⁺ rhs_s (same weights)
        entropies = -(pinv @ (b_entropy * root_w))
        heat_capacities = pinv @ (b_cp * root_w)
        fitted = a @ x
        hat_diag = np.einsum("ij,ji->i", aw, pinv)
    else:
        x = np.zeros(0)
        covariance = np.zeros((0, 0))
        entropies = np.zeros(0)
        heat_capacities = np.zeros(0)
        fitted = np.zeros(0)
        hat_diag = np.zeros(0)
    residuals: list[ValueResidual] = []
    for row, value in enumerate(used):
        e = float(b[row] - fitted[row])
        sigma = float(math.sqrt(variance[row]))
        h = float(min(max(hat_diag[row], 0.0), 1.0))
        if 1.0 - h < 1e-8:
            z, status = 0.0, "unchecked"
        else:
            z = e / (sigma * math.sqrt(1.0 - h))
            status = "disagrees" if abs(z) > DISAGREEMENT_Z else "agrees"
        residuals.append(ValueResidual(value.id, e, sigma, h, z, status, value.source_key))
        if status == "disagrees":
            log.warning("literature value %s (%s) disagrees with the others: residual %.1f kJ/mol, "
                        "%.1f sigma", value.id, value.source_key, e, z)
    species_g = np.array([x[i] - legendre_offset(species[u], reference) for i, u in enumerate(names)])
    return Reconciliation(names, reference, x, covariance, entropies, species_g, tuple(used), a,
                          residuals, dict(species), heat_capacities)


def reconciled_species(rec: Reconciliation, compound: str, key: str, formula: str):
    """The species record (origin ``reconciled``) that carries a reconciled compound through the
    Legendre transform and the temperature integration like species data, or None when the
    compound has no formula (H count and charge) to transform with.

    Its G is the minimum-norm ΔfG° of the reference species (I = 0, 298.15 K), S° and Cp° those of
    :func:`reconcile`; ``sigma_G`` is √C_uu for an identified compound, None inside an open
    conserved moiety (only combinations mean something there). ``key`` becomes the species id and
    its reactant; ``formula`` the element formula without charge.

    Examples
    --------
    >>> rec = reconcile([LiteratureValue("v", {"x": 1.0}, -10.0, 1.0, Conditions())],
    ...                 lambda c, k: (0.0, 0.0), {"x": UnknownSpecies(n_h=0, charge=0)})
    >>> sp = reconciled_species(rec, "x", "reconciled:x", "C")
    >>> sp.origin, round(sp.G, 2), sp.sigma_G
    ('reconciled', -10.0, 1.0)
    """
    from .species import Species

    i = rec.unknowns.index(compound)
    sp = rec.species[compound]
    if not sp.defined:
        return None
    return Species(
        id=key, reactant=key, formula=formula, state="aq", charge=int(sp.charge), n_h=int(sp.n_h),
        n_mg=0, G=float(rec.species_energies[i]), H=None, S=float(rec.entropies[i]) * 1000.0,
        Cp=float(rec.heat_capacities[i]) * 1000.0 if rec.heat_capacities.size else 0.0, V=None,
        source=",".join(rec.source_keys({compound: 1.0})) or "literature", origin="reconciled",
        sigma_G=rec.compound_sigma(compound) if rec.compound_identified(compound) else None)
