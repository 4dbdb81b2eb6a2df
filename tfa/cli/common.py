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
