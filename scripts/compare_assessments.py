"""Compare the output folders of two ``tfa assess`` runs, table by table, across renamed keys.

    python scripts/compare_assessments.py OLD_FOLDER NEW_FOLDER [--rtol 1e-6]

Every table of OLD is read, its file and column names mapped to today's names with
:data:`RENAMED` (the vocabulary of ``tfa.vocabulary`` replaced older spellings), and compared
with NEW: the same rows in the same order, numbers within ``--rtol`` (relative) or 1e-9
(absolute), text equal. ``summary.json`` is compared the same way, key by key. Tables that
describe one optimal solution among several equal ones (the max-min driving-force solution and
the energy profile drawn from it) can differ between two runs of the same code; they are listed
apart (:data:`SOLUTION_TABLES`), so that a real change of an answer stands out.

Prints one line per table ("same", or what differs) and exits 1 when an answer differs.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from pathlib import Path

import pandas as pd

#: Old file stem -> (new file stem, {old column: new column}); a column not named keeps its name.
RENAMED = {
    "coverage": ("coverage", {"dG0_prime_kJ": "delta_g_standard_kJ_per_mol",
                              "sigma_kJ": "sigma_kJ_per_mol"}),
    "census": ("census", {"dg0_prime_kJ": "delta_g_standard_kJ_per_mol",
                          "sigma_kJ": "sigma_kJ_per_mol", "dg_1mM_kJ": "delta_g_1mM_kJ_per_mol",
                          "dg_ratio_kJ": "delta_g_at_ratio_kJ_per_mol"}),
    "census_counts": ("census_counts", {
        "exergonic at standard": "exergonic_standard",
        "fraction at standard": "fraction_exergonic_standard",
        "exergonic at 1 mM": "exergonic_1mM", "fraction at 1 mM": "fraction_exergonic_1mM",
        "exergonic at ratio 100:1": "exergonic_at_ratio",
        "fraction at ratio 100:1": "fraction_exergonic_at_ratio"}),
    "feasibility": ("feasibility", {}),
    "uphill_sets": ("uphill_sets", {"uphill_by_kJ": "uphill_by_kJ_per_mol"}),
    "h2_scan": ("h2_scan", {"h2": "h2_activity", "ln_h2": "ln_h2_activity",
                            "driving_force_kJ": "driving_force_kJ_per_mol"}),
    "h2_threshold": ("h2_threshold", {"threshold": "h2_threshold",
                                      "ln_threshold": "ln_h2_threshold",
                                      "range_low": "h2_range_low",
                                      "range_high": "h2_range_high"}),
    "driving_force": ("driving_force", {"dg_prime_kJ": "delta_g_kJ_per_mol",
                                        "driving_force_kJ": "driving_force_kJ_per_mol"}),
    "energy_profile": ("energy_profile", {"dg_prime": "delta_g_kJ_per_mol",
                                          "dg_standard": "delta_g_standard_kJ_per_mol",
                                          "cumulative": "cumulative_delta_g_kJ_per_mol"}),
    "ranges": ("ranges", {"id": "reaction", "min": "delta_g_min_kJ_per_mol",
                          "max": "delta_g_max_kJ_per_mol"}),
    "robustness_feasibility": ("robustness_feasibility", {"feasible": "feasible_draws",
                                                          "failed": "failed_draws"}),
    "robustness_uphill": ("robustness_uphill", {}),
}
#: Keys of summary.json renamed (and keys inside its robustness records).
SUMMARY_RENAMED = {"driving_force": "driving_force_kJ_per_mol"}
ROBUSTNESS_RENAMED = {"feasible": "feasible_draws", "failed": "failed_draws"}
#: The census was once written as the long table of its figure: kind -> today's column.
CENSUS_KINDS = {"ΔrG'°": "delta_g_standard_kJ_per_mol", "ΔrG' at 1 mM": "delta_g_1mM_kJ_per_mol"}
#: Tables of one optimal solution among equal ones: they may differ run to run.
SOLUTION_TABLES = {"driving_force", "energy_profile", "energy_budget", "carbon_routes"}


def _table(folder: Path, stem: str) -> pd.DataFrame:
    """A table in today's names (old spellings renamed; today's pass unchanged)."""
    frame = pd.read_csv(folder / f"{stem}.csv")
    if stem == "ranges" and "kind" in frame.columns:  # once a stacked table of reactions and compounds
        frame = frame[frame["kind"] == "reaction"].drop(columns=["kind", "unit"])
    if stem == "census" and "kind" in frame.columns:  # once the long table of the census figure
        wide = frame.pivot_table(index=["mode", "reaction"], columns="kind", values="dg_prime",
                                 sort=False).reset_index()
        frame = wide.rename(columns=CENSUS_KINDS)[["mode", "reaction", *CENSUS_KINDS.values()]]
    return frame.rename(columns=RENAMED[stem][1]).reset_index(drop=True)


def _same(a, b, rtol: float) -> bool:
    if isinstance(a, float) and isinstance(b, float):
        if math.isnan(a) and math.isnan(b):
            return True
        return math.isclose(a, b, rel_tol=rtol, abs_tol=1e-9)
    return a == b


def compare_frames(old: pd.DataFrame, new: pd.DataFrame, rtol: float) -> list[str]:
    """What differs between two tables over the columns of ``old`` (new columns are listed)."""
    problems = []
    added = [c for c in new.columns if c not in old.columns]
    missing = [c for c in old.columns if c not in new.columns]
    if missing:
        problems.append(f"columns missing in the new table: {missing}")
    if len(old) != len(new):
        return problems + [f"{len(old)} rows before, {len(new)} now"]
    for column in [c for c in old.columns if c in new.columns]:
        for k, (a, b) in enumerate(zip(old[column], new[column])):
            a = float(a) if isinstance(a, (int, float)) and not isinstance(a, bool) else a
            b = float(b) if isinstance(b, (int, float)) and not isinstance(b, bool) else b
            if not _same(a, b, rtol):
                problems.append(f"row {k + 1}, {column}: {a!r} before, {b!r} now")
                break
    if added and not problems:
        return [f"same (new columns: {', '.join(added)})"]
    return problems


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("old", type=Path)
    parser.add_argument("new", type=Path)
    parser.add_argument("--rtol", type=float, default=1e-6)
    args = parser.parse_args(argv)
    answers_differ = False
    for stem, (new_stem, _) in RENAMED.items():
        if not (args.old / f"{stem}.csv").is_file():
            print(f"{stem}: not in the old folder")
            continue
        new_path = args.new / f"{new_stem}.csv"
        if not new_path.is_file():
            print(f"{stem}: MISSING in the new folder")
            answers_differ = True
            continue
        problems = compare_frames(_table(args.old, stem), _table(args.new, new_stem), args.rtol)
        same = not problems or problems[0].startswith("same")
        label = " (one optimal solution among equal ones)" if stem in SOLUTION_TABLES else ""
        print(f"{stem}: " + ("same" if not problems else "; ".join(problems[:3])) + label)
        answers_differ |= not same and stem not in SOLUTION_TABLES
    old = json.loads((args.old / "summary.json").read_text())
    new = json.loads((args.new / "summary.json").read_text())
    new = {SUMMARY_RENAMED.get(k, k): v for k, v in new.items()}
    for key, value in old.items():
        if key in ("timings_s", "summary"):
            continue
        if key == "robustness":
            value = [{ROBUSTNESS_RENAMED.get(k, k): v for k, v in row.items()} for row in value]
        mapped = SUMMARY_RENAMED.get(key, key)
        if new.get(mapped) != value and not (isinstance(value, float) and
                                              _same(value, float(new.get(mapped, "nan")), args.rtol)):
            solution = key == "bottlenecks"
            print(f"summary.json {key}: {value!r} before, {new.get(mapped)!r} now"
                  + (" (one optimal solution among equal ones)" if solution else ""))
            answers_differ |= not solution
    extra = sorted(set(p.name for p in args.new.iterdir()) - set(p.name for p in args.old.iterdir()))
    print("files only in the new folder: " + (", ".join(extra) or "none"))
    return 1 if answers_differ else 0


if __name__ == "__main__":
    sys.exit(main())
