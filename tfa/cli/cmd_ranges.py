"""``tfa ranges``: the least and largest ΔrG' (kJ/mol) of each reaction, and optionally of each
concentration, over the feasible steady states. When the network is infeasible, the answer is an
error (exit 1) unless ``--allow-uphill`` lets the minimal uphill set run uphill. ``--out DIR``
writes ``ranges.csv/.json`` and the figure ``ranges.png/.svg``.
"""

from __future__ import annotations

import argparse
import sys

from .common import (add_common_options, add_network_options, add_out_option, add_problem_options,
                     check_out, print_header, print_json, print_table, problem_options,
                     solver_output_silenced, thermo_model, write_tables)
from .progress import progress_for


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "ranges",
        help="range of each reaction energy (and concentration) over the feasible steady states",
        description="Least and largest dG' of each reaction (kJ/mol) over the steady states that "
        "meet the demand with every reaction downhill; with --concentrations also each "
        "compound's concentration range.",
        epilog="example: tfa ranges --reactions HDCR,FTHFS,ACS --allow-uphill --out runs/ranges",
    )
    add_network_options(parser)
    parser.add_argument("--reactions", metavar="R1,R2,...", help="only these reactions (default: all)")
    parser.add_argument("--concentrations", action="store_true",
                        help="also range every concentration (slower)")
    parser.add_argument("--allow-uphill", action="store_true",
                        help="when infeasible, let the minimal uphill set run uphill and range "
                        "over those steady states")
    add_problem_options(parser)
    add_out_option(parser)
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from ..analyses.ranges import ranges
    from ..analyses.uphill import minimal_uphill_set
    from ..api import ranges_for_figure, relax
    from ..errors import InputError
    from ..problem.solvers import InfeasibleProblem

    check_out(args)
    options = problem_options(args)
    with progress_for(args, total=3) as bar, solver_output_silenced():
        bar("reading the network", 0, 3)
        inputs, tm = thermo_model(args)
        wanted = None
        if args.reactions:
            wanted = [r.strip() for r in args.reactions.split(",") if r.strip()]
            unknown = [r for r in wanted if r not in tm.energies]
            if unknown:
                raise InputError(f"--reactions: {', '.join(unknown)} not in network {tm.model.id} "
                                 "or without an energy; give ids of reactions with an energy")
        relaxed: list[str] = []
        if args.allow_uphill:
            bar("minimal uphill set", 1, 3)
            up = minimal_uphill_set(tm, options)
            relaxed = up.sets[0] if up.sets else []
            tm = relax(tm, relaxed)
        bar("ranges", 2, 3)
        try:
            result = ranges(tm, options, reactions=wanted,
                            compounds=None if args.concentrations else [])
        except InfeasibleProblem as err:
            raise InfeasibleProblem(f"{err}; or give --allow-uphill to range over the steady "
                                    "states in which the minimal uphill set runs uphill") from None
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", FutureWarning)
        table = result.to_frame()
    if args.out:
        from ..report.figures import ranges_figure, save_figure

        write_tables(args.out, {"ranges": table})
        if len(result.reactions):
            save_figure(ranges_figure(ranges_for_figure(result),
                                      title=f"Feasible ΔrG' per reaction, {tm.mode} mode"),
                        Path(args.out) / "ranges")
    if args.json:
        print_json({**result.to_dict(), "mode": tm.mode, "uphill_allowed": relaxed})
        return 0
    print_header(f"ranges ({tm.mode})", inputs, tm.conditions)
    if relaxed:
        sys.stdout.write(f"with {', '.join(relaxed)} (the minimal uphill set) allowed to run uphill\n")
    sys.stdout.write("\n")
    print_table(table, "{:.4g}")
    return 0
