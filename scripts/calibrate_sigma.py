#!/usr/bin/env python
"""Calibration of the uncertainty model (tfa/thermo/uncertainty.py) against independent checks.

Development-time script (pychnosz is a development and test dependency, never a runtime one).
It measures how often |error| < 2σ for three families of checks and prints the scale that would
make about 95 % of them fall within 2σ:

1. Temperature: the drift of tfa's constant-Cp integration from the HKF equations of state
   (pychnosz ``subcrt``, Psat) for the reactions of ``scripts/hkf_drift.py`` at 40-150 degC,
   against the temperature term of σ, s·(ΔT/55 K)² per species. The drift grows as ΔT² (the
   neglected dCp/dT); the fitted s is the 95th percentile of |error| / (2 (ΔT/55)² √Σν²).
   The same with Cp dropped (the constant-ΔH fallback) calibrates its own s.
2. 25 degC: the data audit of the library (tfa.thermo.audit, reviewed data): the fraction of the
   independent checks within 2σ and the 95th percentile of |z|.
3. Unreviewed source: the audit entries that use species of a source that is not peer reviewed
   (mode with_unreviewed), against a per-species σ_u: the σ_u at which 95 % fall within 2σ.

Run: ``.venv/bin/python scripts/calibrate_sigma.py`` (about half a minute); docs/internals.md
("Uncertainty calibration") quotes its output.
"""

from __future__ import annotations

import math
import sys
import warnings
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))

import hkf_drift  # noqa: E402  (the reactions and both sides of the comparison)

from tfa.thermo.uncertainty import (DELTA_T_CALIBRATION, SIGMA_CONSTANT_CP, SIGMA_CONSTANT_H,  # noqa: E402
                                    SIGMA_UNREVIEWED, temperature_sigma)

TEMPERATURES_C = (40.0, 60.0, 80.0, 100.0, 125.0, 150.0)
TARGET = 0.95


def temperature_errors(constant_enthalpy: bool = False) -> list[tuple[float, float, float]]:
    """(ΔT, |error|, √Σν²) of every drift reaction at every temperature, kJ/mol."""
    table = hkf_drift.species_by_id()
    out = []
    for reaction in hkf_drift.REACTIONS:
        hkf = hkf_drift.hkf_reaction_gibbs(reaction, list(TEMPERATURES_C), table)
        norm = math.sqrt(sum(nu * nu for sid, nu in reaction.stoichiometry.items()
                             if sid != "H+"))
        for t, ref in zip(TEMPERATURES_C, hkf):
            ours = hkf_drift.tfa_reaction_gibbs(reaction, t, table, constant_enthalpy)
            out.append((t - 25.0, abs(ours - float(ref)), norm))
    return out


def fitted_scale(errors) -> tuple[float, float]:
    """(s with 95 % of |error| < 2 s (ΔT/55)² √Σν², fraction within 2σ at the current s)."""
    ratios = np.array([e / (2.0 * (dt / DELTA_T_CALIBRATION) ** 2 * n) for dt, e, n in errors])
    return float(np.percentile(ratios, 100 * TARGET)), ratios


def coverage(errors, sigma_of) -> float:
    return float(np.mean([e < 2.0 * sigma_of(dt) * n for dt, e, n in errors]))


def main() -> int:
    warnings.simplefilter("ignore")
    print("1. temperature term against HKF (pychnosz subcrt, Psat), 40-150 degC")
    for label, constant_h, current in (("constant Cp", False, SIGMA_CONSTANT_CP),
                                       ("constant dH (no Cp)", True, SIGMA_CONSTANT_H)):
        errors = temperature_errors(constant_h)
        s, _ = fitted_scale(errors)
        now = coverage(errors, lambda dt: temperature_sigma(298.15 + dt, not constant_h))
        print(f"   {label}: {len(errors)} comparisons; within 2 sigma with s = {current} kJ/mol: "
              f"{100 * now:.0f} %; s for {100 * TARGET:.0f} %: {s:.3f} kJ/mol")
        for t in TEMPERATURES_C:
            sub = [x for x in errors if abs(x[0] - (t - 25.0)) < 1e-9]
            print(f"      {t:5.0f} degC: median |error| {np.median([e for _, e, _ in sub]):.3f}, "
                  f"max {max(e for _, e, _ in sub):.3f}, within 2 sigma "
                  f"{100 * coverage(sub, lambda dt: temperature_sigma(298.15 + dt, not constant_h)):.0f} %")

    from tfa.thermo.audit import audit

    result = audit()
    stats = result.statistics("reviewed")
    checks = result.checks("reviewed")
    zs = np.array([abs(e.z) for e in checks])
    print("2. data audit at 25 degC (reviewed data)")
    print(f"   {stats['checks']} independent checks ({stats['anchors']} anchors and "
          f"{stats['unchecked']} values checked by no other left out): "
          f"{100 * stats['within_2_sigma_fraction']:.0f} % within 2 sigma, "
          f"95th percentile of |z| {np.percentile(zs, 95):.2f}, largest {zs.max():.2f}; "
          f"beyond 5 kJ/mol (open disagreements): {stats['beyond_5_kJ']}")

    print("3. unreviewed source (audit with unreviewed data)")
    touched = [e for e in result.checks("with_unreviewed") if e.unreviewed_sources]
    if touched:
        # σ_total² = σ_rest² + k σ_u² with k unreviewed species; solve for the σ_u that puts
        # 95 % within 2σ, taking k = 1 (conservative for reactions with two such species)
        rest = np.array([math.sqrt(max(e.uncertainty ** 2 - SIGMA_UNREVIEWED ** 2, 0.0))
                         for e in touched])
        diffs = np.array([abs(e.difference) for e in touched])
        for sigma_u in np.arange(2.0, 40.0, 0.5):
            total = np.sqrt(rest ** 2 + sigma_u ** 2)
            if np.mean(diffs < 2 * total) >= TARGET:
                break
        now = float(np.mean([abs(e.z) <= 2 for e in touched]))
        print(f"   {len(touched)} checks use unreviewed species; within 2 sigma with sigma_u = "
              f"{SIGMA_UNREVIEWED} kJ/mol: {100 * now:.0f} %; sigma_u for {100 * TARGET:.0f} %: "
              f"{sigma_u:.1f} kJ/mol; median |difference| {np.median(diffs):.1f} kJ/mol")
    return 0


if __name__ == "__main__":
    sys.exit(main())
