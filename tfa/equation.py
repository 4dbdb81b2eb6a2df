"""The reaction-equation grammar shared by the command line, the thermodynamics engine and the
network files. Equations are read by this small grammar, never by ``eval``.

Grammar (whitespace separates tokens; ``+`` between terms needs whitespace on both sides, so
names such as ``NAD+`` or ``H+`` keep their sign)::

    equation    := side arrow side
    arrow       := "<=>" | "=" | "->"          ("->" marks an irreversible reaction)
    side        := term { " + " term }
    term        := [coefficient] name
    coefficient := integer | decimal | integer "/" integer     (followed by whitespace)
    name        := any text without " + " or an arrow, e.g. "CO2(g)", "2-oxoglutarate",
                   "1,3-bisphosphoglycerate", "acetyl phosphate"

Examples
--------
>>> eq = parse_equation("4 H2(g) + CO2(g) <=> CH4(g) + 2 H2O")
>>> eq.stoichiometry()
{'H2(g)': -4.0, 'CO2(g)': -1.0, 'CH4(g)': 1.0, 'H2O': 2.0}
>>> parse_equation("NADH + H+ + pyruvate -> lactate + NAD+").reversible
False
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from .errors import EquationSyntaxError, InputError
from .util.numbers import MAX_COEFFICIENT, read_number

ARROWS = ("<=>", "->", "=")
_ARROW_RE = re.compile(r"<=>|->|<-|=>|=")
_PLUS_RE = re.compile(r"\s+\+\s+")
_COEF_RE = re.compile(r"^(\d+(?:\.\d*)?|\.\d+|\d+/\d+)\s+(.*)$")
_SIGNED_COEF_RE = re.compile(r"^([-+]\s*(?:\d+(?:\.\d*)?|\.\d+|\d+/\d+))\s+(.*)$")


@dataclass(frozen=True)
class Term:
    """One compound of an equation: its coefficient (> 0), its name and its 1-based column."""

    coefficient: float
    name: str
    column: int


@dataclass(frozen=True)
class ParsedEquation:
    """A parsed equation: left and right terms, the arrow and the original text."""

    reactants: tuple[Term, ...]
    products: tuple[Term, ...]
    arrow: str
    text: str

    @property
    def reversible(self) -> bool:
        """``False`` for ``->``, ``True`` for ``<=>`` and ``=``."""
        return self.arrow != "->"

    def stoichiometry(self) -> dict[str, float]:
        """Net coefficients by name: negative for consumed, positive for produced; zeros dropped."""
        net: dict[str, float] = {}
        for sign, terms in ((-1.0, self.reactants), (1.0, self.products)):
            for term in terms:
                net[term.name] = net.get(term.name, 0.0) + sign * term.coefficient
        return {name: value for name, value in net.items() if abs(value) > 1e-12}

    def names(self) -> list[str]:
        """Every compound name in order of appearance, without repeats."""
        seen: dict[str, None] = {}
        for term in self.reactants + self.products:
            seen.setdefault(term.name, None)
        return list(seen)


def _where(where: str) -> str:
    return f"{where}: " if where else ""


def _parse_side(text: str, offset: int, where: str, allow_empty: bool) -> tuple[Term, ...]:
    stripped = text.strip()
    if not stripped:
        if allow_empty:
            return ()
        raise EquationSyntaxError(
            f"{_where(where)}column {offset + 1}: one side of the equation is empty; write the "
            "compounds on both sides of the arrow, e.g. 'H2 + CO2tot <=> formate + H2O'"
        )
    terms: list[Term] = []
    pieces: list[tuple[int, str]] = []
    start = 0
    for match in _PLUS_RE.finditer(text):
        pieces.append((start, text[start:match.start()]))
        start = match.end()
    pieces.append((start, text[start:]))
    for piece_start, piece in pieces:
        lead = len(piece) - len(piece.lstrip())
        column = offset + piece_start + lead + 1
        body = piece.strip()
        if not body or body == "+":
            raise EquationSyntaxError(
                f"{_where(where)}column {column}: a '+' has no compound on one side; remove the "
                "extra '+' or add the missing compound"
            )
        coefficient = 1.0
        name = body
        match = _COEF_RE.match(body)
        signed = _SIGNED_COEF_RE.match(body)
        if signed:
            raise EquationSyntaxError(
                f"{_where(where)}column {column}: coefficient {signed.group(1)} must be positive; "
                "write it without a sign and move the compound to the other side if needed"
            )
        if match:
            try:
                coefficient = read_number(match.group(1), "coefficient",
                                          f"{_where(where)}column {column}",
                                          fraction=True, maximum=MAX_COEFFICIENT)
            except InputError as err:
                raise EquationSyntaxError(str(err)) from None
            name = match.group(2).strip()
            if coefficient <= 0:
                raise EquationSyntaxError(
                    f"{_where(where)}column {column}: coefficient {match.group(1)} must be positive; "
                    "move the compound to the other side instead"
                )
        elif re.match(r"^[-+]?\d+(\.\d*)?$", body):
            raise EquationSyntaxError(
                f"{_where(where)}column {column}: '{body}' is a number without a compound; write "
                "'COEFFICIENT NAME' with a space between, e.g. '2 H2O'"
            )
        if name.startswith("+") or name.endswith(" +") or "  " in name:
            raise EquationSyntaxError(
                f"{_where(where)}column {column}: cannot read '{body}'; separate compounds with "
                "' + ' (spaces around the plus sign)"
            )
        terms.append(Term(coefficient, name, column))
    return tuple(terms)


def parse_equation(text: str, where: str = "", allow_empty_side: bool = False) -> ParsedEquation:
    """Parse an equation such as ``"2 H2 + CO2tot <=> formate + H2O"``.

    Parameters
    ----------
    text : str
        The equation.
    where : str
        Prefix for error messages, e.g. ``"network.csv line 12"``.
    allow_empty_side : bool
        Accept an empty side (boundary reactions such as ``"H2 <=> "``).

    Raises
    ------
    EquationSyntaxError
        With the column of the problem and how to fix it.
    """
    if not isinstance(text, str) or not text.strip():
        raise EquationSyntaxError(f"{_where(where)}the equation is empty; write e.g. 'A + B <=> C'")
    arrows = list(_ARROW_RE.finditer(text))
    if not arrows:
        raise EquationSyntaxError(
            f"{_where(where)}no arrow in '{text}'; separate the two sides with '<=>', '=' or '->'"
        )
    if len(arrows) > 1:
        second = arrows[1]
        raise EquationSyntaxError(
            f"{_where(where)}column {second.start() + 1}: more than one arrow in '{text}'; an "
            "equation has exactly one of '<=>', '=' or '->'"
        )
    arrow = arrows[0]
    if arrow.group() not in ARROWS:
        raise EquationSyntaxError(
            f"{_where(where)}column {arrow.start() + 1}: arrow '{arrow.group()}' is not understood; "
            "use '<=>' (reversible), '=' (reversible) or '->' (irreversible, left to right)"
        )
    left = _parse_side(text[: arrow.start()], 0, where, allow_empty_side)
    right = _parse_side(text[arrow.end():], arrow.end(), where, allow_empty_side)
    if not left and not right:
        raise EquationSyntaxError(f"{_where(where)}both sides of '{text}' are empty")
    return ParsedEquation(left, right, arrow.group(), text)


def format_equation(stoichiometry: dict[str, float], arrow: str = "<=>") -> str:
    """Write net coefficients back as an equation; the inverse of :meth:`ParsedEquation.stoichiometry`.

    >>> format_equation({'H2': -1, 'CO2tot': -1, 'formate': 1, 'H2O': 1})
    'H2 + CO2tot <=> formate + H2O'
    """

    def term(name: str, value: float) -> str:
        value = abs(value)
        if abs(value - 1.0) < 1e-12:
            return name
        text = f"{value:.6g}"
        return f"{text} {name}"

    left = " + ".join(term(n, v) for n, v in stoichiometry.items() if v < 0)
    right = " + ".join(term(n, v) for n, v in stoichiometry.items() if v > 0)
    return f"{left} {arrow} {right}".strip()
