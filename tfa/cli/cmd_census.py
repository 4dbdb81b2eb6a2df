"""``tfa census``: every reaction's ΔrG'° at the setting, ΔrG' with every reactant at 1 mM and at
a substrate:product ratio (kJ/mol), and how many are exergonic, per mode. No optimisation.
``--out DIR`` writes ``census.csv/.json``, ``census_counts.csv/.json`` and ``census.png/.svg``.
The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_modes_option, add_network_options, add_option, add_output_options,
                      gated)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "census",
        help="reaction energies at reference concentrations and how many are exergonic, per mode",
        description="For every reaction with an energy: ΔrG'° at the setting, ΔrG' with every "
        "reactant at 1 mM (gases 1e-3 bar) and at a substrate:product ratio; counts of "
        "exergonic reactions per mode.",
        epilog="example: tfa census --modes native,no_atp_bare --ratio 10 --out runs/census",
    )
    add_network_options(parser)
    add_modes_option(parser, "census")
    parser.add_argument("--ratio", type=gated(above=0.0), default=100.0, metavar="R",
                        help="substrate:product ratio of the third energy (default 100)")
    add_option(parser, "out", "census")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    import math

    from ..errors import InputError

    if not (math.isfinite(args.ratio) and args.ratio > 0):
        raise InputError(f"--ratio {args.ratio}: give a positive substrate:product ratio")
    return run_step_command(args, ["census"])
