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
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402
from tfa.analyses.route_comparison import comparison_table, compare_routes  # noqa: E402
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
    verdict, window, size = fig.axes[:3]
    ticks = {t.get_text(): t.get_position()[1] for t in verdict.get_yticklabels()}
    assert ticks["route P"] > ticks["route Q"] > ticks["no carbon entry"]   # table order, top down
    texts = " ".join(t.get_text() for t in window.texts)
    assert "no H2 level in range" in texts and "setting" in texts


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
