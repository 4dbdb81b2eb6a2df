"""The energy budget of a steady state, the carbon routes that ran,
the energy profile along one connected path, and the words of the summary.

Small hand-built networks with hand-derived answers (the derivations are written beside each
check), and the bundled network for the connectedness of the profile and the written files.
"""

from __future__ import annotations

import json
import math

import cobra
import pandas as pd
import pytest

from tfa.analyses.budget import (atp_synthesis_energy, energy_budget, energy_per_proton,
                                 gradient_atp_coupling)
from tfa.analyses.carbon_paths import (carbon_routes, steps_share_carbon,
                                       transferable_carbon)
from tfa.analyses.route import connect_steps, delta_g_at, energy_profile
from tfa.analyses.steady_state import least_flux_state
from tfa.conditions import Conditions
from tfa.network.thermo_model import ReactionEnergy, ThermoModel

#: R in kJ/(mol K), CODATA 2018 (exact SI value 8.314462618 J/(mol K)).
R = 8.314462618e-3


def _model(reactions: dict[str, dict[str, float]], formulas: dict[str, str],
           roles: dict[str, str] | None = None, pathways: dict[str, str] | None = None
           ) -> cobra.Model:
    model = cobra.Model("hand")
    mets = {m: cobra.Metabolite(m, formula=f, charge=0) for m, f in formulas.items()}
    for m, role in (roles or {}).items():
        mets[m].notes["role"] = role
    model.add_metabolites(list(mets.values()))
    for rid, st in reactions.items():
        r = cobra.Reaction(rid, lower_bound=-1000, upper_bound=1000)
        model.add_reactions([r])
        r.add_metabolites({mets[m]: c for m, c in st.items()})
        r.notes["pathway"] = (pathways or {}).get(rid, "")
    return model


def _tm(model: cobra.Model, standard: dict[str, float], demand: str, celsius: float = 25.0,
        ph: float = 7.0, sigma: float = 1.0) -> ThermoModel:
    energies = {rid: ReactionEnergy(rid, g, sigma, "species") for rid, g in standard.items()}
    bounds = {m.id: (math.log(1e-6), math.log(1e-2)) for m in model.metabolites}
    no_activity = {m.id for m in model.metabolites if (m.notes or {}).get("role") in ("proton", "water")}
    return ThermoModel(model, Conditions.from_celsius(celsius, ph=ph), energies, bounds,
                       no_activity=no_activity, demand_id=demand)


# ---------------------------------------------------------------------------------------------
# 1. the energy budget
# ---------------------------------------------------------------------------------------------

def chain():
    """CO2 -> A -> B, demand on B: a two-step chain (one carbon each, hand-built)."""
    model = _model({"EX_co2": {"co2": -1}, "R1": {"co2": -1, "a": 1}, "R2": {"a": -1, "b": 1},
                    "DM_b": {"b": -1}},
                   {"co2": "CO2", "a": "CH2O2", "b": "CH2O2"})
    return _tm(model, {"R1": -8.0, "R2": -3.0}, "DM_b")


def test_budget_of_a_two_step_chain_is_the_flux_weighted_sum_by_hand():
    """Σ flux × ΔrG' by hand (Alberty 2003, ch. 4: energies of reactions add): fluxes 2 and 2,
    demand 2, ΔrG' -10 and -4 kJ/mol -> (2 (-10) + 2 (-4)) / 2 = -14 kJ per unit demand, all of
    it downhill; no uphill step, no gradient, 1 CO2 taken up per unit demand."""
    tm = chain()
    fluxes = {"EX_co2": -2.0, "R1": 2.0, "R2": 2.0, "DM_b": 2.0}
    b = energy_budget(tm, fluxes, {"R1": -10.0, "R2": -4.0}, {"co2": 0.0, "a": -5.0, "b": -6.0})
    assert b.delta_g_net == pytest.approx(-14.0)
    assert b.downhill_dissipated == pytest.approx(-14.0)
    assert b.uphill_supplied == 0.0
    assert b.gradient == 0.0 and b.feed_chemistry == pytest.approx(-14.0)
    assert b.net_reaction == pytest.approx({"co2": -1.0, "b": 1.0})
    assert b.carbon_taken_up == pytest.approx(1.0)
    assert b.equation() == "1 co2 → 1 b"


def test_budget_counts_an_uphill_step_as_energy_supplied():
    """Same chain with R2 uphill at +6 kJ/mol (as in a minimal-uphill solution): by hand,
    supplied = 2 × 6 / 2 = 6 kJ, dissipated = -10 kJ, net = -4 kJ per unit demand."""
    tm = chain()
    fluxes = {"EX_co2": -2.0, "R1": 2.0, "R2": 2.0, "DM_b": 2.0}
    b = energy_budget(tm, fluxes, {"R1": -10.0, "R2": 6.0}, {"co2": 0.0, "a": -5.0, "b": -6.0})
    assert b.uphill_supplied == pytest.approx(6.0)
    assert b.downhill_dissipated == pytest.approx(-10.0)
    assert b.delta_g_net == pytest.approx(-4.0)


def test_budget_needs_a_demand_flux():
    from tfa.errors import InputError

    with pytest.raises(InputError, match="DM_b"):
        energy_budget(chain(), {"R1": 1.0}, {"R1": -1.0}, {})


def gradient_network():
    """H2 + CO2 -> formate, and ATP from 4 outer protons (ADP + Pi + 4 H+out -> ATP + H2O + 3 H+)
    spent on formate -> P (hand-built; pH 7.5 inside, outer pH 5.5, 70 degC: the demo setting)."""
    formulas = {"h2": "H2", "co2": "CO2", "for": "CHO2", "p": "CHO2", "h": "H", "h_out": "H",
                "h2o": "H2O", "atp": "C10H12N5O13P3", "adp": "C10H12N5O10P2", "pi": "HO4P"}
    roles = {"h2": "h2", "h": "proton", "h2o": "water", "atp": "atp", "adp": "adp",
             "pi": "phosphate"}
    model = _model({"EX_h2": {"h2": -1}, "EX_co2": {"co2": -1}, "EX_h_out": {"h_out": -1},
                    "EX_h": {"h": -1}, "EX_h2o": {"h2o": -1}, "EX_pi": {"pi": -1},
                    "HDCR": {"h2": -1, "co2": -1, "for": 1, "h": 1},
                    "ATPS": {"adp": -1, "pi": -1, "h_out": -4, "atp": 1, "h2o": 1, "h": 3},
                    "ATPM": {"atp": -1, "h2o": -1, "adp": 1, "pi": 1, "h": 1},
                    "USE": {"for": -1, "atp": -1, "h2o": -1, "p": 1, "adp": 1, "pi": 1, "h": 1},
                    "DM_p": {"p": -1}}, formulas, roles)
    model.metabolites.h_out.charge = 1
    model.metabolites.h.charge = 1
    tm = _tm(model, {"HDCR": 1.0, "ATPS": 30.0, "ATPM": -30.0, "USE": -20.0}, "DM_p",
             celsius=70.0, ph=7.5)
    tm.log_bounds["h_out"] = (math.log(10 ** -5.5), math.log(10 ** -5.5))
    return tm


def test_gradient_share_atp_and_h2_by_hand():
    """One turnover: 4 outer protons in, each releasing -RT ln10 (7.5 - 5.5) = -13.14 kJ/mol at
    70 degC (RT = 2.853 kJ/mol), so the gradient gives -52.6 kJ; one ATP made and spent; one H2
    per carbon; ATP per H2 = 1. The feed chemistry is the rest of Σ flux × ΔrG'."""
    tm = gradient_network()
    ln = {"h2": math.log(1e-3), "co2": math.log(1e-2), "for": math.log(1e-4),
          "p": math.log(1e-4), "h_out": math.log(10 ** -5.5), "atp": math.log(1e-3),
          "adp": math.log(1e-3), "pi": math.log(1e-3)}
    fluxes = {"EX_h2": -1.0, "EX_co2": -1.0, "EX_h_out": -4.0, "HDCR": 1.0, "ATPS": 1.0,
              "USE": 1.0, "DM_p": 1.0, "EX_h": 5.0, "EX_pi": 0.0, "EX_h2o": 0.0}
    dg = {"HDCR": -2.0, "ATPS": -1.5, "USE": -40.0}
    b = energy_budget(tm, fluxes, dg, ln)
    rt = R * 343.15
    assert b.energy_per_proton == pytest.approx(-rt * math.log(10) * 2.0)
    assert b.energy_per_proton == pytest.approx(-13.14, abs=0.01)
    assert b.protons_in == pytest.approx(4.0)
    assert b.gradient == pytest.approx(4 * b.energy_per_proton)
    assert b.delta_g_net == pytest.approx(-43.5)
    assert b.feed_chemistry == pytest.approx(-43.5 - 4 * b.energy_per_proton)
    assert (b.atp_made, b.atp_spent) == pytest.approx((1.0, 1.0))
    assert (b.h2_consumed, b.carbon_taken_up, b.h2_per_carbon, b.atp_per_h2) == pytest.approx(
        (1.0, 1.0, 1.0, 1.0))
    # ΔrG' of ADP + Pi -> ATP + H2O from ATPM reversed: -(-30 + RT ln(1e-3 1e-3 / 1e-3))
    synthesis, rid = atp_synthesis_energy(tm, ln)
    assert rid == "ATPM"
    assert synthesis == pytest.approx(30.0 - rt * math.log(1e-3))
    assert gradient_atp_coupling(tm) == pytest.approx((2.0, 4.0, "ATPS"))


def test_energy_per_proton_matches_the_demo_setting_comment():
    """models/ancestral_core/environment.toml: each H+ entering gains RT ln10 (7.5 - 5.5) =
    13.1 kJ/mol at 70 degC."""
    tm = gradient_network()
    assert energy_per_proton(tm, {"h_out": math.log(10 ** -5.5)}, "h_out") == pytest.approx(
        -13.1, abs=0.05)


# ---------------------------------------------------------------------------------------------
# 2. the routes that ran
# ---------------------------------------------------------------------------------------------

def two_routes():
    """CO2 to serine-like P (C3) by two routes: route 1 fixes CO2 into formate (C1) and joins it
    to a C2 made from 2 CO2 (tag 'route one'); route 2 makes a C3 straight from 3 CO2
    ('route two'); a THF-like carrier (C19) carries the formate (its carbon is not passed on)."""
    formulas = {"co2": "CO2", "for": "CHO2", "thf": "C19H21N7O6", "fthf": "C20H21N7O7",
                "c2": "C2H3O2", "c3": "C3H5O3", "p": "C3H7NO3"}
    reactions = {"EX_co2": {"co2": -1},
                 "FIX1": {"co2": -1, "for": 1},               # route one
                 "LOAD": {"for": -1, "thf": -1, "fthf": 1},
                 "C2S": {"co2": -2, "c2": 1},
                 "JOIN": {"fthf": -1, "c2": -1, "c3": 1, "thf": 1},
                 "FIX2": {"co2": -3, "c3": 1},                 # route two
                 "AMIN": {"c3": -1, "p": 1},
                 "DM_p": {"p": -1}}
    tags = {"FIX1": "route one", "LOAD": "route one", "C2S": "route one", "JOIN": "route one",
            "FIX2": "route two", "AMIN": "amino acids"}
    return _model(reactions, formulas, pathways=tags)


def test_two_routes_are_found_with_their_carbon_shares_by_hand():
    """Demand 1 of P (3 C); route one carries 0.75 of it, route two 0.25. By hand: route one
    takes 3 × 0.75 = 2.25 C (formate 0.75 + C2 1.5), route two 0.75 C, of 3 C in all: shares
    0.25 + 0.5 (the two branches of route one) and 0.25."""
    model = two_routes()
    fluxes = {"EX_co2": -3.0, "FIX1": 0.75, "LOAD": 0.75, "C2S": 0.75, "JOIN": 0.75,
              "FIX2": 0.25, "AMIN": 1.0, "DM_p": 1.0}
    result = carbon_routes(model, fluxes, "DM_p")
    assert result.carbon_in == pytest.approx(3.0)
    assert result.unassigned == pytest.approx(0.0, abs=1e-12) and not result.unbalanced
    by_fix = result.fixation_shares()
    assert by_fix == pytest.approx({"C2S (route one)": 0.5, "FIX1 (route one)": 0.25,
                                    "FIX2 (route two)": 0.25})
    assert sum(p.share for p in result.paths) == pytest.approx(1.0)
    steps = {", ".join(s.reaction for s in p.steps): p.share for p in result.paths}
    assert steps == pytest.approx({"C2S, JOIN, AMIN": 0.5, "FIX1, LOAD, JOIN, AMIN": 0.25,
                                   "FIX2, AMIN": 0.25})
    # the carrier lends no carbon; 10-formyl-THF carries one
    carbon = transferable_carbon(model)
    assert (carbon["thf"], carbon["fthf"], carbon["c3"]) == (0.0, 1.0, 3.0)
    bundled = transferable_carbon(tfa_network())
    # THF (C19) and CoA (C21) lend none; the C1 units of the THF esters one, acetyl-CoA two,
    # succinyl-CoA four (textbook structures)
    assert {m: bundled[m] for m in ("thf", "coa", "fthf", "methf", "mlthf", "mthf", "accoa",
                                    "succoa", "ump", "nad", "atp")} == {
        "thf": 0, "coa": 0, "fthf": 1, "methf": 1, "mlthf": 1, "mthf": 1, "accoa": 2,
        "succoa": 4, "ump": 9, "nad": 0, "atp": 0}
    routes = {p.route for p in result.paths}
    assert routes == {"route one → amino acids", "route two → amino acids"}


def test_a_transamination_passes_the_keto_acids_skeleton():
    """oaa + glu -> asp + akg: by skeleton matching (equal carbon, alike formulas) the C4 goes
    to aspartate and the C5 to 2-oxoglutarate (textbook transamination), not mixed."""
    model = _model({"EX_oaa": {"oaa": -1}, "EX_glu": {"glu": -1}, "ASPT": {"oaa": -1, "glu": -1,
                    "asp": 1, "akg": 1}, "DM": {"asp": -1, "akg": -1}},
                   {"oaa": "C4H2O5", "glu": "C5H8NO4", "asp": "C4H6NO4", "akg": "C5H4O5"})
    result = carbon_routes(model, {"EX_oaa": -1, "EX_glu": -1, "ASPT": 1, "DM": 1}, "DM")
    pairs = {(p.steps[0].compound_in, p.steps[0].compound_out): p.carbon_flux for p in result.paths}
    assert pairs == pytest.approx({("oaa", "asp"): 4.0, ("glu", "akg"): 5.0})


def test_least_flux_state_drops_a_detour_by_hand():
    """A -> B directly (R1) or round A -> C -> B (R3, R4) with B -> A back (R5) as a cycle: at
    the same directions the least total flux is R1 alone, 1 unit (hand-derived)."""
    model = _model({"EX_a": {"a": -1}, "R1": {"a": -1, "b": 1}, "R3": {"a": -1, "c": 1},
                    "R4": {"c": -1, "b": 1}, "R5": {"b": -1, "a": 1}, "DM_b": {"b": -1}},
                   {"a": "C", "b": "C", "c": "C"})
    model.reactions.DM_b.lower_bound = 1.0
    state = least_flux_state(model, {"EX_a": -1, "R1": 1, "R3": 2, "R4": 2, "R5": 2, "DM_b": 1},
                             {"R1", "R3", "R4", "R5"})
    assert {k: round(v, 9) for k, v in state.fluxes.items() if v} == {"EX_a": -1.0, "R1": 1.0,
                                                                       "DM_b": 1.0}
    assert state.total_after == pytest.approx(3.0) and state.total_before == pytest.approx(9.0)


def test_named_route_breaks_and_idle_steps_are_said():
    """A named route whose consecutive steps share no carbon compound is reported broken
    there; ΔrG' of each step at given concentrations by Alberty 2003 eq. 4.1-4, by hand."""
    tm = chain()
    carbon = transferable_carbon(tm.model)
    steps, breaks = connect_steps(tm.model, [("R1", 1), ("R2", 1)], carbon)
    assert breaks == [] and steps == [("R1", 1, "co2", "a"), ("R2", 1, "a", "b")]
    _, breaks = connect_steps(tm.model, [("R2", 1), ("R1", 1)], carbon)
    assert breaks == ["R2 and R1 share no carbon compound"]
    ln = {"co2": 0.0, "a": math.log(1e-3), "b": math.log(1e-2)}
    rt = R * 298.15
    # R2: A -> B, ΔrG'° = -3, [B]/[A] = 10: -3 + RT ln 10 = -3 + 5.708 = +2.708 kJ/mol
    assert delta_g_at(tm, "R2", ln) == pytest.approx(-3.0 + rt * math.log(10.0))
    table = energy_profile(tm, steps, ln, {"R1": 1.0})
    assert list(table["flux"]) == [1.0, 0.0]
    assert list(table["near_equilibrium"]) == [False, True]   # |2.71| < RT ln 10 = 5.71
    assert "cumulative_delta_g_kJ_per_mol" not in table.columns


# ---------------------------------------------------------------------------------------------
# the bundled network: a connected profile, the files and the words
# ---------------------------------------------------------------------------------------------

@pytest.fixture(scope="module")
def bundled(bundled_run):
    """The folder of the session's ``tfa assess`` on the bundled network (conftest.py)."""
    return bundled_run.out


def tfa_network():
    import tfa

    return tfa.load_network()


def _native_model():
    import tfa

    return tfa.load_network()


def test_profile_path_is_connected_by_carbon(bundled):
    """Consecutive steps of the profile share a carbon compound: the product of one is a
    substrate of the next, checked on the reactions' equations."""
    from tfa.analyses.carbon_paths import PathStep

    table = pd.read_csv(bundled / "energy_profile.csv")
    assert len(table) >= 3
    model = _native_model()
    carbon = transferable_carbon(model)
    for (_, a), (_, b) in zip(table.iloc[:-1].iterrows(), table.iloc[1:].iterrows()):
        assert a["compound_out"] == b["compound_in"]
        ra, rb = model.reactions.get_by_id(a["reaction"]), model.reactions.get_by_id(b["reaction"])
        da = 1 if a["direction"] == "forward" else -1
        db = 1 if b["direction"] == "forward" else -1
        made = {m.id for m, c in ra.metabolites.items() if c * da > 0}
        used = {m.id for m, c in rb.metabolites.items() if c * db < 0}
        assert a["compound_out"] in made and a["compound_out"] in used
        assert carbon[a["compound_out"]] > 0
    steps = [PathStep(r.reaction, 1 if r.direction == "forward" else -1, r.compound_in,
                      r.compound_out) for r in table.itertuples()]
    assert steps_share_carbon(steps, carbon, model)
    assert not steps_share_carbon(steps[::-1], carbon, model)   # the check can fail
    # every step carries flux in the direction shown
    signs = table["flux"] * table["direction"].map({"forward": 1, "backward": -1})
    assert (signs > 0).all()
    # the path starts from the feed's CO2 and ends in a demanded compound
    demand = model.reactions.get_by_id("demand_precursors")
    assert table["compound_in"].iloc[0] == "co2"
    assert table["compound_out"].iloc[-1] in {m.id for m in demand.metabolites}


def test_budget_of_the_bundled_network_adds_up(bundled):
    """The split is exact: gradient + feed chemistry = uphill + downhill = ΔrG' of the net
    reaction; the carbon paths of a mode share out all the carbon taken up."""
    table = pd.read_csv(bundled / "energy_budget.csv").set_index("mode")
    assert {"native", "h2_only", "no_atp_bare"} <= set(table.index)
    for mode, row in table.iterrows():
        total = row["delta_g_net_kJ_per_demand"]
        assert row["gradient_kJ_per_demand"] + row["feed_chemistry_kJ_per_demand"] == pytest.approx(total)
        assert (row["uphill_supplied_kJ_per_demand"] + row["downhill_dissipated_kJ_per_demand"]
                == pytest.approx(total))
    native = table.loc["native"]
    assert native["uphill_supplied_kJ_per_demand"] == 0.0    # feasible: every step downhill
    # a member of a minimal uphill set runs uphill, or downhill by less than the least driving
    # force (then it supplies nothing); bare chemistry drives eleven steps uphill
    assert (table["uphill_supplied_kJ_per_demand"] >= 0).all()
    assert table.loc["no_atp_bare", "uphill_supplied_kJ_per_demand"] > 0
    # ATP is made by 4 outer protons (ATPS_GRAD, downhill in this steady state), so the
    # phosphorylation potential lies below what they release: 4 RT ln10 (7.5 - 5.5) = 52.6
    # kJ/mol at 70 degC (hand-derived); and above 40 kJ/mol, the low end of phosphorylation
    # potentials in growing cells (Thauer, Jungermann & Decker 1977, from memory: 40-70 kJ/mol)
    gain = 4 * R * 343.15 * math.log(10) * 2.0
    assert 40.0 < native["atp_synthesis_delta_g_kJ_per_mol"] < gain
    assert native["energy_per_proton_kJ_per_mol"] == pytest.approx(-gain / 4)
    assert native["protons_in_per_demand"] > 0 and native["atp_made_per_demand"] > 0
    # the carrier rule balances the carbon of every reaction that ran (THF, methenyl-THF, CoA)
    notes = json.loads((bundled / "summary.json").read_text())["notes"]
    assert not [n for n in notes if "does not balance" in n], notes
    routes = pd.read_csv(bundled / "carbon_routes.csv")
    for mode in table.index:
        paths = routes[(routes["mode"] == mode) & (routes["kind"] == "path")]
        assert paths["carbon_share"].sum() == pytest.approx(1.0, abs=1e-6)


def test_assess_writes_budget_routes_and_the_new_figure(bundled):
    out = bundled
    for stem in ("energy_budget", "carbon_routes", "energy_profile"):
        csv = pd.read_csv(out / f"{stem}.csv")
        rows = json.loads((out / f"{stem}.json").read_text())
        assert len(csv) > 0
        assert len(rows if isinstance(rows, list) else rows.get("rows", rows)) > 0
    for suffix in ("png", "svg"):
        assert (out / f"energy_profile.{suffix}").stat().st_size > 1000
    page = (out / "report.html").read_text(encoding="utf-8")
    for words in ("Energy budget", "The routes that ran", "Energy budget per mode",
                  "Carbon paths per mode", "(file: energy_profile.png / .svg)",
                  "data:image/svg+xml;base64,", "near equilibrium", "dissolved at 1 mol/L"):
        assert words in page, words


def test_summary_names_the_route_and_what_pays(bundled):
    text = json.loads((bundled / "summary.json").read_text())["summary"]
    text = text if isinstance(text, str) else "\n".join(text)
    assert "runs with ATP from the proton gradient (ΔpH 2.0, 4 H⁺/ATP): yes" in text
    assert "ATP regenerated inside" not in text
    route = next(line for line in text.splitlines() if line.startswith("carbon in the native"))
    assert "max-min driving-force solution" in route and "enters through" in route
    pays = next(line for line in text.splitlines() if line.startswith("paid for by"))
    assert "proton gradient" in pays and "H⁺ in" in pays


def test_a_named_route_says_which_steps_carry_no_flux():
    """--route with steps the steady state does not use: the profile keeps them (ΔrG' at the
    solution's concentrations, flux 0), the summary and the report say so, the figure draws them
    pale."""
    import tfa
    from tfa.report.figures import energy_profile_figure

    from tfa.assessment.registry import step_ids

    needed = ("coverage", "feasibility", "driving_force", "energy_profile")
    result = tfa.assess(route="HDCR,FTHFS,MTHFC,MTHFD,MTHFR,ACS",
                        skip=[s for s in step_ids() if s not in needed])
    table = result.energy_profile.table
    assert list(table["reaction"]) == ["HDCR", "FTHFS", "MTHFC", "MTHFD", "MTHFR", "ACS"]
    idle = list(table.loc[table["flux"] == 0, "reaction"])
    assert idle   # the max-min driving-force solution does not run the whole methyl branch
    line = next(x for x in result.summary().splitlines() if x.startswith("energy profile: "))
    assert all(rid in line for rid in idle) and "no flux" in line
    bars = list(energy_profile_figure(table).axes[0].containers[0])
    assert [bar.get_alpha() == 0.35 for bar in bars] == list(table["flux"] == 0)


def test_dg_names_the_standard_state_of_each_gas(capsys):
    """The same reaction with dissolved and with gaseous H2 and CO2: the standard state is
    printed beside ΔrG'°, and the two differ by the solution energies of the gases. With gases at
    1 bar, H2 + CO2 -> formate + H+ at pH 7, 25 degC is +3.4 kJ/mol (Thauer, Jungermann & Decker
    1977, Table of ΔG°', from memory)."""
    from tfa.cli import main

    assert main(["dg", "H2(g) + CO2(g) <=> formate + H+"]) == 0
    gas = capsys.readouterr().out
    assert "standard    H2(g), CO2(g) gas at 1 bar" in gas
    standard = float(gas.split("ΔrG'°")[1].split("±")[0])
    assert standard == pytest.approx(3.4, abs=1.0)
    assert main(["dg", "H2 + CO2 <=> formate + H+"]) == 0
    dissolved = capsys.readouterr().out
    assert "standard    H2, CO2 dissolved at 1 mol/L" in dissolved
    assert float(dissolved.split("ΔrG'°")[1].split("±")[0]) < standard - 20   # solution energies
