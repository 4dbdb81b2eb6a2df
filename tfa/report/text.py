"""The answers in plain words, for the terminal and the top of the report.

Small builders of sentences (``runs without ATP: no; three steps must be driven uphill: fdh,
mtr, acs``) and of plain-text tables. Counts up to ten are written in words. Nothing here knows
the analyses' classes; the steps of an assessment (:mod:`tfa.assessment.steps`) hand plain values
in.
"""

from __future__ import annotations

import math
from typing import Iterable, Sequence

import pandas as pd

#: Counts written as words.
_WORDS = ("no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten")
#: Most reaction ids named in one sentence.
MAX_NAMED = 12


def number_in_words(n: int, zero: str = "no") -> str:
    """A count as a word up to ten, as digits above.

    >>> number_in_words(3), number_in_words(0), number_in_words(0, zero="zero"), number_in_words(11)
    ('three', 'no', 'zero', '11')
    """
    n = int(n)
    if 0 <= n <= 10:
        return zero if n == 0 else _WORDS[n]
    return str(n)


def counted(n: int, singular: str, plural: str | None = None, zero: str = "no") -> str:
    """``n`` things in words with the right number.

    >>> counted(1, "step"), counted(3, "step"), counted(0, "step"), counted(12, "reaction")
    ('one step', 'three steps', 'no steps', '12 reactions')
    """
    word = singular if n == 1 else (plural or singular + "s")
    return f"{number_in_words(n, zero)} {word}"


def names(ids: Iterable[str], limit: int = MAX_NAMED) -> str:
    """Ids joined by commas, the list cut after ``limit`` with "and N more".

    >>> names(["a", "b", "c"], limit=2)
    'a, b and 1 more'
    """
    ids = [str(i) for i in ids]
    if len(ids) > limit:
        return ", ".join(ids[:limit]) + f" and {len(ids) - limit} more"
    return ", ".join(ids)


def quantity(value: float, unit: str) -> str:
    """A number with its unit: three significant digits, scientific outside 1e-3 to 1e4.

    >>> quantity(1.93e-11, "mol/L"), quantity(0.25, "mol/L")
    ('1.93e-11 mol/L', '0.25 mol/L')
    """
    if value == 0 or 1e-3 <= abs(value) < 1e4:
        return f"{value:.3g} {unit}"
    return f"{value:.2e} {unit}"


def checked(status: str) -> str:
    """The verification of an answer as a short suffix of its sentence (nothing when unknown).

    >>> checked("proven"), checked("")
    (' [proven]', '')
    """
    return f" [{status}]" if status else ""


def constrained_words(with_energy: int, total: int) -> str:
    """How much of a verdict thermodynamics constrains ("" when every reaction has an energy).

    >>> constrained_words(63, 74)
    'thermodynamically constrained: 63 of 74 reactions; the rest unconstrained'
    >>> constrained_words(10, 74)
    'mostly flux balance: thermodynamically constrained: 10 of 74 reactions; the rest unconstrained'
    """
    if with_energy >= total:
        return ""
    text = (f"thermodynamically constrained: {with_energy} of {total} reaction"
            f"{'' if total == 1 else 's'}; the rest unconstrained")
    return ("mostly flux balance: " + text) if 2 * with_energy < total else text


def mode_line(question: str, feasible: bool | None, sets: Sequence[Sequence[str]] | None = None,
              demand_impossible: bool = False, undetermined: str = "", not_applicable: str = "",
              constrained: str = "", status: str = "", count: int | None = None,
              complete: bool = True, ordered: bool = True) -> str:
    """The answer of one mode in a sentence.

    Parameters
    ----------
    question : str
        The mode's question ("runs without ATP").
    feasible : bool or None
        The answer (None: undetermined).
    sets : list of list of str
        Minimal uphill sets listed (of the same size, the first shown).
    count, complete, ordered
        How many sets of that size were found, whether that is all of them (else "at least"),
        and whether they are in the order of reaction ids. Without a count, more than one set
        listed is said as "at least" that many, one set alone is not qualified.
    demand_impossible : bool
        The demand cannot be met even ignoring thermodynamics.
    not_applicable : str
        Why the question cannot be asked of this network (then no verdict is given).
    constrained : str
        :func:`constrained_words`, appended in brackets.
    status : str
        How the answer was checked (certified, proven, ...), shown after it.

    Examples
    --------
    >>> mode_line("runs without ATP", False, [["acs", "fdh", "mtr"], ["fdh", "mtr", "pfor"]],
    ...           count=4)
    'runs without ATP: no; three steps must be driven uphill: acs, fdh, mtr (the first of four sets of this size in the order of reaction ids)'
    >>> mode_line("runs without ATP", False, [["acs", "fdh"]], count=2)
    'runs without ATP: no; two steps must be driven uphill: acs, fdh (the first of two sets of this size in the order of reaction ids)'
    >>> mode_line("runs without ATP", False, [["fdh"]], count=20, complete=False)
    'runs without ATP: no; one step must be driven uphill: fdh (the first of at least 20 sets of this size in the order of reaction ids)'
    >>> mode_line("runs without ATP", False, demand_impossible=True)
    'runs without ATP: no (the demand cannot be met even ignoring thermodynamics)'
    >>> mode_line("runs without ATP", None, not_applicable="no ATP in this network")
    'runs without ATP: not applicable (no ATP in this network)'
    """
    if not_applicable:
        return f"{question}: not applicable ({not_applicable})"
    if constrained:
        return mode_line(question, feasible, sets, demand_impossible, undetermined,
                         status=status, count=count, complete=complete,
                         ordered=ordered) + f" ({constrained})"
    if feasible is None:
        return f"{question}: undetermined (the solver gave no proven answer)" + (
            f"; {undetermined}" if undetermined else "")
    if feasible:
        return f"{question}: yes" + checked(status)
    line = f"{question}: no"
    if demand_impossible:
        return line + " (the demand cannot be met even ignoring thermodynamics)" + checked(status)
    sets = [list(s) for s in (sets or []) if s is not None]
    if sets:
        first = sets[0]
        line += f"; {counted(len(first), 'step')} must be driven uphill: {names(first)}"
        if count is not None:
            line += f" ({set_count_words(count, complete, ordered)})"
        elif len(sets) > 1:     # not counted: the sets listed are a lower bound
            line += f" ({set_count_words(len(sets), False, ordered)})"
    return line + checked(status)


def set_count_words(count: int, complete: bool = True, ordered: bool = True) -> str:
    """Which minimal set is shown and how many there are, in words (the same words however many
    sets are listed).

    >>> set_count_words(1)
    'the only set of this size'
    >>> set_count_words(12, ordered=False)
    'the first found of 12 sets of this size'
    """
    if count <= 1 and complete:
        return "the only set of this size"
    how_many = f"{'' if complete else 'at least '}{number_in_words(count)}"
    sets = "set" if count == 1 else "sets"
    if ordered:
        return f"the first of {how_many} {sets} of this size in the order of reaction ids"
    return f"the first found of {how_many} {sets} of this size"


def h2_line(threshold: float | None, h2_range: Sequence[float] | None, unit: str = "mol/L",
            status: str = "") -> str:
    """The H2 answer in a sentence.

    >>> h2_line(2.3e-5, (1e-9, 1e-2))
    'H2 needed: at least 2.30e-05 mol/L'
    >>> h2_line(1e-9, (1e-9, 1e-2))
    'H2 needed: less than the lowest level searched; the network runs down to 1.00e-09 mol/L'
    >>> h2_line(None, (1e-7, 1e-2))
    'H2 needed: no amount between 1.00e-07 mol/L and 0.01 mol/L lets the network run'
    """
    if threshold is None or (isinstance(threshold, float) and math.isnan(threshold)):
        where = (f" between {quantity(h2_range[0], unit)} and {quantity(h2_range[1], unit)}"
                 if h2_range else "")
        return f"H2 needed: no amount{where} lets the network run" + checked(status)
    value = float(threshold)
    if h2_range and value <= float(h2_range[0]) * (1 + 1e-6):
        return (f"H2 needed: less than the lowest level searched; the network runs down to "
                f"{quantity(float(h2_range[0]), unit)}" + checked(status))
    return f"H2 needed: at least {quantity(value, unit)}" + checked(status)


def driving_force_line(force: float, bottlenecks: Sequence[str] = (), status: str = "") -> str:
    """The max-min driving force in a sentence.

    >>> driving_force_line(0.84, ["mtr"])
    'max-min driving force: 0.84 kJ/mol (tightest: mtr)'
    """
    line = f"max-min driving force: {force:.3g} kJ/mol" + checked(status)
    if bottlenecks:
        line += f" (tightest: {names(bottlenecks)})"
    return line


def table_text(frame: pd.DataFrame, float_format: str = "{:.4g}") -> str:
    """A table as aligned plain text (no index), every row shown."""
    with pd.option_context("display.max_rows", None, "display.max_columns", None,
                           "display.width", 160):
        return frame.to_string(index=False, float_format=lambda v: float_format.format(v))
