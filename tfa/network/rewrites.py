"""The four ways a network is asked to run, as context managers that restore the model exactly.

- :func:`native`: electron carriers and adenine nucleotides are internal; nothing supplies them
  from outside (their boundary reactions are blocked), so the network must regenerate them.
- :func:`h2_only`: every electron-carrier pair is replaced by H2 (N/2 H2 per N-electron unit),
  with H+ corrected so the reaction still balances: X + NADH + H+ -> XH2 + NAD+ becomes
  X + H2 -> XH2. Reactions left with nothing but H+/H2O (a hydrogenase H2 + NAD+ -> NADH + H+
  becomes H2 -> H2) are removed, as are reactions that make or use up a carrier; carrier
  compounds leave the model.
- :func:`no_atp_strict`: ATP, ADP, AMP and pyrophosphate are unavailable; every reaction that
  contains one of them is blocked (bounds 0, 0); a demand of several compounds only loses them.
- :func:`no_atp_bare_chemistry`: each reaction coupled to ATP, ADP or pyrophosphate hydrolysis
  becomes its own chemistry, i.e. the reaction minus the hydrolysis reactions

      H1  ATP + H2O -> ADP + Pi + H+        H2  ATP + H2O -> AMP + PPi + H+
      H3  ADP + H2O -> AMP + Pi + H+        H4  PPi + H2O -> 2 Pi (+ H+ as the formulas say)

  in the amounts that cancel every nucleotide (a kinase X + ATP -> XP + ADP becomes
  X + Pi -> XP + H2O). The result does not depend on which combination is used, because the only
  freedom (H1 + H3 versus H2 + H4) is the same net chemistry; the combination with the smallest
  total amount is recorded. Pure nucleotide interconversions (adenylate kinase, diphosphatase)
  become empty and are removed; reactions that make or use up the adenine moiety are removed.

Every rewritten reaction gets ``notes['rewritten']`` saying what was done. All changes go through
cobra's ``with model:`` history (undone when the context ends); the order of reactions,
metabolites and the terms within each reaction is restored as well, so the model after the
context equals the model before it. A rewrite works inside another's context too (they compose:
H2 in place of carriers and bare chemistry at once).

The changes of one rewrite are applied as one batch (:class:`RewriteBatch`): new stoichiometries and
removed reactions and compounds are set on the cobra objects, then the solver's problem is built
once from the rewritten network (one row per compound, set in one call), and on leaving the
context the solver's problem from before is put back as it was. Changing reaction by reaction
through cobra rewrites a compound's whole row for every reaction it is in (a shared H+ or water
row once per reaction), which grew quadratically: 3,000 reactions took about 40 s, 20,000 did
not finish in 10 minutes (``scripts/bench_engine.py`` prints the batch's time against size).

Compounds are recognised by their role (``notes['role']``, see :mod:`tfa.network.roles`).

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003 (reactant convention:
    H+ is supplied by the buffer at fixed pH).
[2] R. K. Thauer, K. Jungermann, K. Decker, Bacteriol. Rev. 41 (1977) 100-180 (carriers as
    two-electron couples; ferredoxin counted per two electrons).
"""

from __future__ import annotations

import contextlib
import logging
from typing import Iterator

import cobra

from ..errors import InputError
from ..modes import get_mode
from ..thermo.balance import check_balance
from .checks import is_boundary_reaction as is_boundary
from .rewrite_batch import RewriteBatch, RewriteSummary, exact_context, note_rewrite
from .roles import NUCLEOTIDE_ROLES, carrier_pairs, formula_and_charge, single_with_role

logger = logging.getLogger(__name__)

_TOL = 1e-9


def _is_empty(stoichiometry: dict[cobra.Metabolite, float], inert: set[str]) -> bool:
    return all(abs(c) <= _TOL or m.id in inert for m, c in stoichiometry.items())


def _implicit_protons(stoichiometry: dict[cobra.Metabolite, float]) -> float:
    formulas = {m.id: formula_and_charge(m) for m in stoichiometry}
    report = check_balance({m.id: c for m, c in stoichiometry.items()}, formulas)
    return report.implicit_protons


def _fmt(value: float) -> str:
    return f"{value:+g}"


def _finish(model: cobra.Model, summary: RewriteSummary, remove: list[cobra.Reaction],
            gone: set[cobra.Metabolite], label: str, context, batch: RewriteBatch) -> None:
    """Drop the given compounds from boundary reactions, remove reactions and compounds: the
    whole batch applied at once."""
    remove_ids = {r.id for r in remove}
    for reaction in model.reactions:
        if reaction.id in remove_ids or not is_boundary(reaction):
            continue
        present = [m for m in reaction.metabolites if m in gone]
        if not present:
            continue
        if len(present) == len(reaction.metabolites):
            remove.append(reaction)
            remove_ids.add(reaction.id)
            note_rewrite(context, reaction, f"{label}: boundary reaction of {', '.join(m.id for m in present)} removed", summary)
        else:
            batch.set_terms(reaction, {m: c for m, c in reaction.metabolites.items() if m not in gone})
            note_rewrite(context, reaction, f"{label}: {', '.join(m.id for m in present)} dropped", summary)
    for reaction in model.reactions:   # any other term of a removed compound goes with it
        if reaction.id in remove_ids:
            continue
        terms = batch.terms.get(reaction, reaction._metabolites)  # noqa: SLF001
        if any(m in gone for m in terms):
            batch.set_terms(reaction, {m: c for m, c in terms.items() if m not in gone})
    if remove:
        summary.removed.extend(r.id for r in remove)
        batch.removed.extend(remove)
    leftovers = [m for m in model.metabolites if m in gone]
    if leftovers:
        summary.removed_metabolites.extend(m.id for m in leftovers)
        batch.gone.extend(leftovers)
    batch.apply()


# --------------------------------------------------------------------------------------------
# the modes


@contextlib.contextmanager
def h2_only(model: cobra.Model) -> Iterator[RewriteSummary]:
    """Replace every electron-carrier pair by H2 for the duration of the context.

    A pair whose reduced form differs from the oxidised form by ``N`` electrons, ``c`` in charge
    (reduced minus oxidised), satisfies red - ox = (N/2) H2 + c H+ (element and charge balance;
    checked by :func:`tfa.network.roles.carrier_pairs`). So a reaction with ``k`` units of the
    reduced form on the left (coefficient -k) gets -k N/2 H2 and -k c H+ in place of the pair,
    and stays balanced with the same implicit protons [1].

    Examples
    --------
    NADH/NAD+ (Alberty 2003 reference species C21H27N7O14P2 -2 / C21H26N7O14P2 -1) in lactate
    dehydrogenase (EC 1.1.1.27), pyruvate + NADH + H+ -> lactate + NAD+:

    >>> from tfa.network.roles import parse_role
    >>> m = cobra.Model("ldh")
    >>> def met(i, f, z, role=""):
    ...     x = cobra.Metabolite(i, formula=f, charge=z, compartment="c")
    ...     x.notes = {"role": role} if role else {}
    ...     return x
    >>> pyr, lac = met("pyr", "C3H3O3", -1), met("lac", "C3H5O3", -1)
    >>> nadh, nad = met("nadh", "C21H27N7O14P2", -2, "red:NAD:2"), met("nad", "C21H26N7O14P2", -1, "ox:NAD:2")
    >>> h, h2 = met("h", "H", 1, "proton"), met("h2", "H2", 0, "h2")
    >>> r = cobra.Reaction("LDH"); m.add_reactions([r])
    >>> r.add_metabolites({pyr: -1, nadh: -1, h: -1, lac: 1, nad: 1}); m.add_metabolites([h2])
    >>> with h2_only(m):
    ...     print(m.reactions.LDH.build_reaction_string())
    h2 + pyr --> lac
    >>> m.reactions.LDH.build_reaction_string()
    'h + nadh + pyr --> lac + nad'
    """
    summary = RewriteSummary("h2_only")
    with exact_context(model) as context:
        batch = RewriteBatch(model, context)
        pairs = carrier_pairs(model)
        carriers = {p.reduced for p in pairs.values()} | {p.oxidised for p in pairs.values()}
        h2 = single_with_role(model, "h2", ("h2",))
        proton = single_with_role(model, "proton", ("h", "h_c"))
        water = single_with_role(model, "water", ("h2o", "h2o_c"))
        inert = {m.id for m in (proton, water, h2) if m is not None}
        remove: list[cobra.Reaction] = []
        for reaction in list(model.reactions):
            stoich = reaction.metabolites
            present = [p for p in pairs.values() if p.reduced in stoich or p.oxidised in stoich]
            if not present or is_boundary(reaction):
                continue
            new = dict(stoich)
            h2_change = 0.0
            proton_change = 0.0
            parts: list[str] = []
            unbalanced_pair = None
            for pair in present:
                red = new.pop(pair.reduced, 0.0)
                ox = new.pop(pair.oxidised, 0.0)
                if abs(red + ox) > _TOL:
                    unbalanced_pair = pair
                    break
                h2_change += red * pair.electrons / 2.0
                proton_change += red * pair.charge_difference
                parts.append(f"{pair.reduced.id}/{pair.oxidised.id} ({_fmt(-red)} {pair.pair}, "
                             f"{pair.electrons} e-)")
            if unbalanced_pair is not None:
                remove.append(reaction)
                note_rewrite(context, reaction, f"h2_only: removed, it makes or uses up carrier "
                      f"{unbalanced_pair.pair} ({unbalanced_pair.reduced.id}/{unbalanced_pair.oxidised.id})",
                      summary)
                continue
            if abs(h2_change) > _TOL:
                if h2 is None:
                    raise InputError(
                        f"reaction '{reaction.id}': replacing carriers by H2 needs an H2 compound; add "
                        "one with role 'h2' to the compounds table"
                    )
                new[h2] = new.get(h2, 0.0) + h2_change
            if abs(proton_change) > _TOL:
                if proton is not None:
                    new[proton] = new.get(proton, 0.0) + proton_change
                else:
                    logger.info("%s: %+g H+ left implicit (no compound with role 'proton')",
                                reaction.id, proton_change)
            new = {m: round(c, 12) for m, c in new.items() if abs(c) > _TOL}
            if _is_empty(new, inert):
                remove.append(reaction)
                note_rewrite(context, reaction, "h2_only: removed, only regenerates carriers ("
                      + ", ".join(parts) + " becomes nothing)", summary)
                continue
            batch.set_terms(reaction, new)
            note_rewrite(context, reaction, "h2_only: " + ", ".join(parts) + f" replaced by {_fmt(h2_change)} H2"
                  + (f", H+ {_fmt(proton_change)}" if abs(proton_change) > _TOL else ""), summary)
        _finish(model, summary, remove, carriers, "h2_only", context, batch)
        logger.info("h2_only: %d reactions rewritten, %d removed", len(summary.rewritten) - len(summary.removed),
                    len(summary.removed))
        yield summary


def nucleotide_metabolites(model: cobra.Model) -> dict[str, cobra.Metabolite]:
    """Role -> metabolite for ATP, ADP, AMP and pyrophosphate (roles absent from the model are left out)."""
    found: dict[str, cobra.Metabolite] = {}
    for role in NUCLEOTIDE_ROLES:
        met = single_with_role(model, role)
        if met is not None:
            found[role] = met
    return found


@contextlib.contextmanager
def no_atp_strict(model: cobra.Model) -> Iterator[RewriteSummary]:
    """Block every reaction that contains ATP, ADP, AMP or pyrophosphate (bounds 0, 0).

    A demand reaction of several compounds keeps its other compounds (the nucleotides are
    dropped from it, and noted) rather than being blocked.
    """
    summary = RewriteSummary("no_atp_strict")
    with exact_context(model) as context:
        batch = RewriteBatch(model, context)
        nucleotides = set(nucleotide_metabolites(model).values())
        for reaction in model.reactions:
            present = sorted(m.id for m in reaction.metabolites if m in nucleotides)
            if not present:
                continue
            if is_boundary(reaction) and len(present) < len(reaction.metabolites):
                # a demand of several compounds: ask for the others only
                batch.set_terms(reaction, {m: c for m, c in reaction.metabolites.items()
                                           if m not in nucleotides})
                note_rewrite(context, reaction, f"no_atp_strict: {', '.join(present)} dropped", summary)
                continue
            reaction.bounds = (0.0, 0.0)
            summary.blocked.append(reaction.id)
            note_rewrite(context, reaction, f"no_atp_strict: blocked, needs {', '.join(present)}", summary)
        batch.apply()
        logger.info("no_atp_strict: %d reactions blocked", len(summary.blocked))
        yield summary


#: Hydrolysis reactions over roles (without H+; protons are set from the formulas).
_HYDROLYSES = {
    "H1": {"atp": -1.0, "water": -1.0, "adp": 1.0, "phosphate": 1.0},
    "H2": {"atp": -1.0, "water": -1.0, "amp": 1.0, "pyrophosphate": 1.0},
    "H3": {"adp": -1.0, "water": -1.0, "amp": 1.0, "phosphate": 1.0},
    "H4": {"pyrophosphate": -1.0, "water": -1.0, "phosphate": 2.0},
}
_HYDROLYSIS_TEXT = {"H1": "ATP -> ADP + Pi", "H2": "ATP -> AMP + PPi", "H3": "ADP -> AMP + Pi",
                    "H4": "PPi -> 2 Pi"}


def hydrolysis_amounts(atp: float, adp: float, amp: float, ppi: float) -> dict[str, float]:
    """Amounts of H1..H4 whose subtraction cancels the given nucleotide coefficients.

    Solves x1 + x2 = -atp, x1 - x3 = adp, x2 + x3 = amp, x2 - x4 = ppi (needs
    atp + adp + amp = 0) and picks, of the one-parameter family of solutions, the one with the
    smallest sum of |x| (ties: fewest pyrophosphate hydrolyses).

    >>> hydrolysis_amounts(-1, 1, 0, 0)        # a kinase: X + ATP -> XP + ADP
    {'H1': 1.0, 'H2': 0.0, 'H3': 0.0, 'H4': 0.0}
    >>> hydrolysis_amounts(-1, 0, 1, 1)        # a synthetase: ... + ATP -> ... + AMP + PPi
    {'H1': 0.0, 'H2': 1.0, 'H3': 0.0, 'H4': 0.0}
    >>> hydrolysis_amounts(0, 0, 0, -1)        # inorganic diphosphatase (EC 3.6.1.1)
    {'H1': 0.0, 'H2': 0.0, 'H3': 0.0, 'H4': 1.0}
    """
    if abs(atp + adp + amp) > _TOL:
        raise InputError("the adenine moiety is not conserved (ATP + ADP + AMP coefficients do not sum to 0)")

    def solution(x4: float) -> dict[str, float]:
        x2 = ppi + x4
        return {"H1": -atp - x2, "H2": x2, "H3": amp - x2, "H4": x4}

    candidates = {0.0, -ppi, -atp - ppi, amp - ppi}
    best = min(candidates, key=lambda x4: (round(sum(abs(v) for v in solution(x4).values()), 9), abs(x4)))
    return {k: float(v) + 0.0 for k, v in solution(best).items()}


def hydrolysis_words(amounts: dict[str, float]) -> str:
    """The hydrolyses subtracted from a reaction, in words ("minus 1 x (ATP -> ADP + Pi)")."""
    return ", ".join(f"{'minus' if x > 0 else 'plus'} {abs(x):g} x ({_HYDROLYSIS_TEXT[k]})"
                     for k, x in amounts.items() if abs(x) > _TOL)


def bare_stoichiometry(reaction: cobra.Reaction, nucleotides: dict[str, cobra.Metabolite],
                       water: cobra.Metabolite | None, phosphate: cobra.Metabolite | None,
                       proton: cobra.Metabolite | None
                       ) -> tuple[dict[cobra.Metabolite, float], dict[str, float]] | None:
    """The bare chemistry of one reaction: its terms minus x1 H1 + x2 H2 + x3 H3 + x4 H4 (see the
    module text and :func:`hydrolysis_amounts`), with H+ set so the implicit protons stay those of
    the original reaction [1]; and the amounts x. None when the reaction makes or uses up the
    adenine moiety (it has no bare chemistry).

    ``nucleotides`` maps roles (``atp``, ``adp``, ``amp``, ``pyrophosphate``) to the compounds
    that are stripped; the sum of the amounts is the number of phosphoanhydride bonds the
    reaction spends (negative: it makes them).

    Raises
    ------
    InputError
        When a needed water or phosphate compound is missing.
    """
    stoich = reaction.metabolites
    role_of = {met: role for role, met in nucleotides.items()}
    a = {role: stoich.get(met, 0.0) for role, met in nucleotides.items()}
    try:
        amounts = hydrolysis_amounts(a.get("atp", 0.0), a.get("adp", 0.0), a.get("amp", 0.0),
                                     a.get("pyrophosphate", 0.0))
    except InputError:
        return None
    for role, met in (("water", water), ("phosphate", phosphate)):
        if met is None:
            raise InputError(
                f"reaction '{reaction.id}': stripping ATP coupling needs a compound with role "
                f"'{role}'; add it to the compounds table"
            )
    new = {m: c for m, c in stoich.items() if m not in role_of}
    for name, x in amounts.items():
        if abs(x) <= _TOL:
            continue
        for role, coefficient in _HYDROLYSES[name].items():
            if role in ("water", "phosphate"):
                met = water if role == "water" else phosphate
                new[met] = new.get(met, 0.0) - x * coefficient
    new = {m: round(c, 12) for m, c in new.items() if abs(c) > _TOL}
    if proton is not None:
        before = _implicit_protons(stoich)
        after = _implicit_protons(new) if new else 0.0
        change = after - before
        if abs(change) > _TOL:
            new[proton] = round(new.get(proton, 0.0) + change, 12)
            new = {m: c for m, c in new.items() if abs(c) > _TOL}
    return new, amounts


@contextlib.contextmanager
def no_atp_bare_chemistry(model: cobra.Model) -> Iterator[RewriteSummary]:
    """Strip ATP, ADP and pyrophosphate coupling: each reaction becomes its bare chemistry.

    The reaction minus x1 H1 + x2 H2 + x3 H3 + x4 H4 (see the module text and
    :func:`hydrolysis_amounts`), with H+ set so the implicit protons stay those of the original
    reaction [1]. Requires compounds with roles ``water`` and ``phosphate`` when a reaction is
    rewritten.

    Examples
    --------
    Acetate kinase (EC 2.7.2.1), acetate + ATP -> acetyl phosphate + ADP, becomes
    acetate + Pi + H+ -> acetyl phosphate + H2O (reference species of Alberty 2003 at pH 7):

    >>> m = cobra.Model("ack")
    >>> def met(i, f, z, role=""):
    ...     x = cobra.Metabolite(i, formula=f, charge=z, compartment="c")
    ...     x.notes = {"role": role} if role else {}
    ...     return x
    >>> mets = [met("ac", "C2H3O2", -1), met("actp", "C2H3O5P", -2), met("atp", "C10H12N5O13P3", -4, "atp"),
    ...         met("adp", "C10H12N5O10P2", -3, "adp"), met("pi", "HPO4", -2, "phosphate"),
    ...         met("h2o", "H2O", 0, "water"), met("h", "H", 1, "proton")]
    >>> m.add_metabolites(mets); r = cobra.Reaction("ACK"); m.add_reactions([r])
    >>> r.build_reaction_from_string("ac + atp --> actp + adp")
    >>> with no_atp_bare_chemistry(m):
    ...     print(m.reactions.ACK.build_reaction_string())
    ac + h + pi --> actp + h2o
    """
    summary = RewriteSummary("no_atp_bare")
    with exact_context(model) as context:
        batch = RewriteBatch(model, context)
        nucleotides = nucleotide_metabolites(model)
        role_of = {met: role for role, met in nucleotides.items()}
        water = single_with_role(model, "water", ("h2o", "h2o_c"))
        phosphate = single_with_role(model, "phosphate", ("pi", "pi_c"))
        proton = single_with_role(model, "proton", ("h", "h_c"))
        inert = {m.id for m in (proton, water) if m is not None}
        remove: list[cobra.Reaction] = []
        for reaction in list(model.reactions):
            stoich = reaction.metabolites
            if is_boundary(reaction) or not any(m in role_of for m in stoich):
                continue
            bare = bare_stoichiometry(reaction, nucleotides, water, phosphate, proton)
            if bare is None:
                remove.append(reaction)
                note_rewrite(context, reaction, "no_atp_bare: removed, it makes or uses up adenine nucleotides",
                      summary)
                continue
            new, amounts = bare
            used = hydrolysis_words(amounts)
            if _is_empty(new, inert):
                remove.append(reaction)
                note_rewrite(context, reaction, f"no_atp_bare: removed, a nucleotide interconversion ({used} "
                      "leaves nothing)", summary)
                continue
            batch.set_terms(reaction, new)
            note_rewrite(context, reaction, f"no_atp_bare: {used}", summary)
        _finish(model, summary, remove, set(nucleotides.values()), "no_atp_bare", context, batch)
        logger.info("no_atp_bare: %d reactions rewritten, %d removed",
                    len(summary.rewritten) - len(summary.removed), len(summary.removed))
        yield summary


@contextlib.contextmanager
def native(model: cobra.Model) -> Iterator[RewriteSummary]:
    """Carriers and adenine nucleotides stay internal: block their exchanges (one-compound boundary
    reactions), so the network must regenerate them; a demand that includes them is kept."""
    summary = RewriteSummary("native")
    with exact_context(model) as context:
        internal = set(nucleotide_metabolites(model).values())
        for pair in carrier_pairs(model).values():
            internal |= {pair.reduced, pair.oxidised}
        for reaction in model.reactions:
            present = sorted(m.id for m in reaction.metabolites if m in internal)
            if present and is_boundary(reaction) and len(reaction.metabolites) == 1:
                reaction.bounds = (0.0, 0.0)
                summary.blocked.append(reaction.id)
                note_rewrite(context, reaction, f"native: blocked, {', '.join(present)} must be regenerated inside",
                      summary)
        yield summary


def _currency(currency_id: str):
    """The context manager of the rewrite ``currency_<currency_id>`` (imported when used)."""
    def manager(model: cobra.Model):
        from .currency_rewrites import currency_substitution

        return currency_substitution(model, currency_id)
    return manager


def _coupling_choices(model: cobra.Model):
    from .currency_rewrites import coupling_choices

    return coupling_choices(model)


#: The context manager of each rewrite named in :data:`tfa.modes.REWRITES`.
REWRITE_MANAGERS = {
    "cofactors_internal": native,
    "carriers_to_h2": h2_only,
    "atp_removed": no_atp_strict,
    "atp_to_bare_chemistry": no_atp_bare_chemistry,
    "currency_acetyl_phosphate": _currency("acetyl_phosphate"),
    "currency_thioester": _currency("thioester"),
    "currency_pyrophosphate": _currency("pyrophosphate"),
    "currency_polyphosphate": _currency("polyphosphate"),
    "atp_coupling_optional": _coupling_choices,
}


@contextlib.contextmanager
def apply_mode(model: cobra.Model, mode: str) -> Iterator[RewriteSummary]:
    """Apply the rewrites of ``mode`` (an id of :data:`tfa.modes.MODES`) in order, for the
    duration of the context; the summary collects what every rewrite did.

    >>> from tfa.modes import REWRITES
    >>> sorted(REWRITE_MANAGERS) == sorted(REWRITES)
    True
    """
    definition = get_mode(mode)
    summary = RewriteSummary(mode)
    with contextlib.ExitStack() as stack:
        for name in definition.rewrites:
            part = stack.enter_context(REWRITE_MANAGERS[name](model))
            summary.rewritten.update(part.rewritten)
            summary.removed.extend(part.removed)
            summary.blocked.extend(part.blocked)
            summary.removed_metabolites.extend(part.removed_metabolites)
        yield summary

