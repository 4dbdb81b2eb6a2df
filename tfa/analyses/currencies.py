"""Energy currencies side by side: for each way of paying for the ATP-coupled steps (ATP itself,
acetyl phosphate, a thioester, pyrophosphate, polyphosphate, or nothing: ATP removed or stripped
to bare chemistry), with the carriers kept or replaced by H2, whether the network meets its
demand with every step downhill, the minimal uphill set when not, and which precursors it can make
alone.

The rewrites are those of the mode registry (:mod:`tfa.modes`, :mod:`tfa.network.currency_rewrites`);
each currency brings its own energies through its donor's compounds (the network's data: in the
bundled network acetyl phosphate hydrolysis -43.1 kJ/mol, Nelson & Cox 2008 Table 13-6, and
acetyl-CoA hydrolysis -35.7 kJ/mol, Thauer et al. 1977, both at 25 degC, pH 7; from memory).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from ..modes import CURRENCY_IDS, get_mode, parse_modes

#: Columns of the ``currencies`` table (one row per mode).
CURRENCY_COLUMNS = ["currency", "carriers", "mode", "feasible", "uphill_set_size", "uphill_set",
                    "precursors_made", "precursors_not_made", "message", "verification"]


def currency_of(mode_id: str) -> str:
    """What pays for the ATP-coupled steps in a mode: ATP, a currency id, or none.

    >>> currency_of("h2_only+thioester"), currency_of("no_atp_bare"), currency_of("native")
    ('thioester', 'none (bare chemistry)', 'ATP')
    """
    rewrites = get_mode(parse_modes([mode_id])[0]).rewrites
    for r in rewrites:
        if r.startswith("currency_"):
            return r[len("currency_"):]
    if "atp_removed" in rewrites:
        return "none (ATP removed)"
    if "atp_to_bare_chemistry" in rewrites:
        return "none (bare chemistry)"
    return "ATP"


def currency_modes() -> list[str]:
    """The modes of the currencies table, in order: ATP, each currency, no ATP (strict, bare),
    first with the carriers kept, then with H2 in their place (combined modes registered here)."""
    kept = ["native", *CURRENCY_IDS, "no_atp_strict", "no_atp_bare"]
    h2 = ["h2_only", *(f"h2_only+{c}" for c in CURRENCY_IDS), "h2_no_atp", "h2_bare"]
    return parse_modes(kept + h2)


@dataclass
class CurrencyRow:
    """One mode of the currencies table."""

    mode: str
    feasible: bool | None
    uphill_sets: list[list[str]] = field(default_factory=list)
    precursors: dict[str, bool | None] = field(default_factory=dict)
    message: str = ""
    verification: str = ""

    def row(self) -> dict:
        made = [p for p, ok in self.precursors.items() if ok]
        not_made = [p for p, ok in self.precursors.items() if ok is False]
        first = self.uphill_sets[0] if self.uphill_sets else []
        return {"currency": currency_of(self.mode),
                "carriers": "H2" if "carriers_to_h2" in get_mode(self.mode).rewrites else "kept",
                "mode": self.mode, "feasible": self.feasible,
                "uphill_set_size": (len(first) if self.uphill_sets else (0 if self.feasible else None)),
                "uphill_set": ", ".join(first),
                "precursors_made": ", ".join(made), "precursors_not_made": ", ".join(not_made),
                "message": self.message, "verification": self.verification}


def currency_table(rows: list[CurrencyRow]) -> pd.DataFrame:
    """The ``currencies`` table."""
    return pd.DataFrame([r.row() for r in rows], columns=CURRENCY_COLUMNS)
