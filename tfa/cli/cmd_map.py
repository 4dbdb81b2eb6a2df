"""``tfa map``: feasibility, minimal-uphill-set size, max-min driving force and H2 threshold over a
grid of two conditions (temperature, pH, ionic strength, H2 supply, pressure), with heatmaps, or
along one axis (``--x`` alone), such as the mixing line of the environment's two fluids
(``--x mixing=0:1:11``), with a figure of feasibility and margins along it. A pH change moves the
gradient's outer protons with it (ΔpH kept) unless ``--fixed-outer-ph`` is given.

Axes: ``--x temperature=40:90:6`` (six values from 40 to 90 °C), ``--y h2=1e-6:1e-2:9:log``
(nine log-spaced H2 levels, mol/L; bar for a gas feed) or a list ``--y pH=6.5,7,7.5``. Points run
on the local process pool by default, on Dask with ``--scheduler``; with ``--out DIR`` each
finished point is appended to ``DIR/map.jsonl`` at once, so ``--resume`` continues an interrupted
map, and the tables and heatmaps (PNG and SVG, one per mode) are written there.
"""

from __future__ import annotations

import argparse
import sys

from ..errors import InputError
from .cmd_robustness import (add_execution_options, execution_kwargs, interrupted, point_progress,
                             problem_kwargs, start_points_run)
from .options import (add_modes_option, add_network_options, add_option, add_output_options,
                      add_problem_options, add_switch, add_threshold_switch, parse_h2_range,
                      report_deprecations)
from .output import print_json, print_table, solver_output_silenced
from .step_command import progress_for


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "map",
        help="feasibility, uphill-set size, driving force and H2 threshold over two conditions",
        description="Solve the network at every point of a grid over two of temperature (degC), "
        "pH, ionic strength (mol/L), H2 supply (mol/L) and pressure (bar); write tables and "
        "heatmaps.",
        epilog="example: tfa map --x temperature=40:90:6 --y h2=1e-6:1e-2:9:log --modes native "
        "--out runs/map",
    )
    add_network_options(parser)
    parser.add_argument("--x", required=True, metavar="AXIS",
                        help="NAME=START:STOP:COUNT[:log] or NAME=V1,V2,...; NAME one of "
                        "temperature, ph, ionic_strength, h2, pressure, mixing (share of vent "
                        "fluid on the environment's [mixing] line, 0-1)")
    parser.add_argument("--y", metavar="AXIS", help="the second axis, as --x (without it: a line "
                        "along --x)")
    add_switch(parser, "fixed_outer_ph")
    add_modes_option(parser, "map")
    add_threshold_switch(parser)
    add_option(parser, "h2_range", "map")
    parser.add_argument("--no-driving-force", action="store_true", help="skip the max-min driving force")
    add_problem_options(parser)
    add_execution_options(parser, "map")
    add_output_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..analyses.maps import AXIS_COLUMNS, axis_values, condition_map
    from ..modes import parse_modes
    from ..report.maps import write_line_figures, write_map_figures
    from ..report.tables import write_table
    from ..util.files import write_json

    report_deprecations(args)
    x = axis_values(args.x)
    y = axis_values(args.y) if args.y else None
    if y is not None and x[0] == y[0]:
        raise InputError(f"--x and --y are both {x[0]}; give two different conditions")
    modes = parse_modes(args.modes)
    execution = execution_kwargs(args)
    folder, inputs = start_points_run(args, "map.jsonl")
    model, environment = inputs.model, inputs.environment
    with folder as opened:
        out = opened.staging if opened is not None else None
        with progress_for(args) as bar, solver_output_silenced():
            result = condition_map(model, environment, x, y, modes,
                                   threshold=not args.no_threshold,
                                   driving_force=not args.no_driving_force,
                                   h2_range=parse_h2_range(args.h2_range),
                                   results_path=out / "map.jsonl" if out else None,
                                   progress=point_progress(bar, "points"),
                                   fixed_outer_ph=bool(args.fixed_outer_ph),
                                   **dict(execution, overwrite=True), **problem_kwargs(args))
        result.warnings = list(dict.fromkeys(inputs.warnings + result.warnings))
        if result.run.interrupted:
            return interrupted(args, opened, "points")
        frame = result.to_frame()
        x_column = AXIS_COLUMNS[x[0]]
        y_column = AXIS_COLUMNS[y[0]] if y is not None else None
        figures = []
        if out is not None:
            write_table(frame, out / "map")
            write_json(out / "map.json", result.to_dict())
            drawable = frame[frame["error"].isna()]
            if not drawable.empty:
                figures = (write_map_figures(frame, x_column, y_column, out) if y is not None
                           else write_line_figures(frame, x_column, out))
    if args.json:
        print_json(result.to_dict())
        return 0
    shape = f"{x[0]} × {y[0]}" if y is not None else f"along {x[0]}"
    sys.stdout.write(f"map of {model.id} at {environment.name}: {shape}, "
                     f"{len(result.records)} points; {result.run.executor}, "
                     f"{result.run.seconds:.1f} s\n\n")
    sys.stdout.write(result.summary() + "\n\n")
    columns = ["mode", x_column] + ([y_column] if y_column else []) + [
        c for c in ("temperature_C", "pH", "h2_activity") if y_column is None and c in frame.columns] + [
        "feasible", "uphill_set_size", "driving_force_kJ_per_mol", "h2_threshold",
        "h2_at_range_floor"] + [c for c in ("h2_margin_decades",) if c in frame.columns] + ["error"]
    print_table(frame[columns], "{:.4g}")
    if args.out is not None:
        sys.stdout.write(f"\nfiles in {args.out}" + (f" (heatmaps: {len(figures) // 2} per-mode "
                                                      "PNG+SVG)" if figures and y is not None else
                                                      " (figure along the line: one PNG+SVG per mode)"
                                                      if figures else "") + "\n")
    return 0
