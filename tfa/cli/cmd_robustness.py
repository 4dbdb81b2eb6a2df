"""``tfa robustness``: how sure are the conclusions, given the uncertainty of the energies?

Draws the reactions' ΔrG'° from their distribution in compound space (every identity of the
stoichiometry holds in every draw) and solves each mode again for every draw, in batches, until
every probability's 95 % Wilson interval is at most ``--interval-width`` wide or ``--draws`` are
made (it says which): the probability that the network is feasible (with its Wilson interval), how often each reaction is in the minimal
uphill set, and the distribution of the H2 threshold. The same ``--seed`` gives the same draws
serially, on the local process pool (default) or on Dask. With ``--out DIR`` every finished draw
is appended to ``DIR/robustness.jsonl`` at once, so ``--resume`` continues an interrupted run,
or extends a finished one to more ``--draws`` (draw k is the same draw whatever the total).
"""

from __future__ import annotations

import argparse
import os
import sys

from ..errors import InputError
from ..util.numbers import MAX_SIGMA_SCALE
from ..util.points import HASH_SEED
from .options import (add_deprecated, add_modes_option, add_network_options, add_option,
                      add_output_options, add_problem_options, add_threshold_switch, gated,
                      parse_h2_range, parse_workers, report_deprecations)
from .output import print_json, print_table, solver_output_silenced
from .step_command import progress_for


def add_execution_options(parser: argparse.ArgumentParser, command: str) -> None:
    """--workers, --scheduler, --out, --resume, --overwrite (and the old --serial)."""
    group = parser.add_argument_group("execution")
    add_option(group, "workers", command)
    group.add_argument("--scheduler", metavar="ADDRESS",
                       help="run on Dask: 'local' starts a local Dask cluster with --workers "
                       "workers, an address (tcp://HOST:PORT) uses a running scheduler")
    add_deprecated(parser, "--serial", "--workers 1", "workers", convert=lambda _: {"workers": "1"},
                   nargs=0)
    add_option(group, "out", command)
    group.add_argument("--resume", action="store_true",
                       help="continue the results file in --out, skipping finished points")
    group.add_argument("--overwrite", action="store_true",
                       help="start again when --out already holds a results file")


def execution_kwargs(args: argparse.Namespace) -> dict:
    """Keyword arguments of the many-point analyses for the execution options."""
    if args.resume and not args.out:
        raise InputError("--resume needs --out DIR: the folder of the run to continue")
    workers = parse_workers(args.workers)
    executor = "dask" if args.scheduler else ("pool" if workers > 1 else "serial")
    return {"executor": executor, "workers": workers, "scheduler": args.scheduler,
            "resume": args.resume, "overwrite": args.overwrite}


def same_hash_seed(args: argparse.Namespace) -> None:
    """Re-run this command under PYTHONHASHSEED=:data:`~tfa.util.points.HASH_SEED` when it was
    started from the command line without it, so that every executor (and every later
    ``--resume``) gives identical numbers (see :mod:`tfa.util.points`). Called programmatically
    (``tfa.cli.main([...])``) nothing happens."""
    if os.environ.get("PYTHONHASHSEED") == HASH_SEED or sys.argv[1:2] != [args.command]:
        return
    env = dict(os.environ, PYTHONHASHSEED=HASH_SEED)
    sys.stdout.flush()
    sys.stderr.flush()
    os.execve(sys.executable, [sys.executable, "-m", "tfa", *sys.argv[1:]], env)


def point_progress(bar, unit: str):
    """A ``progress(finished, total, record)`` callback of the many-point runs that shows the
    count of finished points (and failures) on the progress display ``bar``."""
    failed = 0

    def show(done: int, total: int, line: dict) -> None:
        nonlocal failed
        failed += "error" in line
        bar(f"{unit} {done}/{total}" + (f" ({failed} failed)" if failed else ""), 0, 1)

    return show


def load_network(args: argparse.Namespace):
    """The inputs as every command reads them (model, environment, warnings)."""
    from .step_command import load_inputs

    return load_inputs(args, require_balanced=False)


def start_points_run(args: argparse.Namespace, journal: str):
    """What a many-point command needs before it runs: this process under the common hash seed,
    the :class:`~tfa.util.outdir.OutputFolder` of ``--out`` with its resumable results file
    ``journal`` (checked now; a do-nothing context without ``--out``), and the inputs."""
    import contextlib

    from ..util.outdir import OutputFolder

    same_hash_seed(args)
    folder = (contextlib.nullcontext() if args.out is None else
              OutputFolder(args.out, "--out", journal=journal, resume=args.resume,
                           overwrite=args.overwrite, command=args.command))
    return folder, load_network(args)


def interrupted(args: argparse.Namespace, folder, unit: str) -> int:
    """Exit code 1 and what to do after a run stopped by a signal (the output folder keeps the
    previous result; the finished points wait beside it for ``--resume``)."""
    if folder is not None:
        folder.keep_aside()
    sys.stderr.write(f"tfa {args.command}: interrupted; finished {unit} are saved"
                     + (f", continue with --resume --out {args.out}\n" if folder is not None else
                        " only with --out (give --out DIR to be able to resume)\n"))
    return 1


def problem_kwargs(args: argparse.Namespace) -> dict:
    """The problem options as keyword arguments of the many-point analyses."""
    from .step_command import problem_options

    options = problem_options(args)
    return {"solver": options.solver, "time_limit": options.time_limit,
            "min_driving_force": options.min_driving_force,
            "unknown_energy": options.unknown_energy, "uncertainty_k": options.uncertainty_k}


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "robustness",
        help="probability of each conclusion under the uncertainty of the reaction energies",
        description="Draw the reaction energies from their correlated uncertainty and solve "
        "again: probability of feasibility per mode, how often each reaction is in the minimal "
        "uphill set, and the distribution of the H2 threshold.",
        epilog="example: tfa robustness --draws 200 --seed 7 --modes native,no_atp_bare "
        "--workers 2 --out runs/robust",
    )
    add_network_options(parser)
    add_option(parser, "draws", "robustness", type=int)
    add_option(parser, "interval_width", "robustness")
    add_option(parser, "seed", "robustness", type=int)
    add_modes_option(parser, "robustness")
    parser.add_argument("--sigma-scale", type=gated(minimum=0.0, maximum=MAX_SIGMA_SCALE),
                        default=1.0, metavar="F",
                        help="multiply every uncertainty by F (0: every draw is the deterministic "
                        "answer; default 1)")
    parser.add_argument("--scenario", choices=("energies", "assumptions", "both"),
                        default="energies",
                        help="what to draw: the energies (default), the ranges of the setting's "
                        "assumptions given in the environment's [scenario] section, or both "
                        "jointly; with assumptions, each is also held at its central value and "
                        "the change of the probability is reported")
    add_threshold_switch(parser)
    parser.add_argument("--no-uphill-sets", action="store_true",
                        help="skip the minimal uphill set of each infeasible draw: the verdict "
                        "alone (about three times faster)")
    add_option(parser, "h2_range", "robustness")
    add_problem_options(parser)
    add_execution_options(parser, "robustness")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..analyses.robustness import robustness
    from ..report.tables import write_table
    from ..util.files import write_json

    from ..modes import parse_modes

    report_deprecations(args)
    modes = parse_modes(args.modes)
    execution = execution_kwargs(args)
    if args.draws < 1:
        raise InputError(f"--draws {args.draws}: give at least 1")
    if args.seed < 0:
        raise InputError(f"--seed {args.seed}: give a whole number >= 0")
    folder, inputs = start_points_run(args, "robustness.jsonl")
    model, environment = inputs.model, inputs.environment
    with folder as opened:
        out = opened.staging if opened is not None else None
        with progress_for(args) as bar, solver_output_silenced():
            result = robustness(model, environment, n_draws=args.draws, seed=args.seed,
                                modes=modes, sigma_scale=args.sigma_scale,
                                threshold=not args.no_threshold,
                                uphill_sets=not args.no_uphill_sets,
                                h2_range=parse_h2_range(args.h2_range),
                                interval_width=args.interval_width or None,
                                scenario=args.scenario,
                                results_path=out / "robustness.jsonl" if out else None,
                                progress=point_progress(bar, "draws"),
                                **dict(execution, overwrite=True), **problem_kwargs(args))
        payload = dict(result.to_dict(), warnings=list(inputs.warnings))
        if result.run.interrupted:
            return interrupted(args, opened, "draws")
        if out is not None:
            for name, frame in result.frames().items():
                write_table(frame, out / f"robustness_{name}")
            write_json(out / "robustness.json", payload)
    if args.json:
        print_json(payload)
        return 0
    write = sys.stdout.write
    write(f"robustness of {model.id} at {environment.name} ({environment.conditions.describe()})\n")
    write(f"{result.n_draws} draws per mode (at most {args.draws}), seed {args.seed}, "
          f"σ × {args.sigma_scale:g}; "
          f"{result.run.executor}, {result.run.seconds:.1f} s\n\n")
    write(result.summary() + "\n\n")
    print_table(result.feasibility_frame(), "{:.3f}")
    uphill = result.uphill_frame()
    if not uphill.empty:
        write("\nminimal uphill set: how often each reaction is in it\n")
        print_table(uphill, "{:.3f}")
    if result.assumptions:
        write("\nassumptions of the setting: the probability with each drawn and held central\n")
        print_table(result.assumption_frame(), "{:.3f}")
    if not args.no_threshold:
        write(f"\nH2 threshold (mol/L; gases bar) over the draws where it exists; range searched "
              f"{args.h2_range} (h2_at_range_floor: feasible already at its bottom)\n")
        print_table(result.threshold_frame(), "{:.3g}")
    if args.out is not None:
        write(f"\nfiles in {args.out}\n")
    return 0
