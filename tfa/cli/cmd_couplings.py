"""``tfa couplings``: the fewest ATP couplings with which the demand, and each precursor alone,
is met with every step downhill (the other ATP-coupled steps run as their bare chemistry), with
the alternatives in a stable order. ``--out DIR`` writes ``fewest_couplings`` and
``coupling_counts``. The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_mode_option, add_network_options, add_option, add_output_options,
                      add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "couplings", help="fewest ATP couplings the demand needs (which ATP steps are indispensable)",
        description="Each ATP-coupled step may keep its coupling or run as its bare chemistry; "
        "the fewest couplings kept (or the least coupling energy) with every step downhill.",
        epilog="example: tfa couplings --coupling-objective energy --alternatives 3")
    add_network_options(parser)
    add_mode_option(parser, "couplings")
    add_option(parser, "alternatives", "couplings", type=int)
    parser.add_argument("--coupling-objective", dest="coupling_objective", choices=("count", "energy"),
                        default=None, help="fewest couplings kept (count, default) or least "
                        "flux x coupling energy (energy)")
    add_problem_options(parser)
    add_option(parser, "out", "couplings")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["couplings"])
