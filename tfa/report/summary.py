"""The answer in plain words, for the terminal and the top of the report.

:func:`summary_lines` turns a dictionary of results into short sentences such as
``runs without ATP: no; three steps must be driven uphill: fdh, mtr, acs``. Counts up to ten
are written in words. The dictionary is plain data so that the summary does not depend on the
analyses' classes; every key is optional.

Keys of ``results``
-------------------
network : str
    Name of the network.
environment : str
    Name or one-line description of the setting (e.g. ``Conditions.describe()``).
coverage : dict
    ``reactions`` (internal reactions), ``with_energy``, ``estimated``, ``missing`` (counts).
feasible : dict
    Mode -> True, False or None (undetermined), for the modes of
    :data:`tfa.network.thermo_model.MODES`.
uphill : dict
    Mode -> list of minimal uphill sets, each a list of reaction ids (alternative optima).
h2_threshold : float or None
    Smallest H2 at which the network runs (``h2_unit``, default mol/L); None = none found.
h2_range : (float, float)
    The H2 range searched, for the sentence when no threshold was found.
driving_force : float or None
    Max-min driving force, kJ/mol.
bottlenecks : list of str
    Reactions at the max-min driving force.
"""

from __future__ import annotations

import math
from typing import Any, Iterable, Mapping

#: Counts written as words.
_WORDS = ("no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten")

#: How each mode's question is put in the summary.
MODE_QUESTIONS = {
    "native": "runs with ATP regenerated inside",
    "h2_only": "runs with H2 in place of the carriers",
    "no_atp_strict": "runs without ATP",
    "no_atp_bare": "runs as bare chemistry (ATP coupling stripped)",
}

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


def _names(ids: Iterable[str]) -> str:
    ids = [str(i) for i in ids]
    if len(ids) > MAX_NAMED:
        return ", ".join(ids[:MAX_NAMED]) + f" and {len(ids) - MAX_NAMED} more"
    return ", ".join(ids)


def _quantity(value: float, unit: str) -> str:
    if value == 0 or 1e-3 <= abs(value) < 1e4:
        return f"{value:.3g} {unit}"
    return f"{value:.2e} {unit}"


def _mode_line(mode: str, feasible: bool | None, sets: list[list[str]] | None) -> str:
    question = MODE_QUESTIONS.get(mode, f"runs in mode {mode}")
    if feasible is None:
        return f"{question}: undetermined (the solver gave no proven answer)"
    if feasible:
        return f"{question}: yes"
    line = f"{question}: no"
    sets = [list(s) for s in (sets or []) if s is not None]
    if sets:
        first = sets[0]
        line += f"; {counted(len(first), 'step')} must be driven uphill: {_names(first)}"
        if len(sets) == 2:
            line += f" (or, as an alternative set of the same size: {_names(sets[1])})"
        elif len(sets) > 2:
            line += f" ({number_in_words(len(sets))} alternative sets of this size; the first shown)"
    return line


def summary_lines(results: Mapping[str, Any]) -> list[str]:
    """The results as short sentences, one per line (see the module docstring for the keys).

    Examples
    --------
    >>> lines = summary_lines({"feasible": {"native": True, "no_atp_strict": False},
    ...                        "uphill": {"no_atp_strict": [["fdh", "mtr", "acs"]]},
    ...                        "h2_threshold": 2.3e-5, "driving_force": 1.84})
    >>> print("\\n".join(lines))
    runs with ATP regenerated inside: yes
    runs without ATP: no; three steps must be driven uphill: fdh, mtr, acs
    H2 needed: at least 2.30e-05 mol/L
    max-min driving force: 1.84 kJ/mol
    >>> summary_lines({"h2_threshold": 1e-9, "h2_range": [1e-9, 1e-2]})
    ['H2 needed: less than the lowest level searched; the network runs down to 1.00e-09 mol/L']
    """
    lines: list[str] = []
    network = results.get("network")
    environment = results.get("environment")
    if network or environment:
        head = f"network {network}" if network else "the network"
        lines.append(head + (f" at {environment}" if environment else ""))
    coverage = results.get("coverage")
    if coverage:
        total = int(coverage.get("reactions", 0))
        with_energy = int(coverage.get("with_energy", 0))
        estimated = int(coverage.get("estimated", 0))
        missing = int(coverage.get("missing", total - with_energy))
        lines.append(
            f"data: {number_in_words(with_energy, 'none')} of {counted(total, 'reaction')} "
            f"{'has' if with_energy == 1 else 'have'} an energy "
            f"({number_in_words(estimated, 'none')} estimated, "
            f"{number_in_words(missing, 'none')} missing)"
        )
    feasible = results.get("feasible") or {}
    uphill = results.get("uphill") or {}
    modes = list(MODE_QUESTIONS) + [m for m in feasible if m not in MODE_QUESTIONS]
    for mode in modes:
        if mode in feasible:
            lines.append(_mode_line(mode, feasible[mode], uphill.get(mode)))
    if "h2_threshold" in results:
        unit = results.get("h2_unit", "mol/L")
        threshold = results["h2_threshold"]
        if threshold is None or (isinstance(threshold, float) and math.isnan(threshold)):
            searched = results.get("h2_range")
            where = (f" between {_quantity(searched[0], unit)} and {_quantity(searched[1], unit)}"
                     if searched else "")
            lines.append(f"H2 needed: no amount{where} lets the network run")
        else:
            searched = results.get("h2_range")
            value = float(threshold)
            if searched and value <= float(searched[0]) * (1 + 1e-6):
                # the least H2 searched already suffices: no threshold inside the range
                lines.append(f"H2 needed: less than the lowest level searched; the network runs "
                             f"down to {_quantity(float(searched[0]), unit)}")
            else:
                lines.append(f"H2 needed: at least {_quantity(value, unit)}")
    force = results.get("driving_force")
    if force is not None and not (isinstance(force, float) and math.isnan(force)):
        line = f"max-min driving force: {force:.3g} kJ/mol"
        bottlenecks = results.get("bottlenecks")
        if bottlenecks:
            line += f" (tightest: {_names(bottlenecks)})"
        lines.append(line)
    return lines


def summarize(results: Mapping[str, Any]) -> str:
    """:func:`summary_lines` joined into one text (one sentence per line)."""
    return "\n".join(summary_lines(results))
