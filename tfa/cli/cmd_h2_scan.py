"""``tfa h2-scan``: feasibility, max-min driving force and minimal-uphill-set size at each level of
H2 supply (mol/L dissolved; bar when H2 is fed as a gas). ``--out DIR`` writes
``h2_scan.csv/.json`` and the figure ``h2_scan.png/.svg``. The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_h2_options, add_mode_option, add_network_options, add_option,
                      add_output_options, add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "h2-scan",
        help="feasibility, driving force and uphill-set size against the H2 supply",
        description="Scan the H2 supply: at each level, is the network feasible, what is its "
        "max-min driving force, and how many steps must be driven uphill.",
        epilog="example: tfa h2-scan --h2-range 1e-9:1e-2 --h2-levels 15 --out runs/scan",
    )
    add_network_options(parser)
    add_mode_option(parser, "h2-scan")
    add_h2_options(parser, levels=True, command="h2-scan")
    parser.add_argument("--no-uphill", action="store_true",
                        help="skip the minimal-uphill-set size at infeasible levels (faster)")
    add_problem_options(parser)
    add_option(parser, "out", "h2-scan")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["h2_scan"])
