"""One network, many points: the network and environment sent once to every worker process, a
ThermoModel prepared per mode and conditions, and the outcome of the analyses at one point as a
small JSON-able dict.

Used by :mod:`tfa.analyses.robustness` (points = draws of ΔrG'°) and :mod:`tfa.analyses.maps`
(points = conditions). Nothing here computes a Gibbs energy: energies come from
:func:`tfa.network.energies.prepare`, answers from the analyses of this package
(:func:`~tfa.analyses.feasibility.feasibility`, the minimal uphill set, the H2 threshold, the
max-min driving force), each certified there.

A :class:`NetworkJob` holds the model and environment as bytes (``pickle`` of objects this
process built, never of a user file); a worker unpickles them once per process
(:func:`tfa.util.points.worker_cache`, keyed by the content hash) and caches the prepared model
of the last few (mode, conditions), so a robustness run prepares each mode once per worker. Each
point gets a fresh copy of the cached model (:func:`fresh_copy`), so its answer does not depend
on which points the worker solved before.
"""

from __future__ import annotations

import hashlib
import logging
import math
import pickle
from collections import OrderedDict
from dataclasses import dataclass, field, replace
from typing import Any, Mapping

from ..errors import InputError
from ..modes import get_mode
from ..network.thermo_model import ThermoModel
from ..problem.builder import ProblemOptions
from ..util.points import worker_cache
from ..vocabulary import DEFAULT_H2_RANGE

log = logging.getLogger(__name__)

#: Options of a job that are not problem options: the outer fluid's pH held on a pH change, and
#: the H2 range of the threshold search.
JOB_ONLY_OPTIONS = ("fixed_outer_ph", "h2_range")

#: Condition axes a point may change, with their units at the interface.
CONDITION_AXES = {
    "temperature": "degC",
    "ph": "",
    "ionic_strength": "mol/L",
    "pressure": "bar",
    "h2": "mol/L (gas feed: bar)",
    "mixing": "share of vent fluid on the environment's [mixing] line, 0-1",
}
#: What an outcome can hold.
OUTCOME_PARTS = ("uphill", "threshold", "driving_force")
#: Prepared models kept per worker (conditions change from point to point on a map).
PREPARED_CACHE_SIZE = 8


@dataclass(frozen=True)
class NetworkJob:
    """The network, environment and analysis options of a many-point run, ready to ship.

    Attributes
    ----------
    payload : bytes
        ``pickle`` of (cobra model, environment), made by :meth:`create` in this process.
    token : str
        SHA-256 of ``payload``: the worker cache key.
    options : dict
        ``min_driving_force``, ``solver``, ``time_limit``, ``unknown_energy``, ``uncertainty_k``
        (ProblemOptions) and
        ``parts``: which of :data:`OUTCOME_PARTS` to compute.
    fingerprint : str
        A hash of the network's reactions, bounds and notes and of the environment that is the
        same in every process and session (the pickle bytes are not), for results-file headers.
    """

    payload: bytes
    token: str
    options: dict = field(default_factory=dict)
    fingerprint: str = ""

    @classmethod
    def create(cls, model, environment, parts=("uphill", "threshold"), prepare=None,
               **options: Any) -> "NetworkJob":
        """Package a model and environment (see the class docstring for ``options``).

        ``prepare(model, environment, mode) -> ThermoModel`` (a module-level function) replaces
        :func:`tfa.network.energies.prepare`, e.g. for hand-made test networks.
        """
        unknown = [p for p in parts if p not in OUTCOME_PARTS]
        if unknown:
            raise InputError(f"unknown outcome part(s) {', '.join(unknown)}; use {', '.join(OUTCOME_PARTS)}")
        allowed = {"min_driving_force", "solver", "time_limit", "unknown_energy", "uncertainty_k",
                   "fixed_outer_ph", "h2_range"}
        bad = sorted(set(options) - allowed)
        if bad:
            raise InputError(f"unknown option(s) {', '.join(bad)}; use {', '.join(sorted(allowed))}")
        if "h2_range" in options:
            options["h2_range"] = [float(v) for v in options["h2_range"]]
        ProblemOptions(**{k: v for k, v in options.items() if k not in JOB_ONLY_OPTIONS})  # validate now
        if hasattr(model, "metabolites") and hasattr(environment, "check_network"):
            environment.check_network(model)  # a key naming nothing is an error, not ignored
        payload = pickle.dumps((model, environment, prepare), protocol=pickle.HIGHEST_PROTOCOL)
        token = hashlib.sha256(payload).hexdigest()
        return cls(payload, token, {"parts": list(parts), **options},
                   fingerprint(model, environment, prepare))

    def describe(self) -> dict:
        """Plain dictionary for results-file headers (no payload)."""
        return {"network": self.fingerprint, **self.options}

    def objects(self) -> tuple:
        """(model, environment, prepare or None), unpickled once per worker process."""
        return worker_cache(("network-job", self.token), lambda: pickle.loads(self.payload))

    def problem_options(self) -> ProblemOptions:
        opts = {k: v for k, v in self.options.items() if k not in ("parts",) + JOB_ONLY_OPTIONS}
        return ProblemOptions(**opts)

    def h2_range(self) -> tuple[float, float]:
        """The H2 range the threshold is searched over (the one default of
        :data:`tfa.vocabulary.DEFAULT_H2_RANGE` unless the run names another)."""
        return tuple(self.options.get("h2_range", DEFAULT_H2_RANGE))

    def scenario_model(self, mode: str, changes: Mapping[str, float]) -> ThermoModel:
        """The prepared model of ``mode`` with a scenario's drawn assumptions
        (:func:`_scenario_model`)."""
        return _scenario_model(self, mode, changes)

    def thermo_model(self, mode: str, changes: Mapping[str, float] | None = None) -> ThermoModel:
        """The prepared model of ``mode`` at the environment with ``changes`` (see
        :func:`changed_environment`), cached per worker."""
        get_mode(mode)
        key = (mode, tuple(sorted((changes or {}).items())))
        cache: OrderedDict = worker_cache(("prepared", self.token), OrderedDict)
        if key not in cache:
            from ..network.energies import prepare

            model, environment, custom = self.objects()
            env = changed_environment(model, environment, changes or {},
                                      hold_gradient=not self.options.get("fixed_outer_ph", False))
            tm = (custom or prepare)(model, env, mode)
            cache[key] = (tm, pickle.dumps(tm.model, protocol=pickle.HIGHEST_PROTOCOL))
            while len(cache) > PREPARED_CACHE_SIZE:
                cache.popitem(last=False)
        cache.move_to_end(key)
        return fresh_copy(*cache[key])


def _scenario_model(job: "NetworkJob", mode: str, changes: Mapping[str, float]) -> ThermoModel:
    """The prepared model of ``mode`` with a scenario's drawn assumptions
    (:mod:`tfa.network.scenario`): a change of the conditions, a compartment's pH, an ion
    stoichiometry or a carrier state prepares the network again (cached per worker); a change
    of fed activities only replaces those compounds' fixed log-activities on the prepared model
    (the energies do not depend on them)."""
    from ..network.scenario import apply_changes, changes_the_energies

    model, environment, custom = job.objects()
    # a condition, a compartment's pH, an ion stoichiometry or a carrier state: prepared again
    conditions = {k: v for k, v in changes.items() if changes_the_energies(k)}
    feeds = {k: v for k, v in changes.items() if k not in conditions}
    if conditions:
        key = (mode, "scenario", tuple(sorted(conditions.items())))
        cache: OrderedDict = worker_cache(("prepared", job.token), OrderedDict)
        if key not in cache:
            from ..network.energies import prepare

            env = apply_changes(environment, conditions)
            tm = (custom or prepare)(model, env, mode)
            cache[key] = (tm, pickle.dumps(tm.model, protocol=pickle.HIGHEST_PROTOCOL))
            while len(cache) > PREPARED_CACHE_SIZE:
                cache.popitem(last=False)
        cache.move_to_end(key)
        tm = fresh_copy(*cache[key])
    else:
        tm = job.thermo_model(mode)
    if feeds:
        env = apply_changes(environment, feeds)
        bounds = dict(tm.log_bounds)
        for name in feeds:
            compound = name.split(".", 1)[1]
            met = env.resolve(tm.model, compound)
            if met.id in bounds:
                value = math.log(env.feed[compound])
                bounds[met.id] = (value, value)
        copy = replace(tm, log_bounds=bounds)
        for extra in ("compound_table", "all_energies"):
            if hasattr(tm, extra):
                setattr(copy, extra, getattr(tm, extra))
        tm = copy
    return tm


def fresh_copy(tm: ThermoModel, model_bytes: bytes) -> ThermoModel:
    """``tm`` on a new cobra model unpickled from ``model_bytes`` (pickled from the pristine
    prepared model in this process).

    Each point starts from the same solver state: the solver interfaces order their variables
    partly by the history of additions and removals, so a model reused after other problems
    were built on it can give a solution that differs in the last digits.
    """
    copy = replace(tm, model=pickle.loads(model_bytes))
    for extra in ("compound_table", "all_energies"):
        if hasattr(tm, extra):
            setattr(copy, extra, getattr(tm, extra))
    return copy


def fingerprint(model, environment, prepare=None) -> str:
    """SHA-256 (16 hex digits) of the network and environment, stable across processes.

    >>> fingerprint(None, None) == fingerprint(None, None)
    True
    """
    parts = []
    if model is not None and not hasattr(model, "reactions"):
        parts.append(repr(model))
    elif model is not None:
        for r in sorted(model.reactions, key=lambda r: r.id):
            parts.append(f"{r.id}|{r.build_reaction_string()}|{r.lower_bound}|{r.upper_bound}")
        for m in sorted(model.metabolites, key=lambda m: m.id):
            parts.append(f"{m.id}|{m.formula}|{m.charge}|{sorted((m.notes or {}).items())}")
    parts.append(repr(environment))
    if prepare is not None:
        parts.append(f"{prepare.__module__}.{prepare.__qualname__}")
    return hashlib.sha256("\n".join(parts).encode("utf-8")).hexdigest()[:16]


def h2_feed_key(model, environment) -> str:
    """The key of the environment's feed that supplies H2 (role ``h2`` in the network)."""
    from ..network.roles import single_with_role

    feed = dict(getattr(environment, "feed", {}) or {})
    met = (single_with_role(model, "h2", fallback_ids=("h2", "H2", "h2_c"))
           if hasattr(model, "metabolites") else None)
    names = set()
    if met is not None:
        names = {met.id.lower(), str((met.notes or {}).get("thermo_key", "")).lower()}
    for key in feed:
        if key.lower() in names:
            return key
    for key in feed:
        if key.lower() in ("h2", "h2(aq)", "h2(g)"):
            return key
    raise InputError("the environment feeds no H2, so H2 supply cannot be changed; add H2 to its "
                     "[feed] section")


def changed_environment(model, environment, changes: Mapping[str, float], hold_gradient: bool = True):
    """A copy of ``environment`` with conditions or H2 supply changed.

    ``changes`` keys: ``temperature`` (degC), ``ph``, ``ionic_strength`` (mol/L), ``pressure``
    (bar), ``h2`` (the fed H2 activity: mol/L, or bar when H2 is fed as a gas), ``mixing`` (the
    share of vent fluid on the environment's mixing line, applied first:
    :func:`tfa.network.mixing_line.mixed_environment`). A pH change moves the gradient's outer
    protons with it (ΔpH kept) unless ``hold_gradient`` is False.
    """
    from ..network.mixing_line import environment_with_ph, mixed_environment

    unknown = sorted(set(changes) - set(CONDITION_AXES))
    if unknown:
        raise InputError(f"cannot change {', '.join(unknown)}; use {', '.join(CONDITION_AXES)}")
    env = environment
    if "mixing" in changes:
        env, _ = mixed_environment(env, model, float(changes["mixing"]), hold_gradient)
    skip = {"h2", "mixing"}
    if "ph" in changes and hasattr(model, "metabolites") and hasattr(env, "resolve"):
        env = environment_with_ph(env, model, float(changes["ph"]), hold_gradient)
        skip.add("ph")
    conditions = {}
    for name, value in changes.items():
        if name in skip:
            continue
        conditions["celsius" if name == "temperature" else name] = float(value)
    if conditions:
        env = env.with_conditions(**conditions)
    if "h2" in changes:
        env = env.with_feed({h2_feed_key(model, environment): float(changes["h2"])})
    return env


def _number(value) -> float | None:
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def outcome(tm: ThermoModel, options: ProblemOptions, parts=("uphill", "threshold"),
            h2_range: tuple[float, float] = DEFAULT_H2_RANGE) -> dict:
    """Answers of the analyses for one prepared model, as a JSON-able dict.

    Keys (:mod:`tfa.vocabulary`): ``feasible`` (bool), ``demand_impossible`` (bool),
    ``uphill_set_size`` and ``uphill_set`` (a minimal uphill set, sorted; size 0 when feasible),
    ``h2_threshold`` (least H2 at which the network is feasible, mol/L or bar; None when not asked
    or never feasible; the same MILP as ``tfa h2-threshold`` over ``h2_range``),
    ``h2_at_range_floor`` (feasible already at the bottom of the range searched) and
    ``driving_force_kJ_per_mol`` (max-min driving force of the network;
    None when not asked).
    """
    from .feasibility import feasibility

    diagnose = "uphill" in parts
    result = feasibility(tm, options, diagnose=diagnose)
    out: dict[str, Any] = {"feasible": bool(result.feasible),
                           "demand_impossible": bool(result.demand_impossible),
                           "verification": result.verification.get("status")}
    if diagnose:
        if result.feasible:
            out["uphill_set_size"], out["uphill_set"] = 0, []
        elif result.diagnosis is not None:
            members = sorted(result.diagnosis.sets[0]) if result.diagnosis.sets else []
            out["uphill_set_size"], out["uphill_set"] = int(result.diagnosis.size), members
        else:
            out["uphill_set_size"], out["uphill_set"] = None, None
    out.update(answers_beyond_the_verdict(tm, options, parts, h2_range))
    return out


def answers_beyond_the_verdict(tm: ThermoModel, options: ProblemOptions, parts,
                               h2_range: tuple[float, float] = DEFAULT_H2_RANGE) -> dict:
    """The parts of :func:`outcome` other than the verdict and its uphill set: ``h2_threshold``
    with ``h2_at_range_floor`` ("threshold") and ``driving_force_kJ_per_mol``
    ("driving_force"), each its own certified analysis."""
    out: dict[str, Any] = {}
    if "threshold" in parts:
        out["h2_threshold"], out["h2_at_range_floor"] = _h2_threshold(tm, options, h2_range)
    if "driving_force" in parts:
        out["driving_force_kJ_per_mol"] = _driving_force(tm, options)
    return out


def _h2_threshold(tm: ThermoModel, options: ProblemOptions,
                  h2_range: tuple[float, float]) -> tuple[float | None, bool | None]:
    """Least H2 (NaN -> None when no H2 level in the range makes the network feasible) and
    whether it lies at the bottom of the range searched."""
    from .hydrogen import h2_threshold

    result = h2_threshold(tm, options, h2_range=tuple(h2_range))
    return _number(result.threshold), (result.at_range_floor if result.feasible else None)


def _driving_force(tm: ThermoModel, options: ProblemOptions) -> float | None:
    """Max-min driving force of the network (None when the demand cannot be met at all)."""
    from ..problem.solvers import InfeasibleProblem
    from .driving_force import network_driving_force

    try:
        return _number(network_driving_force(tm, options).driving_force)
    except InfeasibleProblem:
        return None


def points_verification(records: list[dict]) -> dict:
    """How the answers at the points are backed: the count of each verification status."""
    from collections import Counter

    counts = Counter(r.get("verification") for r in records if r.get("error") is None)
    return {"status": "per point", "check": "each point's feasibility answer: "
            + ", ".join(f"{n} {status or 'not recorded'}" for status, n in sorted(
                counts.items(), key=lambda item: str(item[0])))}
