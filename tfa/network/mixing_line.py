"""The ``[mixing]`` section of an environment: two fluids (vent fluid and seawater) whose mixing
line a map can follow (``tfa map --x mixing=0:1:11``), and the environment at a point of it.

At a share f of vent fluid the mixture (:func:`tfa.thermo.mixing.mix`: conservative totals and
alkalinity, temperature linear or by enthalpy balance, pH from the acid-base balance) replaces
the environment's temperature, pH and ionic strength, its fed H2 and its ``[fluid]`` totals
(dissolved inorganic carbon, total sulfide, and total ammonia when both fluids give it); pressure,
bounds, carrier states and demand stay. The gradient's outer protons move with the pH so that
ΔpH stays as the environment states it (:meth:`Environment.with_ph`), unless asked otherwise.

File format::

    [mixing]
    temperature = "linear"            # or "enthalpy"
    [mixing.vent]
    temperature_C = 110.0
    pH = 10.3
    ionic_strength_M = 0.05
    h2_M = 1.7e-3
    dissolved_inorganic_carbon_M = 1.0e-4
    total_sulfide_M = 2.0e-4
    [mixing.seawater]
    ...
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from ..errors import NetworkFileError
from ..thermo.mixing import TEMPERATURE_RULES, Fluid

#: Keys of each fluid of ``[mixing]`` (the last two optional).
FLUID_FIELDS = ("temperature_C", "pH", "ionic_strength_M", "h2_M", "dissolved_inorganic_carbon_M",
                "total_sulfide_M", "total_ammonia_M")
END_MEMBERS = ("vent", "seawater")


@dataclass(frozen=True)
class MixingLine:
    """The two fluids and the temperature rule of ``[mixing]``."""

    vent: Fluid
    seawater: Fluid
    temperature: str = "linear"


def read_mixing(section: dict, where: str, real, positive) -> MixingLine:
    """Read ``[mixing]`` (``real``, ``positive``: the environment's number gates)."""
    allowed = ("temperature",) + END_MEMBERS
    for key in section:
        if key not in allowed:
            raise NetworkFileError(f"{where}: unknown key '{key}' in [mixing]; allowed: {', '.join(allowed)}")
    rule = section.get("temperature", "linear")
    if rule not in TEMPERATURE_RULES:
        raise NetworkFileError(f"{where} [mixing] temperature: {rule!r}; give "
                               f"{' or '.join(repr(r) for r in TEMPERATURE_RULES)}")
    fluids = {}
    for name in END_MEMBERS:
        fluid = section.get(name)
        if not isinstance(fluid, dict):
            raise NetworkFileError(f"{where} [mixing.{name}]: missing; give {', '.join(FLUID_FIELDS[:5])}")
        for key in fluid:
            if key not in FLUID_FIELDS:
                raise NetworkFileError(f"{where}: unknown key '{key}' in [mixing.{name}]; allowed: "
                                       f"{', '.join(FLUID_FIELDS)}")
        for key in FLUID_FIELDS[:5]:
            if key not in fluid:
                raise NetworkFileError(f"{where} [mixing.{name}] {key}: missing")
        table = f"mixing.{name}"
        fluids[name] = Fluid(
            name, real(where, table, "temperature_C", fluid["temperature_C"], minimum=0.0, maximum=300.0),
            real(where, table, "pH", fluid["pH"], minimum=0.0, maximum=14.0),
            real(where, table, "ionic_strength_M", fluid["ionic_strength_M"], minimum=0.0, maximum=10.0),
            positive(where, table, "h2_M", fluid["h2_M"]),
            positive(where, table, "dissolved_inorganic_carbon_M", fluid["dissolved_inorganic_carbon_M"]),
            positive(where, table, "total_sulfide_M", fluid["total_sulfide_M"])
            if "total_sulfide_M" in fluid else 0.0,
            positive(where, table, "total_ammonia_M", fluid["total_ammonia_M"])
            if "total_ammonia_M" in fluid else None)
    return MixingLine(fluids["vent"], fluids["seawater"], rule)


#: Thermo key of a fed outer proton (networks that model the gradient as a fed compound rather
#: than as a compartment of its own).
OUTER_PROTON_KEY = "H+(outside)"


def environment_with_ph(environment, model, ph: float, hold_gradient: bool = True):
    """``environment`` at another pH; with ``hold_gradient`` every other compartment's pH moves
    with it (pH_ID + shift) and so does a fed outer proton (thermo key ``H+(outside)``, activity
    × 10^-shift), so every ΔpH across the membrane stays.

    >>> import math
    >>> from tfa.network.inputs import resolve_inputs
    >>> inputs = resolve_inputs()
    >>> env = environment_with_ph(inputs.environment, inputs.model, 8.0)
    >>> round(env.compartments["out"].ph, 2), env.conditions.ph     # pH_out 5.5 -> 6.0
    (6.0, 8.0)
    """
    moved = environment.with_conditions(ph=ph)
    if not hold_gradient:
        return moved
    shift = ph - environment.conditions.ph
    if environment.compartments:
        moved = replace(moved, compartments={cid: replace(c, ph=c.ph + shift)
                                             for cid, c in environment.compartments.items()})
    changes = {}
    for key, value in environment.feed.items():
        met = environment.resolve(model, key)
        if (met.notes or {}).get("thermo_key") == OUTER_PROTON_KEY:
            changes[key] = value * 10.0 ** (-shift)
    return moved.with_feed(changes) if changes else moved


def mixed_environment(environment, model, fraction: float, hold_gradient: bool = True):
    """(environment at the share ``fraction`` of vent fluid on the ``[mixing]`` line, the mixture).

    Raises
    ------
    NetworkFileError
        The environment has no ``[mixing]`` section, or no fed H2 to replace.
    """

    from ..thermo.mixing import mix
    from .roles import single_with_role

    line = environment.mixing
    if line is None:
        raise NetworkFileError(f"{environment.source or environment.name}: no [mixing] section; give "
                               "[mixing.vent] and [mixing.seawater] to follow a mixing line")
    mixture = mix(line.vent, line.seawater, fraction, environment.conditions.pressure, line.temperature)
    env = environment_with_ph(environment, model, mixture.ph, hold_gradient)
    env = env.with_conditions(celsius=mixture.celsius, ionic_strength=mixture.ionic_strength)
    h2 = single_with_role(model, "h2", fallback_ids=("h2", "H2"))
    keys = [k for k in env.feed if h2 is not None and env.resolve(model, k).id == h2.id]
    if not keys:
        raise NetworkFileError(f"{environment.source or environment.name}: the mixing line sets H2, "
                               "but [feed] has no H2; add it")
    fluid = dict(env.fluid)
    fluid["dissolved_inorganic_carbon"] = mixture.dic
    if mixture.sulfide > 0:
        fluid["total_sulfide"] = mixture.sulfide
    if mixture.ammonia is not None:
        fluid["total_ammonia"] = mixture.ammonia
    return replace(env.with_feed({keys[0]: mixture.h2}), fluid=fluid), mixture
