"""``tfa census``: every reaction's ΔrG'° at the setting, ΔrG' with every reactant at 1 mM and at a
substrate:product ratio (kJ/mol), and how many are exergonic, per mode. No optimisation.
``--out DIR`` writes ``census.csv/.json``, ``census_counts.csv/.json`` and ``census.png/.svg``.
"""

from __future__ import annotations

import argparse
import sys

from .common import (add_common_options, add_network_options, add_out_option, check_out,
                     load_inputs, print_json, print_table, write_tables)


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "census",
        help="reaction energies at reference concentrations and how many are exergonic, per mode",
        description="For every reaction with an energy: dG'0 at the setting, dG' with every "
        "reactant at 1 mM (gases 1e-3 bar) and at a substrate:product ratio; counts of "
        "exergonic reactions per mode.",
        epilog="example: tfa census --modes native,no_atp_bare --ratio 10 --out runs/census",
    )
    add_network_options(parser)
    parser.add_argument("--modes", default="all", metavar="LIST",
                        help="comma-separated modes or 'all' (default)")
    parser.add_argument("--ratio", type=float, default=100.0, metavar="R",
                        help="substrate:product ratio of the third energy (default 100)")
    parser.add_argument("--include-unreviewed", action="store_true",
                        help="also use data from sources that are not peer reviewed")
    add_out_option(parser)
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    import math
    from pathlib import Path

    import pandas as pd

    from ..analyses.census import census
    from ..api import census_long
    from ..errors import InputError
    from ..network.energies import prepare
    from ..thermo.database import ThermoDatabase
    from .cmd_robustness import parse_modes

    modes = parse_modes(args.modes)
    if not (math.isfinite(args.ratio) and args.ratio > 0):
        raise InputError(f"--ratio {args.ratio}: give a positive number")
    check_out(args)
    inputs = load_inputs(args)
    db = ThermoDatabase.load(include_unreviewed=args.include_unreviewed)
    results = {m: census(prepare(inputs.model, inputs.environment, m, db=db), args.ratio) for m in modes}
    counts = pd.DataFrame([r.counts() for r in results.values()])
    table = pd.concat([r.to_frame().assign(mode=m) for m, r in results.items()], ignore_index=True)
    table = table[["mode", *[c for c in table.columns if c != "mode"]]]
    if args.out:
        from ..report.figures import census_figure, save_figure

        write_tables(args.out, {"census": table, "census_counts": counts})
        save_figure(census_figure(census_long(results), title="Reaction energies per mode"),
                    Path(args.out) / "census")
    if args.json:
        print_json({"network": inputs.model.id, "environment": inputs.environment.name,
                    "ratio": args.ratio, "counts": counts.to_dict(orient="records"),
                    "table": table.to_dict(orient="records")})
        return 0
    conditions = next(iter(results.values())).conditions
    sys.stdout.write(f"census: {inputs.model.id} at {inputs.environment.name} ({conditions.describe()})\n")
    for r in results.values():
        sys.stdout.write(r.summary() + "\n")
    sys.stdout.write("\n")
    print_table(counts, "{:.3f}")
    return 0
