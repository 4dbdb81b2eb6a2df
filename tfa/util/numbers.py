"""The one gate every number from outside passes: equation coefficients, table cells, the
environment file, command-line options and the arguments of the Python API.

:func:`read_number` turns text or a Python number into a float (or an int) and refuses, with one
line that names where the value came from and what would fix it: text that is not a number,
NaN, infinities, a division by zero (``1/0``), numbers written with more than
:data:`MAX_NUMBER_TEXT` characters (a 400-digit integer), magnitudes beyond :data:`MAX_MAGNITUDE`
and values outside the bounds the caller gives. The caps on sizes and magnitudes of a run are
defined here, once, and listed in the design notes ("Limits").

Nothing here imports anything of ``tfa`` but the errors.

Examples
--------
>>> read_number("2/3", "coefficient", fraction=True)
0.6666666666666666
>>> read_number("1/0", "coefficient", "reactions.tsv line 4", fraction=True)
Traceback (most recent call last):
...
tfa.errors.InputError: reactions.tsv line 4: coefficient '1/0' divides by zero; give a number such as 2 or 1/2
>>> read_count("12", "--draws", maximum=MAX_DRAWS)
12
"""

from __future__ import annotations

import math
from fractions import Fraction
from typing import Any

from ..errors import InputError

#: Longest text read as one number (characters): enough for any float in full precision.
MAX_NUMBER_TEXT = 40
#: Largest magnitude of any number read without a bound of its own (common practice: far
#: beyond any physical quantity in these units, far below float overflow).
MAX_MAGNITUDE = 1e15

# ------------------------------------------------------------------ caps of a run (documented)
#: Largest stoichiometric coefficient (common practice: biomass and maintenance reactions of
#: genome-scale models stay below 100).
MAX_COEFFICIENT = 1e4
#: Activities (mol/L over 1 mol/L; gases bar over 1 bar) accepted for feeds, bounds and H2
#: supplies: from less than one molecule in a million litres to 1000 (above any solubility,
#: pure water being 55.5 mol/L, and at the scale of the highest pressures the data cover).
MIN_ACTIVITY = 1e-30
MAX_ACTIVITY = 1e3
#: Largest flux bound or demand flux, in the network's flux unit (common practice: bounds of
#: 1000 mean "unbounded"; beyond 1e6 the solvers' tolerances of 1e-9 lose all meaning).
MAX_FLUX = 1e6
#: Largest multiple k of σ an energy may move by (common practice: 3 σ covers 99.7 % of a
#: normal distribution; beyond 10 σ an energy means nothing).
MAX_K_SIGMA = 10.0
#: Largest factor on every σ of the robustness draws (same reasoning as MAX_K_SIGMA).
MAX_SIGMA_SCALE = 10.0
#: Most draws per mode (common practice: the standard error of a probability is at most
#: 1/(2 sqrt N), 0.5 % at 10,000 draws; more buys nothing).
MAX_DRAWS = 10_000
#: Most values on one axis of a condition map, and grid points (values x values x modes).
MAX_AXIS_VALUES = 200
MAX_GRID_POINTS = 10_000
#: Most levels of an H2 scan and alternative minimal uphill sets per mode.
MAX_H2_LEVELS = 500
MAX_ALTERNATIVES = 50
#: Longest time limit per solve, s (one day), and the largest least driving force, kJ/mol.
MAX_TIME_LIMIT = 86_400.0
MAX_DRIVING_FORCE = 100.0
#: Most worker processes.
MAX_WORKERS = 256
#: Largest seed of the draws (numpy's seed sequence takes any integer; 2**63 - 1 keeps it one
#: machine word).
MAX_SEED = 2**63 - 1


def _shown(value: Any) -> str:
    text = repr(value) if not isinstance(value, str) else repr(value.strip())
    return text if len(text) <= 24 else text[:20] + "...'"


def _prefix(where: str) -> str:
    return f"{where}: " if where else ""


def read_number(value: Any, field: str, where: str = "", *, minimum: float | None = None,
                maximum: float | None = None, above: float | None = None,
                integer: bool = False, fraction: bool = False, allow_infinite: bool = False,
                unit: str = "") -> float:
    """A number from text or a Python number, checked; the one input gate for numbers.

    Parameters
    ----------
    value : str, int or float
        What was given (``bool`` is refused: ``True`` is no number).
    field : str
        Its name in messages (``"--pressure"``, ``"column 'conc_min'"``, ``"[feed] H2"``).
    where : str
        The file and line, or the function, it came from.
    minimum, maximum : float, optional
        Inclusive bounds.
    above : float, optional
        Exclusive lower bound (e.g. 0 for a positive number).
    integer : bool
        Require a whole number; an ``int`` is returned.
    fraction : bool
        Also read ``A/B`` (stoichiometric coefficients).
    allow_infinite : bool
        Accept ``inf`` (only where infinity means something, e.g. an open bound).
    unit : str
        Shown in messages.

    Raises
    ------
    InputError
        One line naming ``where``, ``field`` and the value, and what to give instead.
    """
    at = _prefix(where)
    unit_text = f" {unit}" if unit else ""
    if isinstance(value, bool) or value is None:
        raise InputError(f"{at}{field} {_shown(value)} is not a number; give a number{unit_text}")
    if isinstance(value, str):
        text = value.strip()
        if len(text) > MAX_NUMBER_TEXT:
            raise InputError(f"{at}{field} {_shown(value)} is written with {len(text)} characters; "
                             f"give a number of at most {MAX_NUMBER_TEXT} characters (e.g. 1e-3)")
        try:
            if fraction and "/" in text:
                number = float(Fraction(text))
            else:
                number = float(text)
        except ZeroDivisionError:
            raise InputError(f"{at}{field} {_shown(value)} divides by zero; give a number such "
                             "as 2 or 1/2") from None
        except (ValueError, OverflowError):
            if integer:
                raise InputError(f"{at}{field} {_shown(value)} is not an integer; give a whole "
                                 "number, e.g. -1") from None
            example = "2 or 1/2" if fraction else f"1e-3{unit_text}"
            raise InputError(f"{at}{field} {_shown(value)} is not a number; give e.g. "
                             f"{example}") from None
    elif isinstance(value, (int, float)) or hasattr(value, "__float__"):
        try:
            number = float(value)
        except (OverflowError, TypeError, ValueError):
            raise InputError(f"{at}{field} {_shown(value)} is too large; give at most "
                             f"{MAX_MAGNITUDE:g}{unit_text}") from None
    else:
        raise InputError(f"{at}{field}: expected a number{unit_text}, got "
                         f"{type(value).__name__} {_shown(value)}")
    if math.isnan(number):
        raise InputError(f"{at}{field} {_shown(value)} is not a number (NaN); give a "
                         f"number{unit_text}")
    if math.isinf(number) and not allow_infinite:
        raise InputError(f"{at}{field} {_shown(value)} is infinite; give a finite number"
                         f"{unit_text}")
    low = [] if minimum is None else [f">= {minimum:g}"]
    low += [] if above is None else [f"> {above:g}"]
    high = [] if maximum is None else [f"<= {maximum:g}"]
    wanted = " and ".join(low + high)
    if ((minimum is not None and number < minimum) or (above is not None and number <= above)
            or (maximum is not None and number > maximum)):
        raise InputError(f"{at}{field} {_shown(value)} is out of range; give a value "
                         f"{wanted}{unit_text}")
    if math.isfinite(number) and abs(number) > MAX_MAGNITUDE and maximum is None:
        raise InputError(f"{at}{field} {_shown(value)} is beyond any sensible magnitude; give at "
                         f"most {MAX_MAGNITUDE:g}{unit_text}")
    if integer and (not math.isfinite(number) or number != int(number)):
        raise InputError(f"{at}{field} {_shown(value)} is not an integer; give a whole number, "
                         "e.g. 3")
    return int(number) if integer else number


def read_count(value: Any, field: str, where: str = "", *, minimum: int = 1,
               maximum: int | None = None, text: bool = True) -> int:
    """A whole number between ``minimum`` and ``maximum`` (a count, a seed, workers); with
    ``text=False`` (arguments of the Python API) only an ``int`` is taken.

    >>> read_count(3, "alternatives", maximum=MAX_ALTERNATIVES)
    3
    """
    if isinstance(value, float) or (not text and isinstance(value, str)):
        raise InputError(f"{_prefix(where)}{field} {value!r} is not a whole number; give e.g. 3")
    return read_number(value, field, where, minimum=minimum, maximum=maximum, integer=True)


def read_activity(value: Any, field: str, where: str = "") -> float:
    """An activity (concentration in mol/L, gas in bar) between :data:`MIN_ACTIVITY` and
    :data:`MAX_ACTIVITY`.

    >>> read_activity("1e-3", "[feed] H2")
    0.001
    """
    return read_number(value, field, where, minimum=MIN_ACTIVITY, maximum=MAX_ACTIVITY,
                       unit="mol/L (gases: bar)")
