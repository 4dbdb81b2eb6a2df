"""The H2 scan lists each level's minimal uphill set in the order of reaction ids, the order the
minimal-set answer uses (tfa.analyses.set_order), whatever order the solver meets the steps in.

Hand-built network: four copies of one hydrogenation, H2 + X -> XH2 (ids HYD_D, HYD_B, HYD_C,
HYD_A, added in that order), Delta_r G'deg = -10 kJ/mol each; X in [1 uM, 10 mM], XH2 in
[10 uM, 10 mM] and drained by a demand of 1. By hand (Alberty 2003, eq. 4.1-4,
Delta_r G' = Delta_r G'deg + RT ln Q, RT = 2.47896 kJ/mol at 298.15 K, CODATA 2018 R), each copy
runs downhill by the least driving force 0.1 kJ/mol iff
H2 >= 1e-5 / (1e-2 exp(9.9 / RT)) = 1.84e-5 mol/L. Below it the demand needs exactly one copy
uphill, and any copy will do: four minimal sets of size 1, {HYD_A} first in the order of ids.
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
import pytest

sys.path.insert(0, str(Path(__file__).parent))
from engine_networks import build_thermo_model  # noqa: E402

from tfa.analyses import h2_scan, minimal_uphill_set  # noqa: E402
from tfa.problem import ProblemOptions, available_solvers  # noqa: E402

RT = 8.314462618e-3 * 298.15
THRESHOLD = 1e-5 / (1e-2 * math.exp(9.9 / RT))
COPIES = ("HYD_D", "HYD_B", "HYD_C", "HYD_A")


def copies(solver: str, order=COPIES, h2=(1e-3, 1e-3)):
    reactions = {rid: ("H2 + X <=> XH2", -10.0, 1.0) for rid in order}
    return build_thermo_model(reactions, {"H2": h2, "X": (1e-6, 1e-2), "XH2": (1e-5, 1e-2)},
                              exchanges={"H2": (-10, 10), "X": (-10, 10)}, demand=("XH2", 1.0),
                              feed_ids={"H2": "H2"}, solver=solver)


@pytest.mark.parametrize("solver", available_solvers())
def test_scan_sets_come_in_the_order_of_reaction_ids(solver):
    assert THRESHOLD == pytest.approx(1.84e-5, rel=1e-2)
    levels = np.logspace(-9, -2, 8)
    frames = [h2_scan(copies(solver, order), levels, ProblemOptions(solver=solver),
                      with_driving_force=False).to_frame()
              for order in (COPIES, COPIES[::-1])]
    for scan in frames:
        below = scan[scan["h2_activity"] < THRESHOLD]
        assert len(below) == 5 and not below["feasible"].any()
        assert list(below["uphill_set"]) == ["HYD_A"] * 5
        assert list(below["uphill_set_size"]) == [1] * 5
        assert below["in_order_of_ids"].all()
        above = scan[scan["h2_activity"] > THRESHOLD]
        assert above["feasible"].all() and list(above["uphill_set"]) == [""] * 3
    # the same whichever order the steps were added in
    assert list(frames[0]["uphill_set"]) == list(frames[1]["uphill_set"])
    # and the first set the minimal-set answer gives at one of those levels
    at = minimal_uphill_set(copies(solver, h2=(1e-9, 1e-9)), ProblemOptions(solver=solver),
                            alternatives=2, count_limit=20)
    assert at.sets == [["HYD_A"], ["HYD_B"]] and at.count == 4
