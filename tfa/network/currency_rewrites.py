"""Rewrites of the energy coupling: ATP exchanged for another energy currency, and each
ATP-coupled step given the choice of running as its bare chemistry.

Both build on the bare chemistry of a step (:func:`tfa.network.rewrites.bare_stoichiometry`): the
step minus the hydrolyses H1-H4 of ATP, ADP and pyrophosphate that cancel its nucleotides. The
step spends n = -2 ν(ATP) - ν(ADP) phosphoanhydride bonds of the adenine nucleotides (ATP -> ADP
one, ATP -> AMP two: the pyrophosphate an AMP-forming step releases is counted as spent, as the
cell's diphosphatase spends it; n < 0: the step makes them). Only steps with ATP, ADP or AMP are
rewritten; steps with pyrophosphate alone (phosphoribosyltransferases, the diphosphatase, a
pyrophosphate-dependent kinase) stay as they are.

- :func:`currency_substitution` (rewrites ``currency_<id>``): each ATP-coupled step becomes its
  bare chemistry plus n times the hydrolysis of the currency's donor (:data:`CURRENCIES`), so a
  kinase X + ATP -> XP + ADP becomes X + acetyl phosphate -> XP + acetate, and a step that made
  ATP makes the donor instead. The energy of the new step is that of its compounds (the network's
  own data: acetyl phosphate and acetyl-CoA from their hydrolysis values), so each currency
  carries its own energies. Steps whose chemistry is nothing but the currency (acetate kinase in
  the acetyl-phosphate currency, adenylate kinase) become empty and are removed; ATP hydrolysis
  becomes the donor's; ATP, ADP and AMP leave the network, pyrophosphate stays.
- :func:`coupling_choices` (rewrite ``atp_coupling_optional``): every ATP-coupled step keeps its
  coupling and gains a twin ``<id>__bare``, its bare chemistry; the fewest-couplings analysis
  (:mod:`tfa.analyses.couplings`) lets each step use one of the two.

References
----------
[1] R. K. Thauer, K. Jungermann, K. Decker, Bacteriol. Rev. 41 (1977) 100-180 (acetyl phosphate
    and acetyl-CoA as energy-rich compounds; their hydrolysis energies, appendix).
[2] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003 (reactant convention:
    H+ supplied by the buffer).
"""

from __future__ import annotations

import contextlib
import logging
from dataclasses import dataclass
from typing import Iterator

import cobra

from ..errors import InputError
from ..thermo.compounds import normalise_name
from .checks import is_boundary_reaction as is_boundary
from .rewrite_batch import RewriteBatch, RewriteSummary, exact_context, note_rewrite
from .rewrites import (_finish, _implicit_protons, _is_empty, bare_stoichiometry,
                       hydrolysis_words, nucleotide_metabolites)
from .roles import single_with_role

logger = logging.getLogger(__name__)

_TOL = 1e-9
#: Suffix of the bare twin of an ATP-coupled step (:func:`coupling_choices`).
BARE_SUFFIX = "__bare"


@dataclass(frozen=True)
class Currency:
    """An energy currency: the donor whose hydrolysis takes the place of ATP hydrolysis.

    Attributes
    ----------
    id : str
        ``acetyl_phosphate``, ``thioester``, ``pyrophosphate``, ``polyphosphate``.
    donor : tuple of str
        Names (metabolite id, name, synonym or thermo key, any case) of the donor compound.
    products : tuple of tuple of str
        Names of each product of the donor's hydrolysis besides phosphate (one tuple per
        compound; phosphate is found by its role).
    phosphate_made : int
        Phosphate released per donor hydrolysed.
    hydrolysis : str
        The hydrolysis in words.
    """

    id: str
    donor: tuple[str, ...]
    products: tuple[tuple[str, ...], ...]
    phosphate_made: int
    hydrolysis: str


#: The currencies (hydrolysis energies from the network's own data; bundled: acetyl phosphate
#: -43.1 and acetyl-CoA -35.7 kJ/mol at 25 degC, pH 7, reaction_values).
CURRENCIES = {c.id: c for c in (
    Currency("acetyl_phosphate", ("actp", "acetyl phosphate", "acetylphosphate", "acetyl-P"),
             (("ac", "acetate"),), 1, "acetyl phosphate + H2O -> acetate + Pi"),
    Currency("thioester", ("accoa", "acetyl-CoA", "acetyl coenzyme A"),
             (("ac", "acetate"), ("coa", "coenzyme A", "CoA")), 0,
             "acetyl-CoA + H2O -> acetate + CoA"),
    Currency("pyrophosphate", ("ppi", "pyrophosphate", "diphosphate", "PPi"), (), 2,
             "PPi + H2O -> 2 Pi"),
    Currency("polyphosphate", ("polyp", "polyphosphate", "polyphosphate unit"), (), 1,
             "polyphosphate (one phosphoanhydride unit) + H2O -> Pi"),
)}


def bonds_spent(stoichiometry: dict, nucleotides: dict[str, cobra.Metabolite]) -> float:
    """Phosphoanhydride bonds of the adenine nucleotides a step spends per unit of forward flux:
    n = -2 ν(ATP) - ν(ADP) (AMP holds none).

    >>> m = {"atp": "ATP", "adp": "ADP"}
    >>> bonds_spent({"ATP": -1.0, "ADP": 1.0}, m), bonds_spent({"ATP": -1.0, "AMP": 1.0}, m)
    (1.0, 2.0)
    """
    atp, adp = nucleotides.get("atp"), nucleotides.get("adp")
    return float(-2.0 * stoichiometry.get(atp, 0.0) - stoichiometry.get(adp, 0.0)) + 0.0


def find_compound(model: cobra.Model, names: tuple[str, ...]) -> cobra.Metabolite | None:
    """The metabolite named by one of ``names`` (its id, name, synonyms or thermo key, any case;
    the first name that matches wins), or None."""
    wanted = [normalise_name(n) for n in names]
    index: dict[str, cobra.Metabolite] = {}
    for met in model.metabolites:
        notes = met.notes or {}
        keys = [met.id, met.name or "", str(notes.get("thermo_key") or "")]
        keys += str(notes.get("synonyms") or "").split(";")
        for key in keys:
            if key and key.strip():
                index.setdefault(normalise_name(key), met)
    for name in wanted:
        if name in index:
            return index[name]
    return None


def currency_compounds(model: cobra.Model, currency: Currency
                       ) -> tuple[cobra.Metabolite, list[cobra.Metabolite]] | None:
    """(donor, products) of ``currency`` in ``model``, or None when one is missing."""
    if currency.id == "pyrophosphate":
        donor = single_with_role(model, "pyrophosphate") or find_compound(model, currency.donor)
    else:
        donor = find_compound(model, currency.donor)
    products = [find_compound(model, names) for names in currency.products]
    if donor is None or any(p is None for p in products):
        return None
    return donor, products


def missing_currency(model: cobra.Model, currency_id: str) -> str:
    """Words for what a network lacks to use a currency ("" when nothing)."""
    currency = CURRENCIES[currency_id]
    if currency_compounds(model, currency) is None:
        names = [currency.donor[1]] + [p[1] for p in currency.products]
        return f"{' or '.join(names)} (for the {currency.id.replace('_', ' ')} currency)"
    return ""


@contextlib.contextmanager
def currency_substitution(model: cobra.Model, currency_id: str) -> Iterator[RewriteSummary]:
    """Couple every ATP-coupled step to the hydrolysis of another donor (see the module text).

    Equation: new step = bare chemistry + n (donor + H2O -> products + k Pi), n the
    phosphoanhydride bonds the step spends (:func:`tfa.network.rewrites.bare_stoichiometry`),
    H+ set so the implicit protons stay those of the original step (Alberty 2003).

    Examples
    --------
    Formate-tetrahydrofolate ligase (EC 6.3.4.3) in the acetyl-phosphate currency
    (reference species of Alberty 2003; hand-derived: for + thf + ATP -> fthf + ADP + Pi, minus
    ATP + H2O -> ADP + Pi + H+, plus acetyl phosphate + H2O -> acetate + Pi + H+):

    >>> m = cobra.Model("fthfs")
    >>> def met(i, f, z, role=""):
    ...     x = cobra.Metabolite(i, formula=f, charge=z, compartment="c")
    ...     x.notes = {"role": role} if role else {}
    ...     return x
    >>> m.add_metabolites([met("for", "CHO2", -1), met("thf", "C19H21N7O6", -2),
    ...     met("fthf", "C20H21N7O7", -2), met("atp", "C10H12N5O13P3", -4, "atp"),
    ...     met("adp", "C10H12N5O10P2", -3, "adp"), met("pi", "HPO4", -2, "phosphate"),
    ...     met("h2o", "H2O", 0, "water"), met("h", "H", 1, "proton"),
    ...     met("actp", "C2H3O5P", -2), met("ac", "C2H3O2", -1)])
    >>> r = cobra.Reaction("FTHFS"); m.add_reactions([r])
    >>> r.build_reaction_from_string("for + thf + atp --> fthf + adp + pi")
    >>> with currency_substitution(m, "acetyl_phosphate"):
    ...     print(m.reactions.FTHFS.build_reaction_string())
    actp + for + thf --> ac + fthf + pi
    """
    if currency_id not in CURRENCIES:
        raise InputError(f"currency '{currency_id}' is not known; use one of {', '.join(CURRENCIES)}")
    currency = CURRENCIES[currency_id]
    label = f"currency_{currency_id}"
    summary = RewriteSummary(label)
    with exact_context(model) as context:
        batch = RewriteBatch(model, context)
        found = currency_compounds(model, currency)
        if found is None:
            raise InputError(f"the {currency_id.replace('_', ' ')} currency needs "
                             f"{missing_currency(model, currency_id)} in the network; add the "
                             "compound to the compounds table")
        donor, products = found
        nucleotides = nucleotide_metabolites(model)
        water = single_with_role(model, "water", ("h2o", "h2o_c"))
        phosphate = single_with_role(model, "phosphate", ("pi", "pi_c"))
        proton = single_with_role(model, "proton", ("h", "h_c"))
        inert = {m.id for m in (proton, water) if m is not None}
        adenine = {m for role, m in nucleotides.items() if role != "pyrophosphate"}
        remove: list[cobra.Reaction] = []
        for reaction in list(model.reactions):
            stoich = reaction.metabolites
            if is_boundary(reaction) or not any(m in adenine for m in stoich):
                continue
            bare = bare_stoichiometry(reaction, nucleotides, water, phosphate, proton)
            if bare is None:
                remove.append(reaction)
                note_rewrite(context, reaction, f"{label}: removed, it makes or uses up adenine "
                             "nucleotides", summary)
                continue
            new, amounts = bare
            bonds = bonds_spent(stoich, nucleotides)
            if abs(bonds) > _TOL:
                hydrolysis = {donor: -1.0, water: -1.0, phosphate: float(currency.phosphate_made)}
                for p in products:
                    hydrolysis[p] = hydrolysis.get(p, 0.0) + 1.0
                for met, c in hydrolysis.items():
                    new[met] = new.get(met, 0.0) + bonds * c
                new = {m: round(c, 12) for m, c in new.items() if abs(c) > _TOL}
                if proton is not None:
                    change = _implicit_protons(new) - _implicit_protons(stoich) if new else 0.0
                    if abs(change) > _TOL:
                        new[proton] = round(new.get(proton, 0.0) + change, 12)
                        new = {m: c for m, c in new.items() if abs(c) > _TOL}
            used = hydrolysis_words(amounts)
            if _is_empty(new, inert):
                remove.append(reaction)
                note_rewrite(context, reaction, f"{label}: removed, nothing but the currency "
                             f"({used}, plus {bonds:g} x ({currency.hydrolysis}))", summary)
                continue
            batch.set_terms(reaction, new)
            note_rewrite(context, reaction, f"{label}: {used}; plus {bonds:g} x "
                         f"({currency.hydrolysis})", summary)
        _finish(model, summary, remove, adenine, label, context, batch)
        logger.info("%s: %d reactions rewritten, %d removed", label,
                    len(summary.rewritten) - len(summary.removed), len(summary.removed))
        yield summary


def coupled_steps(model: cobra.Model) -> dict[str, tuple[dict, float]]:
    """Reaction id -> (bare terms, bonds spent, :func:`bonds_spent`) of every internal
    ATP-coupled step that spends or makes bonds and has a bare chemistry that is not empty (those
    a coupling choice applies to)."""
    nucleotides = nucleotide_metabolites(model)
    stripped = set(nucleotides.values())
    water = single_with_role(model, "water", ("h2o", "h2o_c"))
    phosphate = single_with_role(model, "phosphate", ("pi", "pi_c"))
    proton = single_with_role(model, "proton", ("h", "h_c"))
    inert = {m.id for m in (proton, water) if m is not None}
    out = {}
    for reaction in model.reactions:
        if is_boundary(reaction) or not any(m in stripped for m in reaction.metabolites):
            continue
        if reaction.id.endswith(BARE_SUFFIX):
            continue
        bare = bare_stoichiometry(reaction, nucleotides, water, phosphate, proton)
        bonds = bonds_spent(reaction.metabolites, nucleotides)
        if bare is None or _is_empty(bare[0], inert) or abs(bonds) <= _TOL:
            continue
        out[reaction.id] = (bare[0], bonds)
    return out


@contextlib.contextmanager
def coupling_choices(model: cobra.Model) -> Iterator[RewriteSummary]:
    """Give every ATP-coupled step a twin ``<id>__bare`` that is its bare chemistry, with the
    same flux bounds and pathway; the coupled step stays. Notes on the twin: ``bare_of`` (the
    coupled step) and ``bonds`` (phosphoanhydride bonds the coupled step spends per unit of
    forward flux; negative: it makes them).

    >>> m = cobra.Model("ack")
    >>> def met(i, f, z, role=""):
    ...     x = cobra.Metabolite(i, formula=f, charge=z, compartment="c")
    ...     x.notes = {"role": role} if role else {}
    ...     return x
    >>> m.add_metabolites([met("ac", "C2H3O2", -1), met("actp", "C2H3O5P", -2),
    ...     met("atp", "C10H12N5O13P3", -4, "atp"), met("adp", "C10H12N5O10P2", -3, "adp"),
    ...     met("pi", "HPO4", -2, "phosphate"), met("h2o", "H2O", 0, "water"), met("h", "H", 1, "proton")])
    >>> r = cobra.Reaction("ACK"); m.add_reactions([r])
    >>> r.build_reaction_from_string("ac + atp --> actp + adp")
    >>> with coupling_choices(m):
    ...     print(m.reactions.ACK__bare.build_reaction_string(), m.reactions.ACK__bare.notes["bonds"])
    ac + h + pi --> actp + h2o 1.0
    >>> "ACK__bare" in m.reactions
    False
    """
    summary = RewriteSummary("atp_coupling_optional")
    with exact_context(model) as context:
        twins = []
        for rid, (terms, bonds) in coupled_steps(model).items():
            original = model.reactions.get_by_id(rid)
            twin = cobra.Reaction(rid + BARE_SUFFIX, name=f"{original.name} (bare chemistry)",
                                  lower_bound=original.lower_bound, upper_bound=original.upper_bound)
            twin.add_metabolites(terms)
            notes = {k: v for k, v in (original.notes or {}).items()
                     if k not in ("energy_source", "rewritten")}
            notes.update({"bare_of": rid, "bonds": bonds,
                          "rewritten": f"atp_coupling_optional: bare twin of {rid} "
                                       f"({bonds:g} phosphoanhydride bond(s) spent)"})
            twin.notes = notes
            twin.subsystem = original.subsystem
            twins.append(twin)
            summary.rewritten[twin.id] = notes["rewritten"]
        if twins:
            model.add_reactions(twins)
        logger.info("atp_coupling_optional: %d bare twins added", len(twins))
        yield summary
