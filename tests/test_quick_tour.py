"""The README's quick tour, pinned: the answers ``tfa assess`` gives on the bundled network with
every default (one shared run, ``bundled_run`` in conftest.py), each within a stated tolerance,
so that a change that moves an answer fails here and the README is updated on purpose.

The bundled network and its setting are invented demo data (models/ancestral_core/README.md);
the numbers below are what the current data and models give, read off the README. What makes
them right is checked elsewhere against published values (tests/test_thermo_*.py for the
energies, tests/test_engine_*.py for the optimisation on hand-solved networks); here the point
is that the pipeline still gives the same answers, and that the README says what it prints.
Tolerances: the digits the README prints (common practice for pinned regression answers).
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

pytestmark = pytest.mark.slow  # reads the shared bundled assessment (about 90 s)

README = Path(__file__).resolve().parents[1] / "README.md"

#: The first minimal uphill set of bare chemistry in the order of reaction ids (the canonical
#: order: the same first set from every command; at least 21 sets of this size exist).
BARE_FIRST = ["AK", "CPS", "CTPS", "G5K", "GAPOR", "GLNS", "HSK", "NDK", "PCK", "PRPS", "UMPK"]
#: H2 threshold in native mode, mol/L, and the relative tolerance of the pin (the MILP is solved
#: to 1e-9; the README prints three digits).
H2_THRESHOLD = 5.47e-12
H2_RTOL = 0.01
#: Max-min driving force in native mode, kJ/mol, to the two decimals of summary.json.
DRIVING_FORCE = 2.90
#: Robustness of the default run (at most 40 draws per mode, seed 0): feasible draws per mode.
ROBUSTNESS = {"native": 25, "h2_only": 24, "no_atp_bare": 0}
ROBUSTNESS_DRAWS = 40


@pytest.fixture(scope="module")
def summary(bundled_run) -> dict:
    return json.loads((bundled_run.out / "summary.json").read_text())


def test_coverage_line(summary):
    coverage = summary["coverage"]
    assert {k: coverage[k] for k in ("reactions", "with_energy", "estimated", "missing")} == {
        "reactions": 146, "with_energy": 146, "estimated": 20, "missing": 0}
    # what the energies rest on (the data-to-verify line): 109 reactions rest on a recalled
    # value, a rule of thumb, an estimate or unreviewed data; one is touched by an open audit flag
    assert (coverage["unchecked"], coverage["flagged"]) == (109, 1)


def test_verdicts_per_mode(summary):
    assert summary["feasible"] == {"native": True, "h2_only": True, "no_atp_strict": False,
                                   "no_atp_bare": False}
    assert summary["demand_impossible"] == ["no_atp_strict"]
    assert summary["uphill"]["h2_only"] == []
    bare = summary["uphill"]["no_atp_bare"]
    assert bare[0] == BARE_FIRST and all(len(s) == 11 for s in bare)
    assert bare == sorted(bare)          # listed in the order of reaction ids


def test_h2_threshold_and_driving_force(summary):
    assert summary["h2_threshold"] == pytest.approx(H2_THRESHOLD, rel=H2_RTOL)
    assert summary["h2_unit"] == "mol/L"
    assert round(summary["driving_force_kJ_per_mol"], 2) == DRIVING_FORCE


#: The full re-solve of the top binding constraint of the native H2 threshold (the upper bound
#: of fdox): its pattern's dual -2 predicts +0.01 in ln[H2] for the bound 0.5 % lower
#: (-0.005 in ln); the threshold MILP solved again moves -0.0012 (another pattern takes over).
THRESHOLD_CHECK = {"predicted": 0.01, "measured": -0.0012}


def test_h2_threshold_binding_measured_beside_predicted(bundled_run):
    table = bundled_run.result.binding_constraints.table
    top = bundled_run.result.binding_constraints.top("native", "h2_threshold")
    assert (top["compound"], top["bound"], top["check_step"]) == ("fdox", "upper", -0.005)
    assert top["predicted_ln_h2_change"] == pytest.approx(THRESHOLD_CHECK["predicted"], rel=1e-6)
    assert top["measured_ln_h2_change"] == pytest.approx(THRESHOLD_CHECK["measured"], abs=5e-5)
    # only the top constraint(s) of the H2 answers are solved again
    assert table["measured_ln_h2_change"].notna().sum() <= 2


#: The H2 scan's level below the threshold (1e-12 mol/L) needs one step uphill; of the sets of
#: that size the first in the order of reaction ids (the solver alone gave HYD_BIF).
SCAN_FIRST_SET = "ECH"


def test_h2_scan_set_in_the_order_of_reaction_ids(bundled_run):
    scan = bundled_run.result.h2_scan.table
    low = scan[~scan["feasible"]]
    assert list(low["h2_activity"]) == [1e-12]
    assert list(low["uphill_set"]) == [SCAN_FIRST_SET] and low["in_order_of_ids"].all()


def test_robustness_counts(summary):
    counts = {row["mode"]: row["feasible_draws"] for row in summary["robustness"]}
    assert counts == ROBUSTNESS
    assert all(row["draws"] == ROBUSTNESS_DRAWS for row in summary["robustness"])


def test_readme_shows_the_printed_answer(bundled_run):
    """Every line the quick tour shows (but the last, which gives the time and the folder) is a
    line the assessment prints now, word for word up to the list of tightest steps (an equal
    optimum may name other steps)."""
    text = README.read_text(encoding="utf-8")
    block = re.search(r"```text\n(network ancestral_core.*?)```", text, re.S).group(1)
    shown = [line for line in block.strip().splitlines() if line.strip()]
    printed = bundled_run.result.summary_lines()
    cut = lambda line: line.split(" (tightest:")[0]  # noqa: E731
    assert [cut(line) for line in shown[:-1]] == [cut(line) for line in printed]
    assert shown[-1].startswith("files in tfa-results/ (report: tfa-results/report.html); ")


#: The route comparison at the demo setting (README, "The routes side by side"): ATP made per
#: carbon fixed in each route's own steady state, to the two decimals the summary prints; H2 per
#: carbon (the same for every route); the first two carbon entries; the distance to a flipped
#: verdict to the one decimal the README gives.
ROUTE_ATP_PER_CARBON = {"acetyl_coa": 4.12, "reductive_tca": 5.69, "reversed_oxidative_tca": 4.91,
                        "reductive_glycine": 1.31}
ROUTE_H2_PER_CARBON = 1.94
ROUTE_FIRST_ENTRIES = {"acetyl_coa": "PC 64 %, PFOR 35 %", "reductive_tca": "PC 72 %, PFOR 25 %",
                       "reversed_oxidative_tca": "PC 69 %, PFOR 29 %",
                       "reductive_glycine": "HDCR 51 %, GCS 25 %"}
ROUTE_MARGIN_SIGMA = {"acetyl_coa": 3.4, "reductive_tca": 3.0, "reversed_oxidative_tca": 3.4,
                      "reductive_glycine": 3.4}
#: Columns the route comparison fills for every feasible route.
ROUTE_FILLED = ["driving_force_kJ_per_mol", "h2_threshold", "h2_per_carbon", "atp_made_per_carbon",
                "atp_spent_per_carbon", "delta_g_net_kJ_per_carbon", "gradient_share",
                "carbon_entries", "route_carbon_share", "h2_threshold_binding",
                "driving_force_binding", "margin_sigma", "margin_status", "carried_by", "solution"]


def test_route_comparison_costs_and_entries(bundled_run):
    import pandas as pd

    table = pd.read_csv(bundled_run.out / "route_comparison.csv").set_index("route")
    assert table["feasible"].all()
    feasible = table[table["feasible"]]
    assert not feasible[ROUTE_FILLED].isna().any().any()
    assert {r: round(v, 2) for r, v in table["atp_made_per_carbon"].items()} == ROUTE_ATP_PER_CARBON
    # ATP is internal (made by the gradient's ATP synthase, spent by the coupled steps)
    assert list(table["atp_spent_per_carbon"]) == pytest.approx(list(table["atp_made_per_carbon"]),
                                                                rel=1e-6)
    assert set(table["h2_per_carbon"].round(2)) == {ROUTE_H2_PER_CARBON}
    # the gradient pays all of it (100-101 %: the feed chemistry alone is slightly uphill)
    assert table["gradient_share"].between(0.995, 1.015).all()
    assert {r: ", ".join(e.split(", ")[:2]) for r, e in table["carbon_entries"].items()} == \
        ROUTE_FIRST_ENTRIES
    # every route's carbon came in through its own reactions, the rest (about 1 %) through the
    # shared carbamoyl-phosphate synthetase
    assert table["route_carbon_share"].between(0.98, 1.0).all()
    assert {r: round(v, 1) for r, v in table["margin_sigma"].items()} == ROUTE_MARGIN_SIGMA
    assert table["h2_threshold_binding"].str.startswith("the upper bound of fdox").all()
