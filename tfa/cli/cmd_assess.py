"""``tfa assess``: the whole job on one network and one setting, with one command.

With no arguments: the bundled network (demo data) at its environment (the invented Kestrel
Ridge vent field). Writes to ``--out`` (default ``tfa-results/``) the data coverage, census,
feasibility in the four modes, minimal uphill sets, H2 scan and threshold, driving force, energy
profile, ranges and a small robustness run, each as CSV and JSON; figures as PNG and SVG; one
self-contained HTML report; and prints the answer in plain words. Bad input (exit 2) writes
nothing; every file is written atomically, so an interrupted run leaves only complete files.
A thin layer over :func:`tfa.api.assess`.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..api import DEFAULT_OUT, DEFAULT_ROBUSTNESS_DRAWS, REPORT_FILE, assess
from .common import (add_common_options, add_network_options, add_problem_options, check_out,
                     condition_overrides, print_json, problem_options,
                     solver_output_silenced)
from .progress import progress_for


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "assess",
        help="the whole assessment: tables, figures, an HTML report and the answer in words",
        description="Assess a network at a setting: data coverage, census, feasibility in the "
        "four modes, minimal uphill sets, H2 scan and threshold, driving force, energy profile "
        "along the carbon-fixation route, ranges and a small robustness run. Without NETWORK the "
        "bundled network is assessed at its own environment.",
        epilog="example: tfa assess models/ancestral_core --environment my_vent.toml --out results",
    )
    add_network_options(parser)
    parser.add_argument("--out", metavar="DIR", default=DEFAULT_OUT,
                        help=f"folder for every file (default {DEFAULT_OUT})")
    add_problem_options(parser)
    parser.add_argument("--route", metavar="R1,R2,...",
                        help="reactions of the energy profile in order (a leading minus runs one "
                        "backwards); default: the acetyl-CoA pathway to pyruvate")
    parser.add_argument("--alternatives", type=int, default=2, metavar="N",
                        help="alternative minimal uphill sets per mode (default 2)")
    parser.add_argument("--ranges-compounds", action="store_true",
                        help="also range every concentration (slower)")
    group = parser.add_argument_group("robustness")
    group.add_argument("--robustness-draws", type=int, default=DEFAULT_ROBUSTNESS_DRAWS, metavar="N",
                       help=f"draws of the energies per mode (default {DEFAULT_ROBUSTNESS_DRAWS}; "
                       "0 skips; larger runs: tfa robustness)")
    group.add_argument("--no-robustness", action="store_true", help="skip the robustness run")
    group.add_argument("--seed", type=int, default=0, metavar="S", help="seed of the draws (default 0)")
    group.add_argument("--workers", type=int, metavar="N",
                       help="worker processes for the draws (default: in this process)")
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..errors import InputError

    check_out(args)
    draws = 0 if args.no_robustness else args.robustness_draws
    if draws < 0:
        raise InputError(f"--robustness-draws {draws}: give 0 (skip) or more")
    if args.workers is not None and args.workers < 1:
        raise InputError(f"--workers {args.workers}: give at least 1")
    options = problem_options(args)
    with progress_for(args) as bar, solver_output_silenced():
        result = assess(args.network, args.environment, args.out, mode=args.mode, options=options,
                        route=args.route, alternatives=args.alternatives,
                        ranges_compounds=args.ranges_compounds, robustness_draws=draws,
                        robustness_seed=args.seed, workers=args.workers, compounds=args.compounds,
                        include_unreviewed=args.include_unreviewed,
                        conditions=condition_overrides(args), progress=bar)
    out = Path(args.out)
    if args.json:
        print_json({**result.summary_data(), "summary": result.summary_lines(),
                    "out": str(out), "report": str(out / REPORT_FILE),
                    "timings_s": result.timings})
        return 0
    sys.stdout.write(result.summary() + "\n")
    if result.notes and not args.quiet:
        sys.stdout.write("\nnotes:\n" + "".join(f"  {n}\n" for n in result.notes))
    if not args.quiet:
        sys.stdout.write(f"\nfiles in {out}/ (report: {out / REPORT_FILE}); "
                         f"{sum(result.timings.values()):.0f} s\n")
    return 0
