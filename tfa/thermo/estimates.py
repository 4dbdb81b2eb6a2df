"""Estimates of a species' standard formation properties from its structure: the group sum of
:mod:`tfa.thermo.group_contribution`, the protonation states from the pKa rules of
:mod:`tfa.thermo.groups` (see the module text of :mod:`tfa.thermo.group_contribution` for the
equations), and the species records the database takes.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003, ch. 3 (pseudoisomer
    groups; dissociation constants).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..constants import LN10, R, T_REF
from .group_contribution import (SOURCE_KEY, GroupModel, StructureError, compiled_pattern,
                                 count_groups, fitted_model, format_formula, molecule_formula,
                                 parse_structure, rdkit_chem)
from .groups import PKA_RULES

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
            for match in mol.GetSubstructMatches(compiled_pattern(pattern), uniquify=True):
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
    Chem = rdkit_chem()
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


def compound_structure(database, name: str) -> tuple[str, str] | None:
    """(SMILES, where it was found) of a compound of the thermodynamic data: the structure of
    its species nearest the compound's reference charge (``species_structures.csv``), else the
    ``smiles`` of ``compounds_without_species.csv``; None when it has none.

    Raises
    ------
    UnknownCompoundError
        When the data have no compound of that name (with close matches).

    >>> from tfa.thermo.database import ThermoDatabase
    >>> compound_structure(ThermoDatabase.load(), "pyruvate")
    ('CC(=O)C(=O)[O-]', "species 'pyruvate' of species_structures.csv")
    """
    import csv
    from importlib import resources

    from .group_contribution import load_structures
    from .species import VALUE_COMPOUNDS_FILE

    compound = database.compound(name)
    structures = load_structures()
    species = sorted(compound.species, key=lambda sp: abs(sp.charge - compound.charge))
    for ident in [sp.id for sp in species] + list(compound.dropped_species):
        if ident in structures:
            return structures[ident][0], f"species '{ident}' of species_structures.csv"
    with resources.files("tfa.data").joinpath(VALUE_COMPOUNDS_FILE).open(
            newline="", encoding="utf-8") as handle:
        for row in csv.DictReader(line for line in handle if not line.startswith("#")):
            if row.get("id") == compound.id and (row.get("smiles") or "").strip():
                return row["smiles"].strip(), f"compound '{compound.id}' of {VALUE_COMPOUNDS_FILE}"
    return None
