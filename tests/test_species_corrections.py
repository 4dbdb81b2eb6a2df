"""Corrections of the species table (scripts/make_species_table.py), estimates checked by their
reaction class (tfa/thermo/reaction_classes.py) and the calibration of the uncertainty model.

External references: OBIGT through pychnosz (the uncorrected rows, HKF equations of state);
Alberty 2003 (Mg complex of HPO4(2-): DfG -1566.87 kJ/mol against Mg2+ -454.8 and HPO4(2-)
-1096.1, i.e. a binding DG of -15.97 kJ/mol; from memory); Thauer et al. 1977 and Nelson & Cox
2008 as named per check (from memory).
"""

from __future__ import annotations

import importlib.util
import math
from pathlib import Path

import pytest

from tfa.thermo.reaction_classes import CLASSES, check_estimate, class_range, classify
from tfa.thermo.species import load_species

ROOT = Path(__file__).resolve().parents[1]


def _script(name: str):
    """A development script of scripts/ as a module (registered, so its dataclasses work)."""
    import sys

    if name in sys.modules:
        return sys.modules[name]
    spec = importlib.util.spec_from_file_location(name, ROOT / "scripts" / f"{name}.py")
    module = importlib.util.module_from_spec(spec)
    sys.modules[name] = module
    sys.path.insert(0, str(ROOT / "scripts"))
    try:
        spec.loader.exec_module(module)
    finally:
        sys.path.pop(0)
    return module


def _generator():
    return _script("make_species_table")


@pytest.fixture(scope="module")
def species():
    return {s.id: s for s in load_species()}


def test_quarantined_species_are_left_out_with_a_reason(species):
    generator = _generator()
    assert set(generator.QUARANTINED) == {"acetylphosphate-3", "bisphosphoglycerate-5"}
    for sid, reason in generator.QUARANTINED.items():
        assert sid not in species and "pKa" in reason
    # what stays of acetyl phosphate: the neutral acid and its two P-OH dissociations
    assert {s.id for s in species.values() if s.reactant == "acetyl phosphate"} == {
        "acetylphosphate", "acetylphosphate-1", "acetylphosphate-2"}


def test_every_correction_is_documented_on_its_rows(species):
    generator = _generator()
    corrected = {c.target for c in generator.CORRECTIONS}
    assert {"pyrophosphate", "lactate", "2-oxoglutarate", "glutamate", "glutamine",
            "glucose"} == corrected
    for s in species.values():
        if s.reactant in corrected:
            assert "re-anchored" in s.flag and s.shift and s.anchor and "Reason:" in s.note, s.id
            assert s.recalled  # every anchor is recalled, and the note says so
        else:
            assert "re-anchored" not in s.flag, s.id
    # shifts are common to the species of a reactant (pKa values untouched)
    shifts = {s.reactant: round(s.shift, 6) for s in species.values() if s.shift}
    for s in species.values():
        if s.shift:
            assert round(s.shift, 6) == shifts[s.reactant]
    # pyrophosphate moves by about +13 kJ/mol (OBIGT's SSWS97 rows against SH88 phosphate)
    assert 11.0 < shifts["pyrophosphate"] < 15.0
    assert -9.0 < shifts["lactate"] < -5.0
    assert 5.0 < shifts["2-oxoglutarate"] < 11.0


def test_magnesium_phosphate_complex_against_alberty(species):
    # Alberty 2003 (from memory): Mg2+ + HPO4(2-) -> MgHPO4, DG = -1566.87 + 454.8 + 1096.1
    # = -15.97 kJ/mol at I = 0, 25 degC
    mg, hpo4, cx = species["Mg+2"], species["HPO4-2"], species["MgHPO4"]
    assert cx.n_mg == 1 and cx.charge == 0 and "Mg complex" in cx.flag
    assert cx.G - mg.G - hpo4.G == pytest.approx(-15.97, abs=1.0)


@pytest.mark.parametrize("stoichiometry, name", [
    ({"NADH": -1, "NAD": 1, "H+": -1, "x": -1, "y": 1}, "reduction of a carbonyl group by NAD(P)H"),
    ({"NADPH": 1, "NADP": -1, "H+": 1, "x": 1, "y": -1}, "reduction of a carbonyl group by NAD(P)H"),
    ({"ATP": -1, "ADP": 1, "H+": 1, "x": -1, "y": 1}, "phosphorylation of an alcohol by ATP"),
    ({"H2O": -1, "phosphate": 1, "x": -1, "y": 1}, "hydrolysis of a phosphate ester"),
    ({"glutamate": -1, "2-oxoglutarate": 1, "x": -1, "y": 1}, "transamination with glutamate"),
    ({"NADH": -1, "NAD": 1, "x": -1, "y": 1, "CO2": -1}, None),
    ({"ATP": -1, "ADP": 1, "x": -2, "y": 1}, None),
])
def test_reaction_classes_by_stoichiometry(stoichiometry, name):
    cls = classify(stoichiometry)
    assert (cls.name if cls else None) == name


def test_class_ranges_against_textbook_values():
    # Nelson & Cox 2008 and Thauer et al. 1977 (from memory): lactate dehydrogenase -25.1,
    # malate dehydrogenase -29.7 (reverse of +29.7); hexokinase -16.7; glucose 6-phosphate
    # hydrolysis -13.8; aspartate aminotransferase +4.7 (Krebs 1953): every class range holds
    # its textbook members within 5 kJ/mol
    ranges = {c.name: class_range(c.name) for c in CLASSES}
    carbonyl = ranges["reduction of a carbonyl group by NAD(P)H"]
    assert carbonyl.low - 5 <= -25.1 <= carbonyl.high + 5 and carbonyl.low - 5 <= -29.7
    kinase = ranges["phosphorylation of an alcohol by ATP"]
    assert kinase.low - 5 <= -16.7 <= kinase.high + 5
    ester = ranges["hydrolysis of a phosphate ester"]
    assert ester.low <= -13.8 <= ester.high
    transamination = ranges["transamination with glutamate"]
    assert transamination.low - 5 <= -4.7 <= transamination.high + 5


def test_estimate_far_outside_its_class_is_flagged_and_widened():
    stoichiometry = {"NADPH": -1, "NADP": 1, "H+": -1, "a": -1, "b": 1}
    high = class_range("reduction of a carbonyl group by NAD(P)H").high
    inside = check_estimate(stoichiometry, high - 1.0, 5.0)
    assert not inside.flagged and inside.sigma == 5.0 and "passed" in inside.message
    outside = check_estimate(stoichiometry, high + 40.0, 5.0)
    assert outside.flagged and outside.distance == pytest.approx(40.0)
    assert outside.sigma == pytest.approx(math.hypot(5.0, 40.0))
    assert "class check" in outside.message and "widened" in outside.message
    # an estimate 2.4 sigma outside (ketol-acid reductoisomerase at 25 degC: +15.8 +/- 12.7)
    # is not flagged by the 3-sigma rule: its own sigma already reaches the class
    assert not check_estimate(stoichiometry, high + 30.2, 12.7).flagged


def test_bundled_estimates_report_their_class_check():
    import tfa
    from tfa.network.energies import compound_energies, reaction_energies

    model, environment = tfa.load_network(), tfa.load_environment()
    energies = reaction_energies(model, compound_energies(model, environment))
    for rid in ("KARI", "KARI2", "HSD", "HSK", "THRS", "BCAT", "BCAT2"):
        e = energies[rid]
        assert e.source == "estimated"
        assert "class check" in e.provenance or any("class check" in f for f in e.audit_flags), rid


def test_uncertainty_calibration_against_hkf():
    # pychnosz (OBIGT, HKF equations of state, Psat) as the reference of the temperature drift:
    # about 95 % of 162 comparisons at 40-150 degC lie within 2 sigma of the temperature term
    pytest.importorskip("pychnosz")
    calibration = _script("calibrate_sigma")
    from tfa.thermo.uncertainty import temperature_sigma

    for constant_h in (False, True):
        errors = calibration.temperature_errors(constant_h)
        share = calibration.coverage(errors, lambda dt: temperature_sigma(298.15 + dt, not constant_h))
        assert len(errors) >= 150
        assert 0.90 <= share <= 0.99, (constant_h, share)
