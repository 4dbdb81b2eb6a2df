"""Element and charge balance of every reaction of a network.

Rule (reactant convention, Alberty 2003, ch. 3-4; :mod:`tfa.thermo.balance`): every element
except H balances exactly; the residuals in H and in charge are equal, so a whole number of H+
is exchanged with the pH buffer (``implicit_protons``, H+ to add on the products side).
Boundary reactions (one side empty: exchanges, demands, sinks) are not checked.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003.
"""

from __future__ import annotations

import math

import cobra
import pandas as pd

from ..errors import InputError, UnbalancedReactionError
from ..thermo.balance import check_balance
from .roles import formula_and_charge

BALANCE_COLUMNS = ("reaction", "equation", "balanced", "implicit_protons", "hydrogen_residual",
                   "charge_residual", "element_residuals", "message")


def is_boundary_reaction(reaction: cobra.Reaction) -> bool:
    """True when one side of the reaction is empty (exchange, demand, sink).

    >>> r = cobra.Reaction("EX_h2"); r.add_metabolites({cobra.Metabolite("h2"): -1})
    >>> is_boundary_reaction(r)
    True
    """
    coefficients = list(reaction.metabolites.values())
    return bool(coefficients) and (all(c < 0 for c in coefficients) or all(c > 0 for c in coefficients))


#: The kinds of reaction, classified once by :func:`classify_reactions`: only internal reactions
#: have a transformed Gibbs energy (and so fall under a policy for reactions without one).
REACTION_KINDS = ("internal", "exchange", "demand", "sink")


def reaction_kind(reaction: cobra.Reaction, demand_id: str | None = None) -> str:
    """The kind of one reaction: "internal", "exchange", "demand" or "sink".

    - "demand": the environment's demand reaction (``demand_id``), whatever its shape (a lumped
      biomass reaction has products too), or a one-sided reaction of several compounds that can
      only drain them;
    - "exchange": a one-sided reaction of one compound (feed, outlet, free water or H+);
    - "sink": a one-sided reaction of several compounds that can also supply them;
    - "internal": everything else (compounds on both sides), the reactions with a transformed
      Gibbs energy.

    >>> r = cobra.Reaction("DM_x", lower_bound=0.01); r.add_metabolites({cobra.Metabolite("a"): -1,
    ...                                                                 cobra.Metabolite("b"): -2})
    >>> reaction_kind(r), reaction_kind(r, demand_id="DM_x")
    ('demand', 'demand')
    >>> r.lower_bound = -1; reaction_kind(r)
    'sink'
    """
    if demand_id is not None and reaction.id == demand_id:
        return "demand"
    if not is_boundary_reaction(reaction):
        return "internal"
    coefficients = list(reaction.metabolites.values())
    if len(coefficients) == 1:
        return "exchange"
    consumes = coefficients[0] < 0
    drains_only = reaction.lower_bound >= 0 if consumes else reaction.upper_bound <= 0
    return "demand" if drains_only else "sink"


def classify_reactions(model: cobra.Model, demand_id: str | None = None) -> dict[str, str]:
    """Reaction id -> kind (:func:`reaction_kind`) for every reaction of ``model``, in model order."""
    return {r.id: reaction_kind(r, demand_id) for r in model.reactions}
def balance_problem(reaction: cobra.Reaction) -> str:
    """What is off in the balance of a reaction ("" when it balances, is a boundary reaction,
    or a compound has no formula to check it with).

    >>> r = cobra.Reaction("R"); r.add_metabolites({cobra.Metabolite("a", formula="CO2", charge=0): -1,
    ...                                              cobra.Metabolite("b", formula="CHO2", charge=-1): 1})
    >>> print(balance_problem(r))   # CO2 -> formate is short of H2 (formate dehydrogenase)
    charge is off by -2 beyond what H+ exchange explains (charge residual -1, H residual +1): the products carry 2 more electrons than the reactants; add 1 H2 to the reactants (or a carrier's reduced form there)
    """
    if is_boundary_reaction(reaction):
        return ""
    try:
        formulas = {m.id: formula_and_charge(m) for m in reaction.metabolites}
    except InputError:
        return ""
    report = check_balance({m.id: c for m, c in reaction.metabolites.items()}, formulas)
    return "" if report.ok else report.message


def balance_report(model: cobra.Model, include_boundary: bool = False) -> pd.DataFrame:
    """One row per reaction: is it balanced, how many H+ are implicit, what is off.

    Parameters
    ----------
    model : cobra.Model
        Metabolites need ``formula`` and ``charge``; a compound without them makes its reactions
        ``balanced = False`` with a message saying which formula is missing.
    include_boundary : bool
        Also list boundary reactions (``balanced`` is then NaN for them: nothing to check).

    Returns
    -------
    pandas.DataFrame
        Columns :data:`BALANCE_COLUMNS`; ``implicit_protons`` is NaN when not balanced;
        ``element_residuals`` is text such as ``"C:+1, O:+2"`` (products minus reactants).

    Examples
    --------
    Formate dehydrogenase (EC 1.17.1.9), CO2 + NADH -> formate + NAD+, balances exactly with the
    reference species of Alberty (2003); without NADH it is short of two electrons:

    >>> m = cobra.Model("fdh")
    >>> mets = {i: cobra.Metabolite(i, formula=f, charge=z, compartment="c") for i, f, z in
    ...         [("co2", "CO2", 0), ("nadh", "C21H27N7O14P2", -2), ("nad", "C21H26N7O14P2", -1),
    ...          ("for", "CHO2", -1)]}
    >>> good, bad = cobra.Reaction("FDH"), cobra.Reaction("BAD")
    >>> m.add_reactions([good, bad])
    >>> good.add_metabolites({mets["co2"]: -1, mets["nadh"]: -1, mets["for"]: 1, mets["nad"]: 1})
    >>> bad.add_metabolites({mets["co2"]: -1, mets["for"]: 1})
    >>> balance_report(m)[["reaction", "balanced"]].values.tolist()
    [['FDH', True], ['BAD', False]]
    """
    rows = []
    for reaction in model.reactions:
        equation = reaction.build_reaction_string()
        if is_boundary_reaction(reaction):
            if include_boundary:
                rows.append({"reaction": reaction.id, "equation": equation, "balanced": math.nan,
                             "implicit_protons": math.nan, "hydrogen_residual": math.nan,
                             "charge_residual": math.nan, "element_residuals": "",
                             "message": "boundary reaction (not checked)"})
            continue
        try:
            formulas = {m.id: formula_and_charge(m) for m in reaction.metabolites}
        except InputError as exc:
            rows.append({"reaction": reaction.id, "equation": equation, "balanced": False,
                         "implicit_protons": math.nan, "hydrogen_residual": math.nan,
                         "charge_residual": math.nan, "element_residuals": "", "message": str(exc)})
            continue
        report = check_balance({m.id: c for m, c in reaction.metabolites.items()}, formulas)
        rows.append({
            "reaction": reaction.id,
            "equation": equation,
            "balanced": report.ok,
            "implicit_protons": report.implicit_protons if report.ok else math.nan,
            "hydrogen_residual": report.hydrogen_residual,
            "charge_residual": report.charge_residual,
            "element_residuals": ", ".join(f"{e}:{v:+g}" for e, v in sorted(report.element_residuals.items())),
            "message": report.message,
        })
    return pd.DataFrame(rows, columns=list(BALANCE_COLUMNS))


def require_balanced_network(model: cobra.Model, where: str = "") -> None:
    """Raise :class:`~tfa.errors.UnbalancedReactionError` listing every unbalanced reaction.

    Parameters
    ----------
    where : str
        Where the model came from (file name), for the message.
    """
    frame = balance_report(model)
    bad = frame[frame["balanced"] != True]  # noqa: E712 - NaN-safe comparison
    if bad.empty:
        return
    prefix = f"{where}: " if where else ""
    lines = [f"  {row.reaction} ({row.equation}): {row.message}" for row in bad.itertuples()]
    raise UnbalancedReactionError(
        f"{prefix}{len(bad)} reaction(s) do not balance:\n" + "\n".join(lines)
        + "\nFix the coefficients, add the missing compound (H2O, H+, a carrier) or correct the "
        "formula and charge of a compound"
    )
