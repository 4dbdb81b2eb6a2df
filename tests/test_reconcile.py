"""Tests of tfa.thermo.reconcile: weighted least squares over literature reaction values.

The algebra is checked against hand solutions (derived in the comments) of small systems. The
methods are the textbook ones: the minimum-norm least-squares solution of the Moore-Penrose
inverse (R. Penrose, Proc. Camb. Phil. Soc. 51 (1955) 406), the weighted mean and its variance
1/Σw, and the studentized residual e/(σ√(1−h)) (Belsley, Kuh & Welsch, Regression Diagnostics,
1980); the Legendre term is Alberty's (2003) eq. 4.4-10.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tfa.conditions import Conditions
from tfa.constants import LN10, R
from tfa.errors import InputError, MissingDataError
from tfa.thermo.legendre import debye_huckel_term
from tfa.thermo.literature import LiteratureValue, read_literature_values
from tfa.thermo.reconcile import ENTROPY_SIGMA_NO_ENTHALPY, UnknownSpecies, legendre_offset, reconcile

REF = Conditions(298.15, 7.0, 0.25)

# Known compounds (stand-ins for species data), ΔfG'° at every condition, kJ/mol, σ = 0.
KNOWN = {"A": -300.0, "B": -50.0, "P": -200.0}


def known(compound: str, conditions: Conditions) -> tuple[float, float]:
    return KNOWN[compound], 0.0


def moiety_system() -> list[LiteratureValue]:
    # XC is an acyl-carrier thioester, C the free carrier (a conserved moiety: they only appear
    # together). v1: A + C -> XC + B ; v2: XC -> P + C.
    return [
        LiteratureValue("v1", {"A": -1, "C": -1, "XC": 1, "B": 1}, 10.0, 1.0, REF, source_key="S1"),
        LiteratureValue("v2", {"XC": -1, "P": 1, "C": 1}, 42.0, 2.0, REF, source_key="S2"),
    ]


def test_two_unknowns_with_a_conserved_moiety_hand_solution():
    # Only d = u(XC) - u(C) is determined.
    # v1: d + B - A = 10  ->  d = 10 + A - B = 10 - 300 + 50 = -240   (sigma 1)
    # v2: P - d = 42      ->  d = P - 42 = -200 - 42 = -242           (sigma 2)
    # weighted mean: (-240*1 + -242*1/4) / (1 + 1/4) = -240.4, sigma = 1/sqrt(1.25) = 0.8944
    # minimum-norm split: u(XC) = d/2 = -120.2, u(C) = -d/2 = +120.2
    rec = reconcile(moiety_system(), known, {"XC": None, "C": None})
    assert rec.unknowns == ("XC", "C") or rec.unknowns == ("C", "XC")
    d, sigma = rec.reaction_energy({"XC": 1, "C": -1})
    assert d == pytest.approx(-240.4, abs=1e-9)
    assert sigma == pytest.approx(1 / math.sqrt(1.25), abs=1e-9)
    frame = rec.to_frame().set_index("compound")
    assert frame.loc["XC", "formation_delta_g_standard_kJ_per_mol"] == pytest.approx(-120.2, abs=1e-9)
    assert frame.loc["C", "formation_delta_g_standard_kJ_per_mol"] == pytest.approx(120.2, abs=1e-9)
    assert not frame.loc["XC", "identified"] and not frame.loc["C", "identified"]
    # residuals: v1 row [1,-1], b = -240, fitted -240.4 -> e = +0.4, leverage h = 1/1.25 = 0.8,
    # studentized 0.4/(1*sqrt(0.2)) = 0.894; v2: b = 42 + 200 = 242, fitted 240.4 -> e = 1.6,
    # h = 0.2, studentized 1.6/(2*sqrt(0.8)) = 0.894
    res = {r.id: r for r in rec.residuals}
    assert res["v1"].residual == pytest.approx(0.4)
    assert res["v1"].leverage == pytest.approx(0.8)
    assert res["v1"].studentized == pytest.approx(0.4 / math.sqrt(0.2))
    assert res["v2"].residual == pytest.approx(1.6)
    assert res["v2"].studentized == pytest.approx(1.6 / (2 * math.sqrt(0.8)))
    assert rec.disagreements == []


def test_identifiability_of_reactions_over_a_moiety():
    rec = reconcile(moiety_system(), known, {"XC": None, "C": None, "Z": None})
    # Z appears in no value: it is not even an unknown of the system
    assert "Z" not in rec.unknowns
    assert rec.identified({"XC": -1, "C": 1, "P": 1})          # reaction v2 itself
    assert rec.identified({"XC": 2, "C": -2})                   # a multiple of the row space
    assert not rec.identified({"XC": 1})                        # the thioester alone
    assert not rec.identified({"XC": 1, "C": 1})                # orthogonal to the row space
    assert not rec.identified({"Z": 1})                         # no value at all
    with pytest.raises(MissingDataError, match="conserved moiety"):
        rec.reaction_energy({"XC": 1, "B": -1})
    # thioester hydrolysis-like reaction XC -> C + P (= v2) is identified: 200 - 240.4... as
    # u(C) - u(XC) = +240.4 kJ/mol
    g, _ = rec.reaction_energy({"XC": -1, "C": 1})
    assert g == pytest.approx(240.4)


def test_three_sigma_outlier_is_detected_and_only_it():
    # Four values of A -> X with ΔfG'°(A) = 0: -20, -20, -20, -14 (sigma 1).
    # mean -18.5; residuals -1.5 (x3) and +4.5; leverage 1/4 each;
    # studentized -1.5/sqrt(0.75) = -1.73 (agree) and 4.5/sqrt(0.75) = 5.20 (disagrees).
    vals = [LiteratureValue(f"w{i}", {"A0": -1, "X": 1}, g, 1.0, REF, source_key=f"K{i}")
            for i, g in enumerate([-20.0, -20.0, -20.0, -14.0])]
    rec = reconcile(vals, lambda c, k: (0.0, 0.0), {"X": None})
    bad = rec.disagreements
    assert [r.id for r in bad] == ["w3"]
    assert bad[0].studentized == pytest.approx(4.5 / math.sqrt(0.75))
    statuses = {r.id: r.status for r in rec.residuals}
    assert statuses == {"w0": "agrees", "w1": "agrees", "w2": "agrees", "w3": "disagrees"}
    assert rec.reaction_energy({"X": 1})[0] == pytest.approx(-18.5)


def test_a_value_checked_by_no_other_is_unchecked():
    vals = [LiteratureValue("only", {"A0": -1, "X": 1}, -5.0, 1.0, REF)]
    rec = reconcile(vals, lambda c, k: (0.0, 0.0), {"X": None})
    assert rec.residuals[0].status == "unchecked"
    assert rec.reaction_energy({"X": 1}) == pytest.approx((-5.0, 1.0))


def test_known_uncertainty_enters_the_weights():
    # sigma_total^2 = 1^2 + (1 * 2)^2 = 5 for A -> X when σ(A) = 2 kJ/mol
    vals = [LiteratureValue("v", {"A": -1, "X": 1}, -5.0, 1.0, REF)]
    rec = reconcile(vals, lambda c, k: (-300.0, 2.0), {"X": None})
    assert rec.reaction_energy({"X": 1}) == pytest.approx((-305.0, math.sqrt(5.0)))


def test_ph_and_ionic_strength_offset_of_the_unknown_species():
    # One value at pH 8, I = 0 of A -> X, X having nH = 3, z = -1; reference pH 7, I = 0.25.
    # u_ref = ΔrG'°(pH 8, I 0) + A - [offset(pH 8, I 0) - offset(pH 7, I 0.25)], with
    # offset = nH RT ln10 pH - RTα (z² - nH) √I/(1 + 1.6√I) (Alberty 2003, eq. 4.4-10)
    sp = UnknownSpecies(n_h=3, charge=-1)
    at = Conditions(298.15, 8.0, 0.0)
    vals = [LiteratureValue("v", {"A": -1, "X": 1}, -5.0, 1.0, at)]
    rec = reconcile(vals, known, {"X": sp}, reference=REF)
    rt = R * 298.15
    expected_offset_lit = 3 * rt * LN10 * 8.0
    expected_offset_ref = 3 * rt * LN10 * 7.0 - (1 - 3) * debye_huckel_term(298.15, 0.25)
    expected = -5.0 + KNOWN["A"] - (expected_offset_lit - expected_offset_ref)
    assert rec.reaction_energy({"X": 1})[0] == pytest.approx(expected, abs=1e-9)
    # and the species energy at I = 0, 25 degC is u_ref minus the reference offset
    assert rec.species_energies[0] == pytest.approx(expected - expected_offset_ref, abs=1e-9)
    assert legendre_offset(sp, REF) == pytest.approx(expected_offset_ref)


@pytest.mark.parametrize("dh", [None, 20.0])
def test_entropy_reproduces_the_literature_temperature_dependence(dh):
    # Known A: ΔfG'°(T) = -100 - 0.2 (T - 298.15) (transformed entropy 0.2 kJ/mol/K).
    # Value A -> X: ΔrG'° = -10 kJ/mol at 25 degC; ΔrS'° = 0 (no ΔrH'°) or (20 + 10)/298.15.
    # X has nH = 4, z = -1. With the solved species S°, ΔfG'°_X(T) = G_X - S_X (T - Tr) + offset(T)
    # must equal ΔfG'°_A(T) + ΔrG'°(25 degC) - ΔrS'° (T - Tr) at 75 degC.
    def known_t(c, k):
        return -100.0 - 0.2 * (k.temperature - 298.15), 0.0

    sp = UnknownSpecies(n_h=4, charge=-1)
    vals = [LiteratureValue("v", {"A": -1, "X": 1}, -10.0, 1.0, REF, delta_h_standard=dh)]
    rec = reconcile(vals, known_t, {"X": sp}, reference=REF)
    t = 348.15
    ds = 0.0 if dh is None else (dh + 10.0) / 298.15
    expected = known_t("A", REF.with_(temperature=t))[0] - 10.0 - ds * (t - 298.15)
    g_t = rec.species_gibbs("X", t) + legendre_offset(sp, REF.with_(temperature=t))
    # the species record holds constant S° and Cp°; Cp° absorbs the curvature of RTα(T) in the
    # Legendre term (z² - nH = -3), which a constant S° alone misses by about 0.07 kJ/mol at 75 degC
    assert g_t == pytest.approx(expected, abs=0.01)
    rate = ENTROPY_SIGMA_NO_ENTHALPY if dh is None else 0.01
    assert rec.temperature_sigma({"X": 1}, t) == pytest.approx(rate * 50.0)


def test_bad_value_and_file_errors(tmp_path):
    with pytest.raises(InputError, match="σ > 0"):
        LiteratureValue("bad", {"A": -1}, -1.0, 0.0, REF)
    good = tmp_path / "values.tsv"
    good.write_text(
        "# literature values\n"
        "id\tequation\tdelta_g_standard_kJ_per_mol\tsigma_kJ_per_mol\tdelta_h_standard_kJ_per_mol\ttemperature_C\tph\tionic_strength\tpmg\tsource_key\tpeer_reviewed\tnote\n"
        "v1\ta + c <=> xc + b\t10\t1\t\t25\t7\t0.25\t\tS1\tyes\tnote # with hash\n"
        "v2\txc <=> p + c\tabc\t2\t\t25\t7\t0.25\t\tS2\tyes\t\n")
    with pytest.raises(InputError, match=r"values.tsv line 4: column delta_g_standard_kJ_per_mol holds 'abc'"):
        read_literature_values(good)
    good.write_text(good.read_text().replace("abc", "42"))
    vals = read_literature_values(good)
    assert [v.id for v in vals] == ["v1", "v2"]
    assert vals[0].stoichiometry == {"a": -1.0, "c": -1.0, "xc": 1.0, "b": 1.0}
    assert vals[0].note == "note # with hash" and vals[0].delta_h_standard is None
    assert np.isclose(vals[1].delta_g_standard, 42.0)
