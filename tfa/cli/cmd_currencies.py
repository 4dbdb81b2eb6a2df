"""``tfa currencies``: ATP, acetyl phosphate, thioester, pyrophosphate, polyphosphate or no ATP
paying for the coupled steps, with the carriers kept or H2 in their place: feasible or not, the
minimal uphill set and the precursors each makes alone. ``--out DIR`` writes ``currencies``.
The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import add_network_options, add_option, add_output_options, add_problem_options
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "currencies", help="which energy currency can pay for the coupled steps, per precursor",
        description="Every ATP-coupled step coupled to another donor (or none), with the "
        "carriers kept or replaced by H2: verdict, minimal uphill set, precursors made.",
        epilog="example: tfa currencies --out runs/currencies")
    add_network_options(parser)
    add_option(parser, "alternatives", "currencies", type=int)
    add_problem_options(parser)
    add_option(parser, "out", "currencies")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["currencies"])
