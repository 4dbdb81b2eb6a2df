"""The energy budget of a steady state: what goes in and out per unit of demand, the free energy
of that net reaction, and where it comes from.

For a steady state with fluxes v_j, demand flux D and transformed reaction energies ΔrG'_j at the
solution's concentrations (kJ/mol, as the independent certificate recomputed them):

- the **net reaction** per unit of demand: n_i = Σ_j S_ij v_j / D over the internal reactions (the
  compounds consumed from the feed, negative, and those made for the demand or exported);
- its **ΔrG'**: ΔG_net = Σ_j v_j ΔrG'_j / D [kJ per unit demand]. The transformed energy of a sum
  of reactions is the sum of their energies (Alberty 2003, ch. 4: ΔrG' = Σ_i ν_i μ'_i is linear in
  the stoichiometry), so this is the free energy of the net reaction at the solution's
  concentrations, and it splits exactly into
- the energy **supplied to the uphill steps**, Σ over v_j ΔrG'_j > 0 (zero when every step runs
  downhill), and the energy dissipated by the downhill steps, Σ over v_j ΔrG'_j < 0;
- by **source**: the **proton gradient**, n_H × e_H, with n_H the outer protons taken in per unit
  demand and e_H = μ'(H⁺ in) − μ'(H⁺ out) = −RT (ln 10 pH + ln a_out) [kJ/mol] the free energy
  each one releases on entering (chemical part; the membrane potential is 0 in this model), and
  the **feed chemistry**, ΔG_net − n_H e_H: the net conversion of H2 and CO2 (with N, S and P)
  into the demanded compounds and the outlets.
- **ATP made and spent** per unit demand: Σ_j max(0, ±S_ATP,j v_j)/D, and the free energy stored
  in the ATP made, ATP made × ΔrG'(ADP + Pi → ATP + H2O) at the solution's concentrations (ATP is
  internal: it is a carrier of the budget, not a source).
- **H2** consumed per unit demand and per carbon taken up from the feed; **ATP made per H2**.

Reactions without an energy that carry flux are left out of the sums and named.

Units: kJ per unit of demand (one turnover of the demand reaction); kJ/mol per proton and per
ATP; amounts in mol per unit of demand.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Mapping

import pandas as pd

from ..errors import InputError
from ..network.thermo_model import ThermoModel
from ..thermo.balance import parse_formula

#: Columns of the ``energy_budget`` table (one row per mode).
BUDGET_COLUMNS = [
    "mode", "solution", "net_reaction", "delta_g_net_kJ_per_demand",
    "feed_chemistry_kJ_per_demand", "gradient_kJ_per_demand", "protons_in_per_demand",
    "energy_per_proton_kJ_per_mol", "atp_made_per_demand", "atp_spent_per_demand",
    "atp_synthesis_delta_g_kJ_per_mol", "atp_energy_kJ_per_demand", "uphill_supplied_kJ_per_demand",
    "downhill_dissipated_kJ_per_demand", "h2_consumed_per_demand", "carbon_taken_up_per_demand",
    "h2_per_carbon", "atp_per_h2", "reactions_without_energy", "verification", "checked_by"]
#: Coefficients of the net reaction below this (per unit demand) are left out.
NET_TOLERANCE = 1e-7


@dataclass
class EnergyBudget:
    """The energy budget of one steady state (see the module docstring; kJ per unit demand)."""

    mode: str
    solution: str
    net_reaction: dict[str, float]
    delta_g_net: float
    gradient: float
    protons_in: float
    energy_per_proton: float
    atp_made: float
    atp_spent: float
    atp_synthesis: float
    uphill_supplied: float
    downhill_dissipated: float
    h2_consumed: float
    carbon_taken_up: float
    without_energy: list[str] = field(default_factory=list)
    verification: dict = field(default_factory=dict)

    @property
    def feed_chemistry(self) -> float:
        return self.delta_g_net - self.gradient

    @property
    def atp_energy(self) -> float:
        return self.atp_made * self.atp_synthesis if self.atp_made else 0.0

    @property
    def h2_per_carbon(self) -> float:
        return self.h2_consumed / self.carbon_taken_up if self.carbon_taken_up > 0 else math.nan

    @property
    def atp_per_h2(self) -> float:
        return self.atp_made / self.h2_consumed if self.h2_consumed > 0 else math.nan

    def equation(self, digits: int = 3) -> str:
        """The net reaction in words: "19.7 co2 + 41.3 h2 → ..." (per unit demand)."""
        def side(items):
            return " + ".join(f"{abs(c):.{digits}g} {m}" for m, c in items) or "nothing"
        used = sorted(((m, c) for m, c in self.net_reaction.items() if c < 0), key=lambda t: t[1])
        made = sorted(((m, c) for m, c in self.net_reaction.items() if c > 0), key=lambda t: -t[1])
        return f"{side(used)} → {side(made)}"

    def row(self) -> dict:
        return {"mode": self.mode, "solution": self.solution, "net_reaction": self.equation(),
                "delta_g_net_kJ_per_demand": self.delta_g_net,
                "feed_chemistry_kJ_per_demand": self.feed_chemistry,
                "gradient_kJ_per_demand": self.gradient, "protons_in_per_demand": self.protons_in,
                "energy_per_proton_kJ_per_mol": self.energy_per_proton,
                "atp_made_per_demand": self.atp_made, "atp_spent_per_demand": self.atp_spent,
                "atp_synthesis_delta_g_kJ_per_mol": self.atp_synthesis,
                "atp_energy_kJ_per_demand": self.atp_energy,
                "uphill_supplied_kJ_per_demand": self.uphill_supplied,
                "downhill_dissipated_kJ_per_demand": self.downhill_dissipated,
                "h2_consumed_per_demand": self.h2_consumed,
                "carbon_taken_up_per_demand": self.carbon_taken_up,
                "h2_per_carbon": self.h2_per_carbon, "atp_per_h2": self.atp_per_h2,
                "reactions_without_energy": ", ".join(self.without_energy),
                "verification": self.verification.get("status", ""),
                "checked_by": self.verification.get("check", "")}

    def to_frame(self) -> pd.DataFrame:
        return pd.DataFrame([self.row()], columns=BUDGET_COLUMNS)


def _role(met) -> str:
    return str((met.notes or {}).get("role") or "")


def _carbon(met) -> int:
    try:
        return int(parse_formula(str(met.formula or ""))[0].get("C", 0))
    except InputError:
        return 0


def gradient_protons(tm: ThermoModel) -> list[str]:
    """Compounds that are protons of another fluid (formula H, charge +1, not the proton fixed by
    the pH): the protons of a geochemical gradient."""
    return [m.id for m in tm.model.metabolites
            if str(m.formula or "") == "H" and (m.charge or 0) == 1 and _role(m) != "proton"]


def gradient_atp_coupling(tm: ThermoModel) -> tuple[float, float, str] | None:
    """How the network makes ATP from a proton gradient: (ΔpH = pH − pH_out, H⁺ per ATP,
    reaction id), or None when no reaction makes ATP from outer protons or the outer protons'
    activity is not fixed. pH_out = −log10 a_out (a_out the fixed activity of the outer proton);
    H⁺/ATP = outer protons taken in per ATP made by that reaction.

    For the bundled setting (pH 7.5, a_out = 10^-5.5, ATPS_GRAD: ADP + Pi + 4 H⁺out → ATP + H2O
    + 3 H⁺): (2.0, 4.0, 'ATPS_GRAD').
    """
    protons = gradient_protons(tm)
    atp = [m.id for m in tm.model.metabolites if _role(m) == "atp"]
    for proton in protons:
        compartment = _compartment_of(tm, proton)
        low, high = tm.log_bounds.get(proton, (math.nan, math.nan))
        if compartment is not None:
            ph_out = compartment.ph
        elif math.isfinite(low) and abs(high - low) < 1e-9:
            ph_out = -low / math.log(10.0)
        else:
            continue
        for reaction in tm.model.reactions:
            coef = {m.id: c for m, c in reaction.metabolites.items()}
            n_h, n_atp = coef.get(proton, 0.0), sum(coef.get(a, 0.0) for a in atp)
            if n_h and n_atp and n_h * n_atp < 0:   # takes outer protons in, makes ATP
                return tm.conditions.ph - ph_out, abs(n_h / n_atp), reaction.id
    return None


def _compartment_of(tm: ThermoModel, met_id: str):
    """The environment's :class:`~tfa.conditions.Compartment` of a compound outside the cell, or
    None (a compound of the cell, or of a compartment the environment does not describe)."""
    compartments = getattr(tm.compound_table, "compartments", None) or {}
    met = tm.model.metabolites.get_by_id(met_id)
    return compartments.get(met.compartment) if met.compartment else None


def energy_per_proton(tm: ThermoModel, ln_activity: Mapping[str, float], proton: str) -> float:
    """Free energy released by one outer proton entering, kJ/mol:
    e = μ'(H⁺ in) − μ'(H⁺ out).

    For a proton of a compartment the environment describes (pH_out, Δψ = ψ_cell − ψ_out):
    e = −RT ln 10 (pH − pH_out) + F Δψ (Mitchell 1961,
    :func:`tfa.thermo.membrane.proton_inflow_energy`). For a fed outer proton with its own
    activity: e = −RT (ln 10 · pH + ln a_out); the inner proton is fixed by the pH (μ' = 0 after
    the Legendre transform, Alberty 2003), the outer one has the species data of H⁺
    (ΔfG'° = RT ln 10 · pH) and its activity, and no membrane potential. NaN when neither applies.

    >>> from tfa.conditions import Conditions
    >>> class T:  # 70 degC, pH 7.5, outer pH 5.5: -RT ln10 * 2 (the bundled setting)
    ...     conditions = Conditions.from_celsius(70, ph=7.5)
    >>> round(energy_per_proton(T, {"h_out": math.log(10 ** -5.5)}, "h_out"), 2)
    -13.14
    """
    compartment = _compartment_of(tm, proton) if hasattr(tm, "model") else None
    if compartment is not None:
        from ..thermo.membrane import proton_inflow_energy

        return proton_inflow_energy(tm.conditions.ph - compartment.ph,
                                    compartment.membrane_potential_V, tm.conditions.temperature)
    if proton not in ln_activity:
        return math.nan
    rt = tm.conditions.RT
    return -rt * (math.log(10.0) * tm.conditions.ph + float(ln_activity[proton]))


def atp_synthesis_energy(tm: ThermoModel, ln_activity: Mapping[str, float]) -> tuple[float, str]:
    """ΔrG' of ADP + Pi → ATP + H2O at the given concentrations (kJ/mol) and the reaction it is
    read from: a reaction of the network with exactly that stoichiometry, or its reverse
    (besides water and H⁺, fixed by the pH). NaN and "" when the network has none.

    ΔrG' = ΔrG'° + RT Σ_i ν_i ln a_i (Alberty 2003, eq. 4.1-4).
    """
    roles = {m.id: _role(m) for m in tm.model.metabolites}
    for rid, energy in tm.energies.items():
        reaction = tm.model.reactions.get_by_id(rid)
        net = {roles[m.id]: c for m, c in reaction.metabolites.items()
               if roles[m.id] not in ("water", "proton")}
        for sign in (1, -1):
            if net == {"adp": -sign, "phosphate": -sign, "atp": sign}:
                g = energy.standard + tm.RT * sum(
                    c * ln_activity[m.id] for m, c in reaction.metabolites.items()
                    if m.id not in tm.no_activity)
                return sign * g, rid
    return math.nan, ""


def energy_budget(tm: ThermoModel, fluxes: Mapping[str, float], delta_g: Mapping[str, float],
                  ln_activity: Mapping[str, float], solution: str = "",
                  verification: dict | None = None) -> EnergyBudget:
    """The energy budget of one steady state (see the module docstring for the equations).

    Parameters
    ----------
    tm : ThermoModel
        The network in the mode of the solution.
    fluxes : mapping
        Reaction id -> net flux [flux unit].
    delta_g : mapping
        Reaction id -> ΔrG' at the solution [kJ/mol] (NaN or missing: no energy).
    ln_activity : mapping
        Compound id -> ln activity at the solution.
    solution : str
        Which steady state this is, in words.

    Returns
    -------
    EnergyBudget

    Raises
    ------
    InputError
        When the demand reaction carries no flux.

    Examples
    --------
    Two-step chain A -> B -> C at flux 2 with a demand of 2 on C; ΔrG' = -10 and -4 kJ/mol. By
    hand, per unit demand: ΔG_net = (2 (-10) + 2 (-4)) / 2 = -14 kJ (tests/test_budget_routes.py).
    """
    demand = float(fluxes.get(tm.demand_id, 0.0)) if tm.demand_id else 0.0
    if abs(demand) <= 1e-12:
        raise InputError(f"energy budget: the demand reaction {tm.demand_id!r} carries no flux; "
                         "give a steady state that meets a demand")
    internal = [r for r in tm.internal_reactions() if r.id != tm.demand_id]
    net: dict[str, float] = {}
    total = uphill = downhill = 0.0
    without = []
    atp = [m.id for m in tm.model.metabolites if _role(m) == "atp"]
    made = spent = 0.0
    for reaction in internal:
        v = float(fluxes.get(reaction.id, 0.0)) / demand
        if v == 0.0:
            continue
        for m, c in reaction.metabolites.items():
            net[m.id] = net.get(m.id, 0.0) + c * v
            if m.id in atp:
                made += max(0.0, c * v)
                spent += max(0.0, -c * v)
        g = float(delta_g.get(reaction.id, math.nan))
        if not math.isfinite(g):
            if abs(v) > 1e-9:
                without.append(reaction.id)
            continue
        total += v * g
        if v * g > 0:
            uphill += v * g
        else:
            downhill += v * g
    net = {m: c for m, c in net.items() if abs(c) > NET_TOLERANCE}
    protons = gradient_protons(tm)
    n_h = sum(-net.get(p, 0.0) for p in protons)
    e_h = energy_per_proton(tm, ln_activity, protons[0]) if protons else math.nan
    gradient = n_h * e_h if n_h else 0.0
    h2 = [m.id for m in tm.model.metabolites if _role(m) == "h2"]
    h2_used = sum(-net.get(m, 0.0) for m in h2)
    mets = {m.id: m for m in tm.model.metabolites}
    carbon = sum(-c * _carbon(mets[m]) for m, c in net.items() if c < 0)
    synthesis, _ = atp_synthesis_energy(tm, ln_activity)
    return EnergyBudget(tm.mode, solution, net, total, gradient, n_h, e_h, made, spent, synthesis,
                        uphill, downhill, h2_used, carbon, without, dict(verification or {}))
