"""Print leave-one-out and held-out statistics of the group-contribution model of DfG deg.

Usage: /tmp/venv/bin/python scripts/gc_crossval.py [--worst N]
"""

from __future__ import annotations

import argparse
import sys

from tfa.thermo.group_contribution import EXCLUDED, fitted_model, heldout_split


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--worst", type=int, default=15, help="list the N largest LOO residuals")
    args = parser.parse_args()
    model = fitted_model()
    fit = model.fits["G"]
    print(f"training species: {len(model.species)} (excluded: {', '.join(EXCLUDED) or 'none'}); "
          f"groups: {len(fit.columns)}; fit RMSE {fit.rmse_fit:.2f} kJ/mol")
    cv = model.cross_validation()
    print(f"leave-one-out DfG deg: n = {cv.n}, MAE = {cv.mae:.2f}, RMSE = {cv.rmse:.2f}, "
          f"median |e| = {cv.median_abs:.2f}, max |e| = {cv.max_abs:.2f} kJ/mol")
    print(f"  refused (a group only they carry): {len(cv.refused)}: {', '.join(cv.refused)}")
    for seed in (20260, 1, 2):
        held = heldout_split(model, 0.2, seed)
        print(f"held-out 20 % (seed {seed}): n = {held.n}, MAE = {held.mae:.2f}, RMSE = {held.rmse:.2f}, "
              f"median |e| = {held.median_abs:.2f} kJ/mol, refused {len(held.refused)}")
    print("largest leave-one-out residuals (estimate - reference, kJ/mol):")
    for sid, r in sorted(cv.residuals.items(), key=lambda kv: -abs(kv[1]))[: args.worst]:
        print(f"  {sid:<28} {r:+8.1f}")
    for prop in ("H", "S", "Cp"):
        f = model.fits[prop]
        print(f"{prop}: fitted on {f.n_species} species, fit RMSE {f.rmse_fit:.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
