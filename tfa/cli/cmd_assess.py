"""``tfa assess``: the whole assessment of a network at a setting, every registered step in order,
with the tables, figures, ``summary.json`` and ``report.html`` in ``--out`` and the answer in
words on the terminal."""

from __future__ import annotations

import argparse

from .options import (add_deprecated, add_h2_options, add_mode_option, add_modes_option,
                      add_network_options, add_option, add_output_options, add_problem_options,
                      parse_list)
from .step_command import run_step_command

#: The steps of ``tfa assess``, named in its help (the registry is the source; this list is
#: checked against it by the tests, so that the help can stay free of heavy imports).
STEP_IDS = ("coverage", "feasibility", "precursors", "census", "h2_scan", "h2_threshold",
            "gradient", "driving_force", "energy_budget", "binding_constraints", "energy_profile",
            "ranges", "verdict_margins", "robustness", "couplings", "currencies",
            "route_comparison")


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "assess",
        help="the whole assessment: tables, figures, an HTML report and the answer in words",
        description="Assess a network at a setting: data coverage, feasibility and minimal "
        "uphill sets per mode, census, H2 scan and threshold, driving force, energy budget and "
        "carbon routes per mode, energy profile along the widest carbon path that ran, ranges "
        "and a small robustness run. Without NETWORK the "
        "bundled network is assessed at its own environment.",
        epilog="example: tfa assess models/ancestral_core --environment my_vent.toml --out results",
    )
    add_network_options(parser)
    add_option(parser, "out", "assess")
    add_modes_option(parser, "assess")
    add_mode_option(parser, "assess")
    add_problem_options(parser)
    add_option(parser, "route", "assess")
    add_h2_options(parser, levels=True, command="assess")
    add_option(parser, "alternatives", "assess", type=int)
    parser.add_argument("--concentration-ranges", dest="concentrations", action="store_true",
                        help="also range every concentration (slower)")
    add_deprecated(parser, "--ranges-compounds", "--concentration-ranges", "concentrations",
                   convert=lambda _: {"concentrations": True}, nargs=0)
    parser.add_argument("--skip", metavar="STEPS",
                        help="comma-separated steps not to run: " + ", ".join(STEP_IDS))
    group = parser.add_argument_group("robustness")
    add_option(group, "draws", "assess", type=int)
    add_option(group, "interval_width", "assess")
    add_option(group, "seed", "assess", type=int)
    add_option(group, "workers", "assess")
    add_deprecated(parser, "--robustness-draws", "--draws", "draws",
                   convert=lambda v: {"draws": int(v)})
    add_deprecated(parser, "--no-robustness", "--draws 0", "draws",
                   convert=lambda _: {"draws": 0}, nargs=0)
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..assessment.run import select_steps

    steps = [s.id for s in select_steps(parse_list(args.skip) or [])]
    return run_step_command(args, steps, report=True, text=_text(args))


def _text(args: argparse.Namespace):
    def text(result) -> str:
        from ..assessment.result import REPORT_FILE

        out = args.out
        lines = [result.summary()]
        if result.notes and not args.quiet:
            lines.append("\nnotes:\n" + "".join(f"  {n}\n" for n in result.notes).rstrip())
        if not args.quiet:
            lines.append(f"\nfiles in {out}/ (report: {out}/{REPORT_FILE}); "
                         f"{sum(result.timings.values()):.0f} s")
        return "\n".join(lines) + "\n"

    return text

