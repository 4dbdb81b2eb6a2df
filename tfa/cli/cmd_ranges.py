"""``tfa ranges``: the least and largest ΔrG' (kJ/mol) of each reaction, and optionally each
concentration, over the feasible steady states; when the network is infeasible in the mode, over
the steady states in which its first minimal uphill set may run uphill (said in the output).
``--out DIR`` writes ``ranges.csv/.json`` and the figure ``ranges.png/.svg``. The same step as in
``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_deprecated, add_mode_option, add_network_options, add_option,
                      add_output_options, add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "ranges",
        help="range of each reaction energy (and concentration) over the feasible steady states",
        description="Least and largest ΔrG' of each reaction (kJ/mol) over the steady states that "
        "meet the demand with every reaction downhill; with --concentration-ranges also each "
        "compound's range.",
        epilog="example: tfa ranges --reactions HDCR,FTHFS,ACS --out runs/ranges",
    )
    add_network_options(parser)
    add_mode_option(parser, "ranges")
    parser.add_argument("--reactions", metavar="R1,R2,...", help="only these reactions (default: all)")
    parser.add_argument("--concentration-ranges", dest="concentrations", action="store_true",
                        help="also range every concentration (slower)")
    add_deprecated(parser, "--concentrations", "--concentration-ranges", "concentrations",
                   convert=lambda _: {"concentrations": True}, nargs=0)
    add_deprecated(parser, "--allow-uphill", "nothing (an infeasible network is always ranged "
                   "with its minimal uphill set allowed)", "allow_uphill",
                   convert=lambda _: {}, nargs=0)
    add_option(parser, "workers", "ranges")
    add_problem_options(parser)
    add_option(parser, "out", "ranges")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..errors import InputError

    if args.reactions is not None and not [r for r in args.reactions.split(",") if r.strip()]:
        raise InputError("--reactions: give reaction ids separated by commas")
    return run_step_command(args, ["ranges"])
