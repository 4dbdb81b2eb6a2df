"""``tfa uphill``: the minimal uphill set, the fewest reactions that must be driven against
their gradient for the network to meet its demand, with alternatives of the same size and how
far uphill each member runs (kJ/mol). ``--out DIR`` writes ``uphill_sets.csv/.json``.
"""

from __future__ import annotations

import argparse
import sys

from .common import (add_common_options, add_network_options, add_out_option, add_problem_options,
                     check_out, print_header, print_json, print_table, problem_options,
                     solver_output_silenced, thermo_model, write_tables)
from .progress import progress_for


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "uphill",
        help="minimal uphill set: the fewest steps that must be driven uphill (and alternatives)",
        description="The smallest set of reactions that must run against their gradient "
        "(coupled to an energy source) for the demand to be met, with alternative sets of the "
        "same size and each member's uphill energy at the best concentrations.",
        epilog="example: tfa uphill --mode no_atp_bare --alternatives 3",
    )
    add_network_options(parser)
    parser.add_argument("--alternatives", type=int, default=3, metavar="N",
                        help="up to N alternative minimal sets (default 3)")
    add_problem_options(parser)
    add_out_option(parser)
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..analyses.uphill import minimal_uphill_set
    from ..errors import InputError

    if args.alternatives < 1:
        raise InputError(f"--alternatives {args.alternatives}: give at least 1")
    check_out(args)
    options = problem_options(args)
    with progress_for(args, total=2) as bar, solver_output_silenced():
        bar("reading the network", 0, 2)
        inputs, tm = thermo_model(args)
        bar("minimal uphill set", 1, 2)
        result = minimal_uphill_set(tm, options, alternatives=args.alternatives)
    table = result.to_frame()
    if args.out:
        write_tables(args.out, {"uphill_sets": table})
    if args.json:
        print_json({**result.to_dict(), "mode": tm.mode, "size": result.size, "sets": result.sets,
                    "exhausted": result.exhausted})
        return 0
    print_header(f"minimal uphill set ({tm.mode})", inputs, tm.conditions)
    sys.stdout.write(result.summary() + "\n")
    if len(table):
        sys.stdout.write("\n")
        print_table(table)
    return 0
