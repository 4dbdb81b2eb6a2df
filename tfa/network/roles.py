"""Compound roles: which metabolites are protons, water, H2, phosphate, adenine nucleotides,
pyrophosphate or electron carriers.

A role is declared in the ``role`` column of a compounds table and kept in the metabolite's
``notes['role']``. Carrier roles read ``red:PAIR:N`` / ``ox:PAIR:N``: the reduced or oxidised form
of the carrier pair ``PAIR``, one unit carrying ``N`` electrons (NADH ``red:NAD:2``, NAD+
``ox:NAD:2``, reduced ferredoxin counted per two electrons ``red:Fd:2``).

Nothing here computes an energy; the rewrites of :mod:`tfa.network.rewrites` and the checks of
the table reader use these helpers.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import cobra

from ..errors import InputError
from ..thermo.balance import parse_formula
from ..thermo.compounds import FIXED_ACTIVITY_KINDS

#: Roles without parameters.
SIMPLE_ROLES = ("proton", "water", "h2", "phosphate", "atp", "adp", "amp", "pyrophosphate")
#: The compounds that the no-ATP modes remove.
NUCLEOTIDE_ROLES = ("atp", "adp", "amp", "pyrophosphate")
_CARRIER_RE = re.compile(r"^(red|ox):([A-Za-z0-9_+\-()]+):([1-9][0-9]*)$")


@dataclass(frozen=True)
class CarrierRole:
    """One form of an electron-carrier pair: ``state`` is ``"red"`` or ``"ox"``."""

    state: str
    pair: str
    electrons: int


def parse_role(text: str | None, where: str = "") -> str | CarrierRole | None:
    """Read a role cell: ``None`` for empty, a simple role name, or a :class:`CarrierRole`.

    >>> parse_role("red:NAD:2")
    CarrierRole(state='red', pair='NAD', electrons=2)
    >>> parse_role("water")
    'water'
    """
    if text is None or not str(text).strip():
        return None
    value = str(text).strip()
    if value.lower() in SIMPLE_ROLES:
        return value.lower()
    match = _CARRIER_RE.match(value)
    if match:
        return CarrierRole(match.group(1), match.group(2), int(match.group(3)))
    prefix = f"{where}: " if where else ""
    raise InputError(
        f"{prefix}role '{value}' is not understood; use one of {', '.join(SIMPLE_ROLES)}, "
        "'red:PAIR:N' or 'ox:PAIR:N' (e.g. 'red:NAD:2' for NADH), or leave the cell empty"
    )


def metabolite_role(metabolite: cobra.Metabolite) -> str | CarrierRole | None:
    """The role recorded in ``metabolite.notes['role']`` (``None`` when there is none)."""
    return parse_role((metabolite.notes or {}).get("role"), where=f"compound '{metabolite.id}'")


def without_activity(model: cobra.Model, kind_of=None) -> set[str]:
    """Ids of the metabolites without a concentration variable: water and pure solids (activity
    1) and H+ (fixed by the pH). Found by their role (``water``, ``proton``) or, when ``kind_of``
    is given (a function from a ``thermo_key`` to the kind of the compound it names, or None), by
    a thermo key that names one of :data:`tfa.thermo.compounds.FIXED_ACTIVITY_KINDS`.
    """
    found = set()
    for met in model.metabolites:
        if metabolite_role(met) in ("water", "proton"):
            found.add(met.id)
            continue
        key = str((met.notes or {}).get("thermo_key") or "").strip()
        if kind_of is not None and key and kind_of(key) in FIXED_ACTIVITY_KINDS:
            found.add(met.id)
    return found


def metabolites_with_role(model: cobra.Model, role: str) -> list[cobra.Metabolite]:
    """Metabolites whose role is the simple role ``role`` (e.g. ``"proton"``), in model order."""
    return [m for m in model.metabolites if metabolite_role(m) == role]


def single_with_role(model: cobra.Model, role: str, fallback_ids: tuple[str, ...] = ()) -> cobra.Metabolite | None:
    """The one metabolite with ``role``; else the first of ``fallback_ids`` present; else ``None``.

    Raises
    ------
    InputError
        When two or more metabolites claim the same role.
    """
    found = metabolites_with_role(model, role)
    if len(found) > 1:
        raise InputError(
            f"compounds {', '.join(m.id for m in found)} all have role '{role}'; give the role to one "
            "compound only"
        )
    if found:
        return found[0]
    for candidate in fallback_ids:
        if candidate in model.metabolites:
            return model.metabolites.get_by_id(candidate)
    return None


@dataclass(frozen=True)
class CarrierPair:
    """A two-form electron carrier: reduced and oxidised metabolites, electrons per unit.

    ``hydrogen_difference`` and ``charge_difference`` are (reduced minus oxidised); the check
    ``hydrogen_difference - charge_difference == electrons`` holds for a consistent pair
    (NADH minus NAD+ = one H and charge -1: two electrons).
    """

    pair: str
    reduced: cobra.Metabolite
    oxidised: cobra.Metabolite
    electrons: int
    hydrogen_difference: int
    charge_difference: int


def carrier_pairs(model: cobra.Model) -> dict[str, CarrierPair]:
    """Every carrier pair of the model, checked against the formulas.

    The reduced and oxidised forms must differ only in hydrogen and charge, and by exactly ``N``
    electrons (H difference minus charge difference = N): this is what lets a pair be replaced
    by N/2 H2 and H+ with the balance intact.

    Raises
    ------
    InputError
        A pair with only one form, two forms of the same state, different N, or formulas that do
        not differ by N electrons; the message names the compounds and the fix.
    """
    forms: dict[str, dict[str, list[tuple[cobra.Metabolite, CarrierRole]]]] = {}
    for met in model.metabolites:
        role = metabolite_role(met)
        if isinstance(role, CarrierRole):
            forms.setdefault(role.pair, {"red": [], "ox": []})[role.state].append((met, role))
    pairs: dict[str, CarrierPair] = {}
    for pair, states in forms.items():
        for state in ("red", "ox"):
            if len(states[state]) != 1:
                names = ", ".join(m.id for m, _ in states[state]) or "none"
                raise InputError(
                    f"carrier pair '{pair}' needs exactly one '{state}:{pair}:N' compound, found {names}; "
                    "give each pair one reduced and one oxidised form"
                )
        (red, red_role), (ox, ox_role) = states["red"][0], states["ox"][0]
        if red_role.electrons != ox_role.electrons:
            raise InputError(
                f"carrier pair '{pair}': {red.id} says {red_role.electrons} electrons, {ox.id} says "
                f"{ox_role.electrons}; give both forms the same N"
            )
        red_counts, red_charge = formula_and_charge(red)
        ox_counts, ox_charge = formula_and_charge(ox)
        elements = set(red_counts) | set(ox_counts)
        off = {e: red_counts.get(e, 0) - ox_counts.get(e, 0) for e in elements if e != "H"}
        off = {e: v for e, v in off.items() if v}
        dh = red_counts.get("H", 0) - ox_counts.get("H", 0)
        dz = red_charge - ox_charge
        if off or dh - dz != red_role.electrons:
            raise InputError(
                f"carrier pair '{pair}': {red.id} ({red.formula}, {red_charge:+d}) and {ox.id} "
                f"({ox.formula}, {ox_charge:+d}) differ by {dh - dz} electrons"
                + (f" and in {', '.join(sorted(off))}" if off else "")
                + f", but the role says {red_role.electrons}; fix the formulas, the charges or N"
            )
        pairs[pair] = CarrierPair(pair, red, ox, red_role.electrons, dh, dz)
    return pairs


def formula_and_charge(metabolite: cobra.Metabolite) -> tuple[dict[str, int], int]:
    """(element counts, charge) of a metabolite from its cobra ``formula`` and ``charge``.

    Raises
    ------
    InputError
        When the formula or the charge is missing or unreadable.
    """
    if not metabolite.formula:
        raise InputError(f"compound '{metabolite.id}' has no formula; give its formula and charge")
    counts, suffix_charge = parse_formula(metabolite.formula, where=f"compound '{metabolite.id}'")
    charge = metabolite.charge
    if charge is None:
        charge = suffix_charge
    return counts, int(round(float(charge)))
