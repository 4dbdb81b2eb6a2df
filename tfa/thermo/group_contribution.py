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

Protonation states. Ionisable sites are found by :data:`PKA_RULES` (SMARTS, pKa and source of
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

from ..constants import LN10, R, T_REF
from ..errors import InputError
from .balance import parse_formula

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
# Group table
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class GroupDefinition:
    """One group: ``name``, SMARTS ``pattern`` (every atom of it is owned, context goes in
    recursive SMARTS ``$()``), ``kind`` ("atoms", "correction" or "ring"), ``description``."""

    name: str
    pattern: str
    kind: str = "atoms"
    description: str = ""


_G = GroupDefinition
#: Our group table, applied top to bottom (larger and more specific groups first).
GROUPS: tuple[GroupDefinition, ...] = (
    # --- one-off small molecules (their own group; refused in cross-validation) ---
    _G("carbon monoxide", "[C-]#[O+]"),
    _G("hydrogen cyanide", "[CH1]#N"),
    _G("methane", "[CH4]"),
    _G("formaldehyde", "[CH2]=O"),
    _G("urea", "[NX3H2]C(=O)[NX3H2]"),
    # --- phosphorus ---
    _G("terminal phosphate -PO3H2", "[PX4;$(P[OX2H0])](=O)([OX2H1])[OX2H1]"),
    _G("terminal phosphate -PO3H-", "[PX4;$(P[OX2H0])](=O)([OX2H1])[OX1-]"),
    _G("terminal phosphate -PO3(2-)", "[PX4;$(P[OX2H0])](=O)([OX1-])[OX1-]"),
    _G("inner phosphate -PO2H-", "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX2H1]"),
    _G("inner phosphate -PO2(-)-", "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX1-]"),
    _G("acyl phosphate oxygen C(=O)-O-P", "[OX2H0;$(O(C=O)P)]"),
    _G("phosphoanhydride oxygen P-O-P", "[OX2H0;$(O(P)P)]"),
    _G("phosphate ester oxygen C-O-P", "[OX2H0;$(O([#6])P)]"),
    # --- carboxyl and relatives ---
    _G("formic carboxyl H-COOH", "[CX3H1](=O)[OX2H1]"),
    _G("formic carboxylate H-COO-", "[CX3H1](=O)[OX1-]"),
    _G("carboxylic acid -COOH", "[CX3H0](=O)[OX2H1]"),
    _G("carboxylate -COO-", "[CX3H0](=O)[OX1-]"),
    _G("thioester -C(=O)S-", "[CX3](=O)[SX2H0;$(S[#6])]"),
    _G("ester -C(=O)O-", "[CX3;!$(C(=O)OP)](=O)[OX2H0;$(O[#6])]"),
    _G("guanidine (neutral)", "[NX3H2]C(=[NX2H1])[NX3H1]"),
    _G("guanidinium", "[NX3H2]C(=[NX3H2+])[NX3H1]"),
    _G("amide -C(=O)NH2", "[CX3](=O)[NX3H2]"),
    _G("amide -C(=O)NH-", "[CX3](=O)[NX3H1]"),
    _G("amide -C(=O)N<", "[CX3](=O)[NX3H0]"),
    _G("aldehyde -CHO", "[CX3H1;$(C[#6])]=O"),
    _G("ketone >C=O", "[CX3H0;$(C([#6])[#6])]=O"),
    _G("aromatic carbonyl c=O", "[c]=O"),
    # --- oxygen ---
    _G("hydroxyl on sp3 carbon -OH", "[OX2H1;$(O[CX4])]"),
    _G("hydroxyl on aromatic carbon -OH", "[OX2H1;$(Oc)]"),
    _G("phenolate -O-", "[OX1-;$(Oc)]"),
    _G("ether -O-", "[OX2H0;$(O([#6])[#6])]"),
    # --- nitrogen ---
    _G("ammonium -NH3+", "[NX4H3+]"),
    _G("ammonium >NH2+", "[NX4H2+]"),
    _G("ammonium >NH+-", "[NX4H1+]"),
    _G("amine -NH2", "[NX3H2;$(N[CX4])]"),
    _G("amine >NH", "[NX3H1;$(N([CX4])[CX4])]"),
    _G("amine >N-", "[NX3H0;$(N([CX4])([CX4])[CX4])]"),
    _G("amino on aromatic ring -NH2", "[NX3H2;$(Nc)]"),
    _G("ring N of a 1,4-dihydropyridine", "[NX3H0;R;$(N(C=C)C=C)]"),
    _G("aromatic n (pyridine type)", "[nX2]"),
    _G("aromatic nH (pyrrole type)", "[nX3H1+0]"),
    _G("aromatic n substituted", "[nX3H0+0]"),
    _G("aromatic nH+ (protonated)", "[nX3H1+]"),
    _G("aromatic n+ substituted (pyridinium)", "[nX3H0+]"),
    # --- sulfur, halogen ---
    _G("thiol -SH", "[SX2H1]"),
    _G("thiolate -S-", "[SX1-]"),
    _G("disulfide -S-S-", "[SX2H0;$(S[SX2])]"),
    _G("sulfide -S-", "[SX2H0;$(S([#6])[#6])]"),
    _G("chlorine on carbon", "[Cl;$(Cl[#6])]"),
    # --- carbon skeleton ---
    _G("-CH3", "[CX4H3]"),
    _G("-CH2-", "[CX4H2]"),
    _G(">CH-", "[CX4H1]"),
    _G(">C<", "[CX4H0]"),
    _G("=CH2", "[CX3H2]=C"),
    _G("=CH-", "[CX3H1]=C"),
    _G("=C<", "[CX3H0]=C"),
    _G("#CH", "[CX2H1]#C"),
    _G("#C-", "[CX2H0]#C"),
    _G("aromatic CH next to n", "[cH1;$(c~n)]"),
    _G("aromatic C next to n", "[cH0;$(c~n)]"),
    _G("aromatic CH", "[cH1]"),
    _G("aromatic C fused", "[cH0;$(c(:a)(:a):a)]"),
    _G("aromatic C substituted", "[cH0]"),
    # --- corrections (own no atoms) ---
    _G("correction: alpha-ammonium carboxylate", "[NX4+][CX4][CX3](=O)[OX1-]", "correction",
       "charge interaction of a zwitterionic amino acid"),
    _G("correction: adjacent carbonyls", "[CX3](=O)[CX3]=O", "correction",
       "two carbonyl carbons bonded to each other (oxalate, 2-oxo acids)"),
    _G("correction: acetal carbon", "[CX4]([OX2])[OX2]", "correction",
       "carbon bearing two oxygens (cyclic sugars, nucleosides)"),
    _G("correction: oxygens on adjacent sp3 carbons", "[OX2][CX4][CX4][OX2]", "correction",
       "two singly bonded oxygens on neighbouring saturated carbons (diols, sugars, ribose and "
       "glycerol phosphates)"),
    _G("correction: amino group next to a carbonyl carbon", "[NX3H2,NX4+][CX4][CX3]=O",
       "correction", "alpha-amino acids and peptides, amine or ammonium form"),
    _G("correction: non-aromatic ring", "", "ring", "number of non-aromatic rings (SSSR)"),
)

#: Names used in the refusal message for atoms no group covers.
_CONTEXT_HINTS: tuple[tuple[str, str], ...] = (
    ("[SX2;$(SC=O)]", "S in a thioester"),
    ("[CX3;$(C(=O)OP)]", "C of an acyl phosphate"),
    ("[OX1;$(O=COP)]", "O of an acyl phosphate"),
    ("[#16]", "S"),
    ("[#15]", "P"),
)


@dataclass(frozen=True)
class PkaRule:
    """An ionisable site: SMARTS of its protonated and deprotonated forms (first atom = the atom
    that carries or loses the proton), its pKa values (highest first: one per proton), and the
    source of the values."""

    name: str
    protonated: str
    deprotonated: str
    pkas: tuple[float, ...]
    source: str


#: pKa rules (25 degC, I = 0), most specific first. A site is counted once.
PKA_RULES: tuple[PkaRule, ...] = (
    PkaRule("alpha-carboxyl of an amino acid", "[OX2H1;$(OC(=O)[CX4][NX4+,NX3])]",
            "[OX1-;$(OC(=O)[CX4][NX4+,NX3])]", (2.3,),
            "glycine pKa1 2.35 (CRC Handbook of Chemistry and Physics, from memory)"),
    PkaRule("carboxylic acid", "[OX2H1;$(O[CX3]=O);!$(OC(=O)OP)]", "[OX1-;$(O[CX3]=O)]", (4.5,),
            "common practice (acetic acid 4.76, CRC Handbook, from memory)"),
    PkaRule("terminal phosphate", "[PX4;$(P[OX2H0])](=O)([OX2H1])",
            "[PX4;$(P[OX2H0])](=O)([OX1-])", (6.5, 1.5),
            "common practice: second pKa of phosphate monoesters about 6.5 (Alberty 2003, "
            "ch. 3-4 tables, from memory); first pKa about 1.5"),
    PkaRule("inner phosphate", "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX2H1]",
            "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX1-]", (1.0,), "common practice"),
    PkaRule("alpha-ammonium of an amino acid", "[NX4H3+;$(N[CX4]C(=O)[O,OX1-])]",
            "[NX3H2;$(N[CX4]C(=O)[O,OX1-])]", (9.6,),
            "glycine pKa2 9.78, alanine 9.87 (CRC Handbook, from memory)"),
    PkaRule("primary alkylammonium", "[NX4H3+]", "[NX3H2;$(N[CX4])]", (10.6,),
            "methylamine 10.66 (CRC Handbook, from memory)"),
    PkaRule("secondary alkylammonium", "[NX4H2+]", "[NX3H1;$(N([CX4])[CX4])]", (11.0,),
            "dimethylamine 10.73, diethylamine 11.0 (CRC Handbook, from memory)"),
    PkaRule("tertiary alkylammonium", "[NX4H1+]", "[NX3H0;$(N([CX4])([CX4])[CX4])]", (9.8,),
            "trimethylamine 9.80 (CRC Handbook, from memory)"),
    PkaRule("imidazolium", "[nX3H1+;r5]", "[nX2;r5;$(n1c[nH]cc1),$(n1cc[nH]c1)]", (6.0,),
            "histidine side chain 6.0 (CRC Handbook, from memory)"),
    PkaRule("guanidinium", "[NX3H2+]=C(N)N", "[NX2H1]=C(N)N", (12.5,),
            "arginine side chain 12.5 (CRC Handbook, from memory)"),
    PkaRule("thiol next to an ammonium (cysteine type)", "[SX2H1;$(S[CX4][CX4][NX4+,NX3])]",
            "[SX1-;$(S[CX4][CX4][NX4+,NX3])]", (8.3,),
            "cysteine side chain 8.3 (CRC Handbook, from memory)"),
    PkaRule("thiol", "[SX2H1]", "[SX1-]", (10.0,), "common practice (alkanethiols 10-10.6)"),
    PkaRule("phenol", "[OX2H1;$(Oc)]", "[OX1-;$(Oc)]", (10.0,),
            "phenol 9.99 (CRC Handbook, from memory)"),
)


# --------------------------------------------------------------------------------------------
# Structures
# --------------------------------------------------------------------------------------------


def _rdkit():
    try:
        from rdkit import Chem, RDLogger
    except ImportError as err:  # pragma: no cover - rdkit is an optional extra
        raise InputError(
            "group-contribution estimates need RDKit; install the 'estimate' extra "
            "(pip install 'tfa[estimate]')"
        ) from err
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
    Chem = _rdkit()
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
def _compiled(pattern: str):
    Chem = _rdkit()
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
    Chem = _rdkit()
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
            n = len(mol.GetSubstructMatches(_compiled(group.pattern), uniquify=True))
        else:
            n = 0
            for match in mol.GetSubstructMatches(_compiled(group.pattern), uniquify=True):
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
        if atom.GetIdx() in {m[0] for m in mol.GetSubstructMatches(_compiled(pattern))}:
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


# --------------------------------------------------------------------------------------------
# Protonation states
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class IonisableSite:
    """A site found by a pKa rule: ``protons`` it holds now out of ``len(pkas)``."""

    rule: str
    atom: int
    pkas: tuple[float, ...]
    protons: int
    source: str


def find_sites(mol) -> list[IonisableSite]:
    """Ionisable sites of a molecule by :data:`PKA_RULES` (first rule wins for an atom).

    >>> [(s.rule, s.protons) for s in find_sites(parse_structure("[NH3+]CC(=O)[O-]"))]
    [('alpha-carboxyl of an amino acid', 0), ('alpha-ammonium of an amino acid', 1)]
    """
    taken: set[int] = set()
    sites: list[IonisableSite] = []
    for rule in PKA_RULES:
        for pattern, protonated in ((rule.protonated, True), (rule.deprotonated, False)):
            for match in mol.GetSubstructMatches(_compiled(pattern), uniquify=True):
                atom = match[0]
                if atom in taken:
                    continue
                taken.add(atom)
                if len(rule.pkas) == 1:
                    sites.append(IonisableSite(rule.name, atom, rule.pkas, int(protonated), rule.source))
                else:  # a terminal phosphate: count the OH on this P
                    p = mol.GetAtomWithIdx(atom)
                    n_oh = sum(1 for nb in p.GetNeighbors()
                               if nb.GetSymbol() == "O" and nb.GetTotalNumHs() == 1 and nb.GetDegree() == 1)
                    sites.append(IonisableSite(rule.name, atom, rule.pkas, n_oh, rule.source))
    return sites


def _log_elementary_symmetric(logs: list[float]) -> list[float]:
    """log e_n of exp(logs) for n = 0..len(logs) (stable recursion)."""
    e = [0.0] + [-math.inf] * len(logs)
    for value in logs:
        for n in range(len(e) - 1, 0, -1):
            e[n] = np.logaddexp(e[n], e[n - 1] + value)
    return [float(v) for v in e]


def protonation_energies(G: float, sites: list[IonisableSite], temperature: float = T_REF) -> list[tuple[int, float]]:
    """DfG deg of each macrostate, as (protons more than the fully dissociated form, G).

    Independent sites (Alberty 2003, ch. 3): G(n) = G(0) − RT ln e_n(10^pKa).

    >>> site = IonisableSite("carboxylic acid", 0, (4.76,), 0, "")
    >>> [(n, round(g, 2)) for n, g in protonation_energies(-369.3, [site])]   # acetate -> acetic acid
    [(0, -369.3), (1, -396.47)]
    """
    rt = R * temperature
    pkas = [pk for site in sites for pk in site.pkas]
    held = sum(sum(sorted(site.pkas, reverse=True)[: site.protons]) for site in sites)
    g0 = G + rt * LN10 * held
    logs = _log_elementary_symmetric([LN10 * pk for pk in pkas])
    return [(n, g0 - rt * logs[n]) for n in range(len(pkas) + 1)]


# --------------------------------------------------------------------------------------------
# Estimates
# --------------------------------------------------------------------------------------------


@dataclass
class GroupEstimate:
    """A group-contribution estimate for one structure (298.15 K, 1 bar, I = 0).

    Attributes
    ----------
    name, smiles : str
        Label given and canonical SMILES of the structure estimated.
    formula : str
        Hill formula without charge; ``charge`` and ``n_h`` of the structure.
    groups : dict
        Group name -> count.
    G, sigma_G : float
        DfG deg and its standard uncertainty, kJ/mol.
    H : float or None
        DfH deg, kJ/mol (None if a group has no enthalpy data).
    S, Cp : float or None
        S deg and Cp deg, J/mol/K (None if a group has no data).
    protonation_states : list of (formula, charge, n_h, G)
        Every macrostate produced by the pKa rules, G in kJ/mol (the estimated one included).
    sites : list of IonisableSite
    """

    name: str
    smiles: str
    formula: str
    charge: int
    n_h: int
    groups: dict[str, int]
    G: float
    sigma_G: float
    H: float | None = None
    S: float | None = None
    Cp: float | None = None
    protonation_states: list[tuple[str, int, int, float]] = field(default_factory=list)
    sites: list[IonisableSite] = field(default_factory=list)

    def to_dict(self) -> dict:
        return {
            "name": self.name, "smiles": self.smiles, "formula": self.formula, "charge": self.charge,
            "n_h": self.n_h, "groups": dict(self.groups), "G_kJ": self.G, "sigma_G_kJ": self.sigma_G,
            "H_kJ": self.H, "S_J_K": self.S, "Cp_J_K": self.Cp,
            "protonation_states": [
                {"formula": f, "charge": z, "n_h": h, "G_kJ": g} for f, z, h, g in self.protonation_states
            ],
            "sites": [{"rule": s.rule, "pkas": list(s.pkas), "protons": s.protons, "source": s.source}
                      for s in self.sites],
            "provenance": provenance_text(self.sigma_G),
        }


def provenance_text(sigma: float) -> str:
    """Provenance of an estimated value, e.g. 'estimated (group contribution, ± 8.1 kJ/mol)'."""
    return f"estimated (group contribution, ± {sigma:.1f} kJ/mol)"


def estimate_species(smiles_or_inchi: str, name: str = "", model: GroupModel | None = None) -> GroupEstimate:
    """Estimate DfG deg (and DfH deg, S deg, Cp deg) of one aqueous species from its structure.

    Parameters
    ----------
    smiles_or_inchi : str
        The structure in the protonation state wanted (SMILES, or InChI starting 'InChI=').
    name : str
        A label for messages and results.
    model : GroupModel, optional
        Defaults to :func:`fitted_model`.

    Raises
    ------
    StructureError
        Unreadable structure, an atom no group covers, or a group with no training data.

    Examples
    --------
    Lactate (OBIGT value of Shock 1995: DfG deg = -122.53 kcal/mol = -512.7 kJ/mol):

    >>> est = estimate_species("CC(O)C(=O)[O-]", "lactate")
    >>> est.formula, est.charge, abs(est.G - (-512.7)) < 3 * est.sigma_G
    ('C3H5O3', -1, True)
    """
    model = model or fitted_model()
    label = name or smiles_or_inchi
    mol = parse_structure(smiles_or_inchi, label)
    counts = count_groups(mol, label)
    missing = model.missing_groups(counts)
    if missing:
        raise StructureError(
            f"{label}: no training data for group(s) {', '.join(repr(g) for g in missing)}; the "
            "group contribution model cannot estimate this structure; use a literature value "
            "for this compound or its reactions instead"
        )
    elements, charge = molecule_formula(mol)
    G = float(model.predict(counts, "G"))
    sigma = model.sigma(counts)
    sites = find_sites(mol)
    n_h = elements.get("H", 0)
    held = sum(site.protons for site in sites)
    states = []
    for n, g in protonation_energies(G, sites):
        shift = n - held
        counts_n = dict(elements)
        counts_n["H"] = n_h + shift
        states.append((format_formula(counts_n), charge + shift, n_h + shift, float(g)))
    Chem = _rdkit()
    return GroupEstimate(
        name=label, smiles=Chem.MolToSmiles(mol), formula=format_formula(elements), charge=charge,
        n_h=n_h, groups=counts, G=G, sigma_G=sigma, H=model.predict(counts, "H"),
        S=model.predict(counts, "S"), Cp=model.predict(counts, "Cp"),
        protonation_states=states, sites=sites,
    )


def estimated_species_records(estimate: GroupEstimate, reactant_id: str) -> list:
    """Species records (one per protonation state) for the thermodynamics engine.

    The estimated state carries the group-contribution H, S and Cp; the states derived by pKa
    rules carry only G (their H, S, Cp are unknown: None). All have ``origin="estimated"``,
    ``sigma_G`` = the estimate's uncertainty and ``source="tfa group contribution"``.
    """
    from .species import Species

    records = []
    for formula, charge, n_h, g in estimate.protonation_states:
        is_base = charge == estimate.charge
        suffix = "" if charge == 0 else (f"+{charge}" if charge > 0 else f"{charge}")
        records.append(Species(
            id=f"{reactant_id}{suffix}(est)", reactant=reactant_id, formula=formula, state="aq",
            charge=charge, n_h=n_h, n_mg=0, G=g,
            H=estimate.H if is_base else None, S=estimate.S if is_base else None,
            Cp=estimate.Cp if is_base else None, V=None, source=SOURCE_KEY,
            source2=None, origin="estimated", sigma_G=estimate.sigma_G,
        ))
    return records
