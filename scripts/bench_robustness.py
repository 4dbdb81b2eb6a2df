"""Side-by-side timing of robustness draws: one mode of the bundled network, in this process
against two worker processes, in one run.

Each draw takes the reaction energies in compound space (:mod:`tfa.network.compound_space`) and
answers feasibility (the verdict; with ``--uphill-sets`` also the minimal uphill set of each
infeasible draw; the H2 threshold is off, as in the assessment's robustness step), on one problem
built per mode and worker whose energies change from draw to draw (:mod:`tfa.analyses.draws`).
Both runs use the same seed, so they solve the same draws; the script checks that the answers
agree draw by draw (a worker's answer may not depend on which process computes it) and reports,
for each, the seconds, the draws per second and the ratio in-process / two workers. On a
machine whose cores are busy with other work the ratio says so (it cannot exceed the free
cores). The load average is printed before and after.

Usage: python scripts/bench_robustness.py [--draws 1000] [--mode native] [--seed 0]
       [--time-limit 300] [--uphill-sets]
"""

from __future__ import annotations

import argparse
import os
import time


def run(draws: int, mode: str, seed: int, executor: str, workers: int, time_limit: float,
        uphill_sets: bool):
    from tfa.analyses.robustness import robustness
    from tfa.network.bundled import load_bundled_network
    from tfa.network.environment import bundled_environment

    started = time.perf_counter()
    result = robustness(load_bundled_network(), bundled_environment(), n_draws=draws, seed=seed,
                        modes=[mode], executor=executor, workers=workers, threshold=False,
                        uphill_sets=uphill_sets, time_limit=time_limit)
    seconds = time.perf_counter() - started
    return result, seconds


def points_words(result) -> str:
    """How the draws' answers were checked (certified / proven / solver proof counts)."""
    from tfa.analyses.jobs import points_verification

    return points_verification(result.records)["check"].split(": ", 1)[-1]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--draws", type=int, default=1000)
    parser.add_argument("--mode", default="native")
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--time-limit", type=float, default=300.0)
    parser.add_argument("--uphill-sets", action="store_true",
                        help="also the minimal uphill set of every infeasible draw")
    args = parser.parse_args()
    os.environ.setdefault("PYTHONHASHSEED", "0")
    what = "verdict and minimal uphill set" if args.uphill_sets else "verdict"
    print(f"robustness benchmark ({what}): {args.draws} draws of mode {args.mode}, seed {args.seed}, "
          f"{os.cpu_count()} cores seen (load average {os.getloadavg()[0]:.1f})")
    rows = []
    answers = {}
    for label, executor, workers in (("in process", "serial", 1), ("two workers", "pool", 2)):
        result, seconds = run(args.draws, args.mode, args.seed, executor, workers, args.time_limit,
                              args.uphill_sets)
        frame = result.feasibility_frame().iloc[0]
        answers[label] = [(r["draw"], r["feasible"], r.get("uphill_set_size"))
                          for r in result.records]
        rows.append((label, seconds, args.draws / seconds, frame))
        print(f"  {label:12s} {seconds:8.1f} s  {args.draws / seconds:6.2f} draws/s  "
              f"feasible in {frame['feasible_draws']} of {frame['draws']} "
              f"(95 % interval {frame['interval_low']:.3f}-{frame['interval_high']:.3f}), "
              f"{frame['failed_draws']} failed; checks: {points_words(result)}")
    print(f"  load average after: {os.getloadavg()[0]:.1f}")
    same = answers["in process"] == answers["two workers"]
    print(f"  the same answer in every draw: {'yes' if same else 'NO'}")
    print(f"  ratio in process / two workers: {rows[0][1] / rows[1][1]:.2f} "
          f"(1,000 draws would take {1000 / rows[0][2] / 60:.1f} min in process, "
          f"{1000 / rows[1][2] / 60:.1f} min on two workers)")


if __name__ == "__main__":
    main()
