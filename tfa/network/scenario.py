"""Scenario uncertainty: ranges or distributions of a setting's assumptions, and keyed draws of
them (the ``[scenario]`` section of an environment file).

An assumption of the setting (the temperature, the pH, the ionic strength, the pressure, the
activity of a fed compound, the pH of a fed proton pool such as the outer fluid's) may be given a
range. Each key of ``[scenario]`` names one assumption; its value is

- ``[low, high]``: uniform between the two values (for a fed activity ``feed.<id>``: uniform in
  log10 between them, a range of orders of magnitude);
- ``{ normal = [mean, sd] }``: normal, cut at mean ± 3 sd (not for ``feed.<id>``).

Keys: ``temperature_C``, ``pH``, ``ionic_strength_M``, ``pressure_bar``, ``feed.<id>`` (a fed
compound's activity, mol/L; gases bar), ``pH_feed.<id>`` (a fed H+ pool given as a pH: its
activity is 10^−pH), ``pH_compartment.<id>`` (the pH of a compartment of ``[compartments]``, e.g.
the outer fluid of a proton gradient), ``ion_stoichiometry.<reaction>`` (ions moved per turnover,
e.g. H⁺ per ATP of the gradient's ATP synthase; need not be whole: a c-ring of 11 gives 11/3),
``phosphorylation_potential_min_kJ_per_mol`` (the floor of ``[cofactors]``) and
``pool_total.<pool>`` (the largest total of a carrier pool of ``[cofactors]``, mol/L, drawn
log-uniform like a fed activity). The central value of an assumption is the one the rest of the
file states (the draws are about it).

Draw i of an assumption takes the standard normal number named ``scenario:<key>`` of draw i
(:func:`tfa.util.keyed_random.keyed_normals`): u = Φ(z) gives the uniform one. So draw i of the
setting goes with draw i of the energies, whichever is drawn alone or both together.

Example file section (the Kestrel Ridge demo)::

    [scenario]
    "pH_compartment.out" = [5.0, 6.0]    # the outer fluid between pH 5 and 6
    temperature_C = { normal = [70.0, 5.0] }
    "ion_stoichiometry.ATPS_GRAD" = [3.0, 5.0]   # H+ per ATP

Units: as in the environment file (degC, mol/L, bar).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from statistics import NormalDist
from typing import Any, Mapping

from ..errors import NetworkFileError
from ..util.keyed_random import keyed_normals

#: Keys of [scenario] for conditions -> the name of the condition changed.
CONDITION_KEYS = {"temperature_C": "temperature", "pH": "ph", "ionic_strength_M": "ionic_strength",
                  "pressure_bar": "pressure"}
#: Prefixes of [scenario] keys that name one thing of the environment after the dot.
NAMED_PREFIXES = ("feed", "pH_feed", "pH_compartment", "ion_stoichiometry", "pool_total")
#: Keys of the carrier states (``[cofactors]``) a scenario may draw, besides ``pool_total.<pool>``.
COFACTOR_SCENARIO_KEYS = ("phosphorylation_potential_min_kJ_per_mol",)
#: Prefixes drawn log-uniform from a range (amounts spanning orders of magnitude).
LOG_UNIFORM_PREFIXES = ("feed", "pool_total")
#: Cut of a normal distribution, in standard deviations.
NORMAL_CUT = 3.0


def changes_the_energies(key: str) -> bool:
    """Whether drawing assumption ``key`` asks for the network to be prepared again (a condition,
    a compartment's pH, an ion stoichiometry, a carrier state), rather than only a fed
    compound's fixed activity.

    >>> changes_the_energies("pH_compartment.out"), changes_the_energies("feed.co2")
    (True, False)
    """
    prefix = key.split(".", 1)[0] if "." in key else ""
    return key in CONDITION_KEYS or key in COFACTOR_SCENARIO_KEYS or prefix in (
        "pH_compartment", "ion_stoichiometry", "pool_total")


@dataclass(frozen=True)
class Assumption:
    """One assumption with a distribution: ``key`` as written, ``kind`` "uniform",
    "log_uniform" or "normal", and its two numbers (low, high or mean, sd)."""

    key: str
    kind: str
    first: float
    second: float

    def value(self, z: float) -> float:
        """The value for the standard normal number z (uniform ones through u = Φ(z)).

        >>> Assumption("pH", "uniform", 5.0, 6.0).value(0.0)
        5.5
        >>> round(Assumption("feed.co2", "log_uniform", 1e-3, 1e-1).value(0.0), 6)
        0.01
        """
        if self.kind == "normal":
            return self.first + self.second * max(-NORMAL_CUT, min(NORMAL_CUT, z))
        u = NormalDist().cdf(z)
        if self.kind == "log_uniform":
            low, high = math.log10(self.first), math.log10(self.second)
            return 10.0 ** (low + u * (high - low))
        return self.first + u * (self.second - self.first)

    def describe(self) -> str:
        if self.kind == "normal":
            return f"{self.key} ~ normal({self.first:g}, {self.second:g})"
        return f"{self.key} in [{self.first:g}, {self.second:g}]" + (
            " (log-uniform)" if self.kind == "log_uniform" else "")


def parse_scenario(section: Mapping[str, Any] | None, where: str = "environment") -> dict[str, Assumption]:
    """The assumptions of a ``[scenario]`` section (checked; errors name the key and the fix)."""
    out: dict[str, Assumption] = {}
    for key, value in (section or {}).items():
        prefix = key.split(".", 1)[0] if "." in key else ""
        if (key not in CONDITION_KEYS and key not in COFACTOR_SCENARIO_KEYS
                and prefix not in NAMED_PREFIXES):
            raise NetworkFileError(
                f"{where} [scenario] '{key}': unknown assumption; use {', '.join(CONDITION_KEYS)}, "
                f"{', '.join(COFACTOR_SCENARIO_KEYS)}, "
                + ", ".join(f'"{p}.<id>"' for p in NAMED_PREFIXES))
        if prefix and not key.split(".", 1)[1]:
            raise NetworkFileError(f"{where} [scenario] '{key}': name the compound, compartment, "
                                   "reaction or pool after the dot")
        if isinstance(value, dict):
            if set(value) != {"normal"} or not _two_numbers(value["normal"]):
                raise NetworkFileError(f"{where} [scenario] '{key}': write [low, high] or "
                                       "{ normal = [mean, sd] }")
            if prefix in LOG_UNIFORM_PREFIXES:
                raise NetworkFileError(f"{where} [scenario] '{key}': an amount takes a range "
                                       "[low, high] (drawn log-uniform), not a normal distribution")
            mean, sd = (float(v) for v in value["normal"])
            if not sd > 0:
                raise NetworkFileError(f"{where} [scenario] '{key}': the standard deviation must be > 0")
            out[key] = Assumption(key, "normal", mean, sd)
            continue
        if not _two_numbers(value):
            raise NetworkFileError(f"{where} [scenario] '{key}': write [low, high] or "
                                   "{ normal = [mean, sd] }")
        low, high = (float(v) for v in value)
        if not low < high:
            raise NetworkFileError(f"{where} [scenario] '{key}': need low < high, got [{low:g}, {high:g}]")
        if prefix in LOG_UNIFORM_PREFIXES:
            if low <= 0:
                raise NetworkFileError(f"{where} [scenario] '{key}': amounts must be > 0")
            out[key] = Assumption(key, "log_uniform", low, high)
        else:
            out[key] = Assumption(key, "uniform", low, high)
    return out


def _two_numbers(value: Any) -> bool:
    return (isinstance(value, list) and len(value) == 2
            and all(isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v)
                    for v in value))


def draw_changes(assumptions: Mapping[str, Assumption], seed: int, index: int,
                 held: tuple[str, ...] = ()) -> dict[str, float]:
    """The assumptions' values in draw ``index`` (those in ``held`` left at their central value,
    i.e. not changed): key -> value, in the units of the file."""
    keys = [k for k in sorted(assumptions) if k not in held]
    z = keyed_normals(seed, index, [f"scenario:{k}" for k in keys])
    return {k: assumptions[k].value(float(zk)) for k, zk in zip(keys, z)}


def apply_changes(environment, changes: Mapping[str, float]):
    """A copy of ``environment`` with the drawn values of :func:`draw_changes`."""
    env = environment
    conditions = {}
    feed = {}
    for key, value in changes.items():
        if key in CONDITION_KEYS:
            name = CONDITION_KEYS[key]
            conditions["celsius" if name == "temperature" else name] = float(value)
        elif key.startswith("feed."):
            feed[key[5:]] = float(value)
        elif key.startswith("pH_feed."):
            feed[key[8:]] = 10.0 ** (-float(value))
    if conditions:
        env = env.with_conditions(**conditions)
    for key, value in changes.items():
        if key.startswith("pH_compartment."):
            cid = key[len("pH_compartment."):]
            if cid not in env.compartments:
                raise NetworkFileError(f"[scenario] '{key}': {cid} is not a compartment of the "
                                       "environment; give it with [compartments.ID]")
            env = replace(env, compartments={**env.compartments,
                                             cid: replace(env.compartments[cid], ph=float(value))})
    env = _with_drawn_setting(env, changes)
    if feed:
        unknown = [k for k in feed if k not in env.feed]
        if unknown:
            raise NetworkFileError(f"[scenario]: {', '.join(unknown)} is not fed in [feed]; a "
                                   "scenario changes the activity of a fed compound only")
        env = env.with_feed(feed)
    return env


def _with_drawn_setting(env, changes: Mapping[str, float]):
    """``env`` with drawn ion stoichiometries and carrier states (keys of the module text)."""
    ions = {key.split(".", 1)[1]: float(v) for key, v in changes.items()
            if key.startswith("ion_stoichiometry.")}
    if ions:
        unknown = [rid for rid in ions if rid not in (env.ion_stoichiometry or {})]
        if unknown:
            raise NetworkFileError(f"[scenario] 'ion_stoichiometry.{unknown[0]}': {unknown[0]} has "
                                   "no entry in [ion_stoichiometry]; give its central value there")
        env = replace(env, ion_stoichiometry={**env.ion_stoichiometry, **ions})
    floor = changes.get("phosphorylation_potential_min_kJ_per_mol")
    totals = {key.split(".", 1)[1]: float(v) for key, v in changes.items()
              if key.startswith("pool_total.")}
    if floor is None and not totals:
        return env
    states = env.cofactors
    if states is None:
        raise NetworkFileError("[scenario]: a carrier state is drawn but the environment has no "
                               "[cofactors] section; give its central values there")
    pools = {pool.name: pool for pool in states.pools}
    unknown = [name for name in totals if name not in pools]
    if unknown:
        raise NetworkFileError(f"[scenario] 'pool_total.{unknown[0]}': no pool of that name in "
                               f"[cofactors]; pools: {', '.join(pools) or 'none'}")
    states = replace(states, pools=tuple(replace(p, total=totals.get(p.name, p.total))
                                         for p in states.pools),
                     phosphorylation_floor=states.phosphorylation_floor if floor is None
                     else float(floor))
    return replace(env, cofactors=states)
