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
    "h2-scan": "cmd_h2_scan",
    "h2-threshold": "cmd_h2_threshold",
    "ranges": "cmd_ranges",
    "driving-force": "cmd_driving_force",
    "census": "cmd_census",
    "estimate": "cmd_estimate",
    "new-network": "cmd_new_network",
    "robustness": "cmd_robustness",
    "map": "cmd_map",
}


def build_parser() -> argparse.ArgumentParser:
    """The top-level parser with every subcommand (no heavy import: ``tfa --help`` is fast)."""
    parser = argparse.ArgumentParser(
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
    """Entry point of the ``tfa`` command; returns the exit code."""
    parser = build_parser()
    args = parser.parse_args(argv)
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
    try:
        with collected_warnings(quiet, verbose):
            return int(args.run(args) or 0)
    except TfaError as err:
        print(f"tfa {args.command}: error: {err}", file=sys.stderr)
        return err.exit_code
    except KeyboardInterrupt:
        print(f"tfa {args.command}: interrupted; files already written are complete", file=sys.stderr)
        return 1
    finally:
        root.removeHandler(printer)
        root.setLevel(saved_level)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
