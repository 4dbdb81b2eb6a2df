"""``tfa.assess`` on the bundled defaults (one shared run, tests/conftest.py): every file exists,
every JSON parses, JSON and CSV agree, the summary answers the ATP question, and the energy profile is recomputed from the reference concentrations with
ΔrG' = ΔrG'° + RT Σ ν_i ln c_i (Alberty 2003, Thermodynamics of Biochemical Reactions,
eq. 4.1-4).
"""

from __future__ import annotations

import json

import pytest

pytestmark = pytest.mark.slow  # reads the shared bundled assessment (about 90 s)

import tfa
from tfa.analyses.route import order_route, parse_route
from tfa.assessment import REPORT_FILE, SUMMARY_FILE
from tfa.report.tables import compare_table_files

TABLE_FILES = ("coverage", "census", "census_counts", "feasibility", "uphill_sets", "precursors", "h2_scan",
               "h2_threshold", "driving_force", "energy_profile", "ranges",
               "robustness_feasibility", "robustness_uphill")
FIGURE_FILES = ("energy_profile", "h2_scan", "census", "ranges", "precursors")


@pytest.fixture(scope="module")
def run(bundled_run):
    """The shared default assessment of the bundled network (tests/conftest.py)."""
    return bundled_run.result, bundled_run.out


def test_every_file_written(run):
    result, out = run
    for name in TABLE_FILES:
        assert (out / f"{name}.csv").is_file(), name
        assert (out / f"{name}.json").is_file(), name
    for name in FIGURE_FILES:
        assert (out / f"{name}.png").stat().st_size > 1000, name
        assert (out / f"{name}.svg").stat().st_size > 1000, name
    page = (out / REPORT_FILE).read_text()
    assert page.count("data:image/svg+xml") >= len(FIGURE_FILES)
    assert "http://" not in page and "https://" not in page
    assert not [p for p in out.iterdir() if p.name.endswith(".part")]


def test_json_parses_and_agrees_with_csv(run):
    _, out = run
    for name in TABLE_FILES:
        json.loads((out / f"{name}.json").read_text())
        assert compare_table_files(out / f"{name}.csv", out / f"{name}.json") == [], name
    summary = json.loads((out / SUMMARY_FILE).read_text())
    assert set(summary["feasible"]) == {"native", "h2_only", "no_atp_strict", "no_atp_bare"}


def test_summary_answers_the_atp_question(run):
    result, _ = run
    text = result.summary()
    assert "runs without ATP: " in text
    feasible = result.summary_data()["feasible"]["no_atp_strict"]
    assert ("runs without ATP: yes" in text) == bool(feasible)


def test_energy_profile_recomputed(run):
    """Each step's ΔrG' from the reference solution's concentrations (Alberty 2003 eq. 4.1-4)."""
    result, _ = run
    profile = result.energy_profile.table
    reference = result.energy_profile.reference
    assert len(profile) >= 3
    tm_conc = dict(zip(reference.concentrations["compound"], reference.concentrations["ln_activity"]))
    rt = 8.314462618e-3 * result.environment.conditions.temperature  # R: CODATA 2018
    model = result.network
    for row in profile.itertuples():
        reaction = model.reactions.get_by_id(row.reaction)
        d = 1 if row.direction == "forward" else -1
        term = sum(c * tm_conc[m.id] for m, c in reaction.metabolites.items()
                   if m.id not in ("h", "h2o"))
        assert row.delta_g_kJ_per_mol == pytest.approx(
            d * (row.delta_g_standard_kJ_per_mol * d + rt * term), abs=1e-6)
    # no running sum of unconnected steps; the path ends by making a demanded compound
    assert "cumulative_delta_g_kJ_per_mol" not in profile.columns
    last = model.reactions.get_by_id(profile["reaction"].iloc[-1])
    d = 1 if profile["direction"].iloc[-1] == "forward" else -1
    demanded = {m.id for m in model.reactions.get_by_id("demand_precursors").metabolites}
    assert profile["compound_out"].iloc[-1] in demanded
    assert any(m.id == profile["compound_out"].iloc[-1] and c * d > 0
               for m, c in last.metabolites.items())


def test_ranges_contain_the_reference_solution(run):
    """The reference steady state lies in the feasible set, so each ΔrG' it has lies inside the
    reaction's range (the ranges are over that set)."""
    result, _ = run
    reference = result.energy_profile.reference
    at = dict(zip(reference.table["reaction"], reference.table["delta_g_kJ_per_mol"]))
    ranges = result.ranges.reactions.set_index("reaction")
    checked = 0
    for rid, g in at.items():
        if rid in ranges.index:
            lo = ranges.loc[rid, "delta_g_min_kJ_per_mol"]
            hi = ranges.loc[rid, "delta_g_max_kJ_per_mol"]
            assert lo - 1e-5 <= g <= hi + 1e-5, rid
            checked += 1
    assert checked > 10


def test_route_order_follows_the_carbon():
    """A chain written out of order is put back in the order its substrates appear; the
    carrier (tetrahydrofolate) does not hold a step back."""
    model = tfa.load_network()
    route = order_route(model, parse_route("ACS,MTHFR,HCHO_THF,-FALDH,CODH,HDCR"))
    names = [r for r, _ in route]
    assert names.index("HDCR") < names.index("FALDH") < names.index("HCHO_THF") < names.index("MTHFR")
    assert names.index("MTHFR") < names.index("ACS") and names.index("CODH") < names.index("ACS")


def test_bad_input_raises_before_anything_is_written(tmp_path):
    from tfa.errors import InputError

    out = tmp_path / "never"
    with pytest.raises(InputError, match="sideways"):
        tfa.assess(out=out, modes=["native", "sideways"])
    with pytest.raises(InputError, match="no such file"):
        tfa.assess("no/such/reactions.tsv", out=out)
    assert not out.exists()
