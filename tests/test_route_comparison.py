"""Routes as first-class (tfa.network.routes, tfa.analyses.route_comparison): two routes from A to
D, each feasible alone, at different H2 levels; hand-derived thresholds.

Route P: A + H2 -> B (ΔrG'° = -20 kJ/mol), B -> D (-5); route Q: A + H2 -> C (-10), C -> D (-5).
A is fed at 1 mM, B, C, D lie between 1 uM and 10 mM, the least driving force is delta = 0.1
kJ/mol (25 degC, RT = 2.478957 kJ/mol). The second step runs downhill at any B >= 1 uM when
D = 1 uM, so the least H2 has B at its floor: ΔrG'°1 + RT ln(B / (A H2)) = -delta gives
H2 = exp((ΔrG'°1 + delta) / RT) x 1e-6 / 1e-3, i.e. 3.26e-7 for P and 1.84e-5 for Q (hand
derivation with Delta_r G' = Delta_r G'° + RT sum nu ln c, Alberty 2003, eq. 4.1-4).
"""

from __future__ import annotations

import math
import sys
from dataclasses import replace
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402
from tfa.analyses.route_comparison import (comparison_table, comparison_words,  # noqa: E402
                                            compare_routes)
from tfa.errors import InputError  # noqa: E402
from tfa.network.routes import Route, carbon_fixing, read_routes, route_only  # noqa: E402

DELTA = 0.1


def _two_routes():
    reactions = {"RP1": ("A + h2 -> B", -20.0, 0.0), "RP2": ("B -> D", -5.0, 0.0),
                 "RQ1": ("A + h2 -> C", -10.0, 0.0), "RQ2": ("C -> D", -5.0, 0.0)}
    bounds = {"A": (1e-3, 1e-3), "h2": (1e-3, 1e-3)} | {m: (1e-6, 1e-2) for m in "BCD"}
    tm = build_thermo_model(reactions, bounds, {"A": (-100, 0), "h2": (-100, 0)},
                            demand=("D", 1.0), feed_ids={"h2": "h2", "A": "A"}, solver="highs")
    for rid in reactions:
        tm.model.reactions.get_by_id(rid).notes = {"pathway": "route " + rid[1]}
    return tm


def _expected(g1: float, rt: float) -> float:
    return math.exp((g1 + DELTA) / rt) * 1e-6 / 1e-3


def test_each_route_alone_with_its_own_h2_threshold():
    tm = _two_routes()
    carbon = tm.model.metabolites.A
    routes = [Route("P", "route P", ("RP1", "RP2")), Route("Q", "route Q", ("RQ1", "RQ2"))]
    answers = compare_routes(tm, routes, carbon)
    p, q = answers
    assert p.closed == ["RQ1"] and q.closed == ["RP1"]
    assert p.feasible and q.feasible
    assert p.h2_threshold == pytest.approx(_expected(-20.0, tm.RT), rel=1e-4)   # 3.26e-7
    assert q.h2_threshold == pytest.approx(_expected(-10.0, tm.RT), rel=1e-4)   # 1.84e-5
    assert q.h2_threshold / p.h2_threshold == pytest.approx(math.exp(10.0 / tm.RT), rel=1e-4)
    table = comparison_table(answers)
    assert list(table["route"]) == ["P", "Q"] and table["h2_threshold"].notna().all()
    # the model is restored: both carbon entries open again
    assert set(carbon_fixing(tm.model, carbon)) == {"RP1", "RQ1"}


def test_a_route_without_its_carbon_entry_cannot_meet_the_demand():
    tm = _two_routes()
    answers = compare_routes(tm, [Route("B_only", "only B -> D", ("RP2",))], tm.model.metabolites.A)
    assert answers[0].feasible is False and "cannot be met" in answers[0].message


def test_route_file_is_read_and_checked(tmp_path):
    tm = _two_routes()
    good = tmp_path / "routes.toml"
    good.write_text('carbon_source = "A"\n[routes.p]\nname = "route P"\npathways = ["route P"]\n'
                    '[routes.q]\nreactions = ["RQ1", "RQ2"]\n')
    routes, source = read_routes(good, tm.model)
    assert source == "A" and [r.reactions for r in routes] == [("RP1", "RP2"), ("RQ1", "RQ2")]
    bad = tmp_path / "bad.toml"
    bad.write_text('[routes.p]\npathway = ["route P"]\n')
    with pytest.raises(InputError, match="did you mean 'pathways'"):
        read_routes(bad, tm.model)
    bad.write_text('[routes.p]\nreactions = ["RP9"]\n')
    with pytest.raises(InputError, match="RP9"):
        read_routes(bad, tm.model)
    with route_only(tm.model, routes[0], tm.model.metabolites.A) as closed:
        assert closed == ["RQ1"] and tm.model.reactions.RQ1.upper_bound == 0
    assert tm.model.reactions.RQ1.upper_bound > 0


def test_route_figure_draws_every_route():
    import pandas as pd

    from tfa.report.route_figure import route_comparison_figure

    tm = _two_routes()
    routes = [Route("P", "route P", ("RP1", "RP2")), Route("Q", "route Q", ("RQ1", "RQ2")),
              Route("none", "no carbon entry", ("RP2",))]
    table = comparison_table(compare_routes(tm, routes, tm.model.metabolites.A))
    assert isinstance(table, pd.DataFrame) and len(table) == 3
    fig = route_comparison_figure(table, (1e-12, 1e-2), 1e-3)
    verdict, window, h2_cost, atp, margin = fig.axes[:5]
    ticks = {t.get_text(): t.get_position()[1] for t in verdict.get_yticklabels()}
    assert ticks["route P"] > ticks["route Q"] > ticks["no carbon entry"]   # table order, top down
    texts = " ".join(t.get_text() for t in window.texts)
    assert "no H2 level in range" in texts and "setting" in texts
    # the route without a carbon entry has no steady state: no cost drawn, its margin not asked
    assert "n/a" in " ".join(t.get_text() for t in h2_cost.texts)
    assert "not asked" in " ".join(t.get_text() for t in margin.texts)


# ---------------------------------------------------------------------------------------------
# What each route costs per carbon fixed, what binds it, how far from a flipped verdict
# ---------------------------------------------------------------------------------------------

def _costly_routes():
    """CO2 to D (one carbon) two ways, 25 degC, every energy sigma = 1 kJ/mol (hand-built):

    route P: RP1 co2 + h2 -> B (-10 kJ/mol), RP2 B + h2 -> D (-10): two H2 per carbon, no ATP;
    route Q: RQ1 co2 + atp -> C + adp + pi (-5), RQ2 C + h2 -> D (-10), the ATP made back by
    ATPR adp + ppi -> atp + pi (-10): one H2, one ATP made and one spent per carbon.
    co2, h2, pi and ppi fed at 1 mM; B, C, D, ATP, ADP between 1 uM and 10 mM; demand 1 of D.
    """
    reactions = {"RP1": ("co2 + h2 -> B", -10.0, 1.0), "RP2": ("B + h2 -> D", -10.0, 1.0),
                 "RQ1": ("co2 + atp -> C + adp + pi", -5.0, 1.0),
                 "RQ2": ("C + h2 -> D", -10.0, 1.0), "ATPR": ("adp + ppi -> atp + pi", -10.0, 1.0)}
    bounds = ({m: (1e-3, 1e-3) for m in ("co2", "h2", "pi", "ppi")}
              | {m: (1e-6, 1e-2) for m in ("B", "C", "D", "atp", "adp")})
    tm = build_thermo_model(reactions, bounds, {"co2": (-100, 0), "h2": (-100, 0),
                                                "pi": (-100, 100), "ppi": (-100, 0)},
                            demand=("D", 1.0), feed_ids={"h2": "h2", "co2": "co2"},
                            solver="highs")
    formulas = {"co2": "CO2", "h2": "H2", "B": "CH2O2", "C": "CH2O5P", "D": "CH4O",
                "atp": "C10H16N5O13P3", "adp": "C10H15N5O10P2", "pi": "HO4P", "ppi": "HO7P2"}
    roles = {"h2": "h2", "atp": "atp", "adp": "adp", "pi": "phosphate"}
    for met in tm.model.metabolites:
        met.formula = formulas[met.id]
        if met.id in roles:
            met.notes["role"] = roles[met.id]
    routes = [Route("P", "route P", ("RP1", "RP2")), Route("Q", "route Q", ("RQ1", "RQ2"))]
    return tm, routes


def test_routes_differ_in_h2_and_atp_per_carbon_by_hand():
    """Per carbon fixed (the net reaction of each route's own steady state, read off the
    equations): P takes co2 + 2 h2 -> D, so 2 H2 and no ATP; Q takes co2 + h2 + ppi -> D + 2 pi
    through RQ1, RQ2 and ATPR once each, so 1 H2 and 1 ATP made (ATPR) and spent (RQ1). The only
    carbon entry of P is RP1, of Q RQ1."""
    tm, routes = _costly_routes()
    p, q = compare_routes(tm, routes, tm.model.metabolites.co2)
    table = comparison_table([p, q]).set_index("route")
    assert table.loc["P", "h2_per_carbon"] == pytest.approx(2.0, abs=1e-9)
    assert table.loc["Q", "h2_per_carbon"] == pytest.approx(1.0, abs=1e-9)
    assert (table.loc["P", "atp_made_per_carbon"], table.loc["P", "atp_spent_per_carbon"]) == (
        pytest.approx(0.0, abs=1e-9), pytest.approx(0.0, abs=1e-9))
    assert (table.loc["Q", "atp_made_per_carbon"], table.loc["Q", "atp_spent_per_carbon"]) == (
        pytest.approx(1.0, abs=1e-9), pytest.approx(1.0, abs=1e-9))
    assert table.loc["P", "carbon_entries"] == "RP1 100 %"
    assert table.loc["Q", "carbon_entries"] == "RQ1 100 %"
    assert list(table["route_carbon_share"]) == pytest.approx([1.0, 1.0])
    # no outer protons: the feed chemistry pays everything
    assert list(table["gradient_share"]) == [0.0, 0.0]
    # ΔG_net of P: RP1 + RP2 = -20 + RT ln([D] / ([co2][h2]^2)); its max-min driving force is
    # set by the lower bound of D (below), so [D] = 1 uM: -20 + RT ln(1e3) = -2.876 kJ per mol C
    # (Alberty 2003, eq. 4.1-4: the energy of a sum of reactions is the sum of their energies)
    expected = -20.0 + tm.RT * math.log(1e-6 / (1e-3 * 1e-3 ** 2))
    assert table.loc["P", "delta_g_net_kJ_per_carbon"] == pytest.approx(expected, abs=1e-6)
    assert "max-min driving-force steady state" in table.loc["P", "solution"]
    words = [comparison_words(a) for a in (p, q)]
    assert "per carbon fixed 2 H2, 0 ATP made and 0 spent" in words[0]
    assert "per carbon fixed 1 H2, 1 ATP made and 1 spent" in words[1]


def test_what_binds_each_routes_h2_threshold_by_hand():
    """The least H2 of P: both steps downhill by delta, B in between, so the sum
    -20 + RT ln([D] / ([co2] [h2]^2)) <= -2 delta with [D] at its floor:
    [h2]^2 = [D]_min / [co2] exp(-(20 - 2 delta) / RT) = 5.83e-4 mol/L, hence
    d ln[h2] / d ln[D]_min = +1/2 and d ln[h2] / d ln[co2] = -1/2 (the first two, equal in size).
    Q: only RQ2 takes H2: -10 + RT ln([D] / ([C] [h2])) <= -delta with [C] at its ceiling (RQ1
    and ATPR leave room for it): [h2] = [D]_min / [C]_max exp(-9.9 / RT) = 1.84e-6 mol/L, so
    d ln[h2] / d ln[C]_max = -1 and d ln[h2] / d ln[D]_min = +1. (Hand derivations with
    ΔrG' = ΔrG'° + RT Σ ν ln c, Alberty 2003, eq. 4.1-4; dual values as in tests/test_binding.py.)"""
    tm, routes = _costly_routes()
    p, q = compare_routes(tm, routes, tm.model.metabolites.co2, margins=False)
    rt = tm.RT
    assert p.h2_threshold == pytest.approx(math.sqrt(1e-6 / 1e-3 * math.exp(-(20 - 2 * DELTA) / rt)),
                                           rel=1e-4)
    assert q.h2_threshold == pytest.approx(1e-6 / 1e-2 * math.exp(-(10 - DELTA) / rt), rel=1e-4)
    p_binds = {what: s for what, s, _ in p.binding["h2_threshold"]}
    q_binds = {what: s for what, s, _ in q.binding["h2_threshold"]}
    assert p_binds == {"the lower bound of D": pytest.approx(0.5, abs=1e-6),
                       "the fed co2": pytest.approx(-0.5, abs=1e-6)}
    assert q_binds == {"the upper bound of C": pytest.approx(-1.0, abs=1e-6),
                       "the lower bound of D": pytest.approx(1.0, abs=1e-6)}
    assert comparison_words(q).endswith("the H2 threshold is set by the upper bound of C")
    # each dual named is confirmed by re-solving with its datum moved both ways
    assert p.verification["binding (h2 threshold)"] == "proven"
    assert q.verification["binding (driving force)"] == "proven"
    assert "the lower bound of D (+0.5 d ln[H2] per unit ln c)" in comparison_table([p])[
        "h2_threshold_binding"].iloc[0]


def test_each_route_has_its_own_distance_to_a_flipped_verdict_by_hand():
    """P runs only while RP1 + RP2 can both be downhill by delta: at the best concentrations
    ([D] = 1 uM, B free) the sum -20 + RT ln(1e-6 / 1e-9) = -2.876 kJ/mol must rise above
    -2 delta = -0.2, a change of 2.676 kJ/mol of the two values together, 2.676 sigma with sigma =
    1 kJ/mol per value (hand-derived). The search reports a verified flip, an upper bound: its
    cut asks the mean driving force of the two steps (dual weights 1/2 each) to fall CUT_EPSILON
    below delta, so the sum moves 2 CUT_EPSILON further. Q's max-min driving force (14 kJ/mol
    over three steps of sigma 1) needs more than the cap of 10 sigma."""
    from tfa.analyses.margins import CUT_EPSILON

    tm, routes = _costly_routes()
    p, q = compare_routes(tm, routes, tm.model.metabolites.co2, budget=False, binding=False)
    expected = -2 * DELTA - (-20.0 + tm.RT * math.log(1e-6 / 1e-9))
    assert p.margin.distance == pytest.approx(expected + 2 * CUT_EPSILON, abs=1e-6)
    assert p.margin.status == "best found"
    assert not math.isfinite(q.margin.distance) and q.margin.status.startswith("none within 10")
    table = comparison_table([p, q])
    assert table["margin_sigma"].iloc[0] == p.margin.distance
    assert "RP" in table["carried_by"].iloc[0] and table["carried_by"].iloc[1] == ""


def test_the_whole_networks_smaller_flip_is_taken_for_a_feasible_route():
    """Closing the other carbon entries only removes steady states, so a change of the energies
    that leaves the whole network none leaves a route none: when the network's verified flip is
    smaller than the one the route's own search found (2.678 sigma for P, above), it is the
    route's answer too, and the table says so; a larger one is not taken."""
    from tfa.analyses.margins import MarginResult

    tm, routes = _costly_routes()
    smaller = MarginResult(conditions=tm.conditions, mode=tm.mode, feasible=True, distance=1.5,
                           status="best found", sources=[("v", "reaction value RP1", 1.5)],
                           verification={"status": "best found", "check": "test flip"})
    (p,) = compare_routes(tm, routes[:1], tm.model.metabolites.co2, budget=False, binding=False,
                          network_margin=smaller)
    row = comparison_table([p]).iloc[0]
    assert row["margin_sigma"] == 1.5 and row["carried_by"] == "reaction value RP1"
    assert "the whole network's flip" in row["message"]
    assert "the route's own search found 2.68σ" in p.margin.verification["check"]
    larger = replace(smaller, distance=5.0)
    (p,) = compare_routes(tm, routes[:1], tm.model.metabolites.co2, budget=False, binding=False,
                          network_margin=larger)
    assert p.margin.distance == pytest.approx(2.678, abs=1e-3)


def test_a_route_without_a_steady_state_has_no_cost_and_says_what_was_not_asked():
    tm, _ = _costly_routes()
    (answer,) = compare_routes(tm, [Route("none", "no entry", ("RP2",))], tm.model.metabolites.co2)
    row = comparison_table([answer]).iloc[0]
    assert answer.budget is None and math.isnan(row["h2_per_carbon"])
    assert answer.margin is None and "not asked: distance to a flipped verdict" in row["message"]


def test_route_columns_are_in_the_vocabulary():
    from tfa.analyses.route_comparison import ROUTE_COMPARISON_COLUMNS
    from tfa.vocabulary import COLUMNS

    assert [c for c in ROUTE_COMPARISON_COLUMNS if c not in COLUMNS] == []


@pytest.mark.slow
def test_compare_runs_every_bundled_route(tmp_path):
    """tfa compare on the bundled network: every route of its routes.toml, table and figure."""
    import pandas as pd

    from tfa.cli import main

    out = tmp_path / "routes"
    assert main(["compare", "--out", str(out), "-q"]) == 0
    table = pd.read_csv(out / "route_comparison.csv")
    assert list(table["route"]) == ["acetyl_coa", "reductive_tca", "reversed_oxidative_tca",
                                    "reductive_glycine"]
    assert (out / "route_comparison.png").is_file() and (out / "route_comparison.svg").is_file()
    closed = dict(zip(table["route"], table["closed_entries"].fillna("")))
    assert "CS" in closed["reductive_tca"] and "ACL" in closed["reversed_oxidative_tca"]
    assert "HDCR" not in closed["reductive_glycine"] and "PFOR" in closed["reductive_glycine"]
