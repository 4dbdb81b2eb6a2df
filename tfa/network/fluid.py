"""The ``[fluid]`` section of an environment: totals a geochemist measures (dissolved inorganic
carbon, total sulfide, total ammonia, mol/L) in place of one species each.

``tfa`` speciates each total at the environment's conditions (:mod:`tfa.thermo.speciation`) and
fixes the network's compounds consistently: a compound with thermo key ``CO2`` (dissolved CO2
only) gets the CO2(aq) share of the carbon, one with ``CO2tot`` (total CO2) the whole; ``H2S``
and ``ammonia`` are reactants that already hold every protonation state, so they get the totals.
Because the shares are computed at the conditions, a copy of the environment at another pH or
temperature (a map, a mixing line) fixes the new shares. A compound fixed by ``[fluid]`` must not
also be in ``[feed]``.

The ions of the totals need an ionic strength of at least ½(Σ c z² + |Σ c z|)
(:func:`tfa.thermo.speciation.least_ionic_strength`); a stated ionic strength below it is warned
about (:func:`ionic_strength_warning`), naming the ions and the least value.

File format::

    [fluid]
    dissolved_inorganic_carbon_M = 2.0e-2
    total_sulfide_M = 1.0e-4
    total_ammonia_M = 1.0e-3
"""

from __future__ import annotations

from typing import Callable

from ..conditions import Conditions, ModelRangeWarning
from ..errors import NetworkFileError


class FluidWarning(ModelRangeWarning):
    """The stated ionic strength is below what the fluid's ions force (shown and recorded as the
    model-range warnings are)."""


#: Keys of ``[fluid]`` -> the total they give (keys of :data:`tfa.thermo.speciation.TOTALS`).
FLUID_KEYS = {
    "dissolved_inorganic_carbon_M": "dissolved_inorganic_carbon",
    "total_sulfide_M": "total_sulfide",
    "total_ammonia_M": "total_ammonia",
}
#: Thermo keys a total fixes, with the species whose share it takes (None: the whole total).
TARGETS = {
    "dissolved_inorganic_carbon": (("CO2", "CO2(aq)+H2O"), ("CO2tot", None)),
    "total_sulfide": (("H2S", None),),
    "total_ammonia": (("ammonia", None),),
}


def read_fluid(section: dict, where: str, positive) -> dict[str, float]:
    """Total name -> mol/L from the ``[fluid]`` section (``positive``: the environment's gate)."""
    out = {}
    for key, value in section.items():
        if key not in FLUID_KEYS:
            import difflib
            close = difflib.get_close_matches(key, list(FLUID_KEYS), n=1)
            hint = f"did you mean '{close[0]}'? " if close else ""
            raise NetworkFileError(f"{where}: unknown key '{key}' in [fluid]; {hint}allowed: "
                                   f"{', '.join(FLUID_KEYS)}")
        out[FLUID_KEYS[key]] = positive(where, "fluid", key, value)
    return out


def speciations(fluid: dict[str, float], conditions: Conditions, db=None) -> dict:
    """Total name -> :class:`tfa.thermo.speciation.Speciation` at ``conditions``."""
    from ..thermo.database import ThermoDatabase
    from ..thermo.speciation import TOTALS, speciate

    db = db or ThermoDatabase.load()
    return {name: speciate(db, TOTALS[name], total, conditions) for name, total in fluid.items()}


def fluid_activities(fluid: dict[str, float], conditions: Conditions,
                     resolve: Callable[[str], str | None], db=None) -> dict[str, tuple[str, float]]:
    """Metabolite id -> (thermo key, fixed activity mol/L) for every compound the totals fix.

    ``resolve(thermo key)`` gives the metabolite id or None.

    Raises
    ------
    NetworkFileError
        A total that fixes no compound of the network.
    """
    out: dict[str, tuple[str, float]] = {}
    for name, split in speciations(fluid, conditions, db).items():
        found = False
        for key, species in TARGETS[name]:
            met = resolve(key)
            if met is None:
                continue
            found = True
            out[met] = (key, split.total if species is None else split.concentration(species))
        if not found:
            keys = " or ".join(k for k, _ in TARGETS[name])
            raise NetworkFileError(f"[fluid] {name}: the network has no compound with thermo key "
                                   f"{keys}; remove the total or add the compound")
    return out


def ionic_strength_warning(fluid: dict[str, float], conditions: Conditions, db=None) -> str | None:
    """A message when ``conditions.ionic_strength`` is below what the fluid's ions force."""
    from ..thermo.speciation import least_ionic_strength

    if not fluid:
        return None
    splits = speciations(fluid, conditions, db)
    least = least_ionic_strength(splits.values())
    if conditions.ionic_strength + 1e-12 >= least:
        return None
    parts = ", ".join(f"{sp} {c * 1e3:.3g} mM" for s in splits.values()
                      for sp, c, z in zip(s.species, s.concentrations, s.charges) if z and c > 1e-6)
    return (f"ionic strength {conditions.ionic_strength:g} mol/L is below the {least:.3g} mol/L that "
            f"the fluid's ions force at pH {conditions.ph:g} ({parts}, with counter-ions); raise "
            "ionic_strength_M or lower the totals")
