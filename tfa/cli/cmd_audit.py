"""``tfa audit``: the bundled data against the literature reaction values of the library.

Prints the statistics of the audit and every open disagreement (a value that the rest of the
data predict off by more than 2σ or 5 kJ/mol), with its source, whether it is recalled, its
conditions and the compounds it touches; those disagreements are also attached to every energy
that uses one of those compounds (tfa dg, tfa inspect, the coverage table). The logic is in
:mod:`tfa.thermo.audit`.
"""

from __future__ import annotations

import argparse
import sys

from .options import add_output_options, add_unreviewed_option
from .output import print_json


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "audit",
        help="the data against literature reaction values: every disagreement above 2 sigma or 5 kJ/mol",
        description="Compare the bundled species data and reaction values with every literature "
        "value of the library (tfa/data/reaction_values.csv) at the value's own temperature, pH, "
        "ionic strength and pMg: from species data where all compounds have them, else against "
        "the prediction of all other values (leave one out). Prints the share within 2 sigma "
        "and every open disagreement.",
        epilog="example: tfa audit --all --include-unreviewed",
    )
    parser.add_argument("--all", action="store_true", help="also print one line per value")
    add_unreviewed_option(parser)
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..thermo.audit import audit

    result = audit()
    modes = ["reviewed"] + (["with_unreviewed"] if args.include_unreviewed else [])
    if args.json:
        frame = result.to_frame()
        print_json({"statistics": {m: result.statistics(m) for m in modes},
                    "values": frame.to_dict(orient="records")})
        return 0
    for i, mode in enumerate(modes):
        if i:
            sys.stdout.write("\n")
        sys.stdout.write("\n".join(result.report_lines(mode, args.all)) + "\n")
    return 0
