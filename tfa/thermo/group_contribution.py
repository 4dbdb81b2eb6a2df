"""Group-contribution estimates of standard formation properties of aqueous species.

A structure (SMILES or InChI, in the exact protonation state wanted) is cut into groups found
with RDKit SMARTS patterns; the property is the sum of the group contributions plus an origin
term (the published approach of Mavrovouniotis [1] and Jankowski et al. [2]; the groups and all
numbers here are our own, fitted on the bundled species data):

    X = x0 + sum_g n_g x_g          X = DfG deg (kJ/mol), DfH deg (kJ/mol), S deg, Cp deg (J/mol/K)

Groups come in two kinds. *Atom groups* own the heavy atoms they match (hydrogens come with
their heavy atom); they are applied in table order and an atom is owned once, so a molecule is
partitioned into groups, and an atom no group owns is reported ("no group covers atom 4 (S in
a thioester)"). *Corrections* own nothing and count a structural feature (an alpha-ammonium
carboxylate zwitterion, an acetal carbon, a non-aromatic ring).

Fit. Training species: the aqueous organic species of ``tfa/data/species.csv`` from peer-reviewed
sources with a structure in ``tfa/data/species_structures.csv``. Each property is fitted
separately by ridge-stabilised least squares (the origin term is not penalised; the small ridge
only fixes combinations of groups the data cannot separate); H, S and Cp use the species that
have a value.

Uncertainty. ``s`` = root-mean-square leave-one-out residual of DfG deg. The standard uncertainty
of an estimate with group vector x is

    sigma^2 = s^2 (1 + x^T (X^T X + Lambda)^-1 x) + sum_{g: m_g < 3} (n_g s)^2

i.e. the usual prediction variance of a linear fit scaled to the cross-validated error, plus one
extra ``s`` for each occurrence of a group seen in fewer than three training species (m_g). A
molecule with a group seen in no training species is refused.

Measured (``scripts/gc_crossval.py``, 494 training species, 61 groups): leave-one-out MAE 5.4
and RMSE 7.9 kJ/mol over the 485 species it can estimate (9 refused: a group only they carry);
held-out 20 % split: median |error| 4.6 kJ/mol (4.0-4.9 over three seeds). Published
group-contribution methods report about 10 kJ/mol [2] (from memory). The training set holds,
besides nucleotides, amino and carboxylic acids, the homologous series of OBIGT (n-alkanes,
1-alcohols, aldehydes, ketones, n-alkanoates, dicarboxylates, 2-hydroxy acids, thiols, sulfides,
alkylamines and their ions, alkylbenzenes, phenols), so the -CH2- contribution is physical
(+8.4 kJ/mol; OBIGT series rise by 8.8 kJ/mol per -CH2- on average). Known weak spots: no
peer-reviewed acyclic polyol is in the data, so glycerol and its phosphates come out about
45-50 kJ/mol too high (glycerol 3-phosphate(2-): -1294 against -1345 kJ/mol of an unreviewed
source); lysine's ions lie 30-40 kJ/mol below what the groups give.

Protonation states (:mod:`tfa.thermo.estimates`). Ionisable sites are found by
:data:`tfa.thermo.groups.PKA_RULES` (SMARTS, pKa and source of
each). With independent sites of acidity constants pKa_i, the macrostate holding n protons more
than the fully dissociated form has [3]

    G(n) = G(0) - RT ln sum_{|S| = n} prod_{i in S} 10^(pKa_i)        (298.15 K, I = 0)

and G(0) follows from the estimated state by the same relation.

References
----------
[1] M. L. Mavrovouniotis, Biotechnol. Bioeng. 36 (1990) 1070-1082.
[2] M. D. Jankowski, C. S. Henry, L. J. Broadbelt, V. Hatzimanikatis, Biophys. J. 95 (2008)
    1487-1499.
[3] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003, ch. 3 (pseudoisomer
    groups; dissociation constants).
"""

from __future__ import annotations

import csv
import functools
import logging
import math
from dataclasses import dataclass, field
from importlib import resources
from typing import Iterable

import numpy as np

from ..errors import InputError
from .groups import _CONTEXT_HINTS, GROUPS

log = logging.getLogger(__name__)

#: Ridge weight on the group contributions (counts are O(1), so 1e-3 only touches directions the
#: data do not determine).
RIDGE = 1.0e-3
#: Groups seen in fewer training species than this inflate the uncertainty (see module text).
RARE_GROUP_SPECIES = 3
#: Training species left out of the fit, with the reason (checked by the tests).
EXCLUDED: dict[str, str] = {
    "heptose": "its DfG deg (LA16, -1238.4 kJ/mol) lies about 150 kJ/mol below what the homologous "
    "sugars give (ribose -752, rhamnose -751 kJ/mol; about -165 kJ/mol per CHOH unit); "
    "leave-one-out residual 195 kJ/mol",
}
#: Provenance text of an estimate.
SOURCE_KEY = "tfa group contribution"


class StructureError(InputError):
    """A structure that cannot be read, or that holds an atom or group the model cannot use."""


# --------------------------------------------------------------------------------------------
# Structures
# --------------------------------------------------------------------------------------------


def rdkit_chem():
    """RDKit's ``Chem`` module (imported on first use, so that ``import tfa`` stays fast), with its
    log messages off (errors are reported as :class:`StructureError` instead)."""
    from rdkit import Chem, RDLogger

    RDLogger.DisableLog("rdApp.*")
    return Chem


def parse_structure(text: str, where: str = ""):
    """Read a SMILES or an InChI (``InChI=...``) into an RDKit molecule.

    Raises
    ------
    StructureError
        When RDKit cannot read the text.

    Examples
    --------
    >>> parse_structure("CC(=O)[O-]").GetNumAtoms()
    4
    """
    Chem = rdkit_chem()
    text = (text or "").strip()
    prefix = f"{where}: " if where else ""
    if not text:
        raise StructureError(f"{prefix}empty structure; give a SMILES such as 'CC(=O)[O-]'")
    mol = Chem.MolFromInchi(text) if text.startswith("InChI=") else Chem.MolFromSmiles(text)
    if mol is None:
        raise StructureError(
            f"{prefix}cannot read structure '{text}' as SMILES or InChI; check brackets, ring "
            "closures and charges (e.g. 'CC(=O)[O-]' for acetate)"
        )
    return mol


def molecule_formula(mol) -> tuple[dict[str, int], int]:
    """Element counts (hydrogens included) and net charge of an RDKit molecule.

    >>> molecule_formula(parse_structure("[NH3+]CC(=O)[O-]"))
    ({'C': 2, 'H': 5, 'N': 1, 'O': 2}, 0)
    """
    counts: dict[str, int] = {}
    for atom in mol.GetAtoms():
        counts[atom.GetSymbol()] = counts.get(atom.GetSymbol(), 0) + 1
        n_h = atom.GetTotalNumHs()
        if n_h:
            counts["H"] = counts.get("H", 0) + n_h
    charge = sum(atom.GetFormalCharge() for atom in mol.GetAtoms())
    return dict(sorted(counts.items(), key=lambda kv: _hill_key(kv[0], counts))), charge


def _hill_key(element: str, counts: dict[str, int]) -> tuple[int, str]:
    if "C" in counts:
        return ({"C": 0, "H": 1}.get(element, 2), element)
    return (2, element)


def format_formula(counts: dict[str, int]) -> str:
    """Hill-order formula text without charge, e.g. ``C2H3O2``."""
    ordered = sorted(counts, key=lambda e: _hill_key(e, counts))
    return "".join(f"{e}{counts[e] if counts[e] != 1 else ''}" for e in ordered if counts[e])


@functools.lru_cache(maxsize=None)
def compiled_pattern(pattern: str):
    Chem = rdkit_chem()
    query = Chem.MolFromSmarts(pattern)
    if query is None:  # pragma: no cover - table error
        raise ValueError(f"bad SMARTS in group table: {pattern}")
    return query


def count_groups(mol, where: str = "") -> dict[str, int]:
    """Count the groups of :data:`GROUPS` in a molecule.

    Raises
    ------
    StructureError
        Naming every heavy atom no group covers (index, element, context).

    Examples
    --------
    >>> count_groups(parse_structure("CC(=O)[O-]"))
    {'carboxylate -COO-': 1, '-CH3': 1}
    """
    Chem = rdkit_chem()
    owned: set[int] = set()
    counts: dict[str, int] = {}
    for group in GROUPS:
        if group.kind == "ring":
            ring_info = mol.GetRingInfo()
            n = sum(
                1 for ring in ring_info.AtomRings()
                if not all(mol.GetAtomWithIdx(i).GetIsAromatic() for i in ring)
            )
        elif group.kind == "correction":
            n = len(mol.GetSubstructMatches(compiled_pattern(group.pattern), uniquify=True))
        else:
            n = 0
            for match in mol.GetSubstructMatches(compiled_pattern(group.pattern), uniquify=True):
                if owned.isdisjoint(match):
                    owned.update(match)
                    n += 1
        if n:
            counts[group.name] = n
    uncovered = [a for a in mol.GetAtoms() if a.GetAtomicNum() > 1 and a.GetIdx() not in owned]
    if uncovered:
        described = ", ".join(_describe_atom(mol, a) for a in uncovered)
        prefix = f"{where}: " if where else ""
        raise StructureError(
            f"{prefix}no group covers atom {described} in '{Chem.MolToSmiles(mol)}'; the group "
            "contribution model has no data for this kind of atom, so no estimate is given; use a "
            "literature value for this compound or its reactions instead"
        )
    return counts


def _describe_atom(mol, atom) -> str:
    hint = atom.GetSymbol()
    for pattern, text in _CONTEXT_HINTS:
        if atom.GetIdx() in {m[0] for m in mol.GetSubstructMatches(compiled_pattern(pattern))}:
            hint = text
            break
    return f"{atom.GetIdx()} ({hint})"


# --------------------------------------------------------------------------------------------
# Training data
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class TrainingSpecies:
    """One training species: id, structure, formula, charge, and its properties (None if absent).
    G, H in kJ/mol; S, Cp in J/mol/K."""

    id: str
    smiles: str
    formula: str
    charge: int
    G: float
    H: float | None
    S: float | None
    Cp: float | None
    source: str


def _data_rows(name: str) -> list[dict[str, str]]:
    with resources.files("tfa.data").joinpath(name).open(newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


def _optional(value: str | None) -> float | None:
    if value is None or str(value).strip() in ("", "NA", "nan"):
        return None
    return float(value)


def load_structures() -> dict[str, tuple[str, str]]:
    """``tfa/data/species_structures.csv``: species id -> (SMILES, note)."""
    return {row["species"]: (row["smiles"], row.get("note", "")) for row in _data_rows("species_structures.csv")}


def training_species(include_unreviewed: bool = False) -> list[TrainingSpecies]:
    """Aqueous species with a structure, from peer-reviewed sources (unless asked otherwise)."""
    reviewed = {row["key"]: row["peer_reviewed"].strip().lower() == "yes" for row in _data_rows("sources.csv")}
    structures = load_structures()
    out = []
    for row in _data_rows("species.csv"):
        if row["state"] != "aq" or row["species"] not in structures:
            continue
        if not include_unreviewed and not reviewed.get(row["source"], False):
            continue
        if row["species"] in EXCLUDED:
            continue
        out.append(TrainingSpecies(
            id=row["species"], smiles=structures[row["species"]][0], formula=row["formula"],
            charge=int(float(row["charge"])), G=float(row["G_kJ"]), H=_optional(row.get("H_kJ")),
            S=_optional(row.get("S_J_K")), Cp=_optional(row.get("Cp_J_K")), source=row["source"],
        ))
    return out


# --------------------------------------------------------------------------------------------
# Fit
# --------------------------------------------------------------------------------------------

PROPERTIES = ("G", "H", "S", "Cp")


@dataclass
class PropertyFit:
    """Least-squares fit of one property: ``origin`` plus one value per group in ``columns``."""

    prop: str
    columns: tuple[str, ...]
    origin: float
    values: np.ndarray
    inverse: np.ndarray  # (Z^T Z + Lambda)^-1 with Z = [1 | X]
    species_seen: dict[str, int]
    n_species: int
    rmse_fit: float


@dataclass
class CrossValidation:
    """Leave-one-out statistics of DfG deg (kJ/mol).

    ``residuals``: species id -> (estimate - reference) for species whose groups all remain in
    the training set when they are left out; ``refused``: the other species (a group only they
    carry)."""

    mae: float
    rmse: float
    median_abs: float
    max_abs: float
    n: int
    residuals: dict[str, float] = field(default_factory=dict)
    refused: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        return {"mae": self.mae, "rmse": self.rmse, "median_abs": self.median_abs,
                "max_abs": self.max_abs, "n": self.n, "refused": list(self.refused),
                "residuals": dict(self.residuals)}


def _design(rows: list[dict[str, int]], columns: tuple[str, ...]) -> np.ndarray:
    X = np.zeros((len(rows), len(columns) + 1))
    X[:, 0] = 1.0
    index = {c: i + 1 for i, c in enumerate(columns)}
    for r, counts in enumerate(rows):
        for name, n in counts.items():
            X[r, index[name]] = n
    return X


def _solve(X: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    penalty = np.full(X.shape[1], RIDGE)
    penalty[0] = 0.0
    inverse = np.linalg.inv(X.T @ X + np.diag(penalty))
    return inverse @ (X.T @ y), inverse


def fit_property(prop: str, group_counts: list[dict[str, int]], values: list[float | None],
                 ids: list[str]) -> PropertyFit:
    """Fit one property on the rows that have a value."""
    keep = [i for i, v in enumerate(values) if v is not None]
    rows = [group_counts[i] for i in keep]
    columns = tuple(sorted({g for counts in rows for g in counts}))
    X = _design(rows, columns)
    y = np.array([values[i] for i in keep], dtype=float)
    beta, inverse = _solve(X, y)
    seen = {c: sum(1 for counts in rows if c in counts) for c in columns}
    rmse = float(np.sqrt(np.mean((X @ beta - y) ** 2))) if len(y) else float("nan")
    return PropertyFit(prop, columns, float(beta[0]), beta[1:], inverse, seen, len(y), rmse)


class GroupModel:
    """Group contributions fitted on a set of training species (all four properties)."""

    def __init__(self, species: list[TrainingSpecies]):
        self.species = list(species)
        self.counts = [count_groups(parse_structure(s.smiles, s.id), s.id) for s in self.species]
        ids = [s.id for s in self.species]
        self.fits: dict[str, PropertyFit] = {
            prop: fit_property(prop, self.counts, [getattr(s, prop) for s in self.species], ids)
            for prop in PROPERTIES
        }
        self._cv: CrossValidation | None = None

    # -- prediction --------------------------------------------------------------------------
    def predict(self, counts: dict[str, int], prop: str = "G") -> float | None:
        """Value of ``prop`` for a group count vector; None if a group has no data for it."""
        fit = self.fits[prop]
        if fit.n_species == 0 or any(g not in fit.species_seen for g in counts):
            return None
        index = {c: i for i, c in enumerate(fit.columns)}
        return float(fit.origin + sum(n * fit.values[index[g]] for g, n in counts.items()))

    def leverage(self, counts: dict[str, int]) -> float:
        """x^T (Z^T Z + Lambda)^-1 x of the DfG fit (dimensionless)."""
        fit = self.fits["G"]
        x = np.zeros(len(fit.columns) + 1)
        x[0] = 1.0
        index = {c: i + 1 for i, c in enumerate(fit.columns)}
        for g, n in counts.items():
            x[index[g]] = n
        return float(x @ fit.inverse @ x)

    def sigma(self, counts: dict[str, int]) -> float:
        """Standard uncertainty of an estimated DfG deg, kJ/mol (rule in the module text)."""
        s = self.cross_validation().rmse
        fit = self.fits["G"]
        variance = s * s * (1.0 + self.leverage(counts))
        for g, n in counts.items():
            if fit.species_seen.get(g, 0) < RARE_GROUP_SPECIES:
                variance += (n * s) ** 2
        return math.sqrt(variance)

    def missing_groups(self, counts: dict[str, int], prop: str = "G") -> list[str]:
        return [g for g in counts if g not in self.fits[prop].species_seen]

    # -- cross-validation --------------------------------------------------------------------
    def cross_validation(self) -> CrossValidation:
        """Leave-one-out cross-validation of DfG deg (cached)."""
        if self._cv is None:
            self._cv = holdout_errors(self.species, self.counts, range(len(self.species)), loo=True)
        return self._cv


def holdout_errors(species: list[TrainingSpecies], counts: list[dict[str, int]],
                   test: Iterable[int], loo: bool = False) -> CrossValidation:
    """Errors of DfG deg for the species ``test`` (indices), fitted without them.

    ``loo=True``: each test species is left out alone (leave-one-out); otherwise the whole test
    set is left out at once (held-out split)."""
    test = list(test)
    residuals: dict[str, float] = {}
    refused: list[str] = []
    ids = [s.id for s in species]
    values = [s.G for s in species]

    def evaluate(train_idx: list[int], test_idx: list[int]) -> None:
        fit = fit_property("G", [counts[i] for i in train_idx], [values[i] for i in train_idx],
                           [ids[i] for i in train_idx])
        index = {c: k for k, c in enumerate(fit.columns)}
        for i in test_idx:
            if any(g not in index for g in counts[i]):
                refused.append(ids[i])
                continue
            estimate = fit.origin + sum(n * fit.values[index[g]] for g, n in counts[i].items())
            residuals[ids[i]] = float(estimate - values[i])

    if loo:
        residuals, refused = _leave_one_out(counts, values, ids, test)
    else:
        chosen = set(test)
        evaluate([j for j in range(len(species)) if j not in chosen], test)
    err = np.abs(np.array(list(residuals.values()))) if residuals else np.array([np.nan])
    return CrossValidation(
        mae=float(np.mean(err)), rmse=float(np.sqrt(np.mean(err ** 2))),
        median_abs=float(np.median(err)), max_abs=float(np.max(err)), n=len(residuals),
        residuals=residuals, refused=tuple(refused),
    )


def _leave_one_out(counts: list[dict[str, int]], values: list[float], ids: list[str],
                   test: list[int]) -> tuple[dict[str, float], list[str]]:
    """Leave-one-out residuals of the ridge fit of DfG deg in closed form, one fit in all.

    For a linear fit with a fixed penalty, the residual of species i predicted without it is
    e_i / (1 - h_ii), with e_i its residual in the fit on all species and h_ii the i-th diagonal
    element of the hat matrix X (X^T X + Lambda)^-1 X^T (the PRESS identity, e.g. D. M. Allen,
    Technometrics 16 (1974) 125-127; it holds with a ridge penalty). A species with a group no
    other species has cannot be estimated without it and is refused, as a refit would.
    """
    rows = list(range(len(values)))
    columns = tuple(sorted({g for c in counts for g in c}))
    X = _design(counts, columns)
    y = np.asarray(values, dtype=float)
    beta, inverse = _solve(X, y)
    fitted = X @ beta
    leverage = np.einsum("ij,jk,ik->i", X, inverse, X)
    seen: dict[str, int] = {}
    for c in counts:
        for g in c:
            seen[g] = seen.get(g, 0) + 1
    residuals: dict[str, float] = {}
    refused: list[str] = []
    for i in test:
        if i not in rows or any(seen[g] < 2 for g in counts[i]):
            refused.append(ids[i])
            continue
        residuals[ids[i]] = float((fitted[i] - y[i]) / (1.0 - leverage[i]))
    return residuals, refused


def heldout_split(model: GroupModel, fraction: float = 0.2, seed: int = 20260) -> CrossValidation:
    """Leave a random ``fraction`` of the training species out at once (fixed seed) and report
    the errors of their DfG deg estimates."""
    rng = np.random.default_rng(seed)
    n = len(model.species)
    test = sorted(rng.choice(n, size=max(1, int(round(fraction * n))), replace=False).tolist())
    return holdout_errors(model.species, model.counts, test)


@functools.lru_cache(maxsize=1)
def fitted_model() -> GroupModel:
    """The group model fitted on the bundled reviewed species data (cached in memory)."""
    model = GroupModel(training_species())
    log.info("group contributions fitted on %d species, %d groups", len(model.species),
             len(model.fits["G"].columns))
    return model
