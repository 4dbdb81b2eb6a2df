"""``tfa h2-threshold``: the least H2 supply (mol/L dissolved; bar for a gas feed) at which the
network is feasible, found directly by one optimisation over ln[H2]. ``--out DIR`` writes
``h2_threshold.csv/.json``. The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_h2_options, add_mode_option, add_network_options, add_option,
                      add_output_options, add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "h2-threshold",
        help="the least H2 supply at which the network is feasible",
        description="The smallest H2 supply within a range at which a steady state exists with "
        "every reaction downhill (one optimisation minimising ln[H2]).",
        epilog="example: tfa h2-threshold --h2-range 1e-9:1e-2 --mode h2_only",
    )
    add_network_options(parser)
    add_mode_option(parser, "h2-threshold")
    add_h2_options(parser, levels=False, command="h2-threshold")
    add_problem_options(parser)
    add_option(parser, "out", "h2-threshold")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["h2_threshold"])
