"""Compound lookup, reaction energies, activities, balance errors and the three meanings of CO2,
checked against Thauer et al. (1977), Alberty (2003) and published Henry constants."""

from __future__ import annotations

import math

import pytest

from tfa.conditions import Conditions
from tfa.errors import InputError, MissingDataError, UnbalancedReactionError, UnknownCompoundError
from tfa.thermo import ThermoDatabase
from tfa.thermo.species import Species


@pytest.fixture(scope="module")
def db() -> ThermoDatabase:
    return ThermoDatabase.load()


PH7 = Conditions.from_celsius(25, ph=7.0, ionic_strength=0.0)


@pytest.mark.parametrize("name, expected", [
    ("H2", "H2"), ("h2(G)", "H2(g)"), ("pyruvate", "pyruvate"), ("Pyruvic acid", "pyruvate"),
    ("2-oxoglutarate", "2-oxoglutarate"), ("alpha-ketoglutarate", "2-oxoglutarate"),
    ("phosphate", "phosphate"), ("Pi", "phosphate"), ("ammonia", "ammonia"), ("NH4+", "ammonia"),
    ("alanine", "alanine"), ("L-Alanine", "alanine"), ("CO2", "CO2"), ("CO2(g)", "CO2(g)"),
    ("CO2tot", "CO2tot"), ("bicarbonate", "CO2tot"), ("reduced ferredoxin", "Fd_red"),
])
def test_compound_lookup_by_id_name_synonym_any_case(db, name, expected):
    assert db.compound(name).id == expected


def test_common_name_is_the_whole_reactant(db):
    # Alberty 2003, ch. 4: a reactant is the sum of its species (all protonation states).
    species = {s.id for s in db.compound("phosphate").species}
    assert {s for s in species if not s.startswith("Mg")} == {"H3PO4", "H2PO4-", "HPO4-2", "PO4-3"}
    assert species - {"H3PO4", "H2PO4-", "HPO4-2", "PO4-3"} == {"MgHPO4"}  # used with a pMg only
    assert {s.state for s in db.compound("CO2(g)").species} == {"gas"}
    assert [s.id for s in db.compound("CO2").species] == ["CO2"]
    assert "CO2(aq)+H2O" in {s.id for s in db.compound("CO2tot").species}


def test_unknown_compound_lists_close_matches(db):
    with pytest.raises(UnknownCompoundError) as err:
        db.compound("pyruvat")
    assert "pyruvate" in err.value.matches
    assert "pyruvat" in str(err.value)


def test_methanogenesis_from_gases(db):
    # Thauer et al. 1977 (from memory): 4 H2 + CO2 -> CH4 + 2 H2O, -131 kJ/mol (acceptance ± 2).
    r = db.reaction_energy("4 H2(g) + CO2(g) <=> CH4(g) + 2 H2O", PH7)
    assert r.standard == pytest.approx(-131.0, abs=2.0)
    assert r.balance.ok and r.balance.implicit_protons == 0


def test_acetogenesis_from_gases(db):
    # Thauer et al. 1977 (from memory): 4 H2 + 2 CO2 -> acetate- + H+ + 2 H2O, -95 kJ/mol at pH 7
    # (acceptance ± 3).
    r = db.reaction_energy("4 H2(g) + 2 CO2(g) <=> acetate + 2 H2O", PH7)
    assert r.standard == pytest.approx(-95.0, abs=3.0)
    assert r.balance.implicit_protons == pytest.approx(1.0)


def test_formate_from_gases(db):
    # Thauer et al. 1977 (from memory): H2 + CO2 -> formate- + H+, +3.4 kJ/mol at pH 7 (± 2).
    r = db.reaction_energy("H2(g) + CO2(g) <=> formate", PH7)
    assert r.standard == pytest.approx(3.4, abs=2.0)


def test_atp_hydrolysis_without_mg(db):
    # Alberty 2003 (from memory): ATP + H2O = ADP + Pi, -36.03 kJ/mol at pH 7, I = 0.25 M,
    # 298.15 K, no Mg2+ (acceptance ± 2).
    r = db.reaction_energy("ATP + H2O <=> ADP + phosphate", Conditions(ph=7.0, ionic_strength=0.25))
    assert r.standard == pytest.approx(-36.0, abs=2.0)
    assert {"LH06a", "SH88"} <= set(r.sources)


def test_fumarate_reduction_by_h2(db):
    # Thauer et al. 1977 (from memory): fumarate + H2 -> succinate, -86 kJ/mol at pH 7.
    r = db.reaction_energy("fumarate + H2(g) -> succinate", PH7)
    assert r.standard == pytest.approx(-86.2, abs=3.0)


def test_co2_three_ways_give_the_same_actual_energy(db):
    # the design notes (docs/design): CO2 (dissolved), CO2(g) and CO2tot (hydrated total) are three reactants; with
    # activities consistent with gas-liquid equilibrium and speciation at the pH, dG' must agree.
    c = Conditions.from_celsius(60, ph=6.3, ionic_strength=0.1)
    rt = c.RT
    a_aq = 2.0e-3  # mol/L of dissolved CO2(aq)
    g_aq = db.formation_energy("CO2", c).value
    g_gas = db.formation_energy("CO2(g)", c).value
    p_gas = a_aq * math.exp((g_aq - g_gas) / rt)  # CO2(g) = CO2(aq) at equilibrium
    fraction = db.speciation("CO2tot", c)["CO2(aq)+H2O"]
    c_tot = a_aq / fraction
    common = {"H2": 1e-4, "formate": 1e-3}
    r_aq = db.reaction_energy("H2 + CO2 <=> formate", c, {**common, "CO2": a_aq})
    r_gas = db.reaction_energy("H2 + CO2(g) <=> formate", c, {**common, "CO2(g)": p_gas})
    r_tot = db.reaction_energy("H2 + CO2tot <=> formate + H2O", c, {**common, "CO2tot": c_tot})
    assert r_gas.actual == pytest.approx(r_aq.actual, abs=1e-6)
    assert r_tot.actual == pytest.approx(r_aq.actual, abs=1e-6)
    # the standard energies differ (different standard states), so the test is not trivial
    assert abs(r_gas.standard - r_aq.standard) > 5.0


def test_co2_henry_constant_from_the_data(db):
    # Sander 2015, Atmos. Chem. Phys. 15:4399 (from memory): K_H(CO2, 25 degC) = 0.034 mol/L/bar.
    g_aq = db.formation_energy("CO2", PH7).value
    g_gas = db.formation_energy("CO2(g)", PH7).value
    assert math.exp(-(g_aq - g_gas) / PH7.RT) == pytest.approx(0.034, rel=0.1)


def test_actual_energy_uses_rt_ln_activities(db):
    # dG' = dG'0 + RT sum nu ln a (Alberty 2003 eq. 4.8-1): methanogenesis at 10 Pa H2, 0.1 bar CO2
    # and 0.5 bar CH4. Thauer et al. 1977 note that about 10 Pa H2 leaves methanogenesis near
    # -30 to -40 kJ/mol (from memory).
    acts = {"H2(g)": 1e-4, "CO2(g)": 0.1, "CH4(g)": 0.5}
    r = db.reaction_energy("4 H2(g) + CO2(g) <=> CH4(g) + 2 H2O", PH7, acts)
    expected = r.standard + PH7.RT * (math.log(0.5) - 4 * math.log(1e-4) - math.log(0.1))
    assert r.actual == pytest.approx(expected, abs=1e-9)
    assert -45.0 < r.actual < -25.0
    assert r.activities == acts


def test_default_activities_are_flagged(db):
    r = db.reaction_energy("H2(g) + CO2(g) <=> formate", PH7, {"H2(g)": 1e-3})
    assert any("activity 1" in f and "formate" in f for f in r.flags)
    assert r.actual == pytest.approx(r.standard - PH7.RT * math.log(1e-3))


@pytest.mark.parametrize("activities, fragment", [
    ({"glucoze": 1e-3}, "unknown compound"),
    ({"H2O": 0.9}, "water has activity 1"),
    ({"H+": 1e-7}, "fixed by the pH"),
    ({"formate": 0.0}, "positive"),
    ({"acetate": 1e-3}, "not in the reaction"),
])
def test_bad_activities_are_errors(db, activities, fragment):
    with pytest.raises(InputError, match=fragment):
        db.reaction_energy("H2(g) + CO2(g) <=> formate", PH7, activities)


def test_unbalanced_reaction_names_element_and_amount(db):
    with pytest.raises(UnbalancedReactionError) as err:
        db.reaction_energy("H2 + CO2tot <=> formate", PH7)
    assert "O is off by -1" in str(err.value)
    report = db.check_balance("H2(g) + CO2(g) <=> formate + H2O")
    assert not report.ok and report.element_residuals == {"O": 1.0}


def test_charge_without_protons_is_reported(db):
    # Fd_ox -> Fd_red needs two electrons: the charge residual is not explained by H+.
    report = db.check_balance("Fd_ox <=> Fd_red")
    assert not report.ok
    assert any("charge is off by -2" in p for p in report.problems())


def test_uncertainty_and_provenance_are_reported(db):
    r = db.reaction_energy("pyruvate + H2(g) <=> lactate", Conditions.from_celsius(80))
    assert r.uncertainty > db.reaction_energy("pyruvate + H2(g) <=> lactate", PH7).uncertainty
    assert len(r.provenance) == 3
    assert any("pyruvate" in line and "CS16" in line for line in r.provenance)
    assert {"CS16", "Sho95"} <= set(r.sources)


def test_unreviewed_species_are_off_by_default(db):
    # the design notes (docs/design): unreviewed sources (LDS+26, submitted manuscript) are off unless asked.
    with pytest.raises(MissingDataError, match="LDS\\+26"):
        db.reaction_energy("acetyl phosphate + H2O <=> acetate + phosphate", PH7)
    loose = ThermoDatabase.load(include_unreviewed=True)
    r = loose.reaction_energy("acetyl phosphate + H2O <=> acetate + phosphate", PH7)
    assert "LDS+26" in r.sources
    assert any("unreviewed" in f for f in r.flags)


def test_with_extra_species_adds_a_reconciled_compound(db):
    # Mechanics of the hand-over used by reconciliation: a species made elsewhere becomes a
    # compound found by name, its own sigma is used and it is flagged.
    dianion_g = -1200.0
    sp = Species("AcP-2-reconciled", "acetyl phosphate", "C2H3O5P", "aq", -2, 3, 0, dianion_g,
                 None, None, None, None, "reconciled", origin="reconciled", sigma_G=3.0)
    extended = db.with_extra_species([sp], [{"id": "acetyl phosphate", "name": "acetyl phosphate",
                                             "synonyms": "AcP", "kind": "aqueous",
                                             "species": "AcP-2-reconciled",
                                             "formula": "C2H3O5P", "charge": -2}])
    r = extended.reaction_energy("AcP + H2O <=> acetate + phosphate", PH7)
    f = {n: extended.formation_energy(n, PH7).value for n in ("AcP", "H2O", "acetate", "phosphate")}
    assert r.standard == pytest.approx(f["acetate"] + f["phosphate"] - f["AcP"] - f["H2O"])
    # a single dianion species: dfG'0 = G + 3 RT ln10 pH - RT alpha (4 - 3) * 0 at I = 0
    assert f["AcP"] == pytest.approx(dianion_g + 3 * PH7.RT * math.log(10) * 7.0)
    assert extended.formation_energy("AcP", PH7).uncertainty == pytest.approx(3.0)
    assert any("reconciled" in f for f in r.flags)
    with pytest.raises(MissingDataError):  # the original database is unchanged
        db.formation_energy("acetyl phosphate", PH7)


def test_species_table_marks_unused_species(db):
    table = db.species_table()
    acp = table[table.species == "acetylphosphate-2"].iloc[0]
    assert not acp.used and acp.peer_reviewed is False or acp.peer_reviewed == False  # noqa: E712
    assert table[table.species == "HCO3-"].iloc[0].used


# ----------------------------------------------------------------------- total formaldehyde
THAUER_FORMALDEHYDE_OXIDATION = -23.2
"""HCHO + H2O -> HCOO- + H+ + H2(g) at pH 7, 25 degC, kJ/mol, from the formation energies of
Thauer et al. 1977 (Bacteriol. Rev. 41:100, appendix table; from memory): formaldehyde -130.5,
formate -351.0, water -237.2, H+ at pH 7 -39.9, H2(g) 0. Their formaldehyde is the total of the
hydrate and free HCHO."""


def test_total_formaldehyde_oxidation_matches_thauer(db):
    # Acceptance ± 3 kJ/mol: Thauer's formaldehyde value and the hydration constant (Bell 1966,
    # 1.3e3-2.3e3, from memory) differ by about 2 kJ/mol between compilations.
    r = db.reaction_energy("formaldehyde + H2O <=> formate + H2(g)", PH7)
    assert r.standard == pytest.approx(THAUER_FORMALDEHYDE_OXIDATION, abs=3.0)
    assert r.balance.implicit_protons == pytest.approx(1.0)
    assert "Bel66" in r.sources
    # the check can fail: the free, unhydrated HCHO(aq) species alone (the basis before the
    # hydrate was added) lies RT ln(1 + K_h), about 19 kJ/mol, away from the total
    free = next(s for s in db.compound("formaldehyde").species if s.id == "formaldehyde")
    total = db.formation_energy("formaldehyde", PH7).value
    free_value = free.G + free.n_h * PH7.RT * math.log(10) * 7.0
    assert abs(r.standard + (total - free_value) - THAUER_FORMALDEHYDE_OXIDATION) > 15.0


def test_formaldehyde_transform_picks_the_hydrate(db):
    # Bell 1966 (Adv. Phys. Org. Chem. 4:1, from memory): [CH2(OH)2]/[HCHO] = 1.3e3-2.3e3 at
    # 25 degC, so the hydrate is more than 99.9 % of total formaldehyde.
    fractions = db.speciation("formaldehyde", PH7)
    assert max(fractions, key=fractions.get) == "methanediol-H2O"
    k_25 = fractions["methanediol-H2O"] / fractions["formaldehyde"]
    assert 1.3e3 <= k_25 <= 2.3e3
    # hydration is exothermic (Winkelman et al. 2002, Chem. Eng. Sci. 57:4067, van 't Hoff
    # enthalpy -31 to -36 kJ/mol, from memory): at 70 degC K_h falls to about 190-450, and the
    # temperature integration of the two species data must reproduce that
    hot = db.speciation("formaldehyde", Conditions.from_celsius(70, ph=7.0, ionic_strength=0.0))
    k_70 = hot["methanediol-H2O"] / hot["formaldehyde"]
    assert 190.0 <= k_70 <= 450.0
    assert max(hot, key=hot.get) == "methanediol-H2O"


# Mitchell's chemiosmotic relation (Nicholls & Ferguson, Bioenergetics, 4th ed. 2013, ch. 3,
# from memory): moving one H+ from a fluid at pH_out into a cell at pH_in (membrane potential
# zero) has dG = -2.303 RT (pH_in - pH_out), i.e. -5.71 kJ/mol per pH unit at 25 degC (59 mV).
# R = 8.314462618 J/(mol K), CODATA 2018, independent of tfa's constants.
R_CODATA_KJ = 8.314462618e-3


def test_proton_inflow_along_a_ph_gradient_follows_mitchell(db):
    inside = Conditions.from_celsius(25, ph=8.0, ionic_strength=0.0)
    r = db.reaction_energy("H+(outside) <=> H+", inside, activities={"H+(outside)": 1e-6})
    expected = -R_CODATA_KJ * 298.15 * math.log(10) * (8.0 - 6.0)
    assert expected == pytest.approx(-11.4, abs=0.05)
    assert r.actual == pytest.approx(expected, abs=1e-6)
    assert r.balance.ok and r.balance.implicit_protons == 0
    # no gradient (pH_out = pH_in): no driving force; the inner H+ stays the transformed-zero proton
    same = db.reaction_energy("H+(outside) <=> H+", inside, activities={"H+(outside)": 1e-8})
    assert same.actual == pytest.approx(0.0, abs=1e-9)
    assert db.compound("H+").kind == "proton" and db.compound("H+(outside)").kind == "aqueous"
    # the check can fail: treating the outer proton like the buffered one (energy 0, no
    # activity term) would give 0, and a sign slip +11.4
    assert abs(r.actual) > 10.0 and r.actual < 0


def test_outer_proton_transform_has_no_ionic_strength_term(db):
    """Alberty 2003 eq. 4.4-10: DfG'0 = DfG0 + nH RT ln10 pH - RT alpha (z^2 - nH) sqrt(I)/(1 + B sqrt(I));
    for H+ (DfG0 = 0 by convention, z = nH = 1) only the pH term is left, at any I and T."""
    for celsius, ph, ionic in ((25, 7.0, 0.0), (25, 7.0, 0.25), (70, 7.5, 0.25)):
        c = Conditions.from_celsius(celsius, ph=ph, ionic_strength=ionic)
        fe = db.formation_energy("H+(outside)", c)
        assert fe.value == pytest.approx(R_CODATA_KJ * (celsius + 273.15) * math.log(10) * ph, abs=1e-6)
    # the inner proton keeps transformed energy 0 and refuses an activity; the outer one takes one
    assert db.formation_energy("H+", PH7).value == 0.0
    with pytest.raises(InputError, match="fixed by the pH"):
        db.reaction_energy("H+(outside) <=> H+", PH7, activities={"H+": 1e-7})
