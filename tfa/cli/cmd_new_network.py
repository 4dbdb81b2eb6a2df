"""``tfa new-network DIR``: write the starter network into DIR, a minimal complete network to
edit into one's own: ``compounds.csv``, ``reactions.csv`` and ``environment.toml``, the example
of ``docs/formats.md`` (demo data of an invented setting). Nothing is overwritten.
"""

from __future__ import annotations

import argparse
import sys

from .options import add_output_options


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "new-network",
        help="write a minimal complete network (compounds, reactions, environment) to edit",
        description="Write the starter network into DIR: compounds.csv, reactions.csv and "
        "environment.toml, the example of the network formats (docs/formats.md). It runs as it "
        "is (tfa assess DIR); edit it into your own network. Existing files are never "
        "overwritten.",
        epilog="example: tfa new-network my_network && tfa inspect my_network",
    )
    parser.add_argument("folder", metavar="DIR", help="folder to write the files into (created)")
    add_output_options(parser, json_output=False)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..network.bundled import write_starter_network

    written = write_starter_network(args.folder)
    if not args.quiet:
        sys.stdout.write("wrote " + ", ".join(str(p) for p in written) + "\n"
                         f"next: tfa inspect {args.folder}   (checks it)\n"
                         f"      tfa assess {args.folder}    (the whole assessment)\n"
                         "formats of every file: docs/formats.md\n")
    return 0
