"""The setting a network is asked to live in: conditions, fed compounds, concentration bounds,
the demand it must meet and the outlets it may use, read from a TOML file.

File format (units: degC at the interface, mol/L for solutes, bar for gases)::

    [environment]
    name = "Kestrel Ridge vent field"
    description = "..."
    [conditions]
    temperature_C = 70.0
    pH = 7.0
    ionic_strength_M = 0.25
    pressure_bar = 250.0          # optional
    pMg = 3.0                     # optional
    [feed]                        # fixed activities; keys are network ids or thermo keys
    H2 = 1.0e-3
    [bounds]                      # default for every other compound, then per compound
    default = [1.0e-6, 1.0e-2]
    atp = [1.0e-4, 1.0e-2]
    [demand]                      # required: what the network must make
    reaction = "demand_precursors"
    flux = 0.01                   # > 0, in the network's flux unit
    [outlets]
    allowed = ["ac", "for"]
    [compartments.out]            # optional: see tfa.network.compartments; also
    pH = 5.5                      # [ion_stoichiometry] (reaction id = ions per turnover)

Without a demand the zero-flux state meets every question, so a file must name one; to ask
explicitly whether the network can run at all with nothing required, write ``[demand]`` with
``none = true`` instead (the answer is then always yes, and reports say so). Every key is
checked: an unknown section or key is an error with the closest allowed name, and every compound
key of ``[feed]``, ``[bounds]`` and ``[outlets]`` and the demand reaction must name something in
the network (:meth:`Environment.check_network`). Numbers pass :func:`tfa.util.numbers.read_number`:
activities between 1e-30 and 1000 (mol/L; gases bar), the demand flux up to 1e6.

Precedence of a compound's concentration bounds: fed (fixed) > ``[bounds]`` entry of the
environment > ``conc_min``/``conc_max`` of the compounds table > ``[bounds] default``. Water and
H+ have no concentration variable (activity 1; H+ fixed by pH).
"""

from __future__ import annotations

import difflib
import logging
import sys
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import cobra

from ..conditions import Conditions
from ..errors import ConditionsError, InputError, NetworkFileError
from ..util.files import read_input_text

from .checks import is_boundary_reaction
from .cofactors import CofactorStates
from .environment_fields import _demand, _pair, _positive, _real, _unknown
from .fluid import fluid_activities, ionic_strength_warning, read_fluid
from .mixing_line import MixingLine, read_mixing
from .locations import located, toml_line, with_toml_line
from .roles import without_activity

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

logger = logging.getLogger(__name__)

#: Allowed keys per section of an environment file (None = any key).
SECTIONS: dict[str, tuple[str, ...] | None] = {
    "environment": ("name", "description"),
    "conditions": ("temperature_C", "pH", "ionic_strength_M", "pressure_bar", "pMg"),
    "feed": None,
    "bounds": None,
    "demand": ("reaction", "flux", "none"),
    "outlets": ("allowed",),
    "compartments": None,          # [compartments.ID] pH, ionic_strength_M, pMg, membrane_potential_mV
    "ion_stoichiometry": None,     # reaction id -> ions moved across the membrane per turnover
    "cofactors": None,   # checked by tfa.network.cofactors
    "fluid": None,       # checked by tfa.network.fluid
    "mixing": None,      # checked by tfa.network.mixing_line
    "scenario": None,   # ranges of the assumptions (tfa.network.scenario)
}
REQUIRED_CONDITIONS = ("temperature_C", "pH", "ionic_strength_M")
#: Default concentration bounds, mol/L, when a file gives none (common practice in
#: thermodynamics-based flux analysis: 1 uM to 10 mM; Henry et al. 2007).
DEFAULT_BOUNDS = (1.0e-6, 1.0e-2)


@dataclass(frozen=True)
class Environment:
    """A setting: conditions, feed, concentration bounds, demand and outlets.

    Attributes
    ----------
    name, description : str
        For reports.
    conditions : Conditions
        Temperature (K inside), pH, ionic strength (mol/L), pressure (bar), pMg.
    feed : dict
        Compound key (network id or thermo key) -> fixed activity (mol/L; gases bar).
    default_bounds : tuple
        (lower, upper) concentration, mol/L, for compounds with no other bound.
    bounds : dict
        Compound key -> (lower, upper), mol/L.
    demand_reaction : str or None
        Id of the reaction whose flux expresses the required output.
    demand_flux : float
        Lower bound of that reaction's flux (network flux units).
    outlets : tuple
        Compound keys that may leave the network through their exchange.
    source : str
        The file read, or empty.
    no_demand : bool
        True when the file asks explicitly for no demand (``[demand] none = true``).
    scenario : dict
        Assumption key -> :class:`tfa.network.scenario.Assumption`: the ranges of the setting's
        assumptions that robustness may draw (``[scenario]``).
    network_exchanges : bool
        Keep the flux bounds the network file gives its boundary reactions (every exchange open
        within them; the neutral default of :mod:`tfa.network.default_environment`) instead of
        opening only fed compounds, water, H+ and outlets.
    compartments : dict
        Compartment id -> :class:`~tfa.conditions.Compartment` (pH, ionic strength, pMg,
        membrane potential Δψ = ψ(cell) − ψ(compartment), mV) of every compartment besides the
        cell; the cell is described by ``conditions``.
    ion_stoichiometry : dict
        Reaction id -> ions it moves across the membrane per turnover
        (:func:`tfa.network.compartments.set_ion_stoichiometry`).
    cofactors : CofactorStates or None
        The carrier states of the ``[cofactors]`` section (:mod:`tfa.network.cofactors`): per-form
        bounds, pool totals, ratio bounds, a phosphorylation-potential floor. None: none (the
        loose behaviour, :meth:`with_loose_cofactors`).
    fluid : dict
        Totals of the ``[fluid]`` section (:mod:`tfa.network.fluid`): total name
        (``dissolved_inorganic_carbon``, ``total_sulfide``, ``total_ammonia``) -> mol/L, speciated
        at the conditions into the fixed activities of the compounds they name.
    mixing : MixingLine or None
        The two fluids of ``[mixing]`` (:mod:`tfa.network.mixing_line`), for a mixing-line map.
    """

    name: str
    conditions: Conditions
    feed: dict[str, float] = field(default_factory=dict)
    default_bounds: tuple[float, float] = DEFAULT_BOUNDS
    bounds: dict[str, tuple[float, float]] = field(default_factory=dict)
    demand_reaction: str | None = None
    demand_flux: float = 0.0
    outlets: tuple[str, ...] = ()
    description: str = ""
    source: str = ""
    no_demand: bool = False
    network_exchanges: bool = False
    compartments: dict = field(default_factory=dict)
    ion_stoichiometry: dict = field(default_factory=dict)
    cofactors: CofactorStates | None = None
    fluid: dict[str, float] = field(default_factory=dict)
    mixing: MixingLine | None = None
    scenario: dict = field(default_factory=dict)

    # ---------------------------------------------------------------- reading

    @classmethod
    def from_toml(cls, path: str | Path) -> "Environment":
        """Read and validate an environment file.

        Raises
        ------
        NetworkFileError
            Unreadable TOML (with line and column), unknown section or key, missing key, a value
            of the wrong type, a concentration <= 0, lower bound above upper bound.
        ConditionsError
            Conditions outside what the models support (named with the file).
        """
        path = Path(path)
        if not path.exists():
            raise NetworkFileError(f"{path}: no such environment file; give the path of a .toml file")
        try:
            data = tomllib.loads(read_input_text(path, "environment file"))
        except tomllib.TOMLDecodeError as exc:
            raise NetworkFileError(f"{path}: not valid TOML ({exc}); fix the syntax there") from None
        except InputError as exc:
            raise NetworkFileError(str(exc)) from None
        try:
            return cls.from_dict(data, source=str(path))
        except (NetworkFileError, ConditionsError) as exc:   # name the line of the key too
            raise type(exc)(with_toml_line(str(exc), path)) from exc

    @classmethod
    def from_dict(cls, data: dict[str, Any], source: str = "") -> "Environment":
        """Build from the parsed TOML mapping (see :meth:`from_toml`)."""
        where = source or "environment"
        for section, value in data.items():
            if section not in SECTIONS:
                raise NetworkFileError(_unknown(where, f"section [{section}]", section, list(SECTIONS)))
            if not isinstance(value, dict):
                raise NetworkFileError(f"{where}: '{section}' must be a section [{section}], not a value")
            allowed = SECTIONS[section]
            if allowed is not None:
                for key in value:
                    if key not in allowed:
                        raise NetworkFileError(_unknown(where, f"key '{key}' in [{section}]", key, list(allowed)))
        env = data.get("environment", {})
        name = env.get("name", Path(source).stem if source else "environment")
        if not isinstance(name, str) or not name.strip():
            raise NetworkFileError(f"{where} [environment] name: give a non-empty text")
        description = env.get("description", "")
        if not isinstance(description, str):
            raise NetworkFileError(f"{where} [environment] description: give a text")

        cond = data.get("conditions")
        if cond is None:
            raise NetworkFileError(f"{where}: no [conditions] section; give temperature_C, pH and ionic_strength_M")
        for key in REQUIRED_CONDITIONS:
            if key not in cond:
                raise NetworkFileError(f"{where} [conditions]: '{key}' is missing; add e.g. "
                                       f"{key} = {dict(temperature_C=25.0, pH=7.0, ionic_strength_M=0.1)[key]}")
        values = {key: _real(where, "conditions", key, cond[key]) for key in cond}
        try:
            conditions = Conditions.from_celsius(values["temperature_C"], ph=values["pH"],
                                                 ionic_strength=values["ionic_strength_M"],
                                                 pressure=values.get("pressure_bar"), pmg=values.get("pMg"))
        except ConditionsError as exc:
            raise ConditionsError(f"{where} [conditions]: {exc}") from exc

        feed = {}
        for key, value in data.get("feed", {}).items():
            feed[key] = _positive(where, "feed", key, value)

        bounds_section = dict(data.get("bounds", {}))
        default_bounds = DEFAULT_BOUNDS
        if "default" in bounds_section:
            default_bounds = _pair(where, "default", bounds_section.pop("default"))
        bounds = {key: _pair(where, key, value) for key, value in bounds_section.items()}
        for key in bounds:
            if key in feed:
                raise NetworkFileError(f"{where} [bounds] {key}: '{key}' is also fed (fixed) in [feed]; "
                                       "give it in one section only")

        demand_reaction, demand_flux, no_demand = _demand(where, data.get("demand"))
        fluid = read_fluid(data.get("fluid", {}), where, _positive)
        message = ionic_strength_warning(fluid, conditions)
        if message:
            from .fluid import FluidWarning
            import warnings
            warnings.warn(f"{where} [conditions]: {message}", FluidWarning, stacklevel=2)
        mixing = read_mixing(data["mixing"], where, _real, _positive) if "mixing" in data else None
        cofactors = None
        if "cofactors" in data:
            cofactors = CofactorStates.from_dict(data["cofactors"], where, _pair, _positive, _real)
            for key in cofactors.bounds:
                if key in feed:
                    raise NetworkFileError(f"{where} [cofactors.bounds] {key}: '{key}' is also fed "
                                           "(fixed) in [feed]; give it in one section only")

        outlets = data.get("outlets", {}).get("allowed", [])
        if not isinstance(outlets, list) or not all(isinstance(x, str) and x for x in outlets):
            raise NetworkFileError(f"{where} [outlets] allowed: give a list of compound ids, e.g. [\"ac\", \"for\"]")
        overlap = sorted(set(outlets) & set(feed))
        if overlap:
            logger.info("%s: %s both fed and allowed as outlets", where, ", ".join(overlap))
        from .compartments import read_compartments
        compartments, ions = read_compartments(where, data, _real)
        from .scenario import parse_scenario

        scenario = parse_scenario(data.get("scenario"), where)
        missing = [k.split(".", 1)[1] for k in scenario if k.split(".", 1)[0] in ("feed", "pH_feed")
                   and k.split(".", 1)[1] not in feed]
        if missing:
            raise NetworkFileError(f"{where} [scenario]: {', '.join(missing)} is not fed in [feed]; a "
                                   "scenario changes the activity of a fed compound only")
        return cls(name=name.strip(), conditions=conditions, feed=feed, default_bounds=default_bounds,
                   bounds=bounds, demand_reaction=demand_reaction, demand_flux=demand_flux,
                   outlets=tuple(outlets), description=description, source=source,
                   no_demand=no_demand, compartments=compartments, ion_stoichiometry=ions,
                   cofactors=cofactors, fluid=fluid, mixing=mixing, scenario=scenario)

    # ---------------------------------------------------------------- copies for scans

    @property
    def demand(self) -> tuple[str | None, float]:
        """(demand reaction id, minimum flux)."""
        return self.demand_reaction, self.demand_flux

    def with_conditions(self, **changes: float | None) -> "Environment":
        """A copy with conditions changed: ``celsius``, ``temperature`` (K), ``ph``,
        ``ionic_strength``, ``pressure``, ``pmg``.

        >>> env = Environment("demo", Conditions.from_celsius(25))
        >>> round(env.with_conditions(celsius=70).conditions.temperature, 2)
        343.15
        """
        allowed = {"celsius", "temperature", "ph", "ionic_strength", "pressure", "pmg"}
        unknown = sorted(set(changes) - allowed)
        if unknown:
            raise ConditionsError(f"cannot change {', '.join(unknown)}; use {', '.join(sorted(allowed))}")
        return replace(self, conditions=self.conditions.with_(**changes))

    def with_feed(self, changes: dict[str, float] | None = None, **more: float) -> "Environment":
        """A copy with some fed activities changed or added (mol/L; gases bar).

        >>> env = Environment("demo", Conditions(), feed={"H2": 1e-3})
        >>> env.with_feed({"H2": 1e-5}).feed
        {'H2': 1e-05}
        """
        feed = dict(self.feed)
        for key, value in {**(changes or {}), **more}.items():
            feed[key] = _positive("with_feed", "feed", key, value)
        return replace(self, feed=feed)

    def with_loose_cofactors(self) -> "Environment":
        """A copy without the ``[cofactors]`` section: every carrier form only within ``[bounds]``
        (no pool total, ratio or phosphorylation floor), the earlier behaviour."""
        return replace(self, cofactors=None)

    def without_feed(self, *keys: str) -> "Environment":
        """A copy in which the given compounds are not fed (e.g. ``without_feed("H2")``)."""
        missing = [k for k in keys if k not in self.feed]
        if missing:
            raise NetworkFileError(f"{', '.join(missing)} not fed in {self.name}; fed: {', '.join(self.feed)}")
        return replace(self, feed={k: v for k, v in self.feed.items() if k not in keys})

    # ---------------------------------------------------------------- resolution against a network

    def resolve(self, model: cobra.Model, key: str) -> cobra.Metabolite:
        """The metabolite a key names: its id, its ``thermo_key``, or (case-insensitive) id, thermo
        key, name or synonym.

        Raises
        ------
        NetworkFileError
            When nothing matches (with close matches) or several compounds match.
        """
        if key in model.metabolites:
            return model.metabolites.get_by_id(key)
        exact = [m for m in model.metabolites if (m.notes or {}).get("thermo_key") == key]
        if len(exact) == 1:
            return exact[0]
        lowered = key.lower()
        loose = []
        for met in model.metabolites:
            names = {met.id.lower(), (met.name or "").lower(), (met.notes or {}).get("thermo_key", "").lower()}
            names |= {s.strip().lower() for s in (met.notes or {}).get("synonyms", "").split(";") if s.strip()}
            if lowered in names:
                loose.append(met)
        candidates = exact or loose
        if len(candidates) == 1:
            return candidates[0]
        where = self.source or self.name
        if len(candidates) > 1:
            raise NetworkFileError(
                f"{where}: '{key}' matches several compounds of network {model.id} "
                f"({', '.join(m.id for m in candidates)}); use the compound id"
            )
        known = [m.id for m in model.metabolites] + [m.notes.get("thermo_key", "") for m in model.metabolites
                                                     if (m.notes or {}).get("thermo_key")]
        close = difflib.get_close_matches(key, known, n=3, cutoff=0.5)
        hint = f"did you mean {', '.join(repr(c) for c in close)}?" if close else "use a compound id of the network"
        raise NetworkFileError(f"{where}: '{key}' is not a compound of network {model.id}; {hint}")

    def check_network(self, model: cobra.Model) -> None:
        """Refuse keys that name nothing in ``model`` (the network as read, before any mode's
        rewrites): every ``[feed]``, ``[bounds]`` and ``[outlets]`` compound and the demand
        reaction, each with the closest names (a typo is never ignored).

        Raises
        ------
        NetworkFileError
        """
        where = self.source or self.name
        cofactor_keys = self.cofactors.keys() if self.cofactors is not None else []
        for section, keys in (("feed", [(None, k) for k in self.feed]),
                              ("bounds", [(None, k) for k in self.bounds]),
                              ("outlets", [(None, k) for k in self.outlets]),
                              ("cofactors", cofactor_keys)):
            for table, key in keys:
                try:
                    self.resolve(model, key)
                except NetworkFileError as exc:
                    name = table or section
                    located_message = self._at(name, key, str(exc))
                    if located_message == str(exc):      # no line known: name the section
                        located_message = str(exc).replace(f"{where}: ", f"{where} [{name}]: ", 1)
                    raise NetworkFileError(located_message) from None
        self.feed_metabolites(model)   # a [fluid] total that names nothing, or a compound fed twice
        if self.demand_reaction is not None and self.demand_reaction not in model.reactions:
            close = difflib.get_close_matches(self.demand_reaction, [r.id for r in model.reactions], n=3)
            hint = f"did you mean {', '.join(repr(c) for c in close)}?" if close else "add it to the network"
            raise NetworkFileError(self._at("demand", "reaction", f"{where}: '{self.demand_reaction}' "
                                            f"is not a reaction of network {model.id}; {hint}"))

    def fluid_feed(self, model: cobra.Model) -> dict[str, tuple[str, float]]:
        """Metabolite id -> (thermo key, activity mol/L) of the compounds the ``[fluid]`` totals
        fix, speciated at this environment's conditions (:mod:`tfa.network.fluid`)."""
        if not self.fluid:
            return {}

        def resolve(key: str) -> str | None:
            exact = [m for m in model.metabolites if (m.notes or {}).get("thermo_key") == key]
            return exact[0].id if len(exact) == 1 else None

        try:
            return fluid_activities(self.fluid, self.conditions, resolve)
        except NetworkFileError as exc:
            raise NetworkFileError(f"{self.source or self.name} {exc}") from None

    def feed_metabolites(self, model: cobra.Model) -> dict[str, float]:
        """Metabolite id -> fixed activity for every fed compound (``[feed]`` and the compounds
        the ``[fluid]`` totals fix)."""
        fed: dict[str, float] = {}
        for met_id, (key, value) in self.fluid_feed(model).items():
            fed[met_id] = value
        for key, value in self.feed.items():
            try:
                met = self.resolve(model, key)
            except NetworkFileError as exc:
                raise NetworkFileError(self._at("feed", key, str(exc))) from exc
            if met.id in fed:
                raise NetworkFileError(self._at("feed", key, f"{self.source or self.name}: '{key}' and "
                                                f"another key (or a [fluid] total) both name compound "
                                                f"{met.id}; keep one"))
            fed[met.id] = value
        return fed

    def _at(self, section: str, key: str | None, message: str) -> str:
        """``message`` (which begins with the file) with the line of ``key`` in ``[section]``."""
        prefix = f"{self.source}: "
        line = toml_line(self.source, section, key) if self.source else None
        if line is None or not message.startswith(prefix):
            return message
        return (f"{self.source} line {line} [{section}]" + (f" {key}" if key else "")
                + f": {message[len(prefix):]}")

    def metabolite_bounds(self, model: cobra.Model,
                          no_activity: set[str] | None = None) -> dict[str, tuple[float, float]]:
        """Metabolite id -> (lower, upper) concentration (mol/L; gases bar) for every compound with
        a concentration variable (water and H+, ``no_activity``, are left out; default: found by
        :func:`tfa.network.roles.without_activity`).

        A per-compound ``[bounds]`` entry that names no compound of this network is logged and
        ignored (the same environment serves networks with and without, e.g., ATP).
        """
        fed = self.feed_metabolites(model)
        if no_activity is None:
            no_activity = without_activity(model)
        own: dict[str, tuple[float, float]] = {}
        given = dict(self.bounds)
        if self.cofactors is not None:
            given.update(self.cofactors.bounds)
        for key, pair in given.items():
            try:
                own[self.resolve(model, key).id] = pair
            except NetworkFileError:
                logger.info("%s: bounds for '%s' ignored, not in network %s", self.name, key, model.id)
        result: dict[str, tuple[float, float]] = {}
        for met in model.metabolites:
            if met.id in no_activity:
                continue
            if met.id in fed:
                result[met.id] = (fed[met.id], fed[met.id])
                continue
            if met.id in own:
                lower, upper = own[met.id]
                if not 0 < lower <= upper:
                    raise NetworkFileError(
                        f"compound {met.id}: bounds [{lower:g}, {upper:g}] of environment {self.name} "
                        "are not positive and ordered; give 0 < lower <= upper (mol/L; gases bar)")
                result[met.id] = own[met.id]
                continue
            lower, upper = self.default_bounds
            notes = met.notes or {}
            if notes.get("conc_min"):
                lower = float(notes["conc_min"])
            if notes.get("conc_max"):
                upper = float(notes["conc_max"])
            if lower > upper:
                raise NetworkFileError(located(model, "compound", met.id,
                    f"compound {met.id}: its bounds [{lower:g}, {upper:g}] (compounds table and environment "
                    f"{self.name} default) are empty; widen conc_min/conc_max or the [bounds] default"
                ))
            result[met.id] = (lower, upper)
        return result

    def exchange_bounds(self, model: cobra.Model, flux_bound: float = 1000.0,
                        no_activity: set[str] | None = None) -> dict[str, tuple[float, float]]:
        """Bounds of every boundary reaction in this environment (``no_activity``: water and H+,
        default found by :func:`tfa.network.roles.without_activity`).

        Exchanges (one compound, one empty side) of fed compounds, water and H+ are open both
        ways; those of outlets may only export; all other boundary reactions are closed, except
        the demand reaction, whose lower bound is the demand flux. Outlets are optional: one that
        the network lacks (or has no exchange for) is logged and ignored.

        Raises
        ------
        NetworkFileError
            A fed compound without an exchange, or a demand reaction not in the network.
        """
        where = self.source or self.name
        fed = set(self.feed_metabolites(model))
        outlets: set[str] = set()
        for key in self.outlets:
            try:
                outlets.add(self.resolve(model, key).id)
            except NetworkFileError:
                logger.warning("%s: outlet '%s' ignored, not a compound of network %s", where, key, model.id)
        free = fed | (without_activity(model) if no_activity is None else set(no_activity))
        exchanges: dict[str, cobra.Reaction] = {}
        result: dict[str, tuple[float, float]] = {}
        for reaction in model.reactions:
            if not is_boundary_reaction(reaction) or reaction.id == self.demand_reaction:
                continue
            if self.network_exchanges:
                result[reaction.id] = reaction.bounds
                continue
            if len(reaction.metabolites) == 1:
                met, coefficient = next(iter(reaction.metabolites.items()))
                exchanges.setdefault(met.id, reaction)
                if met.id in free:
                    result[reaction.id] = (-flux_bound, flux_bound)
                    continue
                if met.id in outlets:
                    result[reaction.id] = (0.0, flux_bound) if coefficient < 0 else (-flux_bound, 0.0)
                    continue
            result[reaction.id] = (0.0, 0.0)
        for met_id in sorted(outlets - set(exchanges)):
            logger.warning("%s: outlet %s ignored, network %s has no exchange for it", where, met_id, model.id)
        for met_id in sorted(fed):
            if met_id not in exchanges:
                key = next((k for k in self.feed if self.resolve(model, k).id == met_id), None)
                raise NetworkFileError(self._at("feed", key, (
                    f"{where}: compound {met_id} is fed but network {model.id} has no exchange for it; add "
                    f"a reaction 'EX_{met_id}' with equation '{met_id} <=> '")))
        if self.demand_reaction is not None:
            if self.demand_reaction not in model.reactions:
                close = difflib.get_close_matches(self.demand_reaction, [r.id for r in model.reactions], n=3)
                hint = f"did you mean {', '.join(repr(c) for c in close)}?" if close else "add it to the network"
                raise NetworkFileError(with_toml_line(
                    f"{where} [demand] reaction: '{self.demand_reaction}' is not a reaction "
                    f"of network {model.id}; {hint}", where))
            demand = model.reactions.get_by_id(self.demand_reaction)
            result[demand.id] = (self.demand_flux, max(demand.upper_bound, self.demand_flux))
        return result

    def apply_exchange_bounds(self, model: cobra.Model,
                              no_activity: set[str] | None = None) -> dict[str, tuple[float, float]]:
        """Set :meth:`exchange_bounds` on the model (undone on leaving an enclosing ``with model:``)."""
        bounds = self.exchange_bounds(model, no_activity=no_activity)
        for rid, pair in bounds.items():
            model.reactions.get_by_id(rid).bounds = pair
        return bounds

    def describe(self) -> str:
        """One line for reports."""
        from .compartments import describe_compartments
        feed = ", ".join(f"{k} {v:g}" for k, v in self.feed.items())
        names = {"dissolved_inorganic_carbon": "DIC", "total_sulfide": "total sulfide",
                 "total_ammonia": "total ammonia"}
        fluid = "".join(f"; {names[k]} {v:g} mol/L" for k, v in self.fluid.items())
        return (f"{self.name}: {self.conditions.describe()}{describe_compartments(self, '; ')}; "
                f"feed {feed or 'none'}{fluid}")


def bundled_environment() -> Environment:
    """The bundled demo environment, the invented Kestrel Ridge vent field."""
    from .bundled import bundled_environment_path

    return Environment.from_toml(bundled_environment_path())
