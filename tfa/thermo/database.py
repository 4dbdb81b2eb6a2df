"""The thermodynamics engine: transformed formation energies of compounds and transformed
reaction energies at given conditions, each with a standard uncertainty and its provenance.

For a compound with species data, each species j is carried to T (and P) with constant Cp°
(:mod:`tfa.thermo.temperature`), transformed to the pH, pMg and ionic strength of the conditions
(:mod:`tfa.thermo.legendre`, Alberty 2003), and the species are summed into the reactant
(pseudoisomer group). Carriers without species data enter through their reduction potential
(:mod:`tfa.thermo.potentials`). H+ has transformed energy 0 (fixed by the pH).

Reaction energies:

.. math::

    \\Delta_r G'^\\circ = \\sum_i \\nu_i \\Delta_f G'^\\circ_i, \\qquad
    \\Delta_r G' = \\Delta_r G'^\\circ + RT \\sum_i \\nu_i \\ln a_i

with activities a of solutes in mol/L, of gases as partial pressure in bar, water 1 and H+
never a variable. A compound whose activity is not given enters at 1 (its standard state) and
the result says so. Uncertainty: :mod:`tfa.thermo.uncertainty`.

Species data from sources that are not peer reviewed are left out unless
``include_unreviewed=True``; a compound all of whose species are left out then has no data, and
a reaction that needs it raises :class:`~tfa.errors.MissingDataError` saying why.

References
----------
[1] R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley, 2003.
[2] R. K. Thauer, K. Jungermann, K. Decker, Bacteriol. Rev. 41 (1977) 100-180.

Examples
--------
Methanogenesis from the gases at 25 °C, pH 7 (Thauer et al. 1977: −131 kJ/mol, from memory):

>>> from tfa.conditions import Conditions
>>> db = ThermoDatabase.load()
>>> r = db.reaction_energy("4 H2(g) + CO2(g) <=> CH4(g) + 2 H2O", Conditions.from_celsius(25, ph=7))
>>> round(r.standard, 1)
-130.7
"""

from __future__ import annotations

import logging
import math
from functools import lru_cache
from typing import Any, Iterable, Mapping, Sequence

import numpy as np
import pandas as pd

from ..conditions import Conditions
from ..constants import FARADAY, T_REF
from ..equation import ParsedEquation, format_equation, parse_equation
from ..errors import InputError, MissingDataError
from .balance import BalanceReport, check_balance, parse_formula, require_balanced
from .energy_records import FormationEnergy, ReactionEnergyResult, species_status
from .compounds import (FIXED_ACTIVITY_KINDS, Compound, CompoundRegistry, carrier_explanation,
                        compounds_from_couples, compounds_from_rows)
from .legendre import reactant_energy, species_fractions, transformed_species_energy
from .potentials import CarrierCouple, load_potentials
from .species import (Source, Species, load_compound_rows, load_sources, load_species,
                      load_value_compound_rows)
from .status import weakest
from .temperature import IntegrationFlag, standard_gibbs
from .uncertainty import (base_sigma, is_conventional_zero, reaction_sigma, reactant_sigma,
                          species_sigma)

logger = logging.getLogger(__name__)

#: Id of the magnesium-ion species whose ΔfG° enters the pMg transform.
MAGNESIUM_SPECIES = "Mg+2"


def _carbon_atoms(formula: str) -> int:
    try:
        return parse_formula(formula)[0].get("C", 0)
    except InputError:
        return 0


class ThermoDatabase:
    """Species data, carriers and compounds, and the energies computed from them.

    Build with :meth:`load` (bundled tables) and extend with :meth:`with_extra_species`.
    """

    def __init__(
        self,
        species: Sequence[Species],
        compound_rows: Sequence[Mapping[str, Any]],
        couples: Sequence[CarrierCouple] = (),
        sources: Mapping[str, Source] | None = None,
        include_unreviewed: bool = False,
    ):
        self.include_unreviewed = include_unreviewed
        self.sources: dict[str, Source] = dict(sources or {})
        self._all_species = tuple(species)
        self._compound_rows = tuple(dict(r) for r in compound_rows)
        self._couples = tuple(couples)
        self.dropped: dict[str, str] = {}
        used: dict[str, Species] = {}
        for sp in self._all_species:
            if not include_unreviewed and not self.is_reviewed(sp.source):
                self.dropped[sp.id] = f"source {sp.source} is not peer reviewed"
            else:
                used[sp.id] = sp
        self.species_by_id: dict[str, Species] = used
        self._all_species_by_id = {sp.id: sp for sp in self._all_species}
        compounds = compounds_from_rows(self._compound_rows, used, self.dropped)
        compounds += compounds_from_couples(self._couples)
        self.registry = CompoundRegistry(compounds)
        self._formation_cache: dict[tuple[str, Conditions], FormationEnergy] = {}

    # ------------------------------------------------------------------ construction
    @classmethod
    def load(cls, include_unreviewed: bool = False) -> "ThermoDatabase":
        """The bundled database (cached per value of ``include_unreviewed``)."""
        return _load_cached(bool(include_unreviewed))

    def with_extra_species(
        self,
        species_records: Iterable[Species],
        compound_rows: Iterable[Mapping[str, Any]] = (),
    ) -> "ThermoDatabase":
        """A new database that also knows compounds whose species were made elsewhere
        (reconciled or estimated species, which carry their own ``sigma_G``).

        A compound row whose id already exists replaces the old row; species ids must be new
        or replace a species of the same id.
        """
        extra = list(species_records)
        extra_ids = {s.id for s in extra}
        species = [s for s in self._all_species if s.id not in extra_ids] + extra
        rows = {str(r["id"]).strip(): dict(r) for r in self._compound_rows}
        for row in compound_rows:
            row = dict(row)
            if isinstance(row.get("species"), (list, tuple)):
                row["species"] = ";".join(row["species"])
            if isinstance(row.get("synonyms"), (list, tuple)):
                row["synonyms"] = ";".join(row["synonyms"])
            rows[str(row["id"]).strip()] = row
        return ThermoDatabase(species, list(rows.values()), self._couples, self.sources,
                              self.include_unreviewed)

    def with_unreviewed(self, include_unreviewed: bool) -> "ThermoDatabase":
        """The same data with unreviewed sources included or left out."""
        if include_unreviewed == self.include_unreviewed:
            return self
        return ThermoDatabase(self._all_species, self._compound_rows, self._couples, self.sources,
                              include_unreviewed)

    # ------------------------------------------------------------------ lookups
    def is_reviewed(self, key: str | None) -> bool:
        """True unless ``key`` is a source marked not peer reviewed (unknown keys count as
        reviewed here and are flagged where used)."""
        if not key:
            return True
        source = self.sources.get(key)
        return True if source is None else source.peer_reviewed

    def compound(self, name: str) -> Compound:
        """The compound called ``name`` (id, name or synonym, case-insensitive)."""
        return self.registry.get(name)

    def species_table(self) -> pd.DataFrame:
        """Every species of the database with its compound and whether it is used."""
        rows = []
        for sp in self._all_species:
            src = self.sources.get(sp.source)
            rows.append({
                "species": sp.id, "reactant": sp.reactant, "formula": sp.formula, "state": sp.state,
                "charge": sp.charge, "n_h": sp.n_h, "n_mg": sp.n_mg, "G_kJ": sp.G, "H_kJ": sp.H,
                "S_J_K": sp.S, "Cp_J_K": sp.Cp, "V_cm3": sp.V, "source": sp.source,
                "source2": sp.source2, "origin": sp.origin, "sigma_G": sp.sigma_G,
                "peer_reviewed": None if src is None else src.peer_reviewed,
                "used": sp.id in self.species_by_id,
            })
        return pd.DataFrame(rows)

    # ------------------------------------------------------------------ compounds
    def formation_energy(self, name: str, conditions: Conditions) -> FormationEnergy:
        """ΔfG'° of a compound at ``conditions``, with uncertainty and provenance.

        Raises
        ------
        UnknownCompoundError
            Unknown name (with close matches).
        MissingDataError
            The compound has no usable data (e.g. only unreviewed species).

        Examples
        --------
        Water at pH 7, 25 °C, I = 0: Alberty (2003) gives −157.28 kJ/mol; OBIGT's water is
        0.01 kJ/mol higher (−237.18 against −237.19 kJ/mol):

        >>> db = ThermoDatabase.load()
        >>> round(db.formation_energy("water", Conditions()).value, 2)
        -157.27
        """
        compound = self.compound(name)
        key = (compound.id, conditions)
        cached = self._formation_cache.get(key)
        if cached is None:
            cached = self._formation_energy(compound, conditions)
            self._formation_cache[key] = cached
        return cached

    def _formation_energy(self, compound: Compound, c: Conditions) -> FormationEnergy:
        if compound.kind == "proton":
            return FormationEnergy(compound.id, 0.0, 0.0,
                                   f"{compound.id}: transformed energy 0 (fixed by pH {c.ph:g})")
        if compound.couple is not None:
            return self._carrier_energy(compound, c)
        members = list(compound.species)
        if not members:
            if not compound.dropped_species:
                raise MissingDataError(
                    f"compound '{compound.id}' has no species data: its energy comes from "
                    "reaction-level values only (tfa.thermo.library.ReactionLibrary, which tfa dg "
                    "uses, or a network's reaction_values.tsv)")
            why = ", ".join(f"{s} ({self.dropped.get(s, 'not available')})"
                            for s in compound.dropped_species)
            raise MissingDataError(
                f"compound '{compound.id}' has no usable species data: {why}. Pass "
                "include_unreviewed=True (command line: --include-unreviewed) to use unreviewed "
                "sources, or give a reaction-level value")
        flags: list[str] = []
        with_mg = [s for s in members if s.n_mg]
        if c.pmg is None and with_mg and len(with_mg) < len(members):
            members = [s for s in members if not s.n_mg]
        use_mg_transform = c.pmg is not None and any(s.n_mg for s in members)
        g_mg = None
        if use_mg_transform:
            mg = self._all_species_by_id.get(MAGNESIUM_SPECIES)
            if mg is None:
                raise MissingDataError(f"pMg given but the species table has no {MAGNESIUM_SPECIES}")
            g_mg = float(standard_gibbs([mg], c.temperature, c.pressure)[0][0])
        g, int_flags = standard_gibbs(members, c.temperature, c.pressure)
        charge = np.array([s.charge for s in members], dtype=float)
        n_h = np.array([s.n_h for s in members], dtype=float)
        n_mg = np.array([s.n_mg if use_mg_transform else 0 for s in members], dtype=float)
        transformed = transformed_species_energy(g, charge, n_h, c.temperature, c.ph,
                                                 c.ionic_strength, n_mg, c.pmg, g_mg)
        value = reactant_energy(transformed, c.temperature)
        fractions = species_fractions(transformed, c.temperature)
        sigmas = []
        sources: list[str] = []
        statuses: list[str] = []
        moved = abs(c.temperature - T_REF) > 1e-9
        for sp, flag_bits in zip(members, int_flags):
            flag = IntegrationFlag(int(flag_bits))
            reviewed = self.is_reviewed(sp.source)
            statuses.append(species_status(sp, reviewed))
            if "re-anchored" in sp.flag:
                flags.append(f"{compound.id}: species data re-anchored by {sp.shift or 0.0:+.2f} "
                             f"kJ/mol to measured values ({sp.anchor}; scripts/make_species_table.py)")
            if is_conventional_zero(sp):
                sigmas.append(0.0)
            else:
                sigmas.append(species_sigma(
                    base_sigma(sp.state, _carbon_atoms(sp.formula), reviewed, sp.sigma_G),
                    c.temperature, constant_cp=not (flag & IntegrationFlag.NO_CP)))
            for key in (sp.source, sp.source2):
                if key and key not in sources:
                    sources.append(key)
            if not reviewed:
                flags.append(f"species {sp.id} from unreviewed source {sp.source}")
            if sp.source and sp.source not in self.sources:
                flags.append(f"species {sp.id}: source key {sp.source} not in the sources table")
            if sp.origin != "data":
                flags.append(f"species {sp.id} is {sp.origin} (sigma {sp.sigma_G} kJ/mol)")
            notes = flag.describe()
            if not moved:
                notes = [n for n in notes if not n.startswith(("no Cp", "no S"))]
            flags.extend(f"species {sp.id}: {n}" for n in notes)
        if use_mg_transform:
            sources.append(self._all_species_by_id[MAGNESIUM_SPECIES].source)
        sigma = reactant_sigma(fractions, sigmas)
        shown = sorted(zip(fractions, members), key=lambda t: -t[0])
        parts = ", ".join(f"{sp.id} {100 * r:.3g}%" for r, sp in shown if r >= 1e-4)
        provenance = (f"{compound.id}: ΔfG'° = {value:.2f} ± {sigma:.2f} kJ/mol from "
                      f"{len(members)} species [{parts}] ({', '.join(sources)})")
        if compound.dropped_species:
            provenance += f"; left out (unreviewed): {', '.join(compound.dropped_species)}"
        return FormationEnergy(compound.id, value, sigma, provenance, tuple(sources),
                               tuple(dict.fromkeys(flags)), tuple(s.id for s in members),
                               tuple(float(r) for r in fractions), weakest(statuses))

    def _carrier_energy(self, compound: Compound, c: Conditions) -> FormationEnergy:
        couple = compound.couple
        flags = []
        held = couple.temperature_flag(c.temperature)
        if held:
            flags.append(held)
        if c.ionic_strength > 0:
            flags.append(f"E'° of {couple.name} has no ionic-strength correction")
        status = couple.status
        if compound.role == "oxidised":
            return FormationEnergy(
                compound.id, 0.0, 0.0,
                f"{compound.id}: reference value 0 for the oxidised carrier (cancels, the pair "
                f"{couple.oxidised}/{couple.reduced} is conserved)", (couple.source,), tuple(flags),
                status=status)
        e = couple.potential(c.ph, c.temperature)
        value = couple.reduced_minus_oxidised(c.ph, c.temperature)
        sigma = couple.energy_uncertainty(c.temperature)
        text = (f"{compound.id}: −nFE'° = {value:.2f} ± {sigma:.2f} kJ/mol relative to "
                f"{couple.oxidised}, E'° = {1000 * e:.0f} ± {1000 * couple.potential_sigma(c.temperature):.0f}"
                f" mV at pH {c.ph:g} (n = {couple.n_electrons}, {couple.n_protons} H+; "
                f"{couple.source}; {status})")
        return FormationEnergy(compound.id, value, sigma, text, (couple.source,), tuple(flags),
                               status=status)

    def speciation(self, name: str, conditions: Conditions) -> dict[str, float]:
        """Equilibrium fraction of each species of a compound at ``conditions``."""
        fe = self.formation_energy(name, conditions)
        return dict(zip(fe.species, fe.fractions))

    # ------------------------------------------------------------------ reactions
    def resolve(self, equation_or_stoichiometry: str | ParsedEquation | Mapping[str, float],
                where: str = "") -> tuple[dict[str, float], str]:
        """Net stoichiometry over compound ids, and the equation text written with ids."""
        if isinstance(equation_or_stoichiometry, str):
            parsed = parse_equation(equation_or_stoichiometry, where=where)
            named = parsed.stoichiometry()
            arrow = parsed.arrow
        elif isinstance(equation_or_stoichiometry, ParsedEquation):
            named = equation_or_stoichiometry.stoichiometry()
            arrow = equation_or_stoichiometry.arrow
        else:
            named = {str(k): float(v) for k, v in equation_or_stoichiometry.items()}
            arrow = "<=>"
        net: dict[str, float] = {}
        for name, coefficient in named.items():
            try:
                compound = self.compound(name)
            except InputError:
                raise self.registry.unknown(name, where) from None
            net[compound.id] = net.get(compound.id, 0.0) + coefficient
        net = {k: v for k, v in net.items() if abs(v) > 1e-12}
        return net, format_equation(net, "<=>" if arrow == "=" else arrow)

    def check_balance(self, stoichiometry: str | Mapping[str, float]) -> BalanceReport:
        """Element and charge residuals of a reaction given by equation or stoichiometry."""
        net, _ = self.resolve(stoichiometry)
        return check_balance(net, {cid: self.compound(cid).composition for cid in net})

    def reaction_energy(
        self,
        equation_or_stoichiometry: str | ParsedEquation | Mapping[str, float],
        conditions: Conditions,
        activities: Mapping[str, float] | None = None,
        require_balance: bool = True,
    ) -> ReactionEnergyResult:
        """ΔrG'° and ΔrG' of a reaction, with uncertainty, balance and provenance.

        Parameters
        ----------
        equation_or_stoichiometry : str, ParsedEquation or mapping
            E.g. ``"H2 + CO2tot <=> formate + H2O"`` or ``{"H2": -1, ...}`` (names or ids).
        conditions : Conditions
        activities : mapping, optional
            Compound name -> activity: mol/L for solutes, bar for gases. Water (1) and H+
            (fixed by pH) may not be given. Not given: 1, and the result flags it.
        require_balance : bool
            Raise :class:`~tfa.errors.UnbalancedReactionError` when the reaction does not
            balance (default). With ``False`` the energies are still computed and
            ``balance.ok`` is False.

        Examples
        --------
        H2(g) + CO2(g) ⇌ formate at pH 7, 25 °C: +3.4 kJ/mol (Thauer et al. 1977, from memory):

        >>> db = ThermoDatabase.load()
        >>> r = db.reaction_energy("H2(g) + CO2(g) <=> formate", Conditions())
        >>> round(r.standard, 1), r.balance.message
        (3.5, 'balanced (1 H+ released to the buffer)')
        """
        net, text = self.resolve(equation_or_stoichiometry)
        if not net:
            raise InputError("the reaction has no net change; nothing to compute")
        balance = check_balance(net, {cid: self.compound(cid).composition for cid in net})
        if require_balance:
            require_balanced(balance, text)
        activity_by_id = self._activities(net, activities or {})
        energies = {cid: self.formation_energy(cid, conditions) for cid in net}
        standard = float(sum(net[cid] * energies[cid].value for cid in net))
        actual = standard
        flags: list[str] = []
        defaulted = []
        used_activities: dict[str, float] = {}
        for cid, nu in net.items():
            compound = self.compound(cid)
            if compound.kind in FIXED_ACTIVITY_KINDS:
                continue
            a = activity_by_id.get(cid)
            if a is None:
                defaulted.append(cid)
                a = 1.0
            used_activities[cid] = a
            actual += nu * conditions.RT * math.log(a)
        if defaulted:
            flags.append("activity 1 (standard state) used for " + ", ".join(defaulted))
        sigma = reaction_sigma([net[c] for c in net], [energies[c].uncertainty for c in net])
        sources: list[str] = []
        for fe in energies.values():
            for key in fe.sources:
                if key not in sources:
                    sources.append(key)
            flags.extend(fe.flags)
        flags.extend(self.magnesium_flags(net, conditions))
        couples = {self.compound(cid).couple for cid in net} - {None}
        flags.extend(carrier_explanation(c) for c in sorted(couples, key=lambda c: c.id))
        provenance = tuple(energies[cid].provenance for cid in net)
        status = weakest(fe.status for cid, fe in energies.items()
                         if self.compound(cid).kind not in FIXED_ACTIVITY_KINDS)
        return ReactionEnergyResult(text, net, standard, actual, sigma, balance, tuple(sources),
                                    provenance, tuple(dict.fromkeys(flags)), used_activities,
                                    conditions, energies, status)

    def magnesium_flags(self, net: Mapping[str, float], conditions: Conditions) -> list[str]:
        """Warnings when a pMg is given but reactants have no Mg2+-binding species data.

        A charged reactant (anions bind Mg2+) whose species carry no Mg is taken as not binding
        Mg2+ at all; the flag names them, and says so when no reactant of the reaction has Mg
        species (the pMg then changes nothing). Also logged as a warning.
        """
        if conditions.pmg is None:
            return []
        lacking, binding = [], []
        for cid in net:
            compound = self.compound(cid)
            if compound.kind in FIXED_ACTIVITY_KINDS or compound.kind in ("gas", "carrier"):
                continue
            if any(sp.n_mg for sp in compound.species):
                binding.append(cid)
            elif compound.charge < 0:
                lacking.append(cid)
        if not lacking:
            return []
        text = (f"pMg {conditions.pmg:g} given, but {', '.join(lacking)} "
                f"{'has' if len(lacking) == 1 else 'have'} no Mg2+-binding species data: their "
                "binding of Mg2+ is neglected")
        if not binding:
            text += "; no reactant of this reaction has Mg species, so the pMg changes nothing"
        logger.warning(text)
        return [text]

    def _activities(self, net: Mapping[str, float], activities: Mapping[str, float]) -> dict[str, float]:
        out: dict[str, float] = {}
        for name, value in activities.items():
            compound = self.compound(name)
            if compound.kind == "proton":
                raise InputError(f"activity of '{name}': H+ is fixed by the pH; set the pH instead")
            if compound.kind == "water":
                raise InputError(f"activity of '{name}': water has activity 1 by convention; "
                                 "remove it from the activities")
            if compound.kind == "solid":
                raise InputError(f"activity of '{name}': a pure solid has activity 1 by "
                                 "convention; remove it from the activities")
            if compound.id not in net:
                raise InputError(f"activity given for '{name}', which is not in the reaction; "
                                 "remove it or check the spelling")
            try:
                a = float(value)
            except (TypeError, ValueError):
                raise InputError(f"activity of '{name}' is '{value}', not a number") from None
            if not (math.isfinite(a) and a > 0):
                raise InputError(f"activity of '{name}' must be a positive number (mol/L or bar), "
                                 f"got {value}")
            out[compound.id] = a
        return out

    def reduction_potential(self, oxidised: str, reduced: str, n_electrons: int,
                            conditions: Conditions) -> float:
        """E'° (V) of the half reaction ox + n e⁻ (+ m H⁺) → red at ``conditions``.

        Equation: E'° = −(ΔfG'°(red) − ΔfG'°(ox))/(nF), electrons on the standard-hydrogen-
        electrode scale (Alberty 2003, eq. 8.2-4).

        Examples
        --------
        2 H+ + 2 e⁻ → H2(g) at pH 7, 25 °C: −414 mV (Thauer et al. 1977):

        >>> db = ThermoDatabase.load()
        >>> round(1000 * db.reduction_potential("H+", "H2(g)", 2, Conditions()))
        -414
        """
        ox, red = self.compound(oxidised), self.compound(reduced)
        n_ox = -1.0 if ox.kind != "proton" else -float(n_electrons)
        net = {ox.id: n_ox, red.id: 1.0}
        report = check_balance(net, {ox.id: ox.composition, red.id: red.composition})
        electrons = report.hydrogen_residual - report.charge_residual
        if report.element_residuals or abs(electrons - n_electrons) > 1e-9:
            raise InputError(f"{ox.id} + {n_electrons} e- -> {red.id} does not balance "
                             f"({report.message}); check the pair and the number of electrons")
        dg = (self.formation_energy(red.id, conditions).value
              - (0.0 if ox.kind == "proton" else self.formation_energy(ox.id, conditions).value))
        return -dg / (n_electrons * FARADAY)


@lru_cache(maxsize=2)
def _load_cached(include_unreviewed: bool) -> ThermoDatabase:
    return ThermoDatabase(load_species(), load_compound_rows() + load_value_compound_rows(),
                          load_potentials(), load_sources(), include_unreviewed)
