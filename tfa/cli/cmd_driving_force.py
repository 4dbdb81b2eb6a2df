"""``tfa driving-force``: the max-min driving force B (kJ/mol; Noor et al. 2014, PLoS Comput.
Biol. 10:e1003483) of the network's best flux pattern meeting the demand and, with ``--route
R1,R2,-R3``, of that route alone (a linear program). B > 0: every step runs downhill by at least
B; B < 0: the most uphill step cannot be made less uphill than -B. ``--out DIR`` writes
``driving_force.csv/.json`` (and ``driving_force_route``). The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_deprecated, add_mode_option, add_network_options, add_option,
                      add_output_options, add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "driving-force",
        help="max-min driving force of the network (and of a named route), and its bottlenecks",
        description="The largest B such that every reaction carrying flux runs downhill by at "
        "least B kJ/mol, with the reactions that limit it.",
        epilog="example: tfa driving-force --route HDCR,FTHFS,MTHFC,MTHFD,MTHFR,CODH,ACS",
    )
    add_network_options(parser)
    add_mode_option(parser, "driving-force")
    add_option(parser, "route", "driving-force")
    add_deprecated(parser, "--pathway", "--route", "route")
    add_problem_options(parser)
    add_option(parser, "out", "driving-force")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["driving_force"])
