"""``tfa h2-threshold``: the least H2 supply (mol/L dissolved; bar for a gas feed) at which the
network is feasible, found directly by one optimisation over ln[H2]. ``--out DIR`` writes
``h2_threshold.csv/.json``.
"""

from __future__ import annotations

import argparse
import sys

from ..errors import InputError
from .common import (add_common_options, add_network_options, add_out_option, add_problem_options,
                     check_out, print_header, print_json, print_table, problem_options,
                     solver_output_silenced, thermo_model, write_tables)
from .progress import progress_for


def parse_range(text: str) -> tuple[float, float]:
    """``LOW:HIGH`` -> (low, high), both positive, low < high.

    >>> parse_range("1e-9:1e-2")
    (1e-09, 0.01)
    """
    try:
        low, high = (float(v) for v in text.split(":"))
    except ValueError:
        raise InputError(f"--range '{text}': write LOW:HIGH, e.g. 1e-9:1e-2 (mol/L; gas: bar)") from None
    if not (low > 0 and high > low):
        raise InputError(f"--range '{text}': need 0 < LOW < HIGH (mol/L; gas: bar)")
    return low, high


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "h2-threshold",
        help="the least H2 supply at which the network is feasible",
        description="The smallest H2 supply within a range at which a steady state exists with "
        "every reaction downhill (one optimisation minimising ln[H2]).",
        epilog="example: tfa h2-threshold --range 1e-9:1e-2 --mode h2_only",
    )
    add_network_options(parser)
    parser.add_argument("--range", default="1e-12:1e-2", metavar="LOW:HIGH",
                        help="H2 range searched (mol/L; gas feed: bar; default %(default)s)")
    add_problem_options(parser)
    add_out_option(parser)
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..analyses.hydrogen import h2_threshold
    from ..api import _h2_unit
    from ..thermo.database import ThermoDatabase

    h2_range = parse_range(args.range)
    check_out(args)
    options = problem_options(args)
    with progress_for(args, total=2) as bar, solver_output_silenced():
        bar("reading the network", 0, 2)
        inputs, tm = thermo_model(args)
        bar("H2 threshold", 1, 2)
        result = h2_threshold(tm, options, h2_range=h2_range)
    unit = _h2_unit(tm, ThermoDatabase.load())
    table = result.to_frame()
    if args.out:
        write_tables(args.out, {"h2_threshold": table})
    if args.json:
        print_json({**result.to_dict(), "mode": tm.mode, "feasible": result.feasible,
                    "threshold": result.threshold if result.feasible else None, "unit": unit})
        return 0
    print_header(f"H2 threshold ({tm.mode})", inputs, tm.conditions)
    sys.stdout.write(result.message + (f" {unit}" if result.feasible else "") + "\n\n")
    print_table(table, "{:.4g}")
    return 0
