"""Roles a network's compounds play, declared or inferred from what they are, and the roles a
mode needs that a network lacks.

A role declared in the ``role`` column of a compounds table (``notes['role']``) is kept. A
compound without one gets the role its ``thermo_key`` (written by hand or matched through its
annotations, :mod:`tfa.network.identifiers`) names when that is unambiguous:

- water ``H2O``, proton ``H+``, ``H2``, ``phosphate``, ``pyrophosphate``, ``ATP``, ``ADP``,
  ``AMP`` (one compound each);
- carrier pairs: NAD+/NADH (``NAD``, 2 electrons), NADP+/NADPH (``NADP``, 2) and the carriers
  of ``tfa/data/potentials.csv`` (ferredoxin and the others, by their couple), both forms
  present and differing by the stated electrons (:func:`tfa.network.roles.carrier_pairs`);
- CO2 (``CO2``, ``CO2tot``, ``CO2(g)``) is reported, not written: it is no role of the
  compounds table.

With several compartments, the compound of the inner one (``c``, else the compartment with
most compounds) takes the role; two candidates in that compartment leave the role open.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

import cobra

from ..errors import InputError
from .roles import CarrierRole, SIMPLE_ROLES, carrier_pairs, metabolite_role

#: Compound ids of the thermodynamic data -> the simple role they play.
KEY_ROLES = {"H2O": "water", "H+": "proton", "H2": "h2", "H2(g)": "h2", "phosphate": "phosphate",
             "pyrophosphate": "pyrophosphate", "ATP": "atp", "ADP": "adp", "AMP": "amp"}
#: Compound ids -> (state, pair, electrons) of the two nicotinamide carriers.
KEY_CARRIERS = {"NAD": ("ox", "NAD", 2), "NADH": ("red", "NAD", 2),
                "NADP": ("ox", "NADP", 2), "NADPH": ("red", "NADP", 2)}
#: Compound ids of CO2 (reported as the role ``co2``).
CO2_KEYS = ("CO2", "CO2tot", "CO2(g)")
#: Every role the role table lists, in order ("carriers": at least one carrier pair).
LISTED_ROLES = ("water", "proton", "h2", "co2", "phosphate", "pyrophosphate", "atp", "adp", "amp",
                "carriers")
#: What a mode's need is called in words.
NEED_WORDS = {"h2": "H2", "atp": "ATP", "carriers": "electron-carrier pair",
              "water": "water", "phosphate": "phosphate"}


@dataclass(frozen=True)
class RoleEntry:
    """A role and the compounds that play it, with how that was decided."""

    role: str
    compounds: tuple[str, ...]
    how: str


@dataclass
class RoleReport:
    """Roles found in a network, declared or inferred; ``open`` says why a role stayed open."""

    entries: list[RoleEntry] = field(default_factory=list)
    open: dict[str, str] = field(default_factory=dict)

    def rows(self, needed_by: dict[str, list[str]] | None = None) -> list[dict[str, str]]:
        """One row per listed role: ``role``, ``compounds``, ``how`` (or why it is missing) and
        the modes that need it (``needed_by``: role -> mode ids)."""
        out = []
        by_role = {}
        for entry in self.entries:
            by_role.setdefault(entry.role, []).append(entry)
        for role in LISTED_ROLES:
            entries = by_role.get(role, [])
            out.append({"role": role,
                        "compounds": ", ".join(c for e in entries for c in e.compounds) or "none",
                        "how": "; ".join(dict.fromkeys(e.how for e in entries))
                        or self.open.get(role, "missing"),
                        "needed_by": ", ".join((needed_by or {}).get(role, []))})
        return out


def inner_compartment(model: cobra.Model) -> str:
    """The compartment whose compounds take the roles: the only one, ``c``, else the fullest."""
    counts: dict[str, int] = {}
    for met in model.metabolites:
        counts[met.compartment or ""] = counts.get(met.compartment or "", 0) + 1
    if len(counts) <= 1 or "c" not in counts:
        return max(counts, key=counts.get) if counts else ""
    return "c"


def _candidates(model: cobra.Model, keys: dict[str, object],
                database) -> dict[object, list[cobra.Metabolite]]:
    """What each key names -> the metabolites without a declared role whose thermo key (any of
    the compound's names) is it."""
    inner = inner_compartment(model)
    found: dict[object, list[cobra.Metabolite]] = {}
    for met in model.metabolites:
        if metabolite_role(met) is not None:
            continue
        key = canonical_key(met, database)
        if key in keys and (met.compartment or "") == inner:
            found.setdefault(keys[key], []).append(met)
    return found


def canonical_key(met: cobra.Metabolite, database) -> str:
    """The compound id of the data that the metabolite's ``thermo_key`` names ("" when none)."""
    key = str((met.notes or {}).get("thermo_key") or "").strip()
    if not key:
        return ""
    try:
        return database.compound(key).id
    except InputError:
        return key


def carrier_keys(database) -> dict[str, tuple[str, str, int]]:
    """Compound id -> (state, pair, electrons) of every carrier the data know."""
    out = dict(KEY_CARRIERS)
    for compound in database.registry:
        couple = compound.couple
        if couple is not None and compound.role in ("oxidised", "reduced"):
            out[compound.id] = ("ox" if compound.role == "oxidised" else "red", couple.id,
                                int(couple.n_electrons))
    return out


def infer_roles(model: cobra.Model, database) -> RoleReport:
    """Write the roles that the thermo keys name unambiguously (see the module text) into
    ``notes['role']`` (with ``notes['role_inferred']``) and report every role found."""
    report = RoleReport()
    declared = {metabolite_role(m) for m in model.metabolites}
    declared_pairs = {r.pair for r in declared if isinstance(r, CarrierRole)}
    for role, mets in _candidates(model, KEY_ROLES, database).items():
        if role in declared:
            continue
        if len(mets) > 1:
            report.open[role] = f"not inferred: {', '.join(m.id for m in mets)} all qualify"
            continue
        _write(mets[0], role, f"thermo key {canonical_key(mets[0], database)}")
    pairs: dict[str, dict[str, list[cobra.Metabolite]]] = {}
    for (state, pair, electrons), mets in _candidates(model, carrier_keys(database), database).items():
        if pair not in declared_pairs:
            pairs.setdefault(pair, {})[f"{state}:{pair}:{electrons}"] = mets
    for pair, forms in pairs.items():
        if len(forms) != 2 or any(len(m) != 1 for m in forms.values()):
            continue
        written = [(mets[0], text) for text, mets in forms.items()]
        for met, text in written:
            _write(met, text, f"thermo key {canonical_key(met, database)}")
        try:
            carrier_pairs(model)
        except InputError as err:
            for met, _ in written:
                _unwrite(met)
            report.open["carriers"] = f"pair {pair} not inferred ({err})"
    for met in model.metabolites:
        role = metabolite_role(met)
        inferred = str((met.notes or {}).get("role_inferred") or "")
        if isinstance(role, CarrierRole):
            report.entries.append(RoleEntry(
                "carriers", (f"{met.id} ({role.state}:{role.pair}:{role.electrons})",),
                "inferred from thermo keys" if inferred.startswith("thermo key") else
                f"inferred from {inferred}" if inferred else "declared"))
        elif role in SIMPLE_ROLES:
            report.entries.append(RoleEntry(role, (met.id,),
                                            f"inferred from {inferred}" if inferred else "declared"))
    co2 = [m.id for m in model.metabolites if canonical_key(m, database) in CO2_KEYS]
    if co2:
        report.entries.append(RoleEntry("co2", tuple(co2), "from thermo key"))
    return report


def _write(met: cobra.Metabolite, role: str, why: str) -> None:
    met.notes = {**(met.notes or {}), "role": role, "role_inferred": why}


def _unwrite(met: cobra.Metabolite) -> None:
    met.notes = {k: v for k, v in (met.notes or {}).items() if k not in ("role", "role_inferred")}


def name_h2(model: cobra.Model, metabolite_id: str) -> None:
    """Give the role ``h2`` to the compound named on the command line (``--h2 ID``).

    Raises
    ------
    InputError
        An id that is no compound of the network, or another compound declared H2.
    """
    import difflib

    if metabolite_id not in model.metabolites:
        close = difflib.get_close_matches(metabolite_id, [m.id for m in model.metabolites], n=3)
        hint = f"did you mean {', '.join(repr(c) for c in close)}?" if close else \
            "give a compound id of the network"
        raise InputError(f"--h2 {metabolite_id}: not a compound of network {model.id}; {hint}")
    for met in model.metabolites:
        if met.id != metabolite_id and metabolite_role(met) == "h2":
            if (met.notes or {}).get("role_inferred"):
                _unwrite(met)
            else:
                raise InputError(f"--h2 {metabolite_id}: compound {met.id} is declared H2 (role "
                                 "h2) already; leave --h2 out or remove that role")
    _write(model.metabolites.get_by_id(metabolite_id), "h2", "--h2")


def missing_needs(model: cobra.Model, needs: tuple[str, ...]) -> list[str]:
    """The needs of a mode (:attr:`tfa.modes.Mode.needs`) that the network does not meet."""
    roles = {metabolite_role(m) for m in model.metabolites}
    have = {r for r in roles if isinstance(r, str)}
    if any(isinstance(r, CarrierRole) for r in roles):
        have.add("carriers")
    missing = []
    for n in needs:
        if n.startswith("currency:"):
            from .currency_rewrites import missing_currency

            lack = missing_currency(model, n.split(":", 1)[1])
            if lack:
                missing.append(lack)
        elif n not in have:
            missing.append(n)
    return missing


def not_applicable_reason(missing: list[str]) -> str:
    """Words for the needs a network lacks ("" when none).

    >>> not_applicable_reason(["atp"])
    'no ATP in this network'
    >>> not_applicable_reason(["h2", "carriers"])
    'no H2 and no electron-carrier pair in this network; name the H2 compound with --h2 ID'
    """
    if not missing:
        return ""
    text = " and ".join(f"no {NEED_WORDS.get(n, n)}" for n in missing) + " in this network"
    if "h2" in missing:
        text += "; name the H2 compound with --h2 ID"
    return text


def check_roles(model: cobra.Model) -> None:
    """The roles as the modes will use them: readable, one compound per simple role, carrier
    pairs complete and consistent (:func:`tfa.network.roles.carrier_pairs`).

    Raises
    ------
    InputError
        Naming the file and line of the compound at fault (when the model keeps its files).
    """
    from .locations import located
    from .roles import parse_role

    holders: dict[str, list[str]] = {}
    pairs: dict[str, list[str]] = {}
    for met in model.metabolites:
        try:
            role = parse_role((met.notes or {}).get("role"), where=f"compound '{met.id}'")
        except InputError as err:
            raise InputError(located(model, "compound", met.id, str(err))) from err
        if isinstance(role, CarrierRole):
            pairs.setdefault(role.pair, []).append(met.id)
        elif role is not None:
            holders.setdefault(role, []).append(met.id)
    for role, ids in holders.items():
        if len(ids) > 1:
            raise InputError(located(model, "compound", ids[1], (
                f"compounds {', '.join(ids)} all have role '{role}'; give the role to one compound "
                "only")))
    try:
        carrier_pairs(model)
    except InputError as err:
        text = str(err)
        ids = next((ids for pair, ids in pairs.items() if f"'{pair}'" in text), [])
        named = sorted((m.start(), i) for i in ids for m in [re.search(rf"\b{re.escape(i)}\b", text)] if m)
        culprit = named[0][1] if named else (ids[0] if ids else None)
        raise InputError(located(model, "compound", culprit, text) if culprit else text) from err
