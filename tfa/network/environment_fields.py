"""The number and text gates of an environment file's fields: every value of ``[conditions]``,
``[feed]``, ``[bounds]``, ``[demand]``, ``[cofactors]`` and ``[fluid]`` passes one of them
(:func:`tfa.util.numbers.read_number` behind each), so a bad value is refused naming the file,
section and key."""

from __future__ import annotations

import difflib
from typing import Any

from ..errors import InputError, NetworkFileError
from ..util.numbers import MAX_FLUX, read_activity, read_number


def _unknown(where: str, what: str, key: str, allowed: list[str]) -> str:
    same_case = [a for a in allowed if a.lower() == key.lower()]
    close = same_case or difflib.get_close_matches(key, allowed, n=1)
    hint = f"did you mean '{close[0]}'? " if close else ""
    return f"{where}: unknown {what}; {hint}allowed: {', '.join(allowed)}"


def _real(where: str, section: str, key: str, value: Any, **bounds: float) -> float:
    if isinstance(value, str):  # a number in quotes is text in TOML
        raise NetworkFileError(f"{where} [{section}] {key}: {value!r} is not a number; write e.g. "
                               f"{key} = 1.0")
    try:
        return float(read_number(value, f"[{section}] {key}", where, **bounds))
    except InputError as exc:
        raise NetworkFileError(str(exc)) from None


def _positive(where: str, section: str, key: str, value: Any) -> float:
    if isinstance(value, (int, float)) and not isinstance(value, bool) and value <= 0:
        raise NetworkFileError(
            f"{where} [{section}] {key}: {value!r} is not a concentration; give a value > 0 "
            "(mol/L; gases bar), or remove the entry"
        )
    if isinstance(value, str):
        _real(where, section, key, value)
    try:
        return read_activity(value, f"[{section}] {key}", where)
    except InputError as exc:
        raise NetworkFileError(str(exc)) from None


def _demand(where: str, section: Any) -> tuple[str | None, float, bool]:
    """(reaction, flux, no demand) of the ``[demand]`` section, which must be there."""
    if section is None:
        raise NetworkFileError(
            f"{where}: no [demand] section; name what the network must make, e.g. [demand] "
            "reaction = \"DM_precursors\" and flux = 0.01 (without a demand the zero-flux state "
            "meets every question), or write [demand] none = true to ask whether it can run at all")
    if "none" in section:
        if section["none"] is not True or set(section) != {"none"}:
            raise NetworkFileError(f"{where} [demand]: none = true stands alone (no reaction, no "
                                   "flux); or remove it and name the demand reaction and flux")
        return None, 0.0, True
    reaction = section.get("reaction")
    if not isinstance(reaction, str) or not reaction.strip():
        raise NetworkFileError(f"{where} [demand] reaction: give a reaction id as text, e.g. "
                               "reaction = \"DM_precursors\"")
    if "flux" not in section:
        raise NetworkFileError(f"{where} [demand] flux: missing; give the least flux of "
                               f"{reaction} (> 0, in the network's flux unit), e.g. flux = 0.01")
    flux = _real(where, "demand", "flux", section["flux"], maximum=MAX_FLUX)
    if flux <= 0:
        raise NetworkFileError(f"{where} [demand] flux: {flux:g} must be > 0 (a demand of 0 is met "
                               "by the zero-flux state); or write [demand] none = true")
    return reaction.strip(), flux, False


def _pair(where: str, key: str, value: Any) -> tuple[float, float]:
    if not isinstance(value, list) or len(value) != 2:
        raise NetworkFileError(f"{where} [bounds] {key}: give two numbers [lower, upper] in mol/L, e.g. "
                               f"{key} = [1.0e-6, 1.0e-2]")
    lower = _positive(where, "bounds", key, value[0])
    upper = _positive(where, "bounds", key, value[1])
    if lower > upper:
        raise NetworkFileError(f"{where} [bounds] {key}: lower {lower:g} is above upper {upper:g}; swap them")
    return lower, upper
