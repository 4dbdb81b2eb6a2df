"""``tfa compare``: every carbon-fixation route of the network alone as the entry of carbon from
CO2, side by side: feasible or not, max-min driving force, minimal uphill set, least H2, the energy
budget per carbon fixed (H2, ATP made and spent, the gradient's share), the carbon entries, the
binding constraints and the distance to a flipped verdict. Routes
from ``--routes FILE``, else ``routes.toml`` beside the network, else one per pathway tag.
``--out DIR`` writes ``route_comparison`` and its figure. The same step as in ``tfa assess``.
"""

from __future__ import annotations

import argparse

from .options import (add_mode_option, add_network_options, add_option, add_output_options,
                      add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "compare", help="carbon-fixation routes side by side, each as the only carbon entry",
        description="Each route (a named set of reactions) alone as the entry of carbon from "
        "CO2: verdict, max-min driving force, minimal uphill set, the least H2 it runs on, H2 and "
        "ATP per carbon fixed, where the carbon came in, what binds, and the distance to a "
        "flipped verdict.",
        epilog="example: tfa compare --routes my_routes.toml --out runs/routes")
    add_network_options(parser)
    add_mode_option(parser, "compare")
    parser.add_argument("--routes", dest="route_file", metavar="FILE", default=None,
                        help="route file (TOML; default routes.toml beside the network, else one "
                        "route per carbon-fixing pathway tag)")
    add_option(parser, "h2_range", "compare")
    add_problem_options(parser)
    add_option(parser, "out", "compare")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["route_comparison"])
