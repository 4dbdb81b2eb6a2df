"""Distance to a flipped verdict (tfa.analyses.margins), checked by hand.

One reaction A <=> B with A and B fixed at 1 mM (so ΔrG' = ΔrG'°) must carry the demand's flux
forward; it runs downhill when ΔrG'° <= −δ, δ = 0.1 kJ/mol. Its only error is one source of
σ = 2 kJ/mol. By hand: with ΔrG'° = −10 the verdict (feasible) flips when ΔrG'° rises to −0.1,
a change of 9.9 kJ/mol = 4.95σ; with ΔrG'° = +5 (infeasible) it flips at −0.1, 5.1 kJ/mol =
2.55σ. Two reactions in series, A -> B -> C, each with its own source: the network fails as soon
as either fails, so the distance is the smaller of the two margins. Hand derivations on
ΔrG' = ΔrG'° + RT Σ ν ln a (Alberty 2003, eq. 4.1-4) and the max-min driving force of Noor et
al. 2014 (doi:10.1371/journal.pcbi.1003483).
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import pytest

from tfa.analyses.margins import MARGIN_CAP, verdict_margin
from tfa.problem.builder import ProblemOptions

sys.path.insert(0, str(Path(__file__).resolve().parent))
from engine_networks import build_thermo_model  # noqa: E402

OPTIONS = ProblemOptions(solver="highs", time_limit=60)


def one_reaction(dg0: float, sigma: float = 2.0):
    return build_thermo_model({"R1": ("a <=> b", dg0, sigma)},
                              bounds={"a": (1e-3, 1e-3), "b": (1e-3, 1e-3)},
                              exchanges={"a": (-10.0, 10.0)}, demand=("b", 1.0))


@pytest.mark.parametrize("dg0, feasible, expected", [(-10.0, True, 9.9 / 2.0),
                                                     (5.0, False, 5.1 / 2.0)])
def test_one_reaction_distance_is_the_margin_over_sigma(dg0, feasible, expected):
    result = verdict_margin(one_reaction(dg0), OPTIONS)
    assert result.feasible is feasible
    # the feasible side adds the cut's ε = 1e-3 kJ/mol beyond δ: 5e-4 σ
    assert result.distance == pytest.approx(expected, abs=1e-3)
    assert result.sources[0][0] == "reaction:R1"
    assert result.reaction_change["R1"] == pytest.approx(
        (1 if feasible else -1) * result.distance * 2.0, abs=1e-9)
    assert result.status == ("best found" if feasible else "proven")
    assert "holds unless the energies move by" in result.sentence()


def test_two_steps_in_series_fail_at_the_weaker_step():
    tm = build_thermo_model({"R1": ("a <=> b", -10.0, 2.0), "R2": ("b <=> c", -3.0, 1.0)},
                            bounds={"a": (1e-3, 1e-3), "b": (1e-3, 1e-3), "c": (1e-3, 1e-3)},
                            exchanges={"a": (-10.0, 10.0)}, demand=("c", 1.0))
    result = verdict_margin(tm, OPTIONS)
    # R1: 9.9/2 = 4.95σ; R2: 2.9/1 = 2.9σ — the smaller
    assert result.distance == pytest.approx(2.9, abs=1e-3)
    assert result.carried_by() == ["reaction value R2"]


def test_no_flip_within_the_cap_is_said_so():
    result = verdict_margin(one_reaction(-100.0, sigma=1.0), OPTIONS)
    assert math.isnan(result.distance)
    assert f"{MARGIN_CAP:g}" in result.status
    assert "holds for every change" in result.sentence()
