"""Bundled species, compound and source tables (tfa/data/*.csv) and their loader.

External references:
- OBIGT database as carried by pychnosz (species values must equal what pychnosz's default
  ``info``/``subcrt`` uses at 25 degC, 1 bar).
- Liquid water at 25 degC: Johnson, Oelkers & Helgeson (1992) Comp. Geosci. 18:899 (SUPCRT92
  water model, G = -237.18 kJ/mol, S = 69.91 J/mol/K, Cp = 75.35 J/mol/K, V = 18.07 cm3/mol).
- Peer review of sources: refs.csv of OBIGT lists LDS+26 as "submitted manuscript".
"""

from __future__ import annotations

import contextlib
import csv
import io
import math
import re
import warnings
from importlib import resources
from pathlib import Path

import pytest

from tfa.thermo.balance import parse_formula
from tfa.thermo.species import (COMPOUND_COLUMNS, SOURCE_COLUMNS, SPECIES_COLUMNS, Species,
                                load_compound_rows, load_sources, load_species)

import pychnosz  # noqa: E402 - the test reference (a test dependency)

TFA_ROOT = Path(__file__).resolve().parents[1] / "tfa"


def _header(name: str) -> tuple[str, ...]:
    text = resources.files("tfa.data").joinpath(name).read_text(encoding="utf-8")
    return tuple(next(csv.reader(io.StringIO(text))))


@pytest.fixture(scope="module")
def species() -> dict[str, Species]:
    return {s.id: s for s in load_species()}


@pytest.fixture(scope="module")
def compounds() -> list[dict]:
    return load_compound_rows()


def test_table_headers_exact():
    assert _header("species.csv") == SPECIES_COLUMNS
    assert _header("sources.csv") == SOURCE_COLUMNS
    assert _header("compounds.csv") == COMPOUND_COLUMNS


def test_every_compound_species_exists_and_points_back(species, compounds):
    listed = set()
    for row in compounds:
        members = row["species"].split(";")
        assert members and all(members), row["id"]
        for sid in members:
            assert sid in species, f"{row['id']}: species {sid} missing from species.csv"
            assert species[sid].reactant == row["id"]
            listed.add(sid)
        # reference formula/charge is one of the members (Mg-free)
        refs = [species[s] for s in members
                if species[s].formula == row["formula"] and species[s].charge == int(row["charge"])]
        plain = [species[s] for s in members if species[s].n_mg == 0]
        assert refs and (not plain or all(r.n_mg == 0 for r in refs)), row["id"]
    assert listed == set(species), "species not listed by any compound"


def test_members_of_a_compound_differ_only_by_protons_and_magnesium(species, compounds):
    # Alberty (2003) reactant convention: pseudoisomers differ by H+ (and bound Mg2+ with pMg).
    for row in compounds:
        members = [species[s] for s in row["species"].split(";")]
        cores = set()
        for m in members:
            counts, _ = parse_formula(m.formula)
            cores.add(tuple(sorted((e, n) for e, n in counts.items() if e not in ("H", "Mg"))))
            assert m.charge - m.n_h - 2 * m.n_mg == members[0].charge - members[0].n_h - 2 * members[0].n_mg
        assert len(cores) == 1, row["id"]


def test_n_h_n_mg_and_charge_match_obigt_formula(species):
    for s in species.values():
        counts, z = parse_formula(s.formula)
        assert z == 0, "formula column carries no charge"
        assert counts.get("H", 0) == s.n_h, s.id
        assert counts.get("Mg", 0) == s.n_mg, s.id


def test_names_map_to_exactly_one_compound(compounds):
    owner: dict[str, str] = {}
    for row in compounds:
        labels = {row["id"], row["name"], *filter(None, row["synonyms"].split(";"))}
        for label in labels:
            key = label.strip().lower()
            assert owner.setdefault(key, row["id"]) == row["id"], f"{label} is ambiguous"


def test_required_compounds_and_kinds(compounds):
    by_id = {r["id"]: r for r in compounds}
    kinds = {"H2O": "water", "H+": "proton", "H2(g)": "gas", "CO2(g)": "gas", "CH4(g)": "gas",
             "CO(g)": "gas", "H2S(g)": "gas", "NH3(g)": "gas"}
    for cid, kind in kinds.items():
        assert by_id[cid]["kind"] == kind
    required = ["H2", "CO2", "CO2tot", "CH4", "CO", "H2S", "ammonia", "phosphate",
                "pyrophosphate", "formate", "acetate", "pyruvate", "lactate", "glycolate",
                "citrate", "isocitrate", "cis-aconitate", "2-oxoglutarate", "succinate",
                "fumarate", "malate", "oxaloacetate", "ATP", "ADP", "AMP", "NAD", "NADH", "NADP",
                "NADPH", "acetyl phosphate", "phosphoenolpyruvate", "3-phosphoglycerate",
                "1,3-bisphosphoglycerate", "glycerate", "ribose 5-phosphate", "glucose"]
    assert not [c for c in required if c not in by_id]
    amino = ["alanine", "arginine", "asparagine", "aspartate", "cysteine", "glutamine",
             "glutamate", "glycine", "histidine", "isoleucine", "leucine", "lysine", "methionine",
             "phenylalanine", "proline", "serine", "threonine", "tryptophan", "tyrosine", "valine"]
    for a in amino:
        assert len(by_id[a]["species"].split(";")) >= 3, f"{a}: ionised forms missing"
    assert by_id["CO2"]["species"] == "CO2"
    assert set(by_id["H2S"]["species"].split(";")) == {"H2S", "HS-"}
    assert set(by_id["ammonia"]["species"].split(";")) == {"NH3", "NH4+"}
    assert "Mg" in "".join(by_id["ATP"]["species"].split(";")[-4:])


def test_hydrated_co2_is_sum_of_co2_and_water(species):
    # the design notes (docs/design): neutral member of CO2tot is CO2(aq) + H2O (Alberty 2003 convention)
    comp, co2, w = species["CO2(aq)+H2O"], species["CO2"], species["H2O(l)"]
    assert comp.reactant == "CO2tot" and comp.formula == "CH2O3" and comp.n_h == 2
    for attr in ("G", "H", "S", "Cp", "V"):
        assert getattr(comp, attr) == pytest.approx(getattr(co2, attr) + getattr(w, attr), abs=1e-5)


def test_hydrated_formaldehyde_from_hcho_and_hydration_constant(species):
    """scripts/make_species_table.py: methanediol minus one water, G = G(HCHO) - RT ln K_h,
    H = H(HCHO) + dH_h, S from G and H, Cp and V of HCHO. HCHO from pychnosz (OBIGT, Schulte &
    Shock 1993); K_h = 2.0e3 at 25 degC (Bell 1966, from memory; measurements 1.3e3-2.3e3),
    dH_h = -33 kJ/mol (Winkelman et al. 2002, from memory: -31; older values to -36)."""
    hyd = species["methanediol-H2O"]
    with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        row = pychnosz.info(pychnosz.info("formaldehyde", "aq")).iloc[0]
    f = 4.184 if row["E_units"] == "cal" else 1.0
    g, h, s = row["G"] * f / 1000, row["H"] * f / 1000, row["S"] * f
    assert hyd.reactant == "formaldehyde" and hyd.formula == "CH2O"
    assert hyd.charge == 0 and hyd.n_h == 2 and hyd.state == "aq"
    rt = 8.314462618e-3 * 298.15
    k_h = math.exp((g - hyd.G) / rt)
    assert 1.3e3 <= k_h <= 2.3e3
    assert -36.0 <= hyd.H - h <= -31.0
    # Gibbs-Helmholtz at 298.15 K: dG_h = dH_h - T dS_h (S in J/mol/K)
    assert hyd.G - g == pytest.approx((hyd.H - h) - 298.15 * (hyd.S - s) / 1000, abs=1e-5)
    assert hyd.Cp == pytest.approx(row["Cp"] * f, abs=1e-5)
    assert hyd.V == pytest.approx(row["V"], abs=1e-6)
    assert hyd.source == "SS93" and hyd.source2 == "Bel66"


def test_water_against_published_and_pychnosz(species):
    w = species["H2O(l)"]
    # Johnson et al. (1992) SUPCRT92 values at 25 degC, 1 bar
    assert w.G == pytest.approx(-237.18, abs=0.01)
    assert w.H == pytest.approx(-285.83, abs=0.02)
    assert w.S == pytest.approx(69.91, abs=0.03)
    assert w.Cp == pytest.approx(75.35, abs=0.03)
    assert w.V == pytest.approx(18.07, abs=0.01)
    with contextlib.redirect_stdout(io.StringIO()):
        ref = pychnosz.water(["G", "S"], T=298.15, P=1)
    assert w.G == pytest.approx(float(ref["G"]) / 1000, abs=1e-4)
    assert w.S == pytest.approx(float(ref["S"]), abs=1e-3)


def test_bundled_values_equal_pychnosz_default_rows(species):
    """Every row equals the OBIGT row pychnosz's ``info`` finds by default (cal -> J by 4.184).

    Where the row has no Cp or V, the table carries the row's own equation of state at
    298.15 K, 1 bar: compared with pychnosz's ``subcrt`` there.
    """
    table = {r["species"]: r["obigt_name"] for r in csv.DictReader(io.StringIO(
        resources.files("tfa.data").joinpath("species.csv").read_text(encoding="utf-8")))}
    # composite rows and the Mg complexes built by the script are checked in their own tests;
    # a re-anchored row equals the OBIGT row plus its recorded shift of G and H
    check = [s for s in species.values()
             if s.id not in ("CO2(aq)+H2O", "H2O(l)", "methanediol-H2O") and "Mg complex" not in s.flag]
    names = [table[s.id] for s in check]
    states = [s.state for s in check]
    with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        index = pychnosz.info(names, states)
        rows = pychnosz.info(index)
        eos = pychnosz.subcrt(names, state=states, T=25, P=1).out["species_data"]
    assert len(rows) == len(check) == len(eos)
    for s, (_, row), frame in zip(check, rows.iterrows(), eos):
        f = 4.184 if row["E_units"] == "cal" else 1.0
        shift = s.shift or 0.0
        assert ("re-anchored" in s.flag) == (shift != 0.0), s.id
        assert s.G - shift == pytest.approx(row["G"] * f / 1000, abs=1e-3), s.id
        assert s.H - shift == pytest.approx(row["H"] * f / 1000, abs=1e-3), s.id
        assert s.S == pytest.approx(row["S"] * f, abs=1e-5), s.id
        cp = row["Cp"] * f if row["Cp"] == row["Cp"] else float(frame["Cp"].iloc[0])
        v = row["V"] if row["V"] == row["V"] else float(frame["V"].iloc[0])
        assert s.Cp == pytest.approx(cp, abs=1e-3), s.id
        assert s.V == pytest.approx(v, abs=1e-3), s.id


def test_sources_cover_species_and_flag_unreviewed(species):
    sources = load_sources()
    for s in species.values():
        assert s.source in sources, s.id
        assert s.source2 is None or s.source2 in sources, s.id
    # OBIGT refs.csv: "LDS+26 ... submitted manuscript" -> not peer reviewed
    assert sources["LDS+26"].peer_reviewed is False
    for key in ("SH88", "SHS89", "Sho95", "LH06a", "LH06b", "AH97b", "Kit15", "CS16", "WEP+82",
                "PS01", "JOH92"):
        assert sources[key].peer_reviewed is True, key
    assert sources["SH88"].doi == "10.1016/0016-7037(88)90181-0"
    assert sources["SH88"].year == 1988
    unreviewed = {s.reactant for s in species.values() if not sources[s.source].peer_reviewed}
    assert {"acetyl phosphate", "1,3-bisphosphoglycerate", "phosphoenolpyruvate",
            "3-phosphoglycerate"} <= unreviewed
    assert "ATP" not in unreviewed and "acetate" not in unreviewed
    # glucose: the unreviewed LDS+26 row re-anchored to Alberty (2003) and credited to it
    assert "glucose" not in unreviewed and species["glucose"].source == "Alb03"


def test_literature_sources_merged_when_present():
    path = resources.files("tfa.data").joinpath("literature_sources.csv")
    if not path.is_file():
        pytest.skip("literature_sources.csv not written yet")
    keys = {r["key"] for r in csv.DictReader(io.StringIO(path.read_text(encoding="utf-8")))}
    assert keys <= set(load_sources())


def test_runtime_package_never_imports_pychnosz():
    pattern = re.compile(r"^\s*(import\s+pychnosz|from\s+pychnosz\b)|__import__\(\s*['\"]pychnosz"
                         r"|import_module\(\s*['\"]pychnosz", re.MULTILINE)
    offenders = [str(p.relative_to(TFA_ROOT)) for p in TFA_ROOT.rglob("*.py")
                 if pattern.search(p.read_text(encoding="utf-8"))]
    assert offenders == []
