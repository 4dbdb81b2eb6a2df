"""``tfa uphill``: the minimal uphill sets, the fewest reactions that must be driven against their
gradient for the network to meet its demand, per mode, listed in the order of reaction ids and
counted, with how far uphill each member runs (kJ/mol) and the energy to supply to it per mol of
demand (flux-weighted). The same step as ``tfa feasible`` (so the two always give the same first
set and the same count), printed as the sets. ``--out DIR`` writes
``feasibility.csv/.json`` and ``uphill_sets.csv/.json``.
"""

from __future__ import annotations

import argparse

from .options import (add_deprecated, add_modes_option, add_network_options, add_option,
                      add_output_options, add_problem_options)
from .step_command import run_step_command


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "uphill",
        help="minimal uphill sets: the fewest steps that must be driven uphill (and alternatives)",
        description="The smallest set of reactions that must run against their gradient "
        "(coupled to an energy source) for the demand to be met, per mode: the sets of that size "
        "in the order of reaction ids (--alternatives of them listed) and how many there are, "
        "each member's uphill energy per mole at the best concentrations and the energy to "
        "supply to it per mol of demand.",
        epilog="example: tfa uphill --modes no_atp_bare --alternatives 3",
    )
    add_network_options(parser)
    add_modes_option(parser, "uphill")
    add_deprecated(parser, "--mode", "--modes", "modes")
    add_option(parser, "alternatives", "uphill", type=int)
    add_problem_options(parser)
    add_option(parser, "out", "uphill")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    return run_step_command(args, ["feasibility"], text=_sets_text)


def _sets_text(result) -> str:
    from ..report.text import table_text

    lines = [result.header()]
    for mode, answer in result.feasibility.items():
        if answer.diagnosis is not None:
            lines.append(f"{mode}: {answer.diagnosis.summary()}")
        else:
            lines.append(f"{mode}: {answer.message}")
    sets = result.tables()["uphill_sets"]
    text = "\n".join(lines) + "\n"
    if len(sets):
        text += "\n" + table_text(sets, "{:.2f}") + "\n"
    return text
