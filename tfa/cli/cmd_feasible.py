"""``tfa feasible``: can the network run with every reaction downhill, in each mode?

Per mode: feasible or not; when not, the minimal uphill sets as the diagnosis (or the plain-words
reason when even the stoichiometry cannot meet the demand). ``--out DIR`` writes
``feasibility.csv/.json`` and ``uphill_sets.csv/.json``. The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_modes_option, add_network_options, add_option, add_output_options,
                      add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "feasible",
        help="is there a steady state with every reaction downhill, per mode (with the diagnosis)",
        description="Feasibility of the network in each mode: a steady state meeting the demand "
        "with every reaction that carries flux running downhill. Infeasible modes get the "
        "minimal uphill sets as their diagnosis.",
        epilog="example: tfa feasible --modes native,no_atp_bare --json",
    )
    add_network_options(parser)
    add_modes_option(parser, "feasible")
    add_option(parser, "alternatives", "feasible", type=int)
    add_problem_options(parser)
    add_option(parser, "out", "feasible")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["feasibility"])
