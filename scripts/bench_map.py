"""Benchmark: points per second of a 100-point condition map of the bundled network, serially,
on a 2-worker process pool and on a 2-worker local Dask cluster, side by side in one run.

Usage::

    PYTHONHASHSEED=7 python scripts/bench_map.py [--points-per-axis 10] [--workers 2] [--modes native]
        [--no-threshold] [--no-driving-force]

The map is temperature 40-100 °C × pH 6-9 (10 × 10 by default) in the bundled environment. For
each executor it prints wall time, points per second and, for the parallel ones, the speed-up
over the serial run and the scaling efficiency (speed-up / workers). It also checks that the
three runs gave identical results (they must, under one PYTHONHASHSEED; see tfa.util.points).
Wall times include starting the workers (and the Dask cluster), which a user pays too.
"""

from __future__ import annotations

import argparse
import json
import logging
import os
import sys
import tempfile
import time
from pathlib import Path


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--points-per-axis", type=int, default=10)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--modes", default="native")
    parser.add_argument("--no-threshold", action="store_true")
    parser.add_argument("--no-driving-force", action="store_true")
    parser.add_argument("--skip", default="", help="comma-separated executors to skip (serial,pool,dask)")
    args = parser.parse_args()
    logging.basicConfig(level=logging.ERROR)

    import numpy as np

    from tfa.analyses.maps import condition_map
    from tfa.network.bundled import load_bundled_network
    from tfa.network.environment import bundled_environment
    from tfa.util.points import HASH_SEED

    if os.environ.get("PYTHONHASHSEED") != HASH_SEED:
        print(f"note: run with PYTHONHASHSEED={HASH_SEED} for identical results across executors")
    n = args.points_per_axis
    x = ("temperature", [float(v) for v in np.linspace(40, 100, n)])
    y = ("ph", [round(float(v), 6) for v in np.linspace(6, 9, n)])
    modes = [m.strip() for m in args.modes.split(",")]
    model = load_bundled_network()
    env = bundled_environment()
    total = n * n * len(modes)
    print(f"map of the bundled network ({len(model.reactions)} reactions): {n} x {n} grid "
          f"(temperature 40-100 degC x pH 6-9), modes {', '.join(modes)}: {total} points; "
          f"threshold {'off' if args.no_threshold else 'on'}, driving force "
          f"{'off' if args.no_driving_force else 'on'}; {os.cpu_count()} cores on this machine")
    runs = [("serial", {"executor": "serial"}, 1),
            (f"pool, {args.workers} workers", {"executor": "pool", "workers": args.workers}, args.workers),
            (f"local Dask, {args.workers} workers", {"scheduler": "local", "workers": args.workers}, args.workers)]
    skip = {s.strip() for s in args.skip.split(",") if s.strip()}
    results = {}
    with tempfile.TemporaryDirectory() as scratch:
        for name, kwargs, workers in runs:
            if name.split(",")[0].replace("local Dask", "dask") in skip:
                continue
            started = time.perf_counter()
            result = condition_map(model, env, x, y, modes, threshold=not args.no_threshold,
                                   driving_force=not args.no_driving_force,
                                   results_path=Path(scratch) / f"{name.split(',')[0]}.jsonl", **kwargs)
            seconds = time.perf_counter() - started
            failed = sum(1 for r in result.records if r["error"])
            results[name] = (seconds, workers, result.records, failed)
            print(f"  {name:<24} {seconds:8.1f} s  {total / seconds:7.3f} points/s  failed {failed}", flush=True)
    if "serial" in results:
        base = results["serial"][0]
        print("scaling (speed-up over serial / workers):")
        for name, (seconds, workers, _, _) in results.items():
            if workers > 1:
                speedup = base / seconds
                print(f"  {name:<24} speed-up {speedup:5.2f}  efficiency {speedup / workers:5.2f}")
    names = list(results)
    same = True
    for other in names[1:]:
        diffs = [(a["x"], a["y"], k, a[k], b[k]) for a, b in zip(results[names[0]][2], results[other][2])
                 for k in a if json.dumps(a[k]) != json.dumps(b[k])]
        same = same and not diffs
        if diffs:
            print(f"{other} differs from {names[0]} at {len(diffs)} field(s); first ones:")
            for d in diffs[:5]:
                print("   ", d)
    print("identical results across executors:", same)
    return 0


if __name__ == "__main__":
    sys.exit(main())
