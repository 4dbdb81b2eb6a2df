"""Data audit: the bundled species data against independent reaction-level literature values.

For every literature value (:mod:`tfa.thermo.literature`) the reaction energy is computed from
the species data at the value's own conditions, twice: with reviewed sources only (the default
of the runtime) and with unreviewed sources included. Every difference larger than the threshold
(5 kJ/mol) is flagged, with the sources that entered, so a bad source shows itself: the acyl
phosphates of an unreviewed 2026 source, for instance, make acetyl phosphate hydrolysis about
30 kJ/mol less negative than the long-established value; with reviewed data only, acetyl phosphate
has no species data and the disagreement cannot arise.

A reaction whose compounds have no data in a mode is reported as "no data" in that mode, never
as agreeing.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Iterable, Sequence

import pandas as pd

from ..errors import InputError, MissingDataError
from .database import ThermoDatabase
from .literature import ReactionValue, load_reaction_values

#: Differences above this are flagged, kJ/mol.
THRESHOLD_KJ = 5.0
#: The two modes of the audit.
MODES = ("reviewed", "with_unreviewed")


@dataclass(frozen=True)
class AuditEntry:
    """One literature value compared with the species data in one mode.

    Attributes
    ----------
    id, equation : str
    mode : str
        ``reviewed`` or ``with_unreviewed``.
    literature, literature_sigma : float
        ΔrG'° from the literature and its σ, kJ/mol.
    literature_source : str
    computed, uncertainty : float or None
        ΔrG'° from the species data and its σ; None when no data.
    difference : float or None
        computed − literature, kJ/mol.
    flagged : bool
        |difference| > threshold.
    status : str
        ``agrees``, ``disagrees`` or ``no data``.
    sources : tuple of str
        Source keys of the species that entered.
    unreviewed_sources : tuple of str
        Those of ``sources`` that are not peer reviewed.
    message : str
    """

    id: str
    equation: str
    mode: str
    literature: float
    literature_sigma: float
    literature_source: str
    computed: float | None
    uncertainty: float | None
    difference: float | None
    flagged: bool
    status: str
    sources: tuple[str, ...] = ()
    unreviewed_sources: tuple[str, ...] = ()
    message: str = ""


@dataclass
class AuditResult:
    """The audit in both modes.

    Attributes
    ----------
    entries : list of AuditEntry
        One per literature value and mode.
    threshold : float
        kJ/mol.
    """

    entries: list[AuditEntry] = field(default_factory=list)
    threshold: float = THRESHOLD_KJ

    def mode(self, mode: str) -> list[AuditEntry]:
        """Entries of one mode."""
        if mode not in MODES:
            raise InputError(f"audit mode '{mode}' unknown; use one of {', '.join(MODES)}")
        return [e for e in self.entries if e.mode == mode]

    def flagged(self, mode: str = "reviewed") -> list[AuditEntry]:
        """Entries whose difference exceeds the threshold in ``mode``."""
        return [e for e in self.mode(mode) if e.flagged]

    def explained_by_unreviewed(self) -> list[str]:
        """Ids flagged with unreviewed data whose flag involves an unreviewed source and
        that are not flagged with reviewed data: the disagreements a bad source causes."""
        reviewed = {e.id: e for e in self.mode("reviewed")}
        return [e.id for e in self.flagged("with_unreviewed")
                if e.unreviewed_sources and not reviewed[e.id].flagged]

    def to_frame(self) -> pd.DataFrame:
        """One row per literature value; columns for both modes (energies in kJ/mol)."""
        rows: dict[str, dict] = {}
        for e in self.entries:
            row = rows.setdefault(e.id, {"id": e.id, "equation": e.equation,
                                         "literature": e.literature,
                                         "literature_sigma": e.literature_sigma,
                                         "literature_source": e.literature_source})
            suffix = "reviewed" if e.mode == "reviewed" else "with_unreviewed"
            row[f"computed_{suffix}"] = e.computed
            row[f"difference_{suffix}"] = e.difference
            row[f"flag_{suffix}"] = e.flagged
            row[f"status_{suffix}"] = e.status
            row[f"sources_{suffix}"] = ";".join(e.sources)
            if e.mode == "with_unreviewed":
                row["unreviewed_sources"] = ";".join(e.unreviewed_sources)
                row["message"] = e.message
            elif e.flagged or e.status == "no data":
                row["message_reviewed"] = e.message
        return pd.DataFrame(list(rows.values()))


def _entry(db: ThermoDatabase, value: ReactionValue, mode: str, threshold: float) -> AuditEntry:
    base = dict(id=value.id, equation=value.equation, mode=mode, literature=value.dg0_prime,
                literature_sigma=value.sigma, literature_source=value.source)
    try:
        result = db.reaction_energy(value.equation, value.conditions)
    except MissingDataError as err:
        return AuditEntry(**base, computed=None, uncertainty=None, difference=None, flagged=False,
                          status="no data", message=str(err))
    difference = result.standard - value.dg0_prime
    flagged = abs(difference) > threshold
    unreviewed = tuple(k for k in result.sources if not db.is_reviewed(k))
    if flagged:
        message = (f"{value.id}: computed {result.standard:.1f} kJ/mol, literature "
                   f"{value.dg0_prime:.1f} kJ/mol ({value.source}); off by {difference:+.1f} kJ/mol")
        if unreviewed:
            message += f"; unreviewed source(s) entered: {', '.join(unreviewed)}"
    else:
        message = f"{value.id}: agrees within {threshold:g} kJ/mol ({difference:+.1f})"
    return AuditEntry(**base, computed=result.standard, uncertainty=result.uncertainty,
                      difference=difference, flagged=flagged,
                      status="disagrees" if flagged else "agrees", sources=result.sources,
                      unreviewed_sources=unreviewed, message=message)


def audit(db: ThermoDatabase | None = None, values: Iterable[ReactionValue] | None = None,
          threshold: float = THRESHOLD_KJ) -> AuditResult:
    """Compare the species data with literature reaction values, reviewed-only and with
    unreviewed sources.

    Parameters
    ----------
    db : ThermoDatabase, optional
        The database (default: the bundled one); both review modes are derived from it.
    values : iterable of ReactionValue, optional
        Default: the bundled ``reaction_values.csv``.
    threshold : float
        Differences above this (kJ/mol) are flagged.

    Examples
    --------
    >>> result = audit()
    >>> [e.id for e in result.flagged("with_unreviewed") if "acetyl" in e.id]
    ['acetyl_phosphate_hydrolysis']
    >>> [e.status for e in result.mode("reviewed") if e.id == "acetyl_phosphate_hydrolysis"]
    ['no data']
    """
    db = db if db is not None else ThermoDatabase.load()
    chosen: Sequence[ReactionValue] = list(values) if values is not None else list(load_reaction_values())
    result = AuditResult(threshold=threshold)
    for mode, include in (("reviewed", False), ("with_unreviewed", True)):
        variant = db.with_unreviewed(include)
        for value in chosen:
            result.entries.append(_entry(variant, value, mode, threshold))
    return result
