"""The command line's options, each defined once: the same name, default and help wherever it
appears (the shared ones come from :data:`tfa.vocabulary.OPTIONS`), and the old spellings kept
for one release with a deprecation message.

Nothing here imports cobra, optlang, RDKit or matplotlib: ``tfa --help`` stays fast.
"""

from __future__ import annotations

import argparse
import sys
from typing import Any, Callable

from ..errors import InputError
from ..modes import MODES
from ..util import numbers
from ..vocabulary import OPTIONS


class OneLineParser(argparse.ArgumentParser):
    """An argument parser whose errors are one line on stderr (exit code 2), naming the command
    and where its help is: ``tfa map: error: argument --x: ... (see tfa map --help)``."""

    def error(self, message: str):  # noqa: D401 - argparse's name
        sys.stderr.write(f"{self.prog}: error: {message} (see {self.prog} --help)\n")
        sys.exit(2)


def gated(**bounds: Any) -> Callable[[str], float]:
    """An argparse ``type`` that reads a value through :func:`tfa.util.numbers.read_number`
    (``count=True``: a whole number through :func:`~tfa.util.numbers.read_count`)."""
    count = bounds.pop("count", False)

    def read(text: str):
        try:
            if count:
                return numbers.read_count(text, "value", **bounds)
            return numbers.read_number(text, "value", **bounds)
        except InputError as err:
            raise argparse.ArgumentTypeError(str(err)) from None

    read.__name__ = "number"
    return read


#: The type of each shared option that takes a number: the caps of :mod:`tfa.util.numbers`.
OPTION_TYPES: dict[str, Callable[[str], Any]] = {
    "alternatives": gated(count=True, maximum=numbers.MAX_ALTERNATIVES),
    "draws": gated(count=True, minimum=0, maximum=numbers.MAX_DRAWS),
    "interval_width": gated(minimum=0.0, maximum=1.0),
    "seed": gated(count=True, minimum=0, maximum=numbers.MAX_SEED),
    "h2_levels": gated(count=True, maximum=numbers.MAX_H2_LEVELS),
}

#: Commands whose default for a shared option differs from the vocabulary's, and why.
COMMAND_DEFAULTS: dict[str, dict[str, Any]] = {
    # the assessment writes its files by default; the single analyses only print
    "out": {"assess": "tfa-results"},
    # the assessment runs a small robustness check; tfa robustness a real one
    "draws": {"assess": 40, "robustness": 100},   # assess: ASSESSMENT_DRAWS of tfa.assessment
    # the assessment stops at a wider interval (its draws are a first look)
    "interval_width": {"assess": 0.3},
}


def add_option(parser: argparse.ArgumentParser | Any, name: str, command: str = "",
               **overrides: Any) -> None:
    """Add the shared option ``name`` of :data:`tfa.vocabulary.OPTIONS` to a parser or group.

    ``command`` picks a default from :data:`COMMAND_DEFAULTS`; ``overrides`` may set ``type``.
    """
    spec = OPTIONS[name]
    default = COMMAND_DEFAULTS.get(name, {}).get(command, spec.default)
    text = spec.help
    if name in COMMAND_DEFAULTS and command in COMMAND_DEFAULTS[name]:
        text = COMMAND_SPECIFIC_HELP[name]
    kwargs: dict[str, Any] = {"dest": name, "default": default, "metavar": spec.metavar,
                              "help": text}
    kwargs.update(overrides)
    if name in OPTION_TYPES:
        kwargs["type"] = OPTION_TYPES[name]
    parser.add_argument(*spec.flags, **kwargs)


#: Help of a shared option where its default differs by command (see COMMAND_DEFAULTS).
COMMAND_SPECIFIC_HELP = {
    "out": "folder for the tables (CSV and JSON), figures and report (default %(default)s)",
    "draws": "draws of the energies per mode, at most (default %(default)s; 0 skips)",
    "interval_width": "draw until every 95 %% Wilson interval of a probability is at most W wide, "
                      "or --draws are made (0: exactly --draws; default %(default)s)",
}


class Deprecated(argparse.Action):
    """An old spelling of an option: stores into the new option's destination (through
    ``convert``) and records a deprecation message, printed when the command runs."""

    def __init__(self, option_strings, dest, new: str = "", convert: Callable | None = None,
                 **kwargs):
        self.new = new
        self.convert = convert
        super().__init__(option_strings, dest, help=argparse.SUPPRESS, **kwargs)

    def __call__(self, parser, namespace, values, option_string=None):
        changes = self.convert(values) if self.convert else {self.dest: values}
        for dest, value in changes.items():
            setattr(namespace, dest, value)
        notes = list(getattr(namespace, "deprecations", []) or [])
        notes.append(f"{option_string} is deprecated and will be removed; use {self.new}")
        namespace.deprecations = notes


def add_deprecated(parser: argparse.ArgumentParser, flag: str, new: str, dest: str,
                   convert: Callable | None = None, nargs: Any = None) -> None:
    """Keep ``flag`` working as an alias of ``new`` (hidden from the help)."""
    kwargs: dict[str, Any] = {"new": new, "convert": convert}
    if nargs is not None:
        kwargs["nargs"] = nargs
    parser.add_argument(flag, dest=dest, action=Deprecated, **kwargs)


def report_deprecations(args: argparse.Namespace) -> None:
    """Print the deprecation messages of the options used (on stderr)."""
    for text in getattr(args, "deprecations", []) or []:
        sys.stderr.write(f"tfa {args.command}: {text}\n")


# ------------------------------------------------------------------ groups of options
def add_output_options(parser: argparse.ArgumentParser, json_output: bool = True) -> None:
    """``--json``, ``--quiet`` and ``--verbose``, the same on every command."""
    if json_output:
        parser.add_argument("--json", action="store_true", help="print one JSON object instead of text")
    parser.add_argument("-q", "--quiet", action="store_true", help="print only results and errors")
    parser.add_argument("-v", "--verbose", action="store_true", help="print progress details")


def add_conditions_options(parser: argparse.ArgumentParser) -> None:
    """Conditions of the setting; each overrides the environment file when given."""
    group = parser.add_argument_group("conditions (override the environment file)")
    number = gated()
    group.add_argument("--temperature", type=number, metavar="C",
                       help="temperature, degC (0-300; water must be liquid at the pressure)")
    group.add_argument("--ph", type=number, metavar="X", help="pH (0-14)")
    group.add_argument("--ionic-strength", type=number, metavar="I",
                       help="ionic strength, mol/L (0-10)")
    group.add_argument("--pressure", type=number, metavar="BAR",
                       help="pressure, bar (1-5000; above 100 degC at least the boiling pressure)")
    group.add_argument("--pmg", type=number, metavar="X", help="pMg (free Mg2+); default: no Mg2+ binding")
    add_switch(group, "loose_cofactors")


def add_switch(parser: argparse.ArgumentParser | Any, name: str) -> None:
    """Add the shared on/off option ``name`` of :data:`tfa.vocabulary.OPTIONS` (store_true)."""
    spec = OPTIONS[name]
    parser.add_argument(*spec.flags, dest=name, action="store_true", default=bool(spec.default),
                        help=spec.help)


def add_network_options(parser: argparse.ArgumentParser) -> None:
    """NETWORK, ``--environment``, ``--compounds``, ``--identifiers``, ``--h2``, ``--demand``, the
    condition overrides and ``--include-unreviewed``."""
    parser.add_argument("network", metavar="NETWORK", nargs="?",
                        help="reactions table (.tsv/.csv), a folder with one, or SBML/JSON; "
                        "default: the bundled network")
    parser.add_argument("--environment", metavar="FILE",
                        help="environment file (TOML); default: environment.toml beside the network, "
                        "else a neutral default built from the network (the bundled network: its own)")
    parser.add_argument("--compounds", metavar="FILE",
                        help="compounds table, when it is not compounds.tsv beside the reactions table")
    for name in ("identifiers", "h2", "demand"):
        add_option(parser, name)
    add_unreviewed_option(parser)
    add_conditions_options(parser)


def add_unreviewed_option(parser: argparse.ArgumentParser) -> None:
    """``--include-unreviewed``: data of sources that are not peer reviewed too."""
    parser.add_argument("--include-unreviewed", action="store_true",
                        help="also use data from sources that are not peer reviewed")


def add_threshold_switch(parser: argparse.ArgumentParser) -> None:
    """``--no-threshold``: skip the H2 threshold at every point of a many-point run."""
    parser.add_argument("--no-threshold", action="store_true",
                        help="skip the H2 threshold of each point (faster)")


def add_problem_options(parser: argparse.ArgumentParser) -> None:
    """``--solver``, ``--k-sigma``, ``--min-driving-force``, ``--unknown-energy``,
    ``--time-limit``."""
    group = parser.add_argument_group("problem")
    group.add_argument("--solver", choices=("highs", "glpk"),
                       help="MILP solver (default: the measured best available)")
    group.add_argument("--k-sigma", type=gated(minimum=0.0, maximum=numbers.MAX_K_SIGMA),
                       default=0.0, metavar="K",
                       help="let the energies move by K standard uncertainties in total, in "
                       "compound space: the formation energies' sources (species data, reaction "
                       "values, groups) together by at most K of their σ, so identities and loops "
                       f"stay consistent (0-{numbers.MAX_K_SIGMA:g}; default 0)")
    group.add_argument("--min-driving-force", metavar="KJ",
                       type=gated(minimum=0.0, maximum=numbers.MAX_DRIVING_FORCE),
                       help="least driving force of a reaction carrying flux, kJ/mol (default 0.1)")
    group.add_argument("--unknown-energy", choices=("free", "block"), default="free",
                       help="reactions without an energy: carry flux freely (default) or not at all")
    group.add_argument("--time-limit", metavar="S",
                       type=gated(above=0.0, maximum=numbers.MAX_TIME_LIMIT),
                       help="seconds per solve (default 300, at most "
                       f"{numbers.MAX_TIME_LIMIT:g}); an answer stopped by it is 'undetermined' "
                       "and gives exit code 1")


def add_modes_option(parser: argparse.ArgumentParser, command: str = "") -> None:
    """``--modes LIST`` (the per-mode questions)."""
    add_option(parser, "modes", command)


def add_mode_option(parser: argparse.ArgumentParser, command: str = "") -> None:
    """``--mode MODE`` (the single-mode analyses), checked against :data:`tfa.modes.MODES`."""
    add_option(parser, "mode", command, choices=list(MODES))


def add_h2_options(parser: argparse.ArgumentParser, levels: bool, command: str = "") -> None:
    """``--h2-range`` and (for the scan) ``--h2-levels``, with the old spellings."""
    add_option(parser, "h2_range", command)
    if levels:
        add_option(parser, "h2_levels", command)
        add_deprecated(parser, "--levels", "--h2-range LOW:HIGH --h2-levels N", "h2_range",
                       convert=_old_levels)
    else:
        add_deprecated(parser, "--range", "--h2-range LOW:HIGH", "h2_range")


def _old_levels(text: str) -> dict[str, Any]:
    """``--levels LOW:HIGH:N`` or ``V1,V2,...`` -> the new options."""
    if ":" in text:
        parts = text.split(":")
        if len(parts) != 3:
            raise InputError(f"--levels '{text}': write LOW:HIGH:N")
        try:
            count = int(parts[2])
        except ValueError:
            raise InputError(f"--levels '{text}': N must be a whole number") from None
        return {"h2_range": f"{parts[0]}:{parts[1]}", "h2_levels": count}
    return {"h2_values": [parse_positive(v, "--levels") for v in text.split(",") if v.strip()]}


# ------------------------------------------------------------------ parsing values
def parse_positive(text: str, option: str) -> float:
    """An activity (mol/L; gases bar) within the caps, or an InputError naming the option."""
    return numbers.read_activity(text, option)


def parse_h2_range(text: str) -> tuple[float, float]:
    """``LOW:HIGH`` -> (low, high), both positive, low < high.

    >>> parse_h2_range("1e-9:1e-2")
    (1e-09, 0.01)
    """
    parts = str(text).split(":")
    if len(parts) != 2:
        raise InputError(f"--h2-range '{text}': write LOW:HIGH, e.g. 1e-9:1e-2 (mol/L; gas: bar)")
    low, high = (parse_positive(p, "--h2-range") for p in parts)
    if not low < high:
        raise InputError(f"--h2-range '{text}': need 0 < LOW < HIGH (mol/L; gas: bar)")
    return low, high


def parse_workers(value: Any) -> int:
    """``--workers``: a whole number >= 1, or ``auto`` (one per core).

    >>> parse_workers("3")
    3
    """
    if str(value).strip().lower() == "auto":
        from ..util.points import available_cores

        return available_cores()
    try:
        return numbers.read_count(value, "--workers", maximum=numbers.MAX_WORKERS)
    except InputError as err:
        raise InputError(f"{err} (or auto)") from None


def parse_list(text: str | None) -> list[str] | None:
    """``"a, b,c"`` -> ``["a", "b", "c"]``; None stays None."""
    if text is None:
        return None
    return [item.strip() for item in str(text).split(",") if item.strip()]


def condition_overrides(args: argparse.Namespace) -> dict:
    """Condition options given on the command line, as ``Environment.with_conditions`` keys."""
    out = {}
    for option, key in (("temperature", "celsius"), ("ph", "ph"), ("ionic_strength", "ionic_strength"),
                        ("pressure", "pressure"), ("pmg", "pmg")):
        value = getattr(args, option, None)
        if value is not None:
            out[key] = value
    return out
