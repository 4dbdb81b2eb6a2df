"""``tfa precursors``: each compound the demand consumes, asked alone, per mode: made with every
step downhill, made only with the steps of a minimal uphill set driven (the first in the order of
reaction ids), or not made from the feed at all (a stoichiometric gap). ``--out DIR`` writes
``precursors.csv/.json`` and ``precursors.png/.svg``. The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_modes_option, add_network_options, add_option, add_output_options,
                      add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "precursors",
        help="each demanded compound alone, per mode: downhill, uphill steps needed, or a gap",
        description="For each compound the demand reaction consumes, with a demand of that "
        "compound only: can the feed make it at all (flux balance), with every step downhill, or "
        "only with a minimal set of steps driven uphill (the first in the order of reaction ids)?",
        epilog="example: tfa precursors --modes no_atp_strict,no_atp_bare --out runs/precursors",
    )
    add_network_options(parser)
    add_modes_option(parser, "precursors")
    add_problem_options(parser)
    add_option(parser, "out", "precursors")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["precursors"])
