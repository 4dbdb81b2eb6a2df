"""Legendre transform, speciation, Mg binding and carrier potentials, checked against
Alberty (2003), Thauer et al. (1977) and the pychnosz reference library."""

from __future__ import annotations

import math

import numpy as np
import pytest

from tfa.conditions import Conditions
from tfa.constants import FARADAY, LN10, R
from tfa.thermo import ThermoDatabase
from tfa.thermo.legendre import (debye_huckel_term, reactant_energy, rt_alpha, species_fractions,
                                 transformed_species_energy)
from tfa.thermo.potentials import load_potentials


@pytest.fixture(scope="module")
def db() -> ThermoDatabase:
    return ThermoDatabase.load()


def test_rt_alpha_at_25_C_matches_alberty():
    # Alberty 2003, sect. 3.7: alpha = 1.1758 kg^1/2 mol^-1/2 at 298.15 K (acceptance: ± 0.0005).
    assert rt_alpha(298.15) / (R * 298.15) == pytest.approx(1.1758, abs=5e-4)


@pytest.mark.parametrize("celsius", [25.0, 50.0, 80.0])
def test_rt_alpha_follows_the_debye_huckel_constant_of_water(celsius):
    # Reference: pychnosz water('A_DH') (Debye-Hueckel A, log10 and molal basis, from the water
    # model of Johnson & Norton 1991 / SUPCRT92). alpha(T) = A ln10; Alberty's polynomial is a fit
    # valid 0-100 degC, agreeing within 0.01 in A (molal/molar and fit differences).
    import pychnosz
    t = celsius + 273.15
    a_reference = float(pychnosz.water("A_DH", T=t, messages=False))
    assert rt_alpha(t) / (R * t) / LN10 == pytest.approx(a_reference, abs=0.01)


def test_water_transformed_energy_matches_alberty_table():
    # Alberty 2003 (BasicBiochemData): dfG'0(H2O) = -157.28 (I = 0) and -155.66 kJ/mol (I = 0.25)
    # at pH 7, 298.15 K, from dfG0 = -237.19 kJ/mol.
    g0 = transformed_species_energy(-237.19, 0, 2, 298.15, 7.0, 0.0)[0]
    g25 = transformed_species_energy(-237.19, 0, 2, 298.15, 7.0, 0.25)[0]
    assert g0 == pytest.approx(-157.28, abs=0.02)
    assert g25 == pytest.approx(-155.66, abs=0.02)


def test_ionic_strength_term_value():
    # Alberty 2003 eq. 3.6-3 at 25 degC, I = 0.25: 2.9149 * 0.5 / 1.8 = 0.8097 kJ/mol.
    assert debye_huckel_term(298.15, 0.25) == pytest.approx(0.8097, abs=1e-3)
    assert debye_huckel_term(298.15, 0.0) == 0.0


def test_reactant_energy_is_stable_for_large_energies():
    # log-sum-exp: -3000 kJ/mol species (ATP-like magnitudes) must not overflow, and two equal
    # species lower the reactant by RT ln 2 (Alberty 2003 eq. 4.5-1).
    g = reactant_energy([-3000.0, -3000.0], 298.15)
    assert math.isfinite(g)
    assert g == pytest.approx(-3000.0 - R * 298.15 * math.log(2.0), abs=1e-9)
    fractions = species_fractions([-3000.0, -2990.0], 298.15)
    assert fractions.sum() == pytest.approx(1.0)
    assert fractions[0] / fractions[1] == pytest.approx(math.exp(10.0 / (R * 298.15)))


def test_phosphate_speciation_at_its_pka_from_pychnosz(db):
    # Reference: pychnosz (OBIGT/HKF) logK of H2PO4- = HPO4-2 + H+ at 25 degC; at pH = pKa the two
    # species are half and half (Henderson-Hasselbalch). Textbook pKa2 = 7.20 (Alberty 2003).
    import pychnosz
    out = pychnosz.subcrt(["H2PO4-", "HPO4-2", "H+"], [-1, 1, 1], T=25, messages=False).out
    pka = -float(out["logK"].iloc[0])
    assert pka == pytest.approx(7.20, abs=0.05)
    fractions = db.speciation("phosphate", Conditions(ph=pka))
    assert fractions["HPO4-2"] == pytest.approx(0.5, abs=0.01)
    assert fractions["H2PO4-"] == pytest.approx(0.5, abs=0.01)


def test_ionic_strength_shifts_phosphate_towards_the_more_charged_species(db):
    # Alberty 2003 eq. 4.4-10 written out for H2PO4- = HPO4-2 + H+: the term (z^2 - nH) changes
    # by (4 - 1) - (1 - 2) = 4, so the apparent pKa falls by 4 alpha/ln10 sqrt(I)/(1 + 1.6 sqrt(I))
    # = 0.567 at I = 0.25, 25 degC (H3PO4 and PO4-3 are negligible at pH 7).
    low = db.speciation("phosphate", Conditions(ph=7.0, ionic_strength=0.0))["HPO4-2"]
    high = db.speciation("phosphate", Conditions(ph=7.0, ionic_strength=0.25))["HPO4-2"]
    pka_low = 7.0 - math.log10(low / (1 - low))
    pka_high = 7.0 - math.log10(high / (1 - high))
    assert high > low
    assert pka_low - pka_high == pytest.approx(4 * 1.1758 / LN10 * 0.5 / 1.8, abs=0.01)


def test_mg_binding_makes_atp_hydrolysis_less_negative(db):
    # Alberty 2003 (Table of ATP hydrolysis vs pMg; from memory): about -36.0 kJ/mol without Mg,
    # about -32.5 kJ/mol at pMg 3 (pH 7, I = 0.25, 298.15 K).
    free = db.reaction_energy("ATP + H2O <=> ADP + phosphate", Conditions(ionic_strength=0.25))
    bound = db.reaction_energy("ATP + H2O <=> ADP + phosphate",
                               Conditions(ionic_strength=0.25, pmg=3.0))
    assert bound.standard > free.standard
    assert bound.standard == pytest.approx(-32.5, abs=2.0)
    assert "MgATP-2" in bound.compounds["ATP"].species
    assert "MgATP-2" not in free.compounds["ATP"].species


def test_hydrogen_electrode_potential_at_ph7(db):
    # Thauer et al. 1977 (from memory): E'0(2H+/H2) = -414 mV at pH 7, 25 degC (acceptance ± 3 mV).
    e = db.reduction_potential("H+", "H2(g)", 2, Conditions(ph=7.0))
    assert 1000 * e == pytest.approx(-414, abs=3)
    # and -59.2 mV per pH unit (Nernst, Clark 1960)
    e8 = db.reduction_potential("H+", "H2(g)", 2, Conditions(ph=8.0))
    assert 1000 * (e8 - e) == pytest.approx(-59.16, abs=0.05)


def test_ferredoxin_reduction_by_h2_is_near_equilibrium(db):
    # E'0(Fd) = -420 mV (Thauer et al. 1977, from memory) against -414 mV for H2:
    # dG'0 = -2F(-0.420 + 0.414) = +1.2 kJ/mol; the carrier pseudo-element balances.
    r = db.reaction_energy("Fd_ox + H2(g) <=> Fd_red", Conditions())
    assert r.standard == pytest.approx(-2 * FARADAY * (-0.420 + 0.414), abs=0.5)
    assert r.balance.ok and r.balance.implicit_protons == pytest.approx(2.0)
    assert "TJD77" in r.sources
    assert r.uncertainty == pytest.approx(2 * FARADAY * 0.030, rel=0.05)


def test_carrier_potential_held_with_temperature_and_flagged(db):
    # No temperature dependence of E'0(Fd) is known (Thauer et al. 1977): value held, flagged.
    r = db.reaction_energy("Fd_ox + H2(g) <=> Fd_red", Conditions.from_celsius(70))
    assert any("held" in f for f in r.flags)


def test_f420_potential_moves_with_ph():
    # F420 + 2 e- + 2 H+ -> F420H2, E'0 = -360 mV at pH 7 (Thauer et al. 2008, from memory):
    # one H+ per electron gives -59.2 mV per pH unit at 25 degC (Clark 1960).
    f420 = next(c for c in load_potentials() if c.id == "F420")
    assert 1000 * f420.potential(7.0, 298.15) == pytest.approx(-360)
    assert 1000 * (f420.potential(8.0, 298.15) - f420.potential(7.0, 298.15)) == pytest.approx(-59.16, abs=0.05)


def test_every_potential_has_a_source_and_uncertainty(db):
    for couple in load_potentials():
        assert couple.source in db.sources, couple.id
        assert couple.sigma > 0, couple.id
        assert couple.note, couple.id


def test_constant_cp_against_hkf_at_80_C(db):
    # Reference: pychnosz subcrt (HKF for aqueous species, Maier-Kelley for gases) at 80 degC;
    # the design notes (docs/design): constant-Cp stays within about 0.5 kJ/mol per reaction at 80 degC.
    import pychnosz
    c = Conditions.from_celsius(80, ph=7.0)
    cases = [
        ("4 H2(g) + CO2(g) <=> CH4(g) + 2 H2O", ["H2", "CO2", "CH4", "H2O"], [-4, -1, 1, 2],
         ["gas", "gas", "gas", "liq"]),
        ("acetaldehyde + H2(g) <=> ethanol", ["acetaldehyde", "H2", "ethanol"], [-1, -1, 1],
         ["aq", "gas", "aq"]),
    ]
    for equation, names, coefficients, states in cases:
        ref = pychnosz.subcrt(names, coefficients, states, T=80, messages=False).out
        reference_kj = float(ref["G"].iloc[0]) / 1000.0  # J -> kJ
        ours = db.reaction_energy(equation, c).standard
        assert ours == pytest.approx(reference_kj, abs=0.6), equation


def test_pressure_enters_through_the_volume(db):
    # dG/dP = dV (constant V0); water V0 = 18.07 cm3/mol (Kell 1975): at 101 bar the
    # transformed energy of water rises by 18.07 * 100 * 1e-4 = 0.181 kJ/mol.
    low = db.formation_energy("H2O", Conditions()).value
    high = db.formation_energy("H2O", Conditions(pressure=101.0)).value
    assert high - low == pytest.approx(0.1807, abs=0.002)


def test_fractions_sum_to_one_for_every_compound(db):
    c = Conditions.from_celsius(60, ph=6.5, ionic_strength=0.1)
    for compound in db.registry:
        if compound.species and compound.kind != "proton":
            fe = db.formation_energy(compound.id, c)
            assert np.sum(fe.fractions) == pytest.approx(1.0, abs=1e-9), compound.id
