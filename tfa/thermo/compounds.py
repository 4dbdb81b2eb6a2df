"""The compound registry: a compound (a reactant in Alberty's sense, all its protonation and Mg
states together) found by id, name or synonym, case-insensitively.

Sources: ``tfa/data/compounds.csv`` (compounds with species data) and ``tfa/data/potentials.csv``
(electron carriers known only by a reduction potential, each giving an oxidised and a reduced
compound). A common name denotes the whole reactant: ``phosphate`` is H3PO4 + H2PO4- + HPO4-2 +
PO4-3. Carbon dioxide is the exception, three ways:

- ``CO2`` is dissolved, unhydrated CO2(aq) (one species);
- ``CO2(g)`` is the gas;
- ``CO2tot`` is total CO2 in the hydrated convention: CO2(aq)+H2O, HCO3-, CO3-2 (and MgCO3 when
  pMg is given), so it carries one water: ``H2 + CO2tot <=> formate + H2O``.

A name that is not known raises :class:`~tfa.errors.UnknownCompoundError` listing the closest
known names (difflib).
"""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass, field
from typing import Any, Iterable, Mapping, Sequence

from ..errors import InputError, UnknownCompoundError
from .balance import parse_formula
from .potentials import CarrierCouple

#: Kinds of compound.
KINDS = ("aqueous", "gas", "water", "proton", "carrier", "solid")
#: Kinds whose activity is fixed by convention and never a variable: water (activity 1), the
#: buffered proton (fixed by the pH) and a pure solid phase (activity 1, e.g. rhombic sulfur).
FIXED_ACTIVITY_KINDS = ("water", "proton", "solid")


def normalise_name(name: str) -> str:
    """The lookup key of a name: stripped, inner whitespace collapsed, lower case.

    >>> normalise_name("  Acetyl   Phosphate ")
    'acetyl phosphate'
    """
    return re.sub(r"\s+", " ", str(name).strip()).lower()


@dataclass(frozen=True)
class Compound:
    """One compound of the registry.

    Attributes
    ----------
    id, name : str
        Identifier and readable name.
    kind : str
        One of :data:`KINDS`.
    formula : str
        Formula of the reference species (pseudo-elements for carriers, e.g. ``Fd``).
    charge : int
        Charge of the reference species.
    species : tuple
        The species records (:class:`tfa.thermo.species.Species`); empty for carriers and for
        compounds whose species were all dropped (unreviewed sources).
    synonyms : tuple of str
    couple : CarrierCouple or None
        For carriers, the couple this compound belongs to.
    role : str
        ``"oxidised"`` or ``"reduced"`` for carriers, else ``""``.
    dropped_species : tuple of str
        Ids of species left out (unreviewed sources) when the registry was built.
    """

    id: str
    name: str
    kind: str
    formula: str
    charge: int
    species: tuple = ()
    synonyms: tuple[str, ...] = ()
    couple: CarrierCouple | None = None
    role: str = ""
    dropped_species: tuple[str, ...] = field(default=())

    @property
    def composition(self) -> tuple[dict[str, int], int]:
        """(element counts, charge) of the reference species, for balance checks."""
        counts, charge_in_formula = parse_formula(self.formula, where=f"compound {self.id}")
        return counts, int(self.charge if self.charge is not None else charge_in_formula)

    @property
    def has_data(self) -> bool:
        """True when an energy can be computed (species or a carrier potential)."""
        return bool(self.species) or self.couple is not None


def _split(value: Any) -> tuple[str, ...]:
    if value is None:
        return ()
    if isinstance(value, str):
        return tuple(p.strip() for p in value.split(";") if p.strip())
    return tuple(str(v).strip() for v in value if str(v).strip())


class CompoundRegistry:
    """Lookup of compounds by id, name or synonym (case-insensitive).

    Priority when names collide: an id beats a name, a name beats a synonym; among equals the
    first compound read wins.

    Examples
    --------
    >>> reg = CompoundRegistry([Compound("CO2", "carbon dioxide (dissolved)", "aqueous", "CO2", 0),
    ...                         Compound("CO2(g)", "carbon dioxide gas", "gas", "CO2", 0)])
    >>> reg.get("co2(G)").id
    'CO2(g)'
    >>> reg.get("CO3")
    Traceback (most recent call last):
    ...
    tfa.errors.UnknownCompoundError: unknown compound 'CO3'; did you mean: CO2? ...
    """

    def __init__(self, compounds: Iterable[Compound]):
        self._compounds: dict[str, Compound] = {}
        self._index: dict[str, tuple[int, str]] = {}
        for compound in compounds:
            self.add(compound)

    def add(self, compound: Compound, replace: bool = False) -> None:
        """Add a compound (``replace`` overwrites one with the same id)."""
        if compound.id in self._compounds and not replace:
            raise InputError(f"compound id '{compound.id}' is given twice; ids must be unique")
        self._compounds[compound.id] = compound
        for priority, names in ((0, (compound.id,)), (1, (compound.name,)), (2, compound.synonyms)):
            for name in names:
                key = normalise_name(name)
                if not key:
                    continue
                held = self._index.get(key)
                if held is None or priority < held[0] or (replace and held[1] == compound.id):
                    self._index[key] = (priority, compound.id)

    def __contains__(self, name: str) -> bool:
        return normalise_name(name) in self._index

    def __iter__(self):
        return iter(self._compounds.values())

    def __len__(self) -> int:
        return len(self._compounds)

    def ids(self) -> list[str]:
        return list(self._compounds)

    def get(self, name: str) -> Compound:
        """The compound called ``name`` (id, name or synonym, any case).

        Raises
        ------
        UnknownCompoundError
            With up to five close matches.
        """
        held = self._index.get(normalise_name(name))
        if held is not None:
            return self._compounds[held[1]]
        raise self.unknown(name)

    def close_matches(self, name: str, n: int = 5) -> tuple[str, ...]:
        """Known compounds whose id, name or synonym is close to ``name``, most similar first.

        Every known name is scored by its similarity to ``name`` (difflib's ratio,
        case-insensitive); names with a ratio of at least 0.6, and names that contain ``name``
        ("phospho" -> the phosphates), are candidates, ranked by that ratio (shorter names first
        among equals), each compound once.

        >>> reg = CompoundRegistry([Compound("S0", "sulfur", "solid", "S", 0),
        ...                         Compound("BPG", "1,3-bisphosphoglycerate", "aqueous", "C3H8O10P2", 0)])
        >>> reg.close_matches("sulphur")
        ('S0',)
        """
        key = normalise_name(name)
        if not key:
            return ()
        scored = []
        for known, (_, compound_id) in self._index.items():
            ratio = difflib.SequenceMatcher(None, key, known).ratio()
            if ratio >= 0.6 or (len(key) >= 3 and key in known):
                scored.append((-ratio, len(known), known, compound_id))
        out: list[str] = []
        for _, _, _, compound_id in sorted(scored):
            if compound_id not in out:
                out.append(compound_id)
        return tuple(out[:n])

    def unknown(self, name: str, where: str = "") -> UnknownCompoundError:
        """The error for an unknown name, with close matches."""
        matches = self.close_matches(name)
        prefix = f"{where}: " if where else ""
        hint = f"did you mean: {', '.join(matches)}? " if matches else ""
        return UnknownCompoundError(
            f"{prefix}unknown compound '{name}'; {hint}Write a compound id, name or synonym of "
            "the bundled tables (case does not matter), or add the compound to your network's "
            "compounds table", name=name, matches=matches)


def compounds_from_rows(
    rows: Sequence[Mapping[str, Any]],
    species_by_id: Mapping[str, Any],
    dropped: Mapping[str, str] | None = None,
    where: str = "compounds.csv",
) -> list[Compound]:
    """Build compounds from rows of ``compounds.csv`` and the species records they name.

    Parameters
    ----------
    rows : sequence of mappings
        Keys ``id, name, synonyms, kind, species, formula, charge``.
    species_by_id : mapping
        Species id -> species record (the species available under the current filter).
    dropped : mapping, optional
        Species id -> reason, for species deliberately left out (unreviewed source).
    """
    dropped = dropped or {}
    compounds = []
    for line, row in enumerate(rows, start=2):
        compound_id = str(row["id"]).strip()
        kind = str(row.get("kind") or "aqueous").strip()
        if kind not in KINDS:
            raise InputError(f"{where} line {line}: compound '{compound_id}' has kind '{kind}'; "
                             f"use one of {', '.join(KINDS)}")
        members, left_out = [], []
        for species_id in _split(row.get("species")):
            if species_id in species_by_id:
                members.append(species_by_id[species_id])
            elif species_id in dropped:
                left_out.append(species_id)
            else:
                raise InputError(f"{where} line {line}: compound '{compound_id}' names species "
                                 f"'{species_id}', which the species table does not hold")
        charge = row.get("charge")
        compounds.append(Compound(
            id=compound_id, name=str(row.get("name") or compound_id).strip(), kind=kind,
            formula=str(row.get("formula") or "").strip(),
            charge=int(float(charge)) if charge not in (None, "") else 0,
            species=tuple(members), synonyms=_split(row.get("synonyms")),
            dropped_species=tuple(left_out)))
    return compounds


def compounds_from_couples(couples: Iterable[CarrierCouple]) -> list[Compound]:
    """The oxidised and reduced compounds of each carrier couple.

    The couple's own id and synonyms (``ferredoxin``, ``Fd``) name its oxidised form, as the
    carrier's formula does (the reduced form carries the electrons: ``Fd-2``);
    :func:`carrier_explanation` says so wherever the pair is used.
    """
    out = []
    for couple in couples:
        for role, cid, synonyms, formula in (
            ("oxidised", couple.oxidised,
             tuple(couple.oxidised_synonyms) + (couple.id,) + tuple(couple.synonyms),
             couple.oxidised_formula),
            ("reduced", couple.reduced,
             tuple(couple.reduced_synonyms) + _formula_names(couple.reduced_formula),
             couple.reduced_formula),
        ):
            counts, charge = parse_formula(formula, where=f"potentials.csv, couple {couple.id}")
            out.append(Compound(id=cid, name=f"{couple.name}, {role}", kind="carrier",
                                formula=formula, charge=charge, synonyms=tuple(synonyms),
                                couple=couple, role=role))
    return out


def _formula_names(formula: str) -> tuple[str, ...]:
    """A carrier's reduced formula as a name, both ways of writing a charge: Fd-2 and Fd2-."""
    match = re.fullmatch(r"(.*?)([+-])(\d*)", formula)
    if not match or not match.group(3):
        return (formula,)
    return (formula, f"{match.group(1)}{match.group(3)}{match.group(2)}")


def carrier_explanation(couple: CarrierCouple) -> str:
    """One line on a carrier pair: which name is which form and the half reaction.

    >>> from tfa.thermo.potentials import load_potentials
    >>> fd = next(c for c in load_potentials() if c.id == "ferredoxin")
    >>> carrier_explanation(fd)[:80]
    "ferredoxin (per two electrons): Fd_ox + 2 e- -> Fd_red, E'° = -420 mV at pH 7 (f"
    """
    protons = f" + {couple.n_protons} H+" if couple.n_protons else ""
    names = ", ".join(dict.fromkeys((couple.id,) + tuple(couple.synonyms)))
    return (f"{couple.name}: {couple.oxidised} + {couple.n_electrons} e-{protons} -> "
            f"{couple.reduced}, E'° = {1000 * couple.e0_prime:.0f} mV at pH {couple.ph:g} "
            f"({names} name the oxidised form {couple.oxidised}; the reduced form is "
            f"{couple.reduced}, written {couple.reduced_formula} in formulas)")
