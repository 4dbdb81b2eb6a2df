"""One H2 level in the units a researcher compares it with: dissolved concentration, partial
pressure (bar and Pa, by Henry's law at the setting's temperature and pressure) and mmol/kg.

Henry's law: c = K_H p, K_H = exp(-(ΔfG°(H2,aq) - ΔfG°(H2,g))/RT) from the species data
(:func:`tfa.thermo.gases.henry_constant`), checked against Sander 2015
(doi:10.5194/acp-15-4399-2015): about 7.8e-4 mol/(L bar) for H2 at 25 °C (from memory).
"""

from __future__ import annotations


def h2_equivalents(level: float, unit: str, conditions) -> dict:
    """One H2 level as dissolved concentration, partial pressure (bar, Pa) and mmol/kg.

    Henry's law c = K_H p with K_H = exp(-(ΔfG°(H2,aq) - ΔfG°(H2,g))/RT) at the setting's
    temperature and pressure, from the species data (:func:`tfa.thermo.gases.henry_constant`;
    Sander 2015, doi:10.5194/acp-15-4399-2015, lists about 7.8e-4 mol/(L bar) at 25 °C, from
    memory). Salinity: the activity coefficient of neutral H2 is taken as 1 (the extended
    Debye-Hückel model gives none to an uncharged solute; salting-out is not modelled). The
    dissolved standard state of the species data is 1 mol/kg, so the activity is a molality:
    mmol/kg = 1000 × activity (``tfa`` writes mol/L for it, equal within the density of water).

    Parameters
    ----------
    level : float
        H2 activity [mol/L dissolved, or bar when ``unit`` is "bar"].
    unit : "mol/L" or "bar"
    conditions : Conditions (temperature [K], pressure [bar])

    Examples
    --------
    1 uM dissolved H2 at 25 °C, 1 bar: p = 1e-6 / 7.85e-4 = 1.27e-3 bar = 127 Pa (hand-derived
    from the K_H above).

    >>> from tfa.conditions import Conditions
    >>> e = h2_equivalents(1e-6, "mol/L", Conditions())
    >>> f"{e['h2_partial_pressure_Pa']:.0f} Pa, {e['h2_mmol_per_kg']:.0e} mmol/kg"
    '127 Pa, 1e-03 mmol/kg'
    """
    from ..thermo.gases import henry_constant
    from ..thermo.species import load_species

    species = {s.id: s for s in load_species() if s.id in ("H2", "H2(g)")}
    k_h = henry_constant(species["H2(g)"], species["H2"], conditions.temperature,
                         getattr(conditions, "pressure", None))
    dissolved = level * k_h if unit == "bar" else level
    bar = level if unit == "bar" else level / k_h
    return {"h2_partial_pressure_bar": bar, "h2_partial_pressure_Pa": bar * 1e5,
            "h2_mmol_per_kg": 1000.0 * dissolved, "henry_constant_mol_per_L_per_bar": k_h}


def level_words(level: float, unit: str, conditions) -> str:
    """An H2 level with its other units, e.g. '1.93e-11 mol/L (2.4e-08 bar, 0.0024 Pa, 1.9e-08 mmol/kg)'."""
    try:
        e = h2_equivalents(level, unit, conditions)
    except Exception:  # noqa: BLE001 - conversions are extra words, never the answer
        return f"{level:.3g} {unit}"
    other = (f"{e['h2_mmol_per_kg']:.2g} mmol/kg dissolved" if unit == "bar"
             else f"{e['h2_partial_pressure_bar']:.2g} bar = {e['h2_partial_pressure_Pa']:.2g} Pa "
                  f"H2 by Henry's law, {e['h2_mmol_per_kg']:.2g} mmol/kg")
    return f"{level:.3g} {unit} ({other})"
