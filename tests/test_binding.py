"""What binds each answer (dual values of the pattern LP) and the H2 answer as a window.

Every expected value is hand-derived beside its test from Delta_r G' = Delta_r G'deg +
RT sum_i nu_i ln c_i (R. A. Alberty, Thermodynamics of Biochemical Reactions, Wiley 2003,
eq. 4.1-4) with R = 8.314462618 J/(mol K) (CODATA 2018), T = 298.15 K, RT = 2.478957 kJ/mol,
and the direction rule of thermodynamics-based flux analysis (Henry, Broadbelt & Hatzimanikatis
2007, Biophys. J. 92:1792): a reaction carrying flux forward needs Delta_r G' <= -delta
(delta = 0.1 kJ/mol); the max-min driving force is that of Noor et al. 2014 (PLoS Comput. Biol.
10:e1003483). That a dual value lies between the left and right derivatives of the optimal value
is Bertsimas & Tsitsiklis 1997, Introduction to Linear Optimization, Section 5.2.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import h2_threshold, network_driving_force  # noqa: E402
from tfa.analyses.binding import optimum_constraints  # noqa: E402
from tfa.analyses.h2_levels import h2_equivalents  # noqa: E402
from tfa.conditions import Conditions  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

RT = 8.314462618e-3 * 298.15  # kJ/mol
DELTA = 0.1
SOLVER = "highs" if "highs" in available_solvers() else available_solvers()[0]


def by_datum(rows: list[dict]) -> dict:
    return {(r["kind"], r["compound"] or r["reaction"], r["bound"]): r for r in rows}


def test_dual_of_the_binding_bound_of_one_reaction_is_rt_per_unit_ln_c():
    # A (fed 1 mM) <=> B, dG'deg = -5 kJ/mol, B in [1 uM, 10 mM], B drained by a demand of 1.
    # Max-min driving force B* = -(dG'deg + RT ln(b_lo / a)) = 5 + RT ln(1000) = 22.124 kJ/mol
    # with B at its lower bound; so dB*/d ln b_lo = -RT, dB*/d ln a = +RT, dB*/d dG'deg = -1
    # (hand-derived).
    tm = build_thermo_model({"R1": ("A <=> B", -5.0, 0.0)},
                            {"A": (1e-3, 1e-3), "B": (1e-6, 1e-2)},
                            exchanges={"A": (-10, 10)}, demand=("B", 1.0), solver=SOLVER)
    opts = ProblemOptions(solver=SOLVER)
    force = network_driving_force(tm, opts)
    assert force.driving_force == pytest.approx(5 + RT * math.log(1000), rel=1e-6)
    rows, value = optimum_constraints(tm, force.solution, opts, "native", "driving_force",
                                      ("driving_force", None), "max")
    assert value == pytest.approx(force.driving_force, rel=1e-9)
    got = by_datum(rows)
    b_low = got[("concentration bound", "B", "lower")]
    assert b_low["sensitivity"] == pytest.approx(-RT, rel=1e-6)
    # the finite-difference re-solves agree on both sides
    assert b_low["sensitivity_left"] == pytest.approx(-RT, rel=1e-4)
    assert b_low["sensitivity_right"] == pytest.approx(-RT, rel=1e-4)
    assert b_low["dual_confirmed"]
    assert got[("fed concentration", "A", "fixed")]["sensitivity"] == pytest.approx(RT, rel=1e-6)
    assert got[("reaction energy", "R1", "")]["sensitivity"] == pytest.approx(-1.0, rel=1e-6)
    assert rows[0]["rank"] == 1 and rows[0]["compound"] in ("A", "B")
    assert "tenfold" in b_low["message"] and "-5.71 kJ/mol" in b_low["message"]  # -RT ln 10


def hydrogenase(solver: str = SOLVER):
    """H2 + X <=> XH2, dG'deg = -10 kJ/mol; X in [1 uM, 10 mM], XH2 in [10 uM, 10 mM]."""
    return build_thermo_model({"HYD": ("H2 + X <=> XH2", -10.0, 0.0)},
                              {"H2": (1e-3, 1e-3), "X": (1e-6, 1e-2), "XH2": (1e-5, 1e-2)},
                              exchanges={"H2": (-10, 10), "X": (-10, 10)}, demand=("XH2", 1.0),
                              feed_ids={"H2": "H2"}, solver=solver)


def test_h2_threshold_names_the_carrier_bounds_with_their_exponents():
    # [H2]_min = [XH2]_lo / ([X]_hi K), K = exp(-(dG'deg + delta)/RT) (hand-derived): the
    # threshold scales as [XH2]_lo^1 and [X]_hi^-1, and d ln[H2]_min / d dG'deg = 1/RT, the same
    # for delta.
    tm = hydrogenase()
    result = h2_threshold(tm, ProblemOptions(solver=SOLVER), h2_range=(1e-9, 1e-2), window=True,
                          mode="native")
    expected = 1e-5 / (1e-2 * math.exp(9.9 / RT))
    assert result.threshold == pytest.approx(expected, rel=1e-6)
    got = by_datum([r for r in result.binding if r["answer"] == "h2_threshold"])
    assert got[("concentration bound", "XH2", "lower")]["sensitivity"] == pytest.approx(1.0, abs=1e-7)
    assert got[("concentration bound", "X", "upper")]["sensitivity"] == pytest.approx(-1.0, abs=1e-7)
    assert got[("reaction energy", "HYD", "")]["sensitivity"] == pytest.approx(1 / RT, rel=1e-6)
    assert got[("least driving force", "", "")]["sensitivity"] == pytest.approx(1 / RT, rel=1e-6)
    assert all(r["dual_confirmed"] for r in got.values() if abs(r["sensitivity"]) > 1e-7)
    assert "halving it halves the H2 threshold" in got[("concentration bound", "XH2", "lower")]["message"]
    # feasible up to the top of the range: one window, its upper end at the range
    assert result.windows == [pytest.approx((expected, 1e-2), rel=1e-6)]
    assert [e["at_range_end"] for e in result.ends] == [False, True]
    assert "feasible for H2 between" in result.window_words()
    assert "the top of the range searched" in result.window_words()
    # read as a carrier pair (XH2 reduced, X oxidised), the two bounds are one ratio:
    # [XH2]_lo / [X]_hi = 1e-5 / 1e-2 = 1e-3, and the threshold is proportional to it
    result.carrier_pairs = {"XH2": "X"}
    assert ("the least XH2/X ratio the bounds allow (0.001: XH2 at its lower bound, X at its "
            "upper) sets the H2 threshold: with the flux pattern fixed, halving the ratio halves the H2 "
            "threshold"
            in result.window_words())


def window_network(solver: str = SOLVER):
    """X (fed 1 mM) + H2 <=> XH2 (dG'deg -30 kJ/mol); XH2 <=> Q + H2 (dG'deg +35 kJ/mol);
    XH2, Q in [1 uM, 10 mM]; Q drained by a demand of 1: H2 is taken up by the first step and
    given back by the second, so too little H2 stops the first and too much the second."""
    return build_thermo_model({"R1": ("H2 + X <=> XH2", -30.0, 0.0),
                               "R2": ("XH2 <=> Q + H2", 35.0, 0.0)},
                              {"H2": (1e-3, 1e-3), "X": (1e-3, 1e-3), "XH2": (1e-6, 1e-2),
                               "Q": (1e-6, 1e-2)},
                              exchanges={"H2": (-10, 10), "X": (-10, 10)}, demand=("Q", 1.0),
                              feed_ids={"H2": "H2"}, solver=solver)


# R1 forward: ln H2 >= ln XH2 - ln X + (dG1 + delta)/RT, least with XH2 at 1 uM;
# R2 forward: ln H2 <= ln XH2 - ln Q - (dG2 + delta)/RT, largest with XH2 at 10 mM, Q at 1 uM
# (hand-derived; each end also meets the other step's condition: 0.71 XH2 >= H2 >= 5.7e-3 XH2).
WINDOW_LOW = 1e-6 / 1e-3 * math.exp((-30.0 + DELTA) / RT)
WINDOW_HIGH = 1e-2 / 1e-6 * math.exp(-(35.0 + DELTA) / RT)


def test_h2_window_has_both_ends_each_with_its_binding_constraint():
    assert WINDOW_LOW == pytest.approx(5.75e-9, rel=1e-2)
    assert WINDOW_HIGH == pytest.approx(7.1e-3, rel=1e-2)
    result = h2_threshold(window_network(), ProblemOptions(solver=SOLVER), window=True,
                          mode="native")
    assert result.windows == [(pytest.approx(WINDOW_LOW, rel=1e-6), pytest.approx(WINDOW_HIGH, rel=1e-6))]
    assert [e["found_by"] for e in result.ends] == ["least H2, MILP", "largest H2, MILP"]
    assert not any(e["at_range_end"] for e in result.ends)
    low = by_datum([r for r in result.binding if r["answer"] == "h2_threshold"])
    high = by_datum([r for r in result.binding if r["answer"] == "h2_window_high"])
    assert low[("concentration bound", "XH2", "lower")]["sensitivity"] == pytest.approx(1.0, abs=1e-7)
    assert low[("fed concentration", "X", "fixed")]["sensitivity"] == pytest.approx(-1.0, abs=1e-7)
    assert high[("concentration bound", "XH2", "upper")]["sensitivity"] == pytest.approx(1.0, abs=1e-7)
    assert high[("concentration bound", "Q", "lower")]["sensitivity"] == pytest.approx(-1.0, abs=1e-7)
    assert high[("reaction energy", "R2", "")]["sensitivity"] == pytest.approx(-1 / RT, rel=1e-6)
    words = result.window_words()
    assert words.startswith(f"feasible for H2 between {WINDOW_LOW:.3g} mol/L")
    assert f"and {WINDOW_HIGH:.3g} mol/L" in words
    assert "the lower bound of Q (1e-06 mol/L) sets the upper end" in words
    frame = result.window_frame()
    assert list(frame["window_end"]) == ["low", "high"]
    assert all(frame["binding_constraint"].str.contains("sets"))


def test_h2_window_cut_by_the_range_ends_at_the_range():
    # the same network with the H2 range cut to [1e-10, 1e-3]: one window whose upper end is the
    # top of the range (WINDOW_HIGH = 7.1e-3 lies beyond it)
    result = h2_threshold(window_network(), ProblemOptions(solver=SOLVER), h2_range=(1e-10, 1e-3),
                          window=True)
    assert result.windows == [(pytest.approx(WINDOW_LOW, rel=1e-6), pytest.approx(1e-3))]
    assert result.ends[1]["at_range_end"]
    assert "the top of the range searched" in result.window_words()


def two_window_network(solver: str = SOLVER):
    """Two routes from X (fed 1 mM) to Q (drained by a demand of 1), each taking H2 up and giving
    it back: route 1 by XH2 (R1 -30, R2 +45 kJ/mol), route 2 by YH2 (R3 0, R4 +10 kJ/mol);
    XH2, YH2, Q in [1 uM, 10 mM]."""
    return build_thermo_model({"R1": ("H2 + X <=> XH2", -30.0, 0.0),
                               "R2": ("XH2 <=> Q + H2", 45.0, 0.0),
                               "R3": ("H2 + X <=> YH2", 0.0, 0.0),
                               "R4": ("YH2 <=> Q + H2", 10.0, 0.0)},
                              {"H2": (1e-3, 1e-3), "X": (1e-3, 1e-3), "XH2": (1e-6, 1e-2),
                               "YH2": (1e-6, 1e-2), "Q": (1e-6, 1e-2)},
                              exchanges={"H2": (-10, 10), "X": (-10, 10)}, demand=("Q", 1.0),
                              feed_ids={"H2": "H2"}, solver=solver)


def test_two_routes_give_two_h2_windows_with_the_gap_found_by_bisection():
    # Route 1 as window_network: [1e-3 exp(-29.9/RT), 1e4 exp(-45.1/RT)] = [5.78e-9, 1.25e-4];
    # route 2: H2 >= YH2/X exp(0.1/RT), least with YH2 = 1 uM: 1.0412e-3 (R4 then needs
    # YH2 >= H2 Q exp(10.1/RT) = 6.1e-8, met), and H2 <= 1e4 exp(-10.1/RT) = 170, beyond the
    # range: [1.0412e-3, 1e-2] (hand-derived). The scan level 1e-3 lies in the gap.
    high_1 = 1e4 * math.exp(-45.1 / RT)
    low_2 = 1e-3 * math.exp(DELTA / RT)
    assert high_1 == pytest.approx(1.25e-4, rel=1e-2) and low_2 == pytest.approx(1.0412e-3, rel=1e-4)
    result = h2_threshold(two_window_network(), ProblemOptions(solver=SOLVER), window=True,
                          precision=1e-3)
    assert len(result.windows) == 2
    (a1, b1), (a2, b2) = result.windows
    assert a1 == pytest.approx(WINDOW_LOW, rel=1e-6)
    # ends inside the range found by bisection: on the feasible side, within the precision
    assert high_1 * (1 - 1.01e-3) <= b1 <= high_1 * (1 + 1e-9)
    assert low_2 * (1 - 1e-9) <= a2 <= low_2 * (1 + 1.01e-3)
    assert b2 == pytest.approx(1e-2)
    found = [e["found_by"] for e in result.ends]
    assert found[0] == "least H2, MILP" and found[3] == "largest H2, MILP"
    assert all("bisection" in f for f in found[1:3])
    # the binding constraints at the ends inside: route 1 stops at XH2's upper and Q's lower
    # bound; route 2 starts at YH2's lower bound
    high = by_datum([r for r in result.binding if r["answer"] == "h2_window_high"
                     and r["h2_window"] == 1])
    assert high[("concentration bound", "Q", "lower")]["sensitivity"] == pytest.approx(-1.0, abs=1e-7)
    low = by_datum([r for r in result.binding if r["answer"] == "h2_window_low"])
    assert low[("concentration bound", "YH2", "lower")]["sensitivity"] == pytest.approx(1.0, abs=1e-7)
    assert "; and feasible for H2 between" in result.window_words()


def test_henry_constant_of_h2_at_25_c_and_the_level_in_other_units():
    # Sander 2015 (doi:10.5194/acp-15-4399-2015): H2 about 7.8e-4 mol/(L bar) at 25 degC
    # (7.8e-6 mol/(m3 Pa)); from memory.
    e = h2_equivalents(7.8e-4, "mol/L", Conditions())
    assert e["henry_constant_mol_per_L_per_bar"] == pytest.approx(7.8e-4, rel=0.03)
    assert e["h2_partial_pressure_bar"] == pytest.approx(1.0, rel=0.03)
    assert e["h2_partial_pressure_Pa"] == pytest.approx(1e5 * e["h2_partial_pressure_bar"])
    assert e["h2_mmol_per_kg"] == pytest.approx(0.78)   # molal standard state: 1000 x activity
    gas = h2_equivalents(1.0, "bar", Conditions())
    assert gas["h2_mmol_per_kg"] == pytest.approx(1000 * gas["henry_constant_mol_per_L_per_bar"])


@pytest.mark.slow
def test_robustness_map_and_h2_threshold_report_the_same_threshold(tmp_path, capsys):
    # the bundled network in h2_only mode: the threshold lies inside the default range, so a
    # clipped range elsewhere would show
    from tfa.cli import main

    def run(argv):
        assert main(argv) == 0
        return json.loads(capsys.readouterr().out)

    single = run(["h2-threshold", "--mode", "h2_only", "--json"])
    draws = run(["robustness", "--draws", "1", "--modes", "h2_only", "--workers", "1", "--json"])
    grid = run(["map", "--x", "temperature=70", "--y", "ph=7.5", "--modes", "h2_only",
                "--no-driving-force", "--workers", "1", "--json"])
    threshold = single["h2_threshold"]
    assert 1e-9 < threshold < 1e-3
    assert draws["threshold"][0]["h2_threshold"] == pytest.approx(threshold, rel=1e-9)
    assert grid["table"][0]["h2_threshold"] == pytest.approx(threshold, rel=1e-9)
    assert draws["threshold"][0]["h2_at_range_floor"] is False
    assert grid["table"][0]["h2_at_range_floor"] is False
    # h2_only: a window whose low end lies inside the range, each end naming what binds it (with
    # the ion-coupled ferredoxin reduction the network now runs up to the top of the range; a
    # window with two inner ends is checked on a hand-built network above)
    window = single["tables"]["h2_window"]
    assert [row["window_end"] for row in window] == ["low", "high"]
    assert not window[0]["at_range_end"]
    assert all(" sets " in row["binding_constraint"] for row in window)
    assert window[0]["h2_activity"] == pytest.approx(threshold)
    assert window[1]["h2_activity"] > threshold
    assert "feasible for H2 between" in " ".join(single["summary"])


@pytest.mark.slow
def test_assess_writes_binding_constraints_and_the_report_shows_them(bundled_run):
    out, result = bundled_run.out, bundled_run.result
    for suffix in ("csv", "json"):
        assert (out / f"binding_constraints.{suffix}").is_file()
        assert (out / f"h2_window.{suffix}").is_file()
    report = (out / "report.html").read_text(encoding="utf-8")
    assert "What binds" in report and "Binding constraints" in report
    table = result.binding_constraints.table
    assert set(table["answer"]) >= {"feasible", "h2_threshold", "driving_force"}
    # the H2 answer names its binding constraint, in the summary as well
    # with the environment's physiological carrier states it is a bound of the ferredoxin pool
    # (from [cofactors.bounds], not a loose per-form bound); two ferredoxins per H2, so the dual
    # of the threshold's pattern LP is -2, confirmed by its re-solves with the pattern fixed
    top = result.binding_constraints.top("native", "h2_threshold")
    env = result.context.environment
    assert top["compound"] in env.cofactors.bounds and top["bound"] == "upper"
    assert top["activity"] == pytest.approx(env.cofactors.bounds[top["compound"]][1])
    assert top["sensitivity"] == pytest.approx(-2.0) and top["dual_confirmed"]
    assert any(line.startswith("what binds the H2 threshold (native)") for line in result.summary_lines())
    assert table.loc[table["sensitivity"].abs() > 1e-7, "dual_confirmed"].all()


def test_a_carrier_state_row_that_binds_is_named_with_its_dual():
    """A <=> B forward at ΔrG'° = 5 kJ/mol, both in 1 uM-10 mM, with the ratio row
    ln B - ln A >= ln 0.1 (a carrier state of the environment's [cofactors]): the max-min
    driving force is -(5 + RT ln 0.1) = 0.708 kJ/mol at RT = 2.478957 kJ/mol (298.15 K), and it
    falls by RT per unit ln of the row's lower end (hand-derived); the finite differences agree."""
    import numpy as np

    from tfa.problem.sensitivity import PatternLP, finite_difference, solve_pattern

    lp = PatternLP(["R1"], np.array([1.0]), ["A", "B"], np.array([5.0]), np.array([0.0]),
                   np.array([0, 0]), np.array([0, 1]), np.array([-1.0, 1.0]),
                   np.log([1e-6, 1e-6]), np.log([1e-2, 1e-2]), 2.478957, 0.1,
                   state_rows=[({1: 1.0, 0: -1.0}, float(np.log(0.1)), None, "B/A >= 0.1")])
    opt = solve_pattern(lp, ("driving_force", None), "max")
    assert opt.value == pytest.approx(-(5.0 + 2.478957 * np.log(0.1)), abs=1e-6)
    low_dual, high_dual = opt.state_duals[0]
    assert low_dual == pytest.approx(-2.478957, rel=1e-6) and high_dual == 0.0
    left, right = finite_difference(lp, ("driving_force", None), "max", ("state", "0", "lower"))
    assert left == pytest.approx(-2.478957, rel=1e-3) and right == pytest.approx(-2.478957, rel=1e-3)


def two_carrier_network(solver: str = SOLVER):
    """H2 + A <=> P (HYD_A, dG'deg -10 kJ/mol) or H2 + B <=> P (HYD_B, -10 + 0.002 RT kJ/mol);
    A, B in [1 uM, 10 mM], P in [10 uM, 10 mM] and drained by a demand of 1."""
    return build_thermo_model({"HYD_A": ("H2 + A <=> P", -10.0, 0.0),
                               "HYD_B": ("H2 + B <=> P", -10.0 + 0.002 * RT, 0.0)},
                              {"H2": (1e-3, 1e-3), "A": (1e-6, 1e-2), "B": (1e-6, 1e-2),
                               "P": (1e-5, 1e-2)},
                              exchanges={"H2": (-10, 10), "A": (-10, 10), "B": (-10, 10)},
                              demand=("P", 1.0), feed_ids={"H2": "H2"}, solver=solver)


def test_full_resolve_agrees_when_one_flux_pattern_holds():
    # H2 + X <=> XH2 alone: [H2]_min = [XH2]_lo / ([X]_hi K) (hand-derived), one pattern only, so
    # moving [X]_hi down by 0.5 % (ln step -0.005) raises ln[H2]_min by exactly 0.005, and moving
    # [XH2]_lo down lowers it by 0.005: measured = predicted
    result = h2_threshold(hydrogenase(), ProblemOptions(solver=SOLVER), h2_range=(1e-9, 1e-2),
                          window=True, mode="native")
    got = by_datum([r for r in result.binding if r["answer"] == "h2_threshold"])
    x_hi, xh2_lo = got[("concentration bound", "X", "upper")], got[("concentration bound", "XH2", "lower")]
    for row, change in ((x_hi, 0.005), (xh2_lo, -0.005)):
        assert row["check_step"] == -0.005
        assert row["predicted_ln_h2_change"] == pytest.approx(change, abs=1e-6)
        assert row["measured_ln_h2_change"] == pytest.approx(change, abs=1e-5)
    # only the top ones are solved again
    assert math.isnan(got[("reaction energy", "HYD", "")].get("measured_ln_h2_change", math.nan))
    words = result.window_words()
    assert "with the flux pattern fixed, doubling it halves the H2 threshold" in words
    assert "solved again in full with it 0.5 % lower, the H2 threshold moves by +0.5 %" in words
    assert "takes over" not in words


def test_full_resolve_shows_when_another_flux_pattern_takes_over():
    # Two hydrogenations of equal form; HYD_B's dG'deg is larger by 0.002 RT, so its threshold is
    # exp(0.002) times HYD_A's (hand-derived: [H2]_min = [P]_lo / ([A or B]_hi K)). The optimum
    # runs HYD_A alone and its pattern LP says d ln[H2]/d ln[A]_hi = -1, so lowering [A]_hi by
    # 0.5 % predicts +0.005 in ln; the full MILP switches to HYD_B at +0.002 instead.
    result = h2_threshold(two_carrier_network(), ProblemOptions(solver=SOLVER),
                          h2_range=(1e-9, 1e-2), window=True, mode="native")
    assert result.threshold == pytest.approx(1e-5 / (1e-2 * math.exp(9.9 / RT)), rel=1e-6)
    top = [r for r in result.binding if r["answer"] == "h2_threshold"][0]
    assert (top["kind"], top["compound"], top["bound"]) == ("concentration bound", "A", "upper")
    assert top["sensitivity"] == pytest.approx(-1.0, abs=1e-7)
    assert top["predicted_ln_h2_change"] == pytest.approx(0.005, abs=1e-6)
    assert top["measured_ln_h2_change"] == pytest.approx(0.002, abs=1e-5)
    words = result.window_words()
    assert ("the H2 threshold moves by +0.2 % (the fixed flux pattern predicts +0.5 %: another "
            "flux pattern takes over)") in words
    # the lower bound of P binds as strongly, named once, without a repeated effect
    assert "as strongly (the same size of dual value): the lower bound of P (1e-05 mol/L)" in words
    assert words.count("(lower end)") == 0
