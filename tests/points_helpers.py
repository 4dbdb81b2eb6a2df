"""Module-level point functions for tests/test_points.py (sent to worker processes by reference).

They do no science: each computes a deterministic value from the point alone, optionally records
each computation in a side log (to count how often a point was computed) and optionally sleeps
or fails on request.
"""

from __future__ import annotations

import os
import time

import numpy as np


def draw_point(point: dict) -> dict:
    """A seeded random value per point (as the robustness draws use), a side-log line per call."""
    if point.get("log"):
        with open(point["log"], "a", encoding="utf-8") as handle:
            handle.write(f"{point['id']} {os.getpid()}\n")
    if point.get("sleep"):
        time.sleep(float(point["sleep"]))
    if point.get("fail"):
        raise ValueError(f"injected failure at {point['id']}")
    rng = np.random.default_rng(np.random.SeedSequence([int(point["seed"]), int(point["index"])]))
    return {"value": float(rng.normal()), "sum": float(point["x"] + point["y"])}
