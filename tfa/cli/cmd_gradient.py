"""``tfa gradient``: which energy source the network depends on: the verdicts and the H2
threshold with and without the gradient across the membrane (every compartment at the cell's pH
and Δψ = 0), the least gradient at which each mode runs (verified bisection), and how far H2
reduces a carrier with and without an ion-coupled enzyme. ``--out DIR`` writes
``gradient_verdicts``, ``least_gradient`` and ``carrier_by_h2`` (CSV and JSON). The same step as
in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_h2_options, add_mode_option, add_modes_option, add_network_options,
                      add_option, add_output_options, add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "gradient",
        help="verdicts with and without the gradient across the membrane; the least gradient",
        description="Verdicts and the H2 threshold with the environment's compartment pH and "
        "membrane potential and without them, the least fraction of that gradient at which each "
        "mode runs, and how far H2 reduces ferredoxin with and without the gradient.",
        epilog="example: tfa gradient --modes native,h2_only --out runs/gradient",
    )
    add_network_options(parser)
    add_modes_option(parser, "gradient")
    add_mode_option(parser, "gradient")
    add_h2_options(parser, levels=False, command="gradient")
    add_problem_options(parser)
    add_option(parser, "out", "gradient")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["gradient"])
