"""Data audit: the bundled data against independent reaction-level literature values.

Every literature value of the library (``tfa/data/reaction_values.csv``) is compared with what
the rest of the data predict for it, at the value's own temperature, pH, ionic strength and pMg:

- a value over compounds that all have species data is computed from the species data
  (:meth:`~tfa.thermo.database.ThermoDatabase.reaction_energy`), σ = √(σ_computed² + σ_value²);
- a value that involves compounds without species data (acetyl-CoA, the sugar phosphates, ...)
  is compared with the prediction of all the *other* values and the species data: the
  leave-one-out residual of the reconciliation (:mod:`tfa.thermo.reconcile`),
  −e_r/(1 − h_r), with σ = σ_r/√(1 − h_r) (Belsley, Kuh & Welsch 1980). A value that is the only
  one fixing a compound (leverage 1) is checked by nothing and is reported as ``defines``, never
  as agreeing.

A value disagrees when |difference| > 2σ or |difference| > 5 kJ/mol (:data:`THRESHOLD_KJ`); every
disagreement is "open": it is printed by ``tfa audit`` and attached, as an audit flag, to every
energy computed from a compound of that reaction (:meth:`AuditResult.flags_for`). A value that
the species-table generator used to re-anchor a species (column ``anchors``) is shown but is no
independent check of that species: its role is ``anchor`` and it stays out of the statistics.

Two modes: ``reviewed`` (the default data of the runtime) and ``with_unreviewed`` (species of
sources that are not peer reviewed included), so that a bad source shows itself: the acyl
phosphates of an unreviewed 2026 source make acetyl phosphate hydrolysis about 30 kJ/mol less
negative than the long-established value.

References
----------
[1] D. A. Belsley, E. Kuh, R. E. Welsch, Regression Diagnostics, Wiley, 1980 (leverage,
    deleted residuals).
[2] R. K. Thauer, K. Jungermann, K. Decker, Bacteriol. Rev. 41 (1977) 100-180.
"""

from __future__ import annotations

import contextlib
import logging
import math
from dataclasses import dataclass, field
from typing import Iterable, Sequence

import pandas as pd

from ..errors import InputError, MissingDataError
from .compounds import FIXED_ACTIVITY_KINDS
from .database import ThermoDatabase
from .literature import ReactionValue, load_reaction_values

#: Differences above this are disagreements whatever their σ, kJ/mol.
THRESHOLD_KJ = 5.0
#: Differences above this many σ are disagreements.
THRESHOLD_SIGMA = 2.0
#: Leverage above which a value counts as checked by no other value.
LEVERAGE_ONE = 1.0 - 1e-8
#: The two modes of the audit.
MODES = ("reviewed", "with_unreviewed")
#: Roles of a value: an independent check, an anchor of a species correction, or the only value
#: that fixes a compound.
ROLES = ("check", "anchor", "defines")


@dataclass(frozen=True)
class AuditEntry:
    """One literature value compared with the rest of the data in one mode.

    Attributes
    ----------
    id, equation : str
    mode : str
        ``reviewed`` or ``with_unreviewed``.
    literature, literature_sigma : float
        ΔrG'° of the value and its σ, kJ/mol.
    literature_source : str
    computed, uncertainty : float or None
        ΔrG'° predicted by the rest of the data and the σ of the comparison (value and
        prediction together), kJ/mol; None when there are no data.
    difference : float or None
        computed − literature, kJ/mol.
    flagged : bool
        An open disagreement: |difference| > 2σ or > 5 kJ/mol.
    status : str
        ``agrees``, ``disagrees``, ``no data`` or ``unchecked`` (the only value fixing a compound).
    sources : tuple of str
        Source keys of the data that entered.
    unreviewed_sources : tuple of str
        Those of ``sources`` that are not peer reviewed.
    message : str
    z : float or None
        difference / uncertainty.
    role : str
        ``check``, ``anchor`` or ``defines`` (:data:`ROLES`).
    basis : str
        ``checked``, ``from memory`` or ``common practice``.
    compounds : tuple of str
        The compounds at stake, which the disagreement touches: every compound of the reaction
        (water, H+ and solids left out) for a value computed from species data; only the
        reconciled compounds for a leave-one-out comparison (their species-data partners have
        checks of their own).
    conditions : str
        Temperature, pH, ionic strength and pMg of the value.
    method : str
        ``species data`` or ``leave-one-out`` (reconciled compounds).
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
    z: float | None = None
    role: str = "check"
    basis: str = "checked"
    compounds: tuple[str, ...] = ()
    conditions: str = ""
    method: str = "species data"

    def flag_text(self) -> str:
        """The audit flag attached to energies this disagreement touches."""
        memory = ", from memory" if self.basis == "from memory" else (
            ", common practice" if self.basis == "common practice" else "")
        return (f"audit: {self.id} ({self.literature_source}{memory}) computed {self.computed:.1f} "
                f"against {self.literature:.1f} kJ/mol ({self.difference:+.1f}, {self.z:+.1f} sigma)")


@dataclass
class AuditResult:
    """The audit in one or both modes.

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

    def modes(self) -> list[str]:
        """The modes present, in :data:`MODES` order."""
        present = {e.mode for e in self.entries}
        return [m for m in MODES if m in present]

    def flagged(self, mode: str = "reviewed") -> list[AuditEntry]:
        """Open disagreements in ``mode`` (|difference| > 2σ or > 5 kJ/mol)."""
        return [e for e in self.mode(mode) if e.flagged]

    def checks(self, mode: str = "reviewed") -> list[AuditEntry]:
        """Entries that are independent checks with a computed value (role ``check``)."""
        return [e for e in self.mode(mode) if e.role == "check" and e.difference is not None]

    def statistics(self, mode: str = "reviewed") -> dict:
        """Counts of the independent checks: how many, how many beyond 2σ and beyond 5 kJ/mol,
        and the fraction within 2σ."""
        checks = self.checks(mode)
        beyond_sigma = [e for e in checks if abs(e.z) > THRESHOLD_SIGMA]
        beyond_kj = [e for e in checks if abs(e.difference) > self.threshold]
        n = len(checks)
        return {"mode": mode, "values": len(self.mode(mode)), "checks": n,
                "anchors": sum(e.role == "anchor" for e in self.mode(mode)),
                "unchecked": sum(e.role == "defines" for e in self.mode(mode)),
                "no_data": sum(e.status == "no data" for e in self.mode(mode)),
                "beyond_2_sigma": len(beyond_sigma), "beyond_5_kJ": len(beyond_kj),
                "within_2_sigma_fraction": (n - len(beyond_sigma)) / n if n else float("nan"),
                "flagged": [e.id for e in self.flagged(mode)]}

    def explained_by_unreviewed(self) -> list[str]:
        """Ids flagged with unreviewed data whose flag involves an unreviewed source and
        that are not flagged with reviewed data: the disagreements a bad source causes."""
        reviewed = {e.id: e for e in self.mode("reviewed")}
        return [e.id for e in self.flagged("with_unreviewed")
                if e.unreviewed_sources and not reviewed[e.id].flagged]

    def flags_for(self, compounds: Iterable[str], mode: str | None = None) -> tuple[str, ...]:
        """Audit flags of the open disagreements that touch any of ``compounds`` (ids), in
        ``mode`` (default: the first mode present)."""
        mode = mode or (self.modes()[0] if self.entries else "reviewed")
        wanted = set(compounds)
        return tuple(e.flag_text() for e in self.flagged(mode) if wanted & set(e.compounds))

    def report_lines(self, mode: str = "reviewed", every_value: bool = False) -> list[str]:
        """The audit in words: the statistics, every open disagreement (computed against
        literature, difference, σ, source, basis, conditions, the compounds it touches) and,
        with ``every_value``, one line per value."""
        stats = self.statistics(mode)
        lines = [f"data audit ({mode.replace('_', ' ')} data): {stats['values']} literature values, "
                 f"{stats['checks']} independent checks ({stats['anchors']} anchors of species "
                 f"corrections and {stats['unchecked']} values no other value checks left out)",
                 f"  within 2 sigma: {100 * stats['within_2_sigma_fraction']:.0f} % "
                 f"({stats['checks'] - stats['beyond_2_sigma']} of {stats['checks']}); beyond "
                 f"5 kJ/mol: {stats['beyond_5_kJ']}"]
        flagged = self.flagged(mode)
        lines.append(f"open disagreements (|difference| > {THRESHOLD_SIGMA:g} sigma or > "
                     f"{self.threshold:g} kJ/mol): {len(flagged)}")
        for e in flagged:
            lines.append(f"  {e.id} [{e.role}, {e.method}]: {e.equation}")
            lines.append(f"    computed {e.computed:.1f}, literature {e.literature:.1f} +/- "
                         f"{e.literature_sigma:g} kJ/mol ({e.literature_source}, {e.basis}; "
                         f"{e.conditions}): {e.difference:+.1f} kJ/mol, {e.z:+.1f} sigma")
            lines.append(f"    touches {', '.join(e.compounds) or 'nothing'}"
                         + (f"; unreviewed source(s): {', '.join(e.unreviewed_sources)}"
                            if e.unreviewed_sources else ""))
        if every_value:
            lines.append("every value (difference = computed - literature, kJ/mol):")
            for e in self.mode(mode):
                if e.difference is None:
                    lines.append(f"  {e.id:36s} {e.status:9s} {e.role:8s} {e.message}")
                else:
                    lines.append(f"  {e.id:36s} {e.status:9s} {e.role:8s} {e.difference:+7.1f} "
                                 f"{e.z:+5.1f} sigma  ({e.literature_source}, {e.basis})")
        return lines

    def to_frame(self) -> pd.DataFrame:
        """One row per literature value; columns for each mode (energies in kJ/mol)."""
        rows: dict[str, dict] = {}
        for e in self.entries:
            row = rows.setdefault(e.id, {"id": e.id, "equation": e.equation,
                                         "literature": e.literature,
                                         "literature_sigma": e.literature_sigma,
                                         "literature_source": e.literature_source,
                                         "basis": e.basis, "role": e.role,
                                         "conditions": e.conditions})
            suffix = e.mode
            row[f"computed_{suffix}"] = e.computed
            row[f"sigma_{suffix}"] = e.uncertainty
            row[f"difference_{suffix}"] = e.difference
            row[f"z_{suffix}"] = e.z
            row[f"flag_{suffix}"] = e.flagged
            row[f"status_{suffix}"] = e.status
            row[f"method_{suffix}"] = e.method
            row[f"sources_{suffix}"] = ";".join(e.sources)
            if e.mode == "with_unreviewed":
                row["unreviewed_sources"] = ";".join(e.unreviewed_sources)
                row["message"] = e.message
            elif e.flagged or e.status in ("no data", "unchecked"):
                row["message_reviewed"] = e.message
        return pd.DataFrame(list(rows.values()))


def _conditions_text(value: ReactionValue) -> str:
    mg = "no Mg2+" if value.pmg is None else f"pMg {value.pmg:g}"
    return (f"{value.temperature_C:g} degC, pH {value.ph:g}, I = {value.ionic_strength:g} M, {mg}")


def _judge(value: ReactionValue, computed: float, sigma: float,
           threshold: float) -> tuple[bool, float]:
    difference = computed - value.delta_g_standard
    z = difference / sigma if sigma > 0 else math.copysign(math.inf, difference)
    return abs(z) > THRESHOLD_SIGMA or abs(difference) > threshold, z


@contextlib.contextmanager
def _quiet(*names: str):
    """The audit computes values at their own pMg and reconciles values that disagree, on
    purpose: the warnings of those loggers (kept in each result's flags, and reported by the
    audit itself) are not repeated on the log."""
    logs = [logging.getLogger(n) for n in names]
    levels = [log.level for log in logs]
    for log in logs:
        log.setLevel(logging.ERROR)
    try:
        yield
    finally:
        for log, level in zip(logs, levels):
            log.setLevel(level)


QUIET_LOGGERS = ("tfa.thermo.database", "tfa.thermo.reconcile")


def _entries(library, mode: str, threshold: float = THRESHOLD_KJ) -> list[AuditEntry]:
    """Audit entries of every value of a :class:`~tfa.thermo.library.ReactionLibrary`."""
    with _quiet(*QUIET_LOGGERS):
        return _entries_of(library, mode, threshold)


def _entries_of(library, mode: str, threshold: float) -> list[AuditEntry]:
    db: ThermoDatabase = library.base
    rec = library.reconciliation
    residuals = {r.id: r for r in rec.residuals} if rec is not None else {}
    out = []
    for value, lv in zip(library.values, library.literature):
        compounds = tuple(c for c in lv.stoichiometry
                          if db.compound(c).kind not in FIXED_ACTIVITY_KINDS)
        base = dict(id=value.id, equation=value.equation, mode=mode, literature=value.delta_g_standard,
                    literature_sigma=value.sigma, literature_source=value.source,
                    basis=value.basis, compounds=compounds, conditions=_conditions_text(value),
                    role="anchor" if value.anchors else "check")
        unknown = [c for c in lv.stoichiometry if c in library.reconciled]
        missing = [c for c in lv.stoichiometry if not library.database.compound(c).has_data]
        if missing:
            out.append(AuditEntry(**base, computed=None, uncertainty=None, difference=None,
                                  flagged=False, status="no data",
                                  message=f"{value.id}: no data for {', '.join(missing)}"))
            continue
        if not unknown:
            try:
                result = db.reaction_energy(lv.stoichiometry, value.conditions)
            except MissingDataError as err:
                out.append(AuditEntry(**base, computed=None, uncertainty=None, difference=None,
                                      flagged=False, status="no data", message=str(err)))
                continue
            sigma = math.hypot(result.uncertainty, value.sigma)
            computed, sources, method = result.standard, result.sources, "species data"
        else:
            r = residuals[value.id]
            base["compounds"] = tuple(c for c in compounds if c in unknown)
            loo = leave_one_out(r)
            if loo is None:
                base["role"] = "defines"
                out.append(_unchecked(base, value.id, value.source, unknown))
                continue
            difference, sigma = loo
            computed, method = value.delta_g_standard + difference, "leave-one-out"
            sources = tuple(dict.fromkeys(
                [k for c in lv.stoichiometry if c not in unknown
                 for k in db.formation_energy(c, value.conditions).sources]
                + [k for k in rec.source_keys({c: n for c, n in lv.stoichiometry.items()
                                               if c in unknown}) if k != value.source]))
        flagged, z = _judge(value, computed, sigma, threshold)
        unreviewed = tuple(k for k in sources if not db.is_reviewed(k))
        difference = computed - value.delta_g_standard
        if flagged:
            message = (f"{value.id}: computed {computed:.1f} kJ/mol, literature "
                       f"{value.delta_g_standard:.1f} kJ/mol ({value.source}); off by {difference:+.1f} "
                       f"kJ/mol, {z:+.1f} sigma")
            if unreviewed:
                message += f"; unreviewed source(s) entered: {', '.join(unreviewed)}"
        else:
            message = f"{value.id}: agrees ({difference:+.1f} kJ/mol, {z:+.1f} sigma)"
        out.append(AuditEntry(**base, computed=computed, uncertainty=sigma, difference=difference,
                              flagged=flagged, status="disagrees" if flagged else "agrees",
                              sources=tuple(sources), unreviewed_sources=unreviewed,
                              message=message, z=z, method=method))
    return out


def leave_one_out(residual) -> tuple[float, float] | None:
    """(difference, σ) of a reconciled value against the prediction of all the others, kJ/mol,
    from its :class:`~tfa.thermo.reconcile.ValueResidual`; None when no other value checks it.

    Equation: difference = −e/(1 − h), σ = σ_r/√(1 − h), with e the residual, σ_r its σ
    (value and known compounds) and h the leverage (Belsley, Kuh & Welsch 1980).

    >>> from tfa.thermo.reconcile import ValueResidual
    >>> d, s = leave_one_out(ValueResidual("v", 1.0, 2.0, 0.5, 0.7, "agrees", ""))
    >>> round(d, 2), round(s, 3)
    (-2.0, 2.828)
    """
    if residual.leverage > LEVERAGE_ONE:
        return None
    return (-residual.residual / (1.0 - residual.leverage),
            residual.sigma / math.sqrt(1.0 - residual.leverage))


def _unchecked(base: dict, value_id: str, source: str, unknown) -> AuditEntry:
    return AuditEntry(**base, computed=None, uncertainty=None, difference=None, flagged=False,
                      status="unchecked", method="leave-one-out", sources=(source,),
                      message=(f"{value_id}: the only value that fixes "
                               f"{', '.join(sorted(unknown))}; no other value checks it"))


def reconciliation_audit(rec, threshold: float = THRESHOLD_KJ, mode: str = "reviewed"
                         ) -> list[AuditEntry]:
    """Leave-one-out audit of every value of a reconciliation (a network's own reaction values,
    :mod:`tfa.network.energies`): each against the prediction of the others and the species
    data, with the rule of this module (|difference| > 2σ or > 5 kJ/mol is a disagreement); the
    compounds at stake are the reconciled ones of the value."""
    out = []
    residuals = {r.id: r for r in rec.residuals}
    for value in rec.values:
        unknown = sorted(c for c, n in value.stoichiometry.items() if c in rec.unknowns and n)
        base = dict(id=value.id, equation=" + ".join(unknown), mode=mode,
                    literature=value.delta_g_standard, literature_sigma=value.sigma,
                    literature_source=value.source_key, basis=value.basis,
                    compounds=tuple(unknown), role="check",
                    conditions=value.conditions.describe())
        loo = leave_one_out(residuals[value.id])
        if loo is None:
            base["role"] = "defines"
            out.append(_unchecked(base, value.id, value.source_key, unknown))
            continue
        difference, sigma = loo
        z = difference / sigma
        flagged = abs(z) > THRESHOLD_SIGMA or abs(difference) > threshold
        out.append(AuditEntry(
            **base, computed=value.delta_g_standard + difference, uncertainty=sigma,
            difference=difference, flagged=flagged, status="disagrees" if flagged else "agrees",
            sources=(value.source_key,), z=z, method="leave-one-out",
            message=f"{value.id}: {difference:+.1f} kJ/mol against the other values, {z:+.1f} sigma"))
    return out


def audit_library(library) -> AuditResult:
    """The audit of one :class:`~tfa.thermo.library.ReactionLibrary` (its own review mode)."""
    mode = "with_unreviewed" if library.base.include_unreviewed else "reviewed"
    return AuditResult(_entries(library, mode))


def audit(db: ThermoDatabase | None = None, values: Iterable[ReactionValue] | None = None,
          threshold: float = THRESHOLD_KJ) -> AuditResult:
    """Compare the data with literature reaction values, reviewed-only and with unreviewed
    sources.

    Parameters
    ----------
    db : ThermoDatabase, optional
        The species data (default: the bundled ones); both review modes are derived from it.
    values : iterable of ReactionValue, optional
        Default: the bundled ``reaction_values.csv``.
    threshold : float
        Differences above this (kJ/mol) are disagreements whatever their σ.

    Examples
    --------
    >>> result = audit()
    >>> [e.id for e in result.flagged("with_unreviewed") if e.id == "acetyl_phosphate_hydrolysis"]
    ['acetyl_phosphate_hydrolysis']
    >>> stats = result.statistics("reviewed")
    >>> stats["checks"] >= 40, stats["within_2_sigma_fraction"] >= 0.95
    (True, True)
    """
    from .library import ReactionLibrary

    db = db if db is not None else ThermoDatabase.load()
    chosen: Sequence[ReactionValue] = list(values) if values is not None else list(load_reaction_values())
    result = AuditResult(threshold=threshold)
    for include in (False, True):
        with _quiet(*QUIET_LOGGERS):
            library = ReactionLibrary(db.with_unreviewed(include), chosen)
        result.entries.extend(_entries(library, "with_unreviewed" if include else "reviewed",
                                       threshold))
    return result
