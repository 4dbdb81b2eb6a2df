"""A hand-solvable network for tests/test_robustness.py and tests/test_maps.py, prepared by a
module-level function (worker processes import it by name).

H2 + X <=> XH2 (R1, ΔrG'° = ``dg1``, σ = ``sigma1``), XH2 <=> P + X (R2, −20 kJ/mol, σ = 2 · ``sigma1`` / 4),
H2 fed through EX_h2, demand DM_p >= 1. Bounds 1e-6..1e-2 mol/L; H2 fixed by the environment's
feed (default 1e-3 mol/L); the energies stay those given (no temperature dependence), only RT
follows the conditions. At the best concentrations ([XH2] = 1e-6, [X] = 1e-2) R1 runs downhill
exactly when ΔrG'°1 <= -δ - RT ln(1e-6 / ([H2] · 1e-2)); R2 is then far downhill.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

from tfa.conditions import Conditions

sys.path.insert(0, str(Path(__file__).resolve().parent))
from engine_networks import build_thermo_model  # noqa: E402

#: Default parameters of the hand network, kJ/mol.
HAND = {"dg1": 10.0, "sigma1": 4.0}


def hand_prepare(model, environment, mode):
    """ThermoModel of the hand network at the environment's conditions and H2 feed (any mode)."""
    params = dict(HAND, **(model or {}))
    conditions = environment.conditions if environment is not None else Conditions()
    h2 = (environment.feed.get("h2", 1e-3) if environment is not None else 1e-3)
    s1 = float(params["sigma1"])
    tm = build_thermo_model(
        {"R1": ("h2 + x <=> xh2", params["dg1"], s1),
         "R2": ("xh2 <=> p + x", -20.0, s1 / 2.0)},
        bounds={"h2": (h2, h2), "x": (1e-6, 1e-2), "xh2": (1e-6, 1e-2), "p": (1e-6, 1e-2)},
        exchanges={"h2": (-100.0, 100.0)}, demand=("p", 1.0), conditions=conditions,
        feed_ids={"H2": "h2"})
    tm.mode = mode
    if params.get("log"):  # one line per preparation: counts the points computed
        with open(params["log"], "a", encoding="utf-8") as handle:
            handle.write(f"{mode} {conditions.celsius:.6g} {h2:.6g}\n")
    if params.get("sleep"):
        time.sleep(float(params["sleep"]))
    if params.get("fail_above_C") is not None and conditions.celsius > params["fail_above_C"]:
        raise RuntimeError(f"injected failure at {conditions.celsius:.1f} degC")
    return tm
