"""The ``tfa`` command line.

Each subcommand lives in its own module ``tfa/cli/cmd_<name>.py`` that defines
``register(subparsers)``: it adds its parser and sets ``run=`` to a function taking the parsed
arguments and returning an exit code. Exit codes: 0 done, 1 the question's answer could not be
computed, 2 bad input.
"""

from __future__ import annotations

import argparse
import importlib
import logging
import sys

from ..errors import TfaError

#: Subcommands in the order ``tfa --help`` lists them, with the module that implements each.
COMMANDS: dict[str, str] = {
    "assess": "cmd_assess",
    "dg": "cmd_dg",
    "audit": "cmd_audit",
    "inspect": "cmd_inspect",
    "feasible": "cmd_feasible",
    "uphill": "cmd_uphill",
    "precursors": "cmd_precursors",
    "h2-scan": "cmd_h2_scan",
    "h2-threshold": "cmd_h2_threshold",
    "ranges": "cmd_ranges",
    "driving-force": "cmd_driving_force",
    "census": "cmd_census",
    "gradient": "cmd_gradient",
    "estimate": "cmd_estimate",
    "new-network": "cmd_new_network",
    "robustness": "cmd_robustness",
    "map": "cmd_map",
    "couplings": "cmd_couplings",
    "currencies": "cmd_currencies",
    "compare": "cmd_compare",
}


def build_parser() -> argparse.ArgumentParser:
    """The top-level parser with every subcommand (no heavy import: ``tfa --help`` is fast)."""
    from .options import OneLineParser

    parser = OneLineParser(
        prog="tfa",
        description="Thermodynamic feasibility of ancestral, H2-fed reaction networks at the "
        "conditions of a hydrothermal setting.",
    )
    from .. import __version__

    parser.add_argument("--version", action="version", version=f"tfa {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for module_name in COMMANDS.values():
        importlib.import_module(f".{module_name}", __name__).register(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    """Entry point of the ``tfa`` command; returns the exit code.

    Every error the user can cause ends in one line on stderr and exit code 2; an answer that
    could not be computed (a solver stopped by the time limit: "undetermined") in exit code 1; a
    reader of standard output that went away (``tfa ... | head -1``) ends the command quietly.
    """
    from .output import prepare_streams, quiet_broken_pipe

    prepare_streams()
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as stop:  # --help, --version, or a one-line usage error (exit code 2)
        return stop.code if isinstance(stop.code, int) else 2
    if not getattr(args, "command", None):
        parser.print_help()
        return 2
    from .warnings_table import BelowWarnings, collected_warnings

    quiet, verbose = bool(getattr(args, "quiet", False)), bool(getattr(args, "verbose", False))
    level = logging.ERROR if quiet else logging.INFO if verbose else logging.WARNING
    root = logging.getLogger()
    saved_level = root.level
    root.setLevel(level)
    printer = logging.StreamHandler()   # info (verbose) and errors; warnings go to one table
    printer.setFormatter(logging.Formatter("%(levelname)s: %(message)s"))
    printer.addFilter(BelowWarnings())
    root.addHandler(printer)
    # cobra's own remarks on reading a model ("no objective coefficients") only with -v
    logging.getLogger("cobra").setLevel(level if level == logging.INFO else logging.CRITICAL)
    name = f"tfa {args.command}"
    try:
        with collected_warnings(quiet, verbose):
            code = int(args.run(args) or 0)
        sys.stdout.flush()
        return code
    except TfaError as err:
        sys.stderr.write(f"{name}: error: {_one_line(str(err))}\n")
        return err.exit_code
    except KeyboardInterrupt:
        sys.stderr.write(f"{name}: interrupted; no output folder was changed\n")
        return 1
    except BrokenPipeError:
        quiet_broken_pipe()
        return 1
    finally:
        root.removeHandler(printer)
        root.setLevel(saved_level)


def _one_line(text: str) -> str:
    return " ".join(text.split())


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
