"""Options and output helpers shared by the subcommands."""

from __future__ import annotations

import argparse
import sys

import pandas as pd

from ..util.files import to_json


def add_common_options(parser: argparse.ArgumentParser, json_output: bool = True) -> None:
    """``--json``, ``--quiet`` and ``--verbose``, the same on every subcommand."""
    if json_output:
        parser.add_argument("--json", action="store_true", help="print one JSON object instead of text")
    parser.add_argument("-q", "--quiet", action="store_true", help="print only results and errors")
    parser.add_argument("-v", "--verbose", action="store_true", help="print progress details")


def add_conditions_options(parser: argparse.ArgumentParser) -> None:
    """Conditions of the setting; each overrides the environment file when given."""
    group = parser.add_argument_group("conditions (override the environment file)")
    group.add_argument("--temperature", type=float, metavar="C", help="temperature, degC")
    group.add_argument("--ph", type=float, metavar="X", help="pH")
    group.add_argument("--ionic-strength", type=float, metavar="I", help="ionic strength, mol/L")
    group.add_argument("--pressure", type=float, metavar="BAR", help="pressure, bar")
    group.add_argument("--pmg", type=float, metavar="X", help="pMg (free Mg2+); default: no Mg2+ binding")


def print_json(obj) -> None:
    """Print one JSON object (NaN as null)."""
    sys.stdout.write(to_json(obj) + "\n")


def print_table(frame: pd.DataFrame, float_format: str = "{:.2f}") -> None:
    """Print a table readably on the terminal."""
    with pd.option_context("display.max_rows", None, "display.max_columns", None, "display.width", 160):
        text = frame.to_string(index=False, float_format=lambda v: float_format.format(v))
    sys.stdout.write(text + "\n")


# ------------------------------------------------------------------ network, environment, problem
def add_network_options(parser: argparse.ArgumentParser) -> None:
    """NETWORK, ``--environment``, ``--compounds`` and the condition overrides."""
    parser.add_argument("network", metavar="NETWORK", nargs="?",
                        help="reactions table (.tsv/.csv), a folder with one, or SBML/JSON; "
                        "default: the bundled network")
    parser.add_argument("--environment", metavar="FILE",
                        help="environment file (TOML); default: environment.toml beside the network, "
                        "else the bundled one")
    parser.add_argument("--compounds", metavar="FILE",
                        help="compounds table, when it is not compounds.tsv beside the reactions table")
    add_conditions_options(parser)


def add_problem_options(parser: argparse.ArgumentParser, mode: bool = True) -> None:
    """``--mode``, ``--solver``, ``--k-sigma``, ``--min-driving-force``, ``--unknown-energy``,
    ``--time-limit`` and ``--include-unreviewed``."""
    from ..network.thermo_model import MODES

    group = parser.add_argument_group("problem")
    if mode:
        group.add_argument("--mode", default="native", choices=MODES,
                           help="how the network is asked to run (default native)")
    group.add_argument("--solver", choices=("highs", "glpk"), help="MILP solver (default: the measured best available)")
    group.add_argument("--k-sigma", type=float, default=0.0, metavar="K",
                       help="let each reaction energy move by K standard uncertainties (default 0)")
    group.add_argument("--min-driving-force", type=float, metavar="KJ",
                       help="least driving force of a reaction carrying flux, kJ/mol (default 0.1)")
    group.add_argument("--unknown-energy", choices=("free", "block"), default="free",
                       help="reactions without an energy: carry flux freely (default) or not at all")
    group.add_argument("--time-limit", type=float, metavar="S",
                       help="seconds per solve (default 300); hitting it gives exit code 1")
    group.add_argument("--include-unreviewed", action="store_true",
                       help="also use data from sources that are not peer reviewed")


def add_out_option(parser: argparse.ArgumentParser, default: str | None = None) -> None:
    """``--out DIR``: folder for the tables (CSV + JSON) and figures."""
    parser.add_argument("--out", metavar="DIR", default=default,
                        help="folder for the tables (CSV and JSON) and figures"
                        + (f" (default {default})" if default else "; default: write no files"))


def condition_overrides(args: argparse.Namespace) -> dict:
    """Condition options given on the command line, as ``Environment.with_conditions`` keys."""
    out = {}
    for option, key in (("temperature", "celsius"), ("ph", "ph"), ("ionic_strength", "ionic_strength"),
                        ("pressure", "pressure"), ("pmg", "pmg")):
        value = getattr(args, option, None)
        if value is not None:
            out[key] = value
    return out


def load_inputs(args: argparse.Namespace, require_balanced: bool = True):
    """The network and environment named on the command line (see :func:`tfa.api.resolve_inputs`)."""
    from ..api import resolve_inputs

    return resolve_inputs(getattr(args, "network", None), getattr(args, "environment", None),
                          getattr(args, "compounds", None), require_balanced=require_balanced,
                          **condition_overrides(args))


def problem_options(args: argparse.Namespace):
    """:class:`tfa.problem.builder.ProblemOptions` from the problem options."""
    from ..problem.builder import ProblemOptions

    kwargs = {"solver": args.solver, "uncertainty_k": args.k_sigma,
              "unknown_energy": args.unknown_energy}
    if args.min_driving_force is not None:
        kwargs["min_driving_force"] = args.min_driving_force
    if args.time_limit is not None:
        kwargs["time_limit"] = args.time_limit
    return ProblemOptions(**kwargs)


def thermo_model(args: argparse.Namespace, inputs=None, mode: str | None = None):
    """(inputs, ThermoModel) of the network in ``mode`` (default ``args.mode``)."""
    from ..network.energies import prepare
    from ..thermo.database import ThermoDatabase

    inputs = inputs or load_inputs(args)
    db = ThermoDatabase.load(include_unreviewed=getattr(args, "include_unreviewed", False))
    return inputs, prepare(inputs.model, inputs.environment, mode or args.mode, db=db)


def check_out(args: argparse.Namespace) -> None:
    """Refuse an ``--out`` that exists and is not a folder (before anything is computed)."""
    from pathlib import Path

    from ..errors import InputError

    out = getattr(args, "out", None)
    if out and Path(out).exists() and not Path(out).is_dir():
        raise InputError(f"--out {out}: exists and is not a folder; give a folder")


def write_tables(out, tables: dict) -> list:
    """Write each table as ``<out>/<name>.csv`` and ``.json`` (atomically); returns the paths."""
    from pathlib import Path

    from ..report.tables import write_table

    written = []
    for name, frame in tables.items():
        written.extend(write_table(frame, Path(out) / name))
    return written


def print_header(what: str, inputs, conditions) -> None:
    """First line of a text answer: what, which network, which setting."""
    sys.stdout.write(f"{what}: {inputs.model.id} at {inputs.environment.name} "
                     f"({conditions.describe()})\n")


class solver_output_silenced:
    """Context manager: while the analyses run, anything written to the process's standard output
    by compiled solver libraries (e.g. the banner a HiGHS instance prints when created) goes to
    /dev/null, so that stdout carries only the answer (and ``--json`` stays valid JSON)."""

    def __enter__(self) -> "solver_output_silenced":
        import os

        sys.stdout.flush()
        try:
            self._saved = os.dup(1)
        except OSError:  # no file descriptor 1 (embedded use): nothing to silence
            self._saved = None
            return self
        self._null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(self._null, 1)
        return self

    def __exit__(self, *exc) -> None:
        import os

        if self._saved is None:
            return
        sys.stdout.flush()
        os.dup2(self._saved, 1)
        os.close(self._saved)
        os.close(self._null)
