"""``tfa driving-force``: the max-min driving force B (kJ/mol; Noor et al. 2014, PLoS Comput.
Biol. 10:e1003483): of a given pathway with ``--pathway R1,R2,-R3`` (a linear program), else of
the network's best flux pattern meeting the demand. B > 0: every step runs downhill by at least
B; B < 0: the most uphill step cannot be made less uphill than -B. ``--out DIR`` writes
``driving_force.csv/.json``.
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
        "driving-force",
        help="max-min driving force of the network or of a given pathway, and its bottlenecks",
        description="The largest B such that every reaction carrying flux runs downhill by at "
        "least B kJ/mol, with the reactions that limit it.",
        epilog="example: tfa driving-force --pathway HDCR,FTHFS,MTHFC,MTHFD,MTHFR,CODH,ACS",
    )
    add_network_options(parser)
    parser.add_argument("--pathway", metavar="R1,R2,...",
                        help="a fixed pathway (a leading minus runs a reaction backwards); "
                        "default: the whole network")
    add_problem_options(parser)
    add_out_option(parser)
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..analyses.driving_force import network_driving_force, pathway_driving_force
    from ..api import parse_route

    pathway = parse_route(args.pathway) if args.pathway else None
    check_out(args)
    options = problem_options(args)
    with progress_for(args, total=2) as bar, solver_output_silenced():
        bar("reading the network", 0, 2)
        inputs, tm = thermo_model(args)
        bar("driving force", 1, 2)
        if pathway:
            result = pathway_driving_force(tm, dict(pathway), options)
        else:
            result = network_driving_force(tm, options)
    table = result.to_frame()
    if args.out:
        write_tables(args.out, {"driving_force": table})
    if args.json:
        print_json({**result.to_dict(), "mode": tm.mode, "driving_force_kJ": result.driving_force,
                    "bottlenecks": result.bottlenecks})
        return 0
    print_header(f"max-min driving force ({tm.mode}"
                 + (", pathway)" if pathway else ", network)"), inputs, tm.conditions)
    sys.stdout.write(result.summary() + "\n\n")
    print_table(table)
    return 0
