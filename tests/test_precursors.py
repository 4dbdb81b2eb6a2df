"""Per-precursor verdicts on a hand-built network whose answers are derived by
hand, and on the bundled network through the assessment (files, report, summary lines).

Conventions (Alberty 2003, eq. 4.1-4): Delta_r G' = Delta_r G'deg + RT ln Q at 298.15 K,
RT = 2.47896 kJ/mol; A is fed at 1 mM, every other compound lies in [1 uM, 10 mM].
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import pandas as pd
import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses.precursors import demanded_compounds, precursor_verdicts  # noqa: E402
from tfa.assessment.steps.precursors import precursor_line  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

RT = 8.314462618e-3 * 298.15
BOX = (1e-6, 1e-2)


def three_precursor_network(solver: str):
    """Demand 0.5 P1 + 0.2 P2 + 0.3 P3 -> (at least 1). A -> P1 at -30 kJ/mol (downhill at any
    concentration in the box: -30 + RT ln(1e-2 / 1e-3) = -24.3), A -> P2 at +60 kJ/mol (uphill
    at any: 60 + RT ln(1e-6 / 1e-3) = +42.876), X -> P3 with nothing making X.

    By hand: P1 is made downhill; P2 only with A -> P2 driven uphill, the energy to supply
    42.876 kJ/mol times one mole of it per mole of P2; P3 not at all (a stoichiometric gap,
    largest flux 0)."""
    reactions = {"MAKE_P1": ("A -> P1", -30.0, 0.0), "MAKE_P2": ("A -> P2", 60.0, 0.0),
                 "MAKE_P3": ("X -> P3", -30.0, 0.0)}
    bounds = {m: BOX for m in ("P1", "P2", "P3", "X")}
    bounds["A"] = (1e-3, 1e-3)
    tm = build_thermo_model(reactions, bounds, exchanges={"A": (-100, 0)}, demand=("P1", 1.0),
                            solver=solver)
    demand = tm.model.reactions.get_by_id(tm.demand_id)
    demand.add_metabolites({tm.model.metabolites.get_by_id("P1"): 0.5,
                            tm.model.metabolites.get_by_id("P2"): -0.2,
                            tm.model.metabolites.get_by_id("P3"): -0.3})
    return tm


@pytest.mark.parametrize("solver", available_solvers())
def test_three_precursors_three_verdicts(solver):
    tm = three_precursor_network(solver)
    assert demanded_compounds(tm) == [("P1", 0.5), ("P2", 0.2), ("P3", 0.3)]
    result = precursor_verdicts(tm, ProblemOptions(solver=solver))
    by = {v.compound: v for v in result.verdicts}
    assert [by[c].verdict for c in ("P1", "P2", "P3")] == ["downhill", "uphill",
                                                           "stoichiometric gap"]
    assert by["P1"].producible and by["P1"].feasible and by["P1"].energy_to_supply == 0.0
    assert by["P2"].uphill_set == ["MAKE_P2"]
    assert (by["P2"].sets_found, by["P2"].all_sets_found) == (1, True)
    assert by["P2"].energy_to_supply == pytest.approx(60.0 + RT * math.log(1e-3), abs=1e-4)
    assert by["P3"].producible is False and by["P3"].max_flux == pytest.approx(0.0, abs=1e-9)
    # the whole demand is unchanged afterwards (the questions are asked of a copy)
    demand = tm.model.reactions.get_by_id(tm.demand_id)
    assert {m.id: c for m, c in demand.metabolites.items()} == {"P1": -0.5, "P2": -0.2, "P3": -0.3}
    frame = result.to_frame()
    assert list(frame["verdict"]) == ["downhill", "uphill", "stoichiometric gap"]
    assert frame.loc[1, "uphill_set"] == "MAKE_P2" and frame.loc[1, "uphill_set_size"] == 1


def test_precursor_line_names_gap_and_bottleneck():
    from tfa.analyses.precursors import PrecursorVerdict

    verdicts = [PrecursorVerdict("m", "P1", 0.5, "downhill"),
                PrecursorVerdict("m", "P2", 0.2, "uphill", uphill_set=["MAKE_P2"]),
                PrecursorVerdict("m", "P3", 0.3, "stoichiometric gap")]
    line = precursor_line("runs", verdicts, {"P1": True, "P2": True, "P3": False})
    assert line == ("runs, each precursor alone: 1 made downhill: P1; 1 only with steps driven "
                    "uphill (a thermodynamic bottleneck): MAKE_P2 for P2; 1 not from the feed (a "
                    "stoichiometric gap: no route from the feed whatever the energies): P3")


@pytest.mark.slow
def test_assessment_writes_and_shows_the_precursors(bundled_run):
    """Acceptance: `tfa assess --out DIR` writes the precursors table (CSV and JSON) and
    its figure (PNG and SVG), and the report shows them; the no-ATP summary line says which
    precursors are made and which are not, and why."""
    out = bundled_run.out
    for suffix in (".csv", ".json", ".png", ".svg"):
        assert (out / f"precursors{suffix}").is_file(), suffix
    frame = pd.read_csv(out / "precursors.csv")
    modes = json.loads((out / "summary.json").read_text())["precursors"]
    assert set(frame["mode"]) == set(modes)
    assert set(frame["verdict"]) <= {"downhill", "uphill", "stoichiometric gap", "undetermined",
                                     "not applicable"}
    report = (out / "report.html").read_text()
    assert 'id="sec-each-precursor-alone"' in report and "Verdict per demanded compound" in report
    lines = [line for line in bundled_run.result.summary_lines() if "each precursor alone" in line]
    strict = [line for line in lines if line.startswith("runs without ATP,")]
    assert strict and "stoichiometric gap" in strict[0] and "thermodynamic bottleneck" in strict[0]


@pytest.mark.slow
def test_cut_demand_without_atp_needs_only_formate_reduction():
    """A hand check reported by a user: with the demand cut to glycine, alanine, aspartate,
    glutamate and serine, the strict no-ATP mode needs exactly one step driven uphill, formate
    reduced to formaldehyde (FALDH run backwards). Its direction is uphill at standard state:
    formaldehyde + NAD+ + H2O -> formate + NADH has Delta_r G'deg about -43 kJ/mol at 25 degC,
    pH 7 (`tfa dg` from the reviewed species data; about -41 kJ/mol from E0'(formate/formaldehyde)
    and E0'(NAD+/NADH) = -0.32 V in Thauer, Jungermann & Decker 1977, Bacteriol. Rev. 41:100,
    from memory), so the reduction costs about +43 kJ/mol before concentrations."""
    from tfa.analyses.feasibility import feasibility
    from tfa.network.energies import prepare
    from tfa.network.inputs import resolve_inputs

    inputs = resolve_inputs(None, None, None)
    model = inputs.model.copy()
    demand = model.reactions.get_by_id("demand_precursors")
    keep = {"gly", "ala", "asp", "glu", "ser"}
    demand.subtract_metabolites({m: c for m, c in demand.metabolites.items() if m.id not in keep})
    tm = prepare(model, inputs.environment, "no_atp_strict")
    answer = feasibility(tm, ProblemOptions(), alternatives=3, count_limit=20)
    d = answer.diagnosis
    assert not answer.feasible and d is not None
    assert d.sets == [["FALDH"]] and d.directions[0]["FALDH"] == -1
    assert (d.count, d.exhausted) == (1, True)
    assert d.verification["status"] == "proven"
    assert d.uphill_by[0]["FALDH"] > 0 and d.energy_to_supply(0) > d.uphill_by[0]["FALDH"]
