"""``tfa feasible``: can the network run with every reaction downhill, in each mode?

Per mode: feasible or not; when not, the minimal uphill set as the diagnosis (or the plain-words
reason when even the stoichiometry cannot meet the demand). ``--out DIR`` writes
``feasibility.csv/.json`` and ``uphill_sets.csv/.json``.
"""

from __future__ import annotations

import argparse
import sys

from .common import (add_common_options, add_network_options, add_out_option, add_problem_options,
                     check_out, load_inputs, print_header, print_json, print_table, problem_options,
                     solver_output_silenced, write_tables)
from .progress import progress_for


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "feasible",
        help="is there a steady state with every reaction downhill, per mode (with the diagnosis)",
        description="Feasibility of the network in each mode: a steady state meeting the demand "
        "with every reaction that carries flux running downhill. Infeasible modes get the "
        "minimal uphill set as their diagnosis.",
        epilog="example: tfa feasible --modes native,no_atp_bare --json",
    )
    add_network_options(parser)
    parser.add_argument("--modes", default="all", metavar="LIST",
                        help="comma-separated modes (native, h2_only, no_atp_strict, no_atp_bare) or "
                        "'all' (default)")
    parser.add_argument("--alternatives", type=int, default=1, metavar="N",
                        help="alternative minimal uphill sets per infeasible mode (default 1)")
    add_problem_options(parser, mode=False)
    add_out_option(parser)
    add_common_options(parser)
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    import pandas as pd

    from ..api import _feasibility
    from ..errors import InputError
    from ..network.energies import prepare
    from ..thermo.database import ThermoDatabase
    from .cmd_robustness import parse_modes

    modes = parse_modes(args.modes)
    if args.alternatives < 1:
        raise InputError(f"--alternatives {args.alternatives}: give at least 1")
    check_out(args)
    options = problem_options(args)
    inputs = load_inputs(args)
    db = ThermoDatabase.load(include_unreviewed=args.include_unreviewed)
    results = {}
    with progress_for(args, total=len(modes)) as bar, solver_output_silenced():
        for k, mode in enumerate(modes):
            bar(f"feasibility: {mode}", k, len(modes))
            tm = prepare(inputs.model, inputs.environment, mode, db=db)
            results[mode] = _feasibility(tm, options, args.alternatives)
    conditions = next(iter(results.values())).conditions
    table = pd.DataFrame([{"mode": m, "feasible": r.feasible,
                           "uphill_set_size": r.diagnosis.size if r.diagnosis is not None else
                           (0 if r.feasible else None),
                           "demand_impossible": r.demand_impossible, "message": r.message}
                          for m, r in results.items()])
    rows = [{"mode": m, **row} for m, r in results.items() if r.diagnosis is not None
            for row in r.diagnosis.to_frame().to_dict(orient="records")]
    sets = pd.DataFrame(rows, columns=["mode", "set", "reaction", "direction", "uphill_by_kJ"])
    if args.out:
        write_tables(args.out, {"feasibility": table, "uphill_sets": sets})
    if args.json:
        print_json({"network": inputs.model.id, "environment": inputs.environment.name,
                    "conditions": conditions.to_dict(),
                    "feasibility": table.to_dict(orient="records"),
                    "uphill_sets": sets.to_dict(orient="records")})
        return 0
    print_header("feasibility", inputs, conditions)
    for m, r in results.items():
        sys.stdout.write(f"{m}: {r.message}\n")
    sys.stdout.write("\n")
    print_table(table.drop(columns=["message"]))
    return 0
