"""The reaction library: species data and the reaction-level values of ``tfa/data``, reconciled.

Compounds without (reviewed) species data, such as acetyl-CoA, the THF-bound C1 units, acetyl
phosphate, PEP and the sugar phosphates (``tfa/data/compounds_without_species.csv``, and the
compounds whose only species come from an unreviewed source), take their transformed formation
energies from the literature reaction values of ``tfa/data/reaction_values.csv`` by the
weighted least squares of :mod:`tfa.thermo.reconcile`, the same mechanism a network uses for its
own ``reaction_values.tsv`` (:mod:`tfa.network.energies`). A reconciled compound becomes a
species record, so its Legendre transform and its temperature dependence are computed by the
same code as for species data.

A reaction is then computed as for species data, except that

- the part over reconciled compounds must be fixed by the values (conserved moieties such as
  CoA and THF leave single compounds open; only differences to their free forms are fixed),
  otherwise :class:`~tfa.errors.MissingDataError` says so;
- its σ is √(vᵀCv) from the covariance of the fit plus the temperature term of
  :meth:`~tfa.thermo.reconcile.Reconciliation.temperature_sigma`, in quadrature with the
  species part;
- its status is the weakest of the species' and of the values' it uses
  (:mod:`tfa.thermo.status`), and every open disagreement of the data audit
  (:mod:`tfa.thermo.audit`) that touches one of its compounds is attached.

Magnesium: a value measured at a pMg enters the fit with its compounds that have Mg-binding
species at that pMg, so the reconciled compounds come out Mg-free; their own Mg binding is not
known (none is given for them) and is neglected, which the result flags when a pMg is asked for.
For phosphate monoesters and PEP at pMg >= 3 that neglect is below 0.5 kJ/mol (log K of Mg2+
binding about 2, Alberty 2003, from memory).

Units: kJ/mol, K, mol/L.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003.
[2] R. K. Thauer, K. Jungermann, K. Decker, Bacteriol. Rev. 41 (1977) 100-180.
"""

from __future__ import annotations

import dataclasses
import logging
import math
from functools import lru_cache
from typing import Mapping, Sequence

from ..conditions import Conditions
from ..errors import MissingDataError
from .balance import parse_formula
from .compounds import FIXED_ACTIVITY_KINDS
from .database import ReactionEnergyResult, ThermoDatabase
from .literature import ReactionValue, load_reaction_values
from .literature import LiteratureValue
from .reconcile import Reconciliation, UnknownSpecies, reconcile, reconciled_species
from .status import combined_value_status, weakest

logger = logging.getLogger(__name__)

#: Prefix of the species ids of reconciled library compounds.
RECONCILED_PREFIX = "reconciled:"


def literature_value(db: ThermoDatabase, value: ReactionValue) -> LiteratureValue:
    """A library value with its equation resolved to compound ids of ``db``."""
    net, _ = db.resolve(value.equation, where=f"reaction_values.csv, value {value.id}")
    return LiteratureValue(value.id, net, value.delta_g_standard, value.sigma, value.conditions,
                           value.delta_h_standard, value.source, value.peer_reviewed, value.note,
                           value.basis)


class ReactionLibrary:
    """Species data plus reconciled reaction values, with an audit of both.

    Build with :meth:`load` (the bundled tables, cached) or from a database and values.

    Attributes
    ----------
    base : ThermoDatabase
        The species data.
    database : ThermoDatabase
        ``base`` extended with a species record for every reconciled compound.
    values : tuple of ReactionValue
        The values used (those of unreviewed sources only with ``include_unreviewed``).
    literature : tuple of LiteratureValue
        The same over compound ids.
    reconciliation : Reconciliation or None
        The fit of the compounds without species data.
    """

    def __init__(self, base: ThermoDatabase, values: Sequence[ReactionValue]):
        self.base = base
        self.values = tuple(v for v in values if v.peer_reviewed or base.include_unreviewed)
        self.literature = tuple(literature_value(base, v) for v in self.values)
        unknown: dict[str, UnknownSpecies] = {}
        for lv in self.literature:
            for cid in lv.stoichiometry:
                compound = base.compound(cid)
                if not compound.has_data and compound.kind not in FIXED_ACTIVITY_KINDS:
                    counts, _ = parse_formula(compound.formula, where=f"compound {cid}")
                    unknown[cid] = UnknownSpecies(n_h=float(counts.get("H", 0)),
                                                  charge=float(compound.charge))
        self.reconciliation: Reconciliation | None = None
        self.database = base
        if unknown:
            self.reconciliation = reconcile(self.literature, self._known_energy, unknown)
            records, rows = [], []
            for cid in self.reconciliation.unknowns:
                compound = base.compound(cid)
                counts, _ = parse_formula(compound.formula)
                formula = "".join(f"{e}{n if n != 1 else ''}" for e, n in counts.items())
                record = reconciled_species(self.reconciliation, cid, RECONCILED_PREFIX + cid,
                                            formula)
                if record is None:  # no formula to transform with: stays without data
                    continue
                records.append(record)
                rows.append({"id": cid, "name": compound.name, "synonyms": list(compound.synonyms),
                             "kind": "aqueous", "species": [record.id], "formula": compound.formula,
                             "charge": compound.charge})
            self.database = base.with_extra_species(records, rows)

    @classmethod
    def load(cls, include_unreviewed: bool = False) -> "ReactionLibrary":
        """The bundled library (cached per value of ``include_unreviewed``)."""
        return _load_cached(bool(include_unreviewed))

    def _known_energy(self, compound: str, conditions: Conditions) -> tuple[float, float]:
        fe = self.base.formation_energy(compound, conditions)
        return fe.value, fe.uncertainty

    @property
    def reconciled(self) -> tuple[str, ...]:
        """Ids of the compounds whose energies come from the values."""
        return self.reconciliation.unknowns if self.reconciliation is not None else ()

    def value(self, value_id: str) -> ReactionValue:
        """The library value with this id."""
        for v in self.values:
            if v.id == value_id:
                return v
        raise KeyError(value_id)

    def reconciled_status(self, stoichiometry: Mapping[str, float]) -> tuple[str, list[str]]:
        """(status, value ids) of the reconciled part of a reaction (:mod:`tfa.thermo.status`)."""
        rec = self.reconciliation
        ids = rec.value_ids(stoichiometry)
        bases = [self.value(i).basis for i in ids]
        return combined_value_status(bases), ids

    # ------------------------------------------------------------------ reactions
    def reaction_energy(self, equation_or_stoichiometry, conditions: Conditions,
                        activities: Mapping[str, float] | None = None,
                        require_balance: bool = True) -> ReactionEnergyResult:
        """ΔrG'° and ΔrG' of a reaction over species data and reconciled compounds.

        Same arguments and result as :meth:`tfa.thermo.database.ThermoDatabase.reaction_energy`,
        with ``status`` and ``audit_flags`` filled.

        Raises
        ------
        MissingDataError
            A compound has neither species data nor values, or the values fix only
            combinations of its conserved moiety that this reaction does not form.

        Examples
        --------
        Acetyl-CoA hydrolysis at pH 7, 25 °C, I = 0.25 M: Nelson & Cox (2008) give −31.4,
        Thauer et al. (1977) −35.7 kJ/mol (both from memory); the library reconciles both with
        the other values that involve acetyl-CoA:

        >>> lib = ReactionLibrary.load()
        >>> r = lib.reaction_energy("acetyl-CoA + H2O <=> acetate + CoA",
        ...                         Conditions.from_celsius(25, ph=7, ionic_strength=0.25))
        >>> -36.0 < r.standard < -31.0, r.status
        (True, 'recalled value (from memory)')
        """
        net, _ = self.base.resolve(equation_or_stoichiometry)
        rec = self.reconciliation
        part = {c: n for c, n in net.items() if c in self.reconciled}
        missing = [c for c in net if not self.database.compound(c).has_data]
        if missing:
            raise MissingDataError(
                f"{', '.join(missing)}: no species data and no library value fixes "
                f"{'it' if len(missing) == 1 else 'them'}; give a reaction-level value (a "
                "network's reaction_values.tsv with tfa dg --network)")
        if part and not rec.identified(part):
            raise MissingDataError(
                f"the library's reaction values fix only differences within the conserved "
                f"moiety of {', '.join(sorted(part))} (CoA, THF: to their free forms); write the "
                "reaction so that the moiety balances (e.g. acetyl-CoA with CoA)")
        result = self.database.reaction_energy(net, conditions, activities, require_balance)
        if not part:
            return dataclasses.replace(result, audit_flags=self.audit_flags(net))
        known_variance = sum((n * result.compounds[c].uncertainty) ** 2
                             for c, n in net.items() if c not in part)
        g_ref, s_ref = rec.reaction_energy(part)
        s_t = rec.temperature_sigma(part, conditions.temperature)
        sigma = math.sqrt(known_variance + s_ref ** 2 + s_t ** 2)
        value_status, ids = self.reconciled_status(part)
        species_statuses = [fe.status for c, fe in result.compounds.items()
                            if c not in part and self.base.compound(c).kind not in FIXED_ACTIVITY_KINDS]
        status = weakest(species_statuses + [value_status])
        line = (f"{', '.join(sorted(part))}: reconciled from library value(s) {', '.join(ids)} "
                f"(±{s_ref:.2f} kJ/mol at 25 degC" + (f", ±{s_t:.2f} for temperature" if s_t else "")
                + f"; {value_status})")
        provenance = tuple(p for c, p in zip(net, result.provenance) if c not in part) + (line,)
        flags = [f for f in result.flags if not f.startswith(f"species {RECONCILED_PREFIX}")]
        if conditions.pmg is not None:
            flags.append(f"Mg2+ binding of {', '.join(sorted(part))} not known: neglected")
        sources = tuple(dict.fromkeys(
            [k for c in net if c not in part for k in result.compounds[c].sources]
            + rec.source_keys(part)))
        return dataclasses.replace(result, uncertainty=sigma, provenance=provenance,
                                   flags=tuple(dict.fromkeys(flags)), sources=sources,
                                   status=status, audit_flags=self.audit_flags(net))

    # ------------------------------------------------------------------ audit
    def audit(self):
        """The data audit of this library (:func:`tfa.thermo.audit.audit_library`, cached)."""
        if getattr(self, "_audit", None) is None:
            from .audit import audit_library

            self._audit = audit_library(self)
        return self._audit

    def audit_flags(self, compounds) -> tuple[str, ...]:
        """Open audit disagreements that touch any of ``compounds`` (ids)."""
        return self.audit().flags_for(compounds)


@lru_cache(maxsize=2)
def _load_cached(include_unreviewed: bool) -> ReactionLibrary:
    return ReactionLibrary(ThermoDatabase.load(include_unreviewed), load_reaction_values())
