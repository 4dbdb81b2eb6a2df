"""Compartments and the proton-motive force, on small hand-built networks
with hand-derived answers.

Sign convention under test: Δψ = ψ(cell) − ψ(compartment) (the environment's
``membrane_potential_mV``), ΔpH = pH(cell) − pH(compartment); one H+ entering the cell has
ΔG = −RT ln10 ΔpH + F Δψ (Mitchell 1961, Nature 191:144, doi:10.1038/191144a0). Constants:
CODATA 2018 (R = 8.314462618 J/mol/K, F = 96485.33212 C/mol).
"""

from __future__ import annotations

import math

import pytest

from tfa.network.compartments import with_gradient_scaled, without_gradient

R = 8.314462618e-3       # kJ/mol/K, CODATA 2018
F = 96.48533212          # kJ/mol/V, CODATA 2018
T70 = 343.15

COMPOUNDS = """id\tname\tformula\tcharge\tthermo_key\trole\tcompartment
h2o\twater\tH2O\t0\tH2O\twater\t
h\tproton\tH\t1\tH+\tproton\t
h_e\touter proton\tH\t1\tH+\t\te
adp\tADP\tC10H12N5O10P2\t-3\tADP\tadp\t
atp\tATP\tC10H12N5O13P3\t-4\tATP\tatp\t
pi\tphosphate\tHO4P\t-2\tphosphate\tphosphate\t
pi_e\touter phosphate\tHO4P\t-2\tphosphate\t\te
"""

REACTIONS = """id\tequation
EX_h2o\th2o <=>
EX_h\th <=>
EX_h_e\th_e <=>
EX_adp\tadp <=>
EX_pi\tpi <=>
EX_pi_e\tpi_e <=>
HT\th_e <=> h
PIT\tpi_e <=> pi
ATPS\tadp + pi + 4 h_e <=> atp + h2o + 3 h
DM_atp\tatp ->
"""


@pytest.fixture()
def network(tmp_path):
    from tfa.network.io_table import read_network

    (tmp_path / "compounds.tsv").write_text(COMPOUNDS)
    (tmp_path / "reactions.tsv").write_text(REACTIONS)
    return read_network(tmp_path / "reactions.tsv")


def _environment(ph_out=5.5, psi_mV=-150.0, n=None, atp=1e-3, adp=1e-3, pi=1e-2, ph=7.5):
    from tfa.conditions import Compartment, Conditions
    from tfa.network.environment import Environment

    return Environment("hand", Conditions.from_celsius(70, ph=ph, ionic_strength=0.0),
                       feed={"adp": adp, "pi": pi, "pi_e": pi},
                       bounds={"atp": (atp, atp)}, demand_reaction="DM_atp", demand_flux=0.01,
                       compartments={"e": Compartment("e", ph=ph_out, membrane_potential_mV=psi_mV)},
                       ion_stoichiometry={} if n is None else {"ATPS": n})


def test_one_proton_from_ph_5_5_at_minus_150_mV_into_ph_7_5_at_70_degC(network):
    """Mitchell's relation by hand: −RT ln10 (7.5 − 5.5) + F (−0.150 V)
    = −2 × 6.56951 − 14.47280 = −27.6118 kJ/mol (R, F: CODATA 2018)."""
    from tfa.network.energies import prepare
    from tfa.thermo.membrane import proton_inflow_energy

    by_hand = -R * T70 * math.log(10) * 2.0 + F * (-0.150)
    assert by_hand == pytest.approx(-27.6118, abs=1e-3)
    assert proton_inflow_energy(2.0, -0.150, T70) == pytest.approx(by_hand, abs=1e-9)
    tm = prepare(network, _environment(), "native")
    assert tm.energies["HT"].standard == pytest.approx(by_hand, abs=1e-6)
    # the proton has no activity variable in either compartment: this is its whole energy
    assert {"h", "h_e"} <= tm.no_activity
    # each part alone: ΔpH only, Δψ only
    assert prepare(network, _environment(psi_mV=0.0), "native").energies["HT"].standard == \
        pytest.approx(-2 * R * T70 * math.log(10), abs=1e-6)
    assert prepare(network, _environment(ph_out=7.5), "native").energies["HT"].standard == \
        pytest.approx(F * -0.150, abs=1e-6)


def test_a_charged_ion_moves_by_nernst(network):
    """HPO4(2-) (z = −2) into a cell at Δψ = −150 mV with no pH difference: uphill by
    z F Δψ = (−2)(96.485)(−0.150) = +28.95 kJ/mol at equal activities (Nernst; by hand)."""
    from tfa.network.energies import prepare

    tm = prepare(network, _environment(ph_out=7.5, psi_mV=-150.0), "native")
    assert tm.energies["PIT"].standard == pytest.approx(-2 * F * -0.150, abs=1e-6)
    assert tm.energies["PIT"].uncertainty == pytest.approx(0.0, abs=1e-9)   # the σ cancels
    # with no membrane potential and equal pH, transport carries no energy
    flat = prepare(network, _environment(ph_out=7.5, psi_mV=0.0), "native")
    assert flat.energies["PIT"].standard == pytest.approx(0.0, abs=1e-9)


def _phosphorylation_potential(network, env) -> float:
    """ΔG of ADP + Pi -> ATP + H2O at the environment's concentrations, kJ/mol, from the species
    data alone (the database's reaction energy, no compartment involved) and RT ln Q."""
    from tfa.thermo import ThermoDatabase

    c = env.conditions
    g0 = ThermoDatabase.load().reaction_energy("ADP + phosphate <=> ATP + H2O", c).standard
    atp = env.bounds["atp"][0]
    return g0 + c.RT * math.log(atp / (env.feed["adp"] * env.feed["pi"]))


@pytest.mark.parametrize("ph_out,psi_mV", [(5.5, -150.0), (6.5, -60.0)])
def test_atp_synthase_runs_exactly_when_n_protons_pay_the_phosphorylation_potential(network, ph_out,
                                                                                   psi_mV):
    """n H+/ATP: ATP synthesis (with the demand pulling ATP out) is feasible exactly when
    n × (RT ln10 ΔpH − F Δψ) exceeds the phosphorylation potential ΔG_p (Mitchell 1961), here
    with the least driving force δ of the problem: feasible iff n·|ΔG_H| − ΔG_p > δ."""
    from tfa.analyses import feasibility
    from tfa.network.energies import prepare
    from tfa.problem import ProblemOptions

    options = ProblemOptions(time_limit=60)
    env = _environment(ph_out=ph_out, psi_mV=psi_mV)
    dg_p = _phosphorylation_potential(network, env)
    gain = -(-R * T70 * math.log(10) * (7.5 - ph_out) + F * psi_mV / 1000.0)   # per H+, > 0
    assert 40.0 < dg_p < 70.0
    n_star = (dg_p + options.min_driving_force) / gain
    for n, expected in ((n_star * 0.97, False), (n_star * 1.03, True)):
        tm = prepare(network, _environment(ph_out=ph_out, psi_mV=psi_mV, n=n), "native")
        atps = {m.id: c for m, c in tm.model.reactions.ATPS.metabolites.items()}
        assert atps["h_e"] == pytest.approx(-n) and atps["h"] == pytest.approx(n - 1)
        # the reaction energy itself: ΔG_p − n × gain, by hand
        g = tm.energies["ATPS"].standard + tm.RT * (math.log(env.bounds["atp"][0])
                                                    - math.log(env.feed["adp"] * env.feed["pi"]))
        assert g == pytest.approx(dg_p - n * gain, abs=1e-6)
        result = feasibility(tm, options)
        assert result.feasible is expected, (n, n_star, result.message)
        if expected:
            assert all(c.passed for c in result.certificates)


def test_the_ion_stoichiometry_parameter_keeps_the_balance(network):
    from tfa.network.compartments import set_ion_stoichiometry
    from tfa.network.checks import balance_problem

    with network:
        set_ion_stoichiometry(network, {"ATPS": 3})
        atps = network.reactions.ATPS
        assert {m.id: c for m, c in atps.metabolites.items()}["h_e"] == -3
        assert not balance_problem(atps)
    assert {m.id: c for m, c in network.reactions.ATPS.metabolites.items()}["h_e"] == -4   # undone


def test_environment_compartments_are_checked(tmp_path):
    from tfa.errors import ConditionsError, NetworkFileError
    from tfa.network.environment import Environment

    base = ("[conditions]\ntemperature_C = 25.0\npH = 7.0\nionic_strength_M = 0.1\n"
            "[demand]\nreaction = \"DM_atp\"\nflux = 0.01\n")
    path = tmp_path / "env.toml"
    path.write_text(base + "[compartments.e]\npH = 6.0\nmembrane_potential_mV = -120\n")
    env = Environment.from_toml(path)
    assert env.compartments["e"].ph == 6.0 and env.compartments["e"].membrane_potential_V == -0.12
    assert without_gradient(env).compartments["e"].ph == 7.0
    assert with_gradient_scaled(env, 0.5).compartments["e"].ph == pytest.approx(6.5)
    path.write_text(base + "[compartments.e]\nmembrane_potential_mV = -120\n")
    with pytest.raises(NetworkFileError, match="'pH' is missing"):
        Environment.from_toml(path)
    path.write_text(base + "[compartments.e]\npH = 6.0\npotential = -120\n")
    with pytest.raises(NetworkFileError, match="unknown key 'potential'"):
        Environment.from_toml(path)
    path.write_text(base + "[compartments.e]\npH = 16.0\n")
    with pytest.raises(ConditionsError, match="outside 0-14"):
        Environment.from_toml(path)


def test_a_compartment_without_a_stated_ph_is_warned_about(network):
    from tfa.conditions import Conditions
    from tfa.network.compartments import compartment_warnings
    from tfa.network.environment import Environment

    env = Environment("hand", Conditions(), demand_reaction="DM_atp", demand_flux=0.01)
    (text,) = compartment_warnings(network, env)
    assert "compartment(s) e have no stated pH" in text and "[compartments.ID]" in text
    assert compartment_warnings(network, _environment()) == []


def test_compartment_column_round_trips(network, tmp_path):
    from tfa.network.io_table import read_network, write_network

    reactions, _ = write_network(network, tmp_path / "copy")
    again = read_network(reactions)
    assert again.metabolites.h_e.compartment == "e" and again.metabolites.h.compartment == "c"


def test_least_gradient_of_an_atp_synthase_is_the_hand_derived_one(network):
    """With n = 4 H+/ATP and Δψ held in proportion, the least fraction s of the gradient at which
    ATP is made satisfies 4 s |ΔG_H| = ΔG_p + δ (Mitchell 1961; by hand), found by the verified
    bisection within its tolerance: a certified point above, no point below."""
    from tfa.analyses import feasibility
    from tfa.analyses.gradient import SCALE_TOLERANCE, least_gradient
    from tfa.network.energies import prepare
    from tfa.problem import ProblemOptions

    options = ProblemOptions(time_limit=60)
    env = _environment(ph_out=5.5, psi_mV=-150.0, n=4)
    dg_p = _phosphorylation_potential(network, env)
    gain = -(-R * T70 * math.log(10) * 2.0 + F * -0.150)
    s_star = (dg_p + options.min_driving_force) / (4 * gain)
    assert 0.0 < s_star < 1.0
    rows, check, words = least_gradient(
        env, lambda e: prepare(network, e, "native"),
        lambda tm, diagnose: feasibility(tm, options, diagnose=diagnose))
    (row,) = rows
    assert row["feasible"] and s_star <= row["gradient_scale"] <= s_star + SCALE_TOLERANCE
    assert row["delta_ph"] == pytest.approx(2.0 * row["gradient_scale"])
    assert row["membrane_potential_mV"] == pytest.approx(-150.0 * row["gradient_scale"])
    assert check["status"] in ("proven", "solver proof") and "certified point" in check["check"]
    # without the gradient nothing runs; with three times it, it does
    no = feasibility(prepare(network, without_gradient(env), "native"), options, diagnose=False)
    assert not no.feasible


# ------------------------------------------------------------------ cobra's textbook model
@pytest.fixture(scope="module")
def textbook_sbml(tmp_path_factory):
    """cobra's textbook model (E. coli core, compartments c and e) written to SBML, as in
    tests/test_own_networks.py."""
    import cobra

    path = tmp_path_factory.mktemp("textbook") / "e_coli_core.xml"
    cobra.io.write_sbml_model(cobra.io.load_model("textbook"), str(path))
    return path


def test_textbook_transport_energies_follow_the_stated_compartment_ph(textbook_sbml, caplog):
    """ATPS4r (adp_c + 4 h_e + pi_c <=> atp_c + h2o_c + 3 h_c) has ΔrG'° lower by
    4 RT ln10 per unit of ΔpH and by 4 F |Δψ| for a cell negative inside (Mitchell 1961; by
    hand at 25 degC: 4 × 5.7080 = 22.832 kJ/mol per pH unit, 4 × 14.473 = 57.891 kJ/mol at
    −150 mV); the phosphate symport PIt2r changes too; without a stated pH the user is told."""
    import logging

    from tfa.network.compartments import with_compartment
    from tfa.network.energies import prepare
    from tfa.network.inputs import resolve_inputs

    with caplog.at_level(logging.WARNING):
        inputs = resolve_inputs(textbook_sbml)
    told = [w for w in inputs.warnings if "compartment(s) e have no stated pH" in w]
    assert told and any("compartment(s) e have no stated pH" in r.getMessage() for r in caplog.records)
    model, env = inputs.model, inputs.environment
    assert model.metabolites.h_e.compartment == "e" and env.conditions.ph == 7.0
    rt_ln10 = R * env.conditions.temperature * math.log(10)
    energy = {}
    for ph_e, psi in ((7.0, 0.0), (6.0, 0.0), (7.0, -150.0)):
        tm = prepare(model, with_compartment(env, "e", ph=ph_e, membrane_potential_mV=psi), "native")
        energy[ph_e, psi] = {r: tm.energies[r].standard for r in ("ATPS4r", "PIt2r")}
    flat = prepare(model, env, "native")   # no compartment stated: the cell's pH, 0 mV
    assert flat.energies["ATPS4r"].standard == pytest.approx(energy[7.0, 0.0]["ATPS4r"], abs=1e-9)
    assert energy[6.0, 0.0]["ATPS4r"] - energy[7.0, 0.0]["ATPS4r"] == pytest.approx(-4 * rt_ln10, abs=1e-6)
    assert -4 * rt_ln10 == pytest.approx(-22.832, abs=1e-3)
    assert energy[7.0, -150.0]["ATPS4r"] - energy[7.0, 0.0]["ATPS4r"] == pytest.approx(4 * F * -0.150, abs=1e-6)
    assert abs(energy[6.0, 0.0]["PIt2r"] - energy[7.0, 0.0]["PIt2r"]) > 1.0
    # HPO4(2-) with one H+ in: net charge -1 crosses, so Δψ = −150 mV costs F × 0.150 (by hand)
    assert energy[7.0, -150.0]["PIt2r"] - energy[7.0, 0.0]["PIt2r"] == pytest.approx(F * 0.150, abs=1e-6)


def test_textbook_cobra_json_compartments_map_the_same_way(textbook_sbml, tmp_path):
    import cobra

    from tfa.network.compartments import with_compartment
    from tfa.network.energies import prepare
    from tfa.network.inputs import resolve_inputs

    path = tmp_path / "e_coli_core.json"
    cobra.io.save_json_model(cobra.io.load_model("textbook"), str(path))
    values = []
    for source in (textbook_sbml, path):
        inputs = resolve_inputs(source)
        env = with_compartment(inputs.environment, "e", ph=6.0, membrane_potential_mV=-150.0)
        values.append(prepare(inputs.model, env, "native").energies["ATPS4r"].standard)
    assert values[1] == pytest.approx(values[0], abs=1e-9)


FD_COMPOUNDS = """id\tname\tformula\tcharge\tthermo_key\trole\tcompartment
h2o\twater\tH2O\t0\tH2O\twater\t
h\tproton\tH\t1\tH+\tproton\t
h_e\touter proton\tH\t1\tH+\t\te
h2\thydrogen\tH2\t0\tH2\th2\t
fdox\tferredoxin (oxidised)\tFd\t0\tFd_ox\tox:Fd:2\t
fdred\tferredoxin (reduced)\tFd\t-2\tFd_red\tred:Fd:2\t
"""
FD_REACTIONS = """id\tequation
EX_h2o\th2o <=>
EX_h\th <=>
EX_h_e\th_e <=>
EX_h2\th2 <=>
HYD\th2 + fdox <=> fdred + 2 h
ECH\th2 + fdox + 2 h_e <=> fdred + 4 h
EX_fdox\tfdox <=>
DM_fd\tfdred ->
"""


def test_ferredoxin_by_h2_with_and_without_the_gradient(tmp_path):
    """H2 reduces ferredoxin directly up to red/ox = exp((−ΔrG'° − δ + RT ln a_H2)/RT); with
    two H+ entering at ΔpH 2 and Δψ 0 it gets 2 × 2 RT ln10 more, i.e. a ratio 10^4 times higher
    and a potential (RT/2F) ln 10^4 = 136.2 mV lower at 70 °C (by hand: 2.8531 / (2 × 96.485)
    × 9.2103 V). To reach red/ox 1e4 (10 mM / 1 µM), each entering H+ must bring
    (ΔrG'(direct at that ratio) + δ)/2."""
    from tfa.analyses.gradient import carrier_by_h2
    from tfa.conditions import Compartment, Conditions
    from tfa.network.energies import prepare
    from tfa.network.environment import Environment
    from tfa.network.io_table import read_network
    from tfa.problem import ProblemOptions

    (tmp_path / "compounds.tsv").write_text(FD_COMPOUNDS)
    (tmp_path / "reactions.tsv").write_text(FD_REACTIONS)
    model = read_network(tmp_path / "reactions.tsv")
    env = Environment("fd", Conditions.from_celsius(70, ph=7.5), feed={"h2": 1e-3, "fdox": 1e-6},
                      demand_reaction="DM_fd", demand_flux=0.01,
                      compartments={"e": Compartment("e", ph=5.5)})
    options = ProblemOptions()
    tm = prepare(model, env, "native")
    rows = {r["reaction"]: r for r in carrier_by_h2(tm, "h2", options)}
    rt, delta = tm.RT, options.min_driving_force
    g_direct = tm.energies["HYD"].standard
    assert rows["HYD"]["reduced_to_oxidised_max"] == pytest.approx(
        math.exp((-g_direct - delta + rt * math.log(1e-3)) / rt), rel=1e-9)
    assert rows["ECH"]["ions_in"] == 2 and rows["HYD"]["ions_in"] == 0
    assert rows["ECH"]["reduced_to_oxidised_max"] / rows["HYD"]["reduced_to_oxidised_max"] == \
        pytest.approx(1e4, rel=1e-9)
    assert rows["HYD"]["carrier_potential_mV"] - rows["ECH"]["carrier_potential_mV"] == \
        pytest.approx(136.2, abs=0.05)
    at_bound = g_direct + rt * (math.log(1e-2 / 1e-6) - math.log(1e-3))
    assert rows["ECH"]["needed_per_ion_kJ_per_mol"] == pytest.approx(max(0.0, (at_bound + delta) / 2))
    # without the gradient the coupled enzyme does no better than the direct one
    flat = {r["reaction"]: r for r in carrier_by_h2(prepare(model, without_gradient(env), "native"),
                                                    "h2", options)}
    assert flat["ECH"]["reduced_to_oxidised_max"] == pytest.approx(flat["HYD"]["reduced_to_oxidised_max"])


def test_census_keeps_fed_compounds_at_feed_and_protons_at_their_compartment_ph(network):
    """Census: ΔrG' 'at 1 mM' keeps the fed compounds (ADP 1 mM, Pi 10 mM) at
    their feed values; H+ of either compartment has no activity term (it stands at its
    compartment's pH, inside ΔrG'°); a reaction across the membrane states its reference."""
    from tfa.analyses.census import census
    from tfa.network.energies import prepare

    env = _environment(adp=1e-3, pi=1e-2)
    tm = prepare(network, env, "native")
    table = census(tm).table.set_index("reaction")
    rt = tm.RT
    atps = table.loc["ATPS"]
    # ADP + Pi (fed) -> ATP (1 mM) + H2O: RT [ln 1e-3 − ln 1e-3 − ln 1e-2] by hand
    assert atps["delta_g_1mM_kJ_per_mol"] == pytest.approx(
        atps["delta_g_standard_kJ_per_mol"] + rt * (math.log(1e-3) - math.log(1e-3) - math.log(1e-2)))
    ht = table.loc["HT"]
    assert ht["delta_g_1mM_kJ_per_mol"] == pytest.approx(ht["delta_g_standard_kJ_per_mol"])
    assert ht["delta_g_standard_kJ_per_mol"] == pytest.approx(-27.6118, abs=1e-3)
    assert "e pH 5.5, Δψ = ψ cell − ψ e = -150 mV" in ht["standard_state"]
    assert "cell pH 7.5" in ht["standard_state"]


def test_gradient_dependence_on_the_atp_synthase_network(network):
    """The whole analysis on the hand-built ATP synthase: with the gradient ATP is made, without
    it one step (ATPS) must be driven uphill, and the least gradient is the hand-derived
    fraction s* = (ΔG_p + δ) / (4 |ΔG_H|) (Mitchell 1961)."""
    from tfa.analyses import feasibility
    from tfa.analyses.gradient import SCALE_TOLERANCE, gradient_dependence
    from tfa.network.energies import prepare
    from tfa.problem import ProblemOptions

    options = ProblemOptions(time_limit=60)
    env = _environment(n=4)
    with_gradient = {"native": feasibility(prepare(network, env, "native"), options)}
    result = gradient_dependence(
        env, ["native"], lambda e, m: prepare(network, e, m),
        lambda tm, diagnose: feasibility(tm, options, diagnose=diagnose), with_gradient, "native",
        options)
    verdicts = {r["gradient"]: r for r in result.verdicts}
    assert verdicts["with"]["feasible"] and not verdicts["without"]["feasible"]
    assert verdicts["without"]["uphill_set_size"] == 1
    s_star = (_phosphorylation_potential(network, env) + options.min_driving_force) / (
        4 * -(-R * T70 * math.log(10) * 2.0 + F * -0.150))
    (row,) = result.least
    assert row["mode"] == "native" and s_star <= row["gradient_scale"] <= s_star + SCALE_TOLERANCE
    assert set(result.tables()) == {"gradient_verdicts", "least_gradient"}
    assert "native: runs from" in result.message
