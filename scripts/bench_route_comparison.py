"""Side-by-side timing of the route comparison on the bundled network, in one process: the
questions asked before the per-route costs (feasibility, max-min driving force, H2 threshold)
alone, then with each addition (energy budget and carbon entries; binding constraints; distance
to a flipped verdict, with the whole network's asked once) and with all of them, as
``tfa compare`` runs it. Every variant is run ``--repeats`` times in turn (round robin, so a
busy machine slows them alike) and the median and its ratio to the plain comparison printed.

Usage: python scripts/bench_route_comparison.py [--repeats 1]
"""

from __future__ import annotations

import argparse
import statistics
import time

VARIANTS = {"verdict, driving force, H2 (before)": dict(budget=False, binding=False, margins=False),
            "+ energy budget and carbon entries": dict(budget=True, binding=False, margins=False),
            "+ binding constraints": dict(budget=False, binding=True, margins=False),
            "+ distance to a flipped verdict": dict(budget=False, binding=False, margins=True),
            "all (tfa compare now)": dict(budget=True, binding=True, margins=True)}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=1)
    args = parser.parse_args()

    from tfa.analyses.route_comparison import compare_routes
    from tfa.network.bundled import bundled_folder, load_bundled_network
    from tfa.network.energies import prepared
    from tfa.network.environment import bundled_environment
    from tfa.network.routes import network_routes
    from tfa.problem.builder import ProblemOptions

    model = load_bundled_network()
    with prepared(model, bundled_environment(), "native") as tm:
        routes, carbon = network_routes(tm.model, None, bundled_folder())
        seconds: dict[str, list[float]] = {name: [] for name in VARIANTS}
        for _ in range(args.repeats):
            for name, flags in VARIANTS.items():
                started = time.perf_counter()
                compare_routes(tm, routes, carbon, ProblemOptions(), **flags)
                seconds[name].append(time.perf_counter() - started)
    base = statistics.median(seconds[next(iter(VARIANTS))])
    print(f"route comparison of the bundled network, {len(routes)} routes, "
          f"{args.repeats} run(s) each, median seconds and ratio to the first line:")
    for name, values in seconds.items():
        median = statistics.median(values)
        print(f"  {name:40s} {median:7.1f} s   x{median / base:.2f}")


if __name__ == "__main__":
    main()
