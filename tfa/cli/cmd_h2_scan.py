"""``tfa h2-scan``: feasibility, max-min driving force and minimal-uphill-set size at each level
of H2 supply (mol/L dissolved; bar when H2 is fed as a gas). ``--out DIR`` writes
``h2_scan.csv/.json`` and the figure ``h2_scan.png/.svg``.
"""

from __future__ import annotations

import argparse
import sys

import numpy as np

from ..errors import InputError
from .common import (add_common_options, add_network_options, add_out_option, add_problem_options,
                     check_out, print_header, print_json, print_table, problem_options,
                     solver_output_silenced, thermo_model, write_tables)
from .progress import progress_for


def parse_levels(text: str) -> list[float]:
    """``LOW:HIGH:N`` (N log-spaced levels) or ``V1,V2,...`` -> levels.

    >>> parse_levels("1e-6:1e-3:4")
    [1e-06, 1e-05, 0.0001, 0.001]
    >>> parse_levels("1e-5, 1e-3")
    [1e-05, 0.001]
    """
    try:
        if ":" in text:
            low, high, count = text.split(":")
            n = int(count)
            if n < 1 or float(low) <= 0 or float(high) <= 0:
                raise ValueError
            return [float(f"{v:.12g}") for v in np.logspace(np.log10(float(low)), np.log10(float(high)), n)]
        values = [float(v) for v in text.split(",") if v.strip()]
    except ValueError:
        raise InputError(f"--levels '{text}': write LOW:HIGH:N (N log-spaced levels, e.g. "
                         "1e-9:1e-2:8) or a list V1,V2,... of positive numbers") from None
    if not values or any(not (np.isfinite(v) and v > 0) for v in values):
        raise InputError(f"--levels '{text}': every level must be a positive number (mol/L; gas: bar)")
    return values


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "h2-scan",
        help="feasibility, driving force and uphill-set size against the H2 supply",
        description="Scan the H2 supply: at each level, is the network feasible, what is its "
        "max-min driving force, and how many steps must be driven uphill.",
        epilog="example: tfa h2-scan --levels 1e-9:1e-2:15 --out runs/scan",
    )
    add_network_options(parser)
    parser.add_argument("--levels", default="1e-12:1e-2:11", metavar="LOW:HIGH:N",
                        help="H2 levels: LOW:HIGH:N log-spaced, or V1,V2,... (mol/L; gas feed: bar; "
                        "default %(default)s)")
    parser.add_argument("--no-uphill", action="store_true",
                        help="skip the minimal-uphill-set size at infeasible levels (faster)")
    add_problem_options(parser)
    add_out_option(parser)
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from ..analyses.hydrogen import h2_scan
    from ..api import _h2_unit, h2_scan_for_figure
    from ..thermo.database import ThermoDatabase

    levels = parse_levels(args.levels)
    check_out(args)
    options = problem_options(args)
    with progress_for(args, total=2) as bar, solver_output_silenced():
        bar("reading the network", 0, 2)
        inputs, tm = thermo_model(args)
        bar(f"H2 scan ({len(levels)} levels)", 1, 2)
        result = h2_scan(tm, levels, options, with_uphill=not args.no_uphill)
    unit = _h2_unit(tm, ThermoDatabase.load())
    table = result.to_frame()
    if args.out:
        from ..report.figures import h2_scan_figure, save_figure

        write_tables(args.out, {"h2_scan": table})
        save_figure(h2_scan_figure(h2_scan_for_figure(table), unit=unit,
                                   title=f"H2 supply, {tm.mode} mode"), Path(args.out) / "h2_scan")
    if args.json:
        print_json({**result.to_dict(), "mode": tm.mode, "h2_compound": result.h2_id, "unit": unit})
        return 0
    print_header(f"H2 scan ({tm.mode})", inputs, tm.conditions)
    sys.stdout.write(result.summary() + f" ({unit})\n\n")
    print_table(table.drop(columns=["ln_h2"]), "{:.3g}")
    return 0
