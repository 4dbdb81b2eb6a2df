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

#: The first minimal uphill set of bare chemistry: these ten and one of the last two (two
#: alternative sets of the same size; which comes first is the solver's choice).
BARE_CORE = {"AK", "CPS", "CTPS", "G5K", "GLNS", "HSK", "NDK", "PGK", "PRPS", "UMPK"}
BARE_EITHER = {"PPS", "PPDK"}
#: H2 threshold in native mode, mol/L, and the relative tolerance of the pin (the MILP is solved
#: to 1e-9; the README prints three digits).
H2_THRESHOLD = 1.93e-11
H2_RTOL = 0.01
#: Max-min driving force in native mode, kJ/mol, to the two decimals the README prints.
DRIVING_FORCE = 2.38
#: Robustness of the default run (4 draws per mode, seed 0): feasible draws per mode.
ROBUSTNESS = {"native": 2, "h2_only": 0, "no_atp_bare": 0}


@pytest.fixture(scope="module")
def summary(bundled_run) -> dict:
    return json.loads((bundled_run.out / "summary.json").read_text())


def test_coverage_line(summary):
    coverage = summary["coverage"]
    assert {k: coverage[k] for k in ("reactions", "with_energy", "estimated", "missing")} == {
        "reactions": 138, "with_energy": 138, "estimated": 18, "missing": 0}
    # what the energies rest on (the data-to-verify line): 101 reactions rest on a recalled
    # value, a rule of thumb, an estimate or unreviewed data; one is touched by an open audit flag
    assert (coverage["unchecked"], coverage["flagged"]) == (101, 1)


def test_verdicts_per_mode(summary):
    assert summary["feasible"] == {"native": True, "h2_only": False, "no_atp_strict": False,
                                   "no_atp_bare": False}
    assert summary["demand_impossible"] == ["no_atp_strict"]
    h2_sets = summary["uphill"]["h2_only"]
    assert [len(s) for s in h2_sets] == [1, 1]
    assert {s[0] for s in h2_sets} == {"DHODH", "DHOase"}
    bare = summary["uphill"]["no_atp_bare"]
    assert len(bare[0]) == 11
    assert BARE_CORE <= set(bare[0]) and len(set(bare[0]) & BARE_EITHER) == 1


def test_h2_threshold_and_driving_force(summary):
    assert summary["h2_threshold"] == pytest.approx(H2_THRESHOLD, rel=H2_RTOL)
    assert summary["h2_unit"] == "mol/L"
    assert round(summary["driving_force_kJ_per_mol"], 2) == DRIVING_FORCE


def test_robustness_counts(summary):
    counts = {row["mode"]: row["feasible_draws"] for row in summary["robustness"]}
    assert counts == ROBUSTNESS
    assert all(row["draws"] == 4 for row in summary["robustness"])


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
