"""The standard state of each gas of a network, in words: a gas compound (thermo key ``X(g)``)
is the ideal gas at 1 bar; a dissolved gas (thermo key ``X`` whose gas ``X(g)`` is in the species
data: H2, CO2, CO, H2S, CH4, N2, NH3, O2) is the ideal solution at 1 mol/L (1 mol/kg, within
0.3 % up to 60 degC; see :mod:`tfa.thermo.gases`). Every standard energy (ΔrG'°, ΔfG'°) refers
to these standard states, so every output that shows one says which holds for each gas."""

from __future__ import annotations


def gas_state_of_key(key: str, database) -> str:
    """"gas at 1 bar" for a gas thermo key (``X(g)``), "dissolved at 1 mol/L" for a dissolved
    gas (``X`` whose ``X(g)`` is in the species data), "" otherwise.

    >>> from tfa.thermo.database import ThermoDatabase
    >>> db = ThermoDatabase.load()
    >>> [gas_state_of_key(k, db) for k in ("H2", "H2(g)", "formate")]
    ['dissolved at 1 mol/L', 'gas at 1 bar', '']
    """
    if key.endswith("(g)"):
        return "gas at 1 bar"
    try:
        database.compound(f"{key}(g)")
    except Exception:  # noqa: BLE001 - no gas of that name in the species data
        return ""
    return "dissolved at 1 mol/L"


def gas_standard_states(model, database) -> dict[str, str]:
    """Compound id -> "gas at 1 bar" or "dissolved at 1 mol/L", for the gases of the network.

    >>> import cobra
    >>> from tfa.thermo.database import ThermoDatabase
    >>> m = cobra.Model("g")
    >>> m.add_metabolites([cobra.Metabolite("h2", formula="H2"), cobra.Metabolite("for")])
    >>> m.metabolites.h2.notes["thermo_key"] = "H2"
    >>> gas_standard_states(m, ThermoDatabase.load())
    {'h2': 'dissolved at 1 mol/L'}
    """
    out = {}
    for met in model.metabolites:
        key = str((met.notes or {}).get("thermo_key") or "").strip()
        state = gas_state_of_key(key, database) if key else ""
        if state:
            out[met.id] = state
    return out


def standard_state_words(model, database) -> str:
    """One sentence: the standard state of each gas ("" when the network has none)."""
    states = gas_standard_states(model, database)
    if not states:
        return ""
    groups: dict[str, list[str]] = {}
    for met, state in states.items():
        groups.setdefault(state, []).append(met)
    parts = [f"{', '.join(sorted(mets))} {state}" for state, mets in sorted(groups.items())]
    return ("Standard states of the gases (ΔrG'° refers to them; ΔrG' to the activities): "
            + "; ".join(parts) + ".")
