"""A command that runs assessment steps: read the inputs, run the steps (with progress), write
their files when ``--out`` is given, print their answer as text or JSON.

``tfa assess`` runs every registered step; ``tfa feasible``, ``tfa h2-scan`` ... run one step
alone through the same code, so a command and the assessment cannot disagree.
"""

from __future__ import annotations

import argparse
import sys
from typing import TYPE_CHECKING, Callable

from .options import (condition_overrides, parse_h2_range, parse_list, parse_workers,
                      report_deprecations)
from .output import print_json, solver_output_silenced

if TYPE_CHECKING:
    from ..assessment.context import Settings
    from ..assessment.result import Assessment


def settings_from_args(args: argparse.Namespace) -> "Settings":
    """The run's :class:`~tfa.assessment.context.Settings` from whichever options the command
    has (the others keep their defaults)."""
    from ..analyses.route import parse_route
    from ..assessment.context import Settings

    given: dict = {}
    for name in ("modes", "mode", "alternatives", "seed", "ratio", "draws", "interval_width",
                 "coupling_objective"):
        if getattr(args, name, None) is not None:
            given[name] = getattr(args, name)
    if getattr(args, "h2_range", None) is not None:
        given["h2_range"] = parse_h2_range(args.h2_range)
    if getattr(args, "h2_levels", None) is not None:
        given["h2_levels"] = args.h2_levels
    if getattr(args, "h2_values", None):
        given["h2_values"] = args.h2_values
    if getattr(args, "route_file", None):
        given["route_file"] = args.route_file
    if getattr(args, "route", None):
        given["route"] = parse_route(args.route)
    if getattr(args, "workers", None) is not None:
        given["workers"] = parse_workers(args.workers)
    if getattr(args, "reactions", None):
        given["ranges_reactions"] = parse_list(args.reactions)
    if getattr(args, "concentrations", False):
        given["ranges_compounds"] = True
    if getattr(args, "no_uphill", False):
        given["scan_uphill"] = False
    given["include_unreviewed"] = bool(getattr(args, "include_unreviewed", False))
    return Settings(**given)


def problem_options(args: argparse.Namespace):
    """:class:`tfa.problem.builder.ProblemOptions` from the problem options (defaults when the
    command has none)."""
    from ..problem.builder import ProblemOptions

    kwargs = {}
    if hasattr(args, "solver"):
        kwargs = {"solver": args.solver, "uncertainty_k": args.k_sigma,
                  "unknown_energy": args.unknown_energy}
        if args.min_driving_force is not None:
            kwargs["min_driving_force"] = args.min_driving_force
        if args.time_limit is not None:
            kwargs["time_limit"] = args.time_limit
    return ProblemOptions(**kwargs)


def load_inputs(args: argparse.Namespace, require_balanced: bool = True):
    """The network and environment named on the command line
    (:func:`tfa.network.inputs.resolve_inputs`)."""
    from ..network.inputs import resolve_inputs

    inputs = resolve_inputs(getattr(args, "network", None), getattr(args, "environment", None),
                            getattr(args, "compounds", None), require_balanced=require_balanced,
                            h2=getattr(args, "h2", None), demand=getattr(args, "demand", None),
                            identifiers=getattr(args, "identifiers", None),
                            **condition_overrides(args))
    if getattr(args, "loose_cofactors", False):
        import dataclasses
        inputs = dataclasses.replace(inputs, environment=inputs.environment.with_loose_cofactors())
    return inputs


def check_out(args: argparse.Namespace) -> None:
    """Refuse an ``--out`` that cannot hold the results (before anything is computed)."""
    from ..util.outdir import check_output_folder

    out = getattr(args, "out", None)
    if out is not None:
        check_output_folder(out, "--out")


def progress_for(args: argparse.Namespace):
    """The progress display configured from ``--quiet``/``--verbose``."""
    from .progress import Progress

    return Progress(quiet=bool(getattr(args, "quiet", False)),
                    verbose=bool(getattr(args, "verbose", False)))


def run_step_command(args: argparse.Namespace, step_ids: list[str], report: bool = False,
                     text: Callable[["Assessment"], str] | None = None) -> int:
    """Run the steps ``step_ids`` for a command and print the answer; returns the exit code.

    Parameters
    ----------
    args : Namespace
        The parsed command line.
    step_ids : list of str
        Steps to run, in order.
    report : bool
        With ``--out``, also write ``summary.json`` and ``report.html`` (the assessment).
    text : callable, optional
        Text to print instead of the steps' own (``text(result)``).
    """
    from ..assessment.registry import get_step
    from ..assessment.run import run_steps

    report_deprecations(args)
    steps = [get_step(s) for s in step_ids]
    settings = settings_from_args(args)
    options = problem_options(args)
    check_out(args)
    out = getattr(args, "out", None)
    with progress_for(args) as bar, solver_output_silenced():
        inputs = load_inputs(args)
        result = run_steps(steps, inputs, settings, options, progress=bar, out=out, report=report,
                           command=args.command)
    if args.json:
        print_json(json_payload(args.command, result))
    elif text is not None:
        sys.stdout.write(text(result))
    else:
        write = sys.stdout.write
        write(result.header() + "\n")
        for step in result.steps:
            body = step.text(result.result(step.id), result.context)
            if body.strip():
                write("\n" + body)
        if result.notes and not args.quiet:
            write("\nnotes:\n" + "".join(f"  {n}\n" for n in result.notes))
    return exit_code(args, result)


def exit_code(args: argparse.Namespace, result: "Assessment") -> int:
    """0, or 1 (with a line on stderr) when a solver stopped at the time limit before an
    answer ("undetermined")."""
    undetermined = result.context.undetermined
    if not undetermined:
        return 0
    sys.stderr.write(f"tfa {args.command}: undetermined within the time limit of "
                     f"{result.context.options.time_limit:g} s per solve: "
                     f"{', '.join(undetermined)}; raise --time-limit\n")
    return 1


def json_payload(command: str, result: "Assessment") -> dict:
    """The JSON a command prints: what ran where, the summary, its data and every table."""
    settings = result.context.settings
    return {"command": command, **result.summary_data(),
            "conditions": result.environment.conditions.to_dict(),
            "modes": list(settings.modes), "summary": result.summary_lines(),
            "tables": {name: frame.to_dict(orient="records")
                       for name, frame in result.tables().items()},
            "timings_s": dict(result.timings)}
