"""Each analysis subcommand through the installed entry point (``python -m tfa``): its output is
checked against an independent calculation, and one bad input per subcommand gives a message,
exit code 2 and no file in the output folder.

References of the checks:
- ΔrG' at 1 mM: ΔrG' = ΔrG'° + RT Σ ν_i ln a_i (Alberty 2003, Thermodynamics of Biochemical
  Reactions, eq. 4.1-4), every reactant at 1 mM (Flamholz et al. 2012, Nucleic Acids Res.
  40:D770).
- Max-min driving force of one reaction with fixed substrates: B = -(ΔrG'° + RT ln(c_P,min /
  Π c_S)) with the product at its lower bound (Noor et al. 2014, PLoS Comput. Biol.
  10:e1003483).
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import pytest

try:
    import tomllib
except ModuleNotFoundError:  # Python 3.10
    import tomli as tomllib

from tfa.network.bundled import bundled_environment_path

R = 8.314462618e-3  # kJ/mol/K (CODATA 2018)


def tfa(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "tfa", *args], capture_output=True, text=True,
                          cwd=cwd, timeout=600)


def environment() -> dict:
    return tomllib.loads(bundled_environment_path().read_text())


def fixed_co2() -> float:
    """The CO2(aq) activity the bundled environment fixes: its dissolved inorganic carbon
    speciated at its conditions (mol/L; tests/test_fluid.py checks the speciation)."""
    from tfa.network.environment import Environment
    from tfa.network.inputs import resolve_inputs

    inputs = resolve_inputs()
    return Environment.from_toml(bundled_environment_path()).feed_metabolites(inputs.model)["co2"]


@pytest.fixture(scope="module")
def census_json():
    run = tfa("census", "--modes", "native", "--json", "-q")
    assert run.returncode == 0, run.stderr
    return json.loads(run.stdout)


def test_census_energy_at_1mM_recomputed(census_json, tmp_path):
    """Alberty 2003 eq. 4.1-4 at 1 mM (Flamholz et al. 2012): recomputed for every reaction; fed
    compounds stay at their feed values, and H+ of either compartment (h, h_out) and water have
    no activity term."""
    from tfa.network.bundled import load_bundled_network

    from tfa.network.environment import bundled_environment

    model = load_bundled_network()
    env = environment()
    t = env["conditions"]["temperature_C"] + 273.15
    fed = bundled_environment().feed_metabolites(model)   # [feed] and the speciated [fluid]
    rows = census_json["tables"]["census"]
    assert len(rows) > 100
    for row in rows:
        reaction = model.reactions.get_by_id(row["reaction"])
        total = sum(c * math.log(fed.get(m.id, 1e-3)) for m, c in reaction.metabolites.items()
                    if m.id not in ("h", "h_out", "h2o"))
        expected = row["delta_g_standard_kJ_per_mol"] + R * t * total
        assert row["delta_g_1mM_kJ_per_mol"] == pytest.approx(expected, abs=1e-6), row["reaction"]
    counts = census_json["tables"]["census_counts"][0]
    assert counts["exergonic_1mM"] == sum(r["delta_g_1mM_kJ_per_mol"] < 0 for r in rows)


def test_driving_force_of_one_reaction_is_analytic(census_json, tmp_path):
    """Noor et al. 2014: B of h2 + co2 -> formate + H+ alone, formate at its lower bound."""
    env = environment()
    dg0 = next(r["delta_g_standard_kJ_per_mol"] for r in census_json["tables"]["census"]
               if r["reaction"] == "HDCR")
    t = env["conditions"]["temperature_C"] + 273.15
    low = env["bounds"]["default"][0]
    expected = -(dg0 + R * t * math.log(low / (env["feed"]["h2"] * fixed_co2())))
    run = tfa("driving-force", "--route", "HDCR", "--json", "-q", "--out", str(tmp_path))
    assert run.returncode == 0, run.stderr
    out = json.loads(run.stdout)
    (route,) = out["tables"]["driving_force_route"]
    assert route["driving_force_kJ_per_mol"] == pytest.approx(expected, abs=1e-5)
    assert route["reaction"] == "HDCR"
    assert (tmp_path / "driving_force_route.csv").is_file()
    assert (tmp_path / "driving_force.csv").is_file() and (tmp_path / "driving_force.json").is_file()


@pytest.mark.slow
def test_feasible_and_uphill_agree(tmp_path):
    """Feasible in a mode exactly when its minimal uphill set is empty (same problem, two ways):
    the two commands give the same first set and the same count."""
    feas = tfa("feasible", "--modes", "native,h2_only", "--json", "-q", "--out", str(tmp_path))
    assert feas.returncode == 0, feas.stderr
    feasible = json.loads(feas.stdout)
    up = tfa("uphill", "--modes", "native,h2_only", "--json", "-q")
    assert up.returncode == 0, up.stderr
    uphill = json.loads(up.stdout)
    for row in feasible["tables"]["feasibility"]:
        assert row["feasible"] == (row["uphill_set_size"] == 0)
    assert feasible["uphill"] == uphill["uphill"] and feasible["feasible"] == uphill["feasible"]
    # both modes run at the demo setting (tests/test_precursors.py compares the two commands in
    # every mode, including those that need driven steps)
    assert feasible["feasible"] == {"native": True, "h2_only": True}
    # the hidden marker of a tfa output folder aside (tfa.util.outdir.MARKER)
    assert sorted(p.name for p in tmp_path.iterdir() if not p.name.startswith(".")) == [
        "feasibility.csv", "feasibility.json", "uphill_sets.csv", "uphill_sets.json"]


@pytest.mark.slow
def test_h2_scan_and_threshold_agree(tmp_path):
    """The threshold (one MILP over ln H2) and the scan (fixed levels) tell the same story: no
    scanned level below a found threshold is feasible, every level above it is."""
    scan = tfa("h2-scan", "--h2-range", "1e-8:1e-2", "--h2-levels", "4", "--no-uphill", "--json",
               "-q", "--out", str(tmp_path))
    assert scan.returncode == 0, scan.stderr
    table = json.loads(scan.stdout)["tables"]["h2_scan"]
    assert [r["h2_activity"] for r in table] == pytest.approx([1e-8, 1e-6, 1e-4, 1e-2])
    thr = tfa("h2-threshold", "--h2-range", "1e-8:1e-2", "--json", "-q")
    assert thr.returncode == 0, thr.stderr
    threshold = json.loads(thr.stdout)["h2_threshold"]
    for row in table:
        if threshold is not None:
            assert row["feasible"] == (row["h2_activity"] >= threshold * (1 - 1e-9))
        else:
            assert not row["feasible"]
    assert (tmp_path / "h2_scan.png").is_file() and (tmp_path / "h2_scan.svg").is_file()


def test_ranges_inside_the_concentration_box(census_json, tmp_path):
    """The range of ΔrG' of HDCR lies inside what its concentration bounds allow (Alberty 2003
    eq. 4.1-4 at the extreme concentrations) and contains a value below zero (it runs)."""
    env = environment()
    dg0 = next(r["delta_g_standard_kJ_per_mol"] for r in census_json["tables"]["census"]
               if r["reaction"] == "HDCR")
    t = env["conditions"]["temperature_C"] + 273.15
    fed = math.log(env["feed"]["h2"] * fixed_co2())
    low, high = (dg0 + R * t * (math.log(b) - fed) for b in env["bounds"]["default"])
    run = tfa("ranges", "--reactions", "HDCR", "--json", "-q", "--out", str(tmp_path))
    assert run.returncode == 0, run.stderr
    row = json.loads(run.stdout)["tables"]["ranges"][0]
    assert low - 1e-6 <= row["delta_g_min_kJ_per_mol"] <= row["delta_g_max_kJ_per_mol"] <= high + 1e-6
    assert row["delta_g_min_kJ_per_mol"] < 0
    assert (tmp_path / "ranges.png").is_file()


def test_text_output():
    run = tfa("census", "--modes", "native,no_atp_bare")
    assert run.returncode == 0, run.stderr
    assert "exergonic at 1 mM" in run.stdout and "no_atp_bare" in run.stdout


BAD_INPUTS = [
    ("feasible", ["--modes", "native,sideways"], "sideways"),
    ("uphill", ["no/such/reactions.tsv"], "no/such/reactions.tsv"),
    ("h2-scan", ["--h2-range", "1e-6:-1"], "--h2-range"),
    ("h2-threshold", ["--h2-range", "1e-2:1e-9"], "--h2-range"),
    ("ranges", ["--reactions", "NOT_A_REACTION"], "NOT_A_REACTION"),
    ("driving-force", ["--route", "HDCR,NOT_A_REACTION"], "NOT_A_REACTION"),
    ("census", ["--ratio", "-5"], "--ratio"),
    ("assess", ["--route", "HDCR,NOT_A_REACTION"], "NOT_A_REACTION"),
]


@pytest.mark.parametrize("command, args, named", BAD_INPUTS, ids=[b[0] for b in BAD_INPUTS])
def test_bad_input_exit_2_and_no_files(command, args, named, tmp_path):
    out = tmp_path / "out"
    run = tfa(command, *args, "--out", str(out))
    assert run.returncode == 2, (run.stdout, run.stderr)
    assert f"tfa {command}: error:" in run.stderr and named in run.stderr
    assert run.stdout == ""
    assert not out.exists() or not any(out.iterdir())
