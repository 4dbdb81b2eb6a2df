"""Chemical formulas and the element/charge balance of reactions.

Balance rule (the reactant convention of biochemical thermodynamics, Alberty 2003, ch. 3-4):
the pH is fixed, so hydrogen ions are supplied or taken up by the buffer. Every element except
H must balance exactly; the residual in H atoms and the residual in charge must be equal, i.e.
the reaction is balanced up to a whole number of H+ ions (``implicit_protons``). Any other
residual (an element, or charge without matching hydrogen: an electron) is an error.

Formulas: element symbols (a capital letter followed by lower-case letters, so pseudo-elements
such as ``Fd`` for a ferredoxin or ``R`` for an unspecified group are allowed), integer counts,
parenthesised groups with a multiplier, and an optional trailing charge written ``+``, ``-2``,
``+3`` (the charge may also be given separately).

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003.

Examples
--------
>>> parse_formula("C10H12N5O13P3-4")
({'C': 10, 'H': 12, 'N': 5, 'O': 13, 'P': 3}, -4)
>>> report = check_balance({"ATP": -1, "H2O": -1, "ADP": 1, "phosphate": 1},
...     {"ATP": parse_formula("C10H12N5O13P3-4"), "H2O": parse_formula("H2O"),
...      "ADP": parse_formula("C10H12N5O10P2-3"), "phosphate": parse_formula("HPO4-2")})
>>> report.ok, report.implicit_protons
(True, 1.0)
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from ..errors import InputError, UnbalancedReactionError

_TOKEN = re.compile(r"([A-Z][a-z]*)(\d*)|(\()|(\))(\d*)")
_CHARGE = re.compile(r"([+-])(\d*)$")
#: Residuals smaller than this are taken as zero (coefficients may be decimals).
TOLERANCE = 1e-9


def parse_formula(text: str, where: str = "") -> tuple[dict[str, int], int]:
    """Parse a formula such as ``"C3H3O3-"`` into (element counts, charge).

    Parameters
    ----------
    text : str
        The formula; a trailing ``+``/``-`` with an optional count is the charge.
    where : str
        Prefix for error messages (file, line, compound).

    Raises
    ------
    InputError
        When the text is not a formula, with the position of the problem.
    """
    if text is None:
        raise InputError(f"{where}: no formula given")
    body = str(text).strip()
    charge = 0
    match = _CHARGE.search(body)
    if match and body[: match.start()]:
        sign = 1 if match.group(1) == "+" else -1
        charge = sign * int(match.group(2) or 1)
        body = body[: match.start()]
    stack: list[dict[str, int]] = [{}]
    pos = 0
    while pos < len(body):
        m = _TOKEN.match(body, pos)
        if not m:
            prefix = f"{where}: " if where else ""
            raise InputError(
                f"{prefix}cannot read formula '{text}' at character {pos + 1} ('{body[pos]}'); write "
                "element symbols with counts, e.g. 'C3H3O3' with charge '-1' or 'C3H3O3-'"
            )
        symbol, count, open_paren, close_paren, multiplier = m.groups()
        if symbol:
            stack[-1][symbol] = stack[-1].get(symbol, 0) + int(count or 1)
        elif open_paren:
            stack.append({})
        else:
            if len(stack) == 1:
                raise InputError(f"{where}: unmatched ')' in formula '{text}'")
            group = stack.pop()
            factor = int(multiplier or 1)
            for element, n in group.items():
                stack[-1][element] = stack[-1].get(element, 0) + n * factor
        pos = m.end()
    if len(stack) != 1:
        raise InputError(f"{where}: unmatched '(' in formula '{text}'")
    counts = {element: n for element, n in stack[0].items() if n}
    return counts, charge


@dataclass(frozen=True)
class BalanceReport:
    """Element and charge residuals of a reaction (products minus reactants).

    Attributes
    ----------
    element_residuals : dict
        Element -> residual, H excluded, only non-zero entries.
    hydrogen_residual : float
        Residual in H atoms.
    charge_residual : float
        Residual in charge.
    implicit_protons : float
        H+ ions released to the buffer (negative: taken from it) so that the reaction balances:
        the number of H+ to add on the products side. Meaningful when ``ok``.
    """

    element_residuals: dict[str, float] = field(default_factory=dict)
    hydrogen_residual: float = 0.0
    charge_residual: float = 0.0

    @property
    def implicit_protons(self) -> float:
        return -self.hydrogen_residual + 0.0

    @property
    def ok(self) -> bool:
        return not self.element_residuals and abs(self.hydrogen_residual - self.charge_residual) <= TOLERANCE

    def problems(self) -> list[str]:
        """Plain-words description of every residual that breaks the balance, the last one the
        simplest fix (:meth:`hint`)."""
        out = [
            f"{element} is off by {value:+g} (products minus reactants)"
            for element, value in sorted(self.element_residuals.items())
        ]
        mismatch = self.charge_residual - self.hydrogen_residual
        if abs(mismatch) > TOLERANCE:
            out.append(
                f"charge is off by {mismatch:+g} beyond what H+ exchange explains (charge residual "
                f"{self.charge_residual:+g}, H residual {self.hydrogen_residual:+g})"
            )
        hint = self.hint()
        if hint:
            out[-1] += f": {hint}"
        return out

    def hint(self) -> str:
        """The simplest fix of what is off, in the direction that fixes it: water for an O
        residual that water explains, H2 (two electrons each) for electrons, else the compounds
        to check ("" when balanced).

        >>> BalanceReport({"O": 1.0}, 2.0, 0.0).hint()
        'the products have 1 H2O more than the reactants; remove it there or add 1 H2O to the reactants'
        >>> BalanceReport({}, -2.0, 0.0).hint()   # 2 H2 + CO2 -> formate + H+
        'the reactants carry 2 more electrons than the products: 1 H2 too many there; remove it or add 1 H2 to the products'
        """
        elements = dict(self.element_residuals)
        parts = []
        hydrogen = self.hydrogen_residual
        water = elements.pop("O", 0.0) if set(elements) == {"O"} else 0.0
        if water:
            n = f"{abs(water):g}"
            more, less = ("products", "reactants") if water > 0 else ("reactants", "products")
            parts.append(f"the {more} have {n} H2O more than the {less}; remove it there or add "
                         f"{n} H2O to the {less}")
            hydrogen -= 2 * water
        if elements:
            return ("check the coefficients and the formulas of the compounds holding "
                    + ", ".join(sorted(elements)))
        electrons = hydrogen - self.charge_residual
        if abs(electrons) > TOLERANCE:
            n, h2 = f"{abs(electrons):g}", f"{abs(electrons) / 2:g}"
            if electrons > 0:
                parts.append(f"the products carry {n} more electrons than the reactants; add {h2} "
                             "H2 to the reactants (or a carrier's reduced form there)")
            else:
                parts.append(f"the reactants carry {n} more electrons than the products: {h2} H2 "
                             f"too many there; remove it or add {h2} H2 to the products")
        return "; ".join(parts)

    @property
    def message(self) -> str:
        if self.ok:
            if abs(self.implicit_protons) > TOLERANCE:
                verb = "released to" if self.implicit_protons > 0 else "taken from"
                return f"balanced ({abs(self.implicit_protons):g} H+ {verb} the buffer)"
            return "balanced"
        return "; ".join(self.problems())

    def to_dict(self) -> dict:
        return {
            "balanced": self.ok,
            "element_residuals": dict(self.element_residuals),
            "hydrogen_residual": self.hydrogen_residual,
            "charge_residual": self.charge_residual,
            "implicit_protons": self.implicit_protons if self.ok else None,
            "message": self.message,
        }


def check_balance(
    stoichiometry: dict[str, float],
    formulas: dict[str, tuple[dict[str, int], int]],
) -> BalanceReport:
    """Residuals of a reaction given each compound's (element counts, charge).

    Parameters
    ----------
    stoichiometry : dict
        Compound -> net coefficient (negative consumed, positive produced).
    formulas : dict
        Compound -> (element counts, charge), e.g. from :func:`parse_formula`. Every compound of
        ``stoichiometry`` must be present.

    Returns
    -------
    BalanceReport
    """
    totals: dict[str, float] = {}
    charge = 0.0
    for name, coefficient in stoichiometry.items():
        if name not in formulas:
            raise InputError(f"no formula for '{name}'; give its formula and charge")
        counts, z = formulas[name]
        for element, n in counts.items():
            totals[element] = totals.get(element, 0.0) + coefficient * n
        charge += coefficient * z
    hydrogen = totals.pop("H", 0.0)
    residuals = {e: v for e, v in totals.items() if abs(v) > TOLERANCE}
    return BalanceReport(residuals, hydrogen if abs(hydrogen) > TOLERANCE else 0.0,
                         charge if abs(charge) > TOLERANCE else 0.0)


def require_balanced(report: BalanceReport, equation: str, where: str = "") -> None:
    """Raise :class:`UnbalancedReactionError` naming what is off, unless ``report.ok``."""
    if not report.ok:
        prefix = f"{where}: " if where else ""
        raise UnbalancedReactionError(
            f"{prefix}'{equation}' does not balance: {report.message}. Fix the coefficients or "
            "the compounds so every element except H balances and any H difference equals the "
            "charge difference (H+ from the buffer)"
        )
