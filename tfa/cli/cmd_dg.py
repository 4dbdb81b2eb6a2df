"""``tfa dg``: transformed Gibbs energy of one reaction at given conditions.

Prints ΔrG'° and ΔrG' (kJ/mol) with their standard uncertainty, the balance, the status of the
data (reviewed species data, recalled value, ...), the open audit disagreements that touch it,
the sources and the provenance of every compound. The energies come from the reaction library
(:class:`tfa.thermo.library.ReactionLibrary`: species data and the literature values of
``tfa/data``, reconciled, so acetyl-CoA, the THF carriers, acyl phosphates, PEP and the sugar
phosphates are there), or with ``--network`` from a network's own data. Bad input (unknown
compound, unbalanced equation, bad activity) prints an error on stderr only and exits with
code 2; a reaction the data do not fix exits with code 1.
"""

from __future__ import annotations

import argparse
import sys
from typing import TYPE_CHECKING

from ..conditions import Conditions
from ..errors import InputError
from .options import add_conditions_options, add_option, add_output_options, add_unreviewed_option
from .output import print_json

if TYPE_CHECKING:
    from ..thermo.database import ReactionEnergyResult

#: Conditions used when an option is not given.
DEFAULTS = {"temperature": 25.0, "ph": 7.0, "ionic_strength": 0.0}


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "dg",
        help="transformed Gibbs energy of a reaction (ΔrG'°, ΔrG', uncertainty, balance, sources)",
        description="Transformed reaction Gibbs energy at the given temperature, pH, ionic "
        "strength, pMg and pressure, from species data and the literature reaction values of "
        "the library (reconciled: acetyl-CoA, CoA, THF carriers, acyl phosphates, PEP, sugar "
        "phosphates). Compounds are named by id, name or synonym (case does not matter): CO2 "
        "is dissolved CO2, CO2(g) the gas and CO2tot total CO2 (it carries one water); "
        "ferredoxin is the pair Fd_ox/Fd_red per two electrons ('Fd' and 'ferredoxin' name the "
        "oxidised form, 'Fd2-' the reduced one); S0 is solid sulfur. Arrows: <=>, =, ->. The "
        "output says how far the data were checked (status) and names every open audit "
        "disagreement that touches the reaction (tfa audit lists them all).",
        epilog='example: tfa dg "H2 + CO2tot <=> formate + H2O" --temperature 70 --ph 6.5 '
        "--ionic-strength 0.2 --activity H2=1e-3",
    )
    parser.add_argument("equation", metavar="EQUATION", help='e.g. "4 H2(g) + CO2(g) <=> CH4(g) + 2 H2O"')
    add_conditions_options(parser)
    parser.add_argument("--activity", action="append", default=[], metavar="NAME=VALUE",
                        help="activity of a compound for ΔrG' (mol/L; gases: bar); repeatable. "
                        "Compounds not given are at 1 (standard state)")
    add_unreviewed_option(parser)
    add_option(parser, "network_data")
    add_output_options(parser)
    parser.set_defaults(run=run)


def parse_activities(items: list[str]) -> dict[str, float]:
    """``["H2=1e-3", "formate=0.01"]`` -> ``{"H2": 0.001, "formate": 0.01}``.

    >>> parse_activities(["H2(g)=1e-3", "acetyl phosphate = 2e-4"])
    {'H2(g)': 0.001, 'acetyl phosphate': 0.0002}
    """
    out: dict[str, float] = {}
    for item in items:
        name, sep, value = item.rpartition("=")
        name = name.strip()
        if not sep or not name:
            raise InputError(f"--activity '{item}': write NAME=VALUE, e.g. --activity H2=1e-3")
        try:
            out[name] = float(value)
        except ValueError:
            raise InputError(f"--activity '{item}': '{value.strip()}' is not a number; write "
                             "NAME=VALUE, e.g. --activity H2=1e-3") from None
    return out


def _conditions(args: argparse.Namespace) -> tuple[Conditions, list[str]]:
    defaulted = []
    values = {}
    for key, default in DEFAULTS.items():
        given = getattr(args, key)
        if given is None:
            defaulted.append(f"{key.replace('_', ' ')} {default:g}")
            given = default
        values[key] = given
    conditions = Conditions.from_celsius(values["temperature"], ph=values["ph"],
                                         ionic_strength=values["ionic_strength"],
                                         pressure=args.pressure, pmg=args.pmg)
    return conditions, defaulted


def _text(result: "ReactionEnergyResult", defaulted: list[str], database=None) -> str:
    from ..network.standard_states import gas_state_of_key

    states = {}
    for key in result.activities:
        state = gas_state_of_key(str(key), database) if database is not None else ""
        if state:
            states.setdefault(state, []).append(str(key))
    lines = [
        f"reaction    {result.equation}",
        f"conditions  {result.conditions.describe()}"
        + (f"  (default: {', '.join(defaulted)})" if defaulted else ""),
        f"ΔrG'°       {result.standard:9.2f} ± {result.uncertainty:.2f} kJ/mol  (standard transformed)",
        f"ΔrG'        {result.actual:9.2f} ± {result.uncertainty:.2f} kJ/mol  (at the activities below)",
        "activities  " + (", ".join(f"{k}={v:g}" for k, v in result.activities.items()) or "none"),
    ] + ([f"standard    " + "; ".join(f"{', '.join(keys)} {state}" for state, keys in states.items())
          + " (ΔrG'° refers to these states)"] if states else []) + [
        f"balance     {result.balance.message}",
        f"status      {result.status}",
        f"sources     {', '.join(result.sources) or 'none'}",
        "provenance",
    ]
    lines += [f"  {line}" for line in result.provenance]
    if result.audit_flags:
        lines.append("audit (open disagreements that touch this reaction; tfa audit lists all)")
        lines += [f"  {flag}" for flag in result.audit_flags]
    if result.flags:
        lines.append("flags")
        lines += [f"  {flag}" for flag in result.flags]
    return "\n".join(lines) + "\n"


def run(args: argparse.Namespace) -> int:
    conditions, defaulted = _conditions(args)
    activities = parse_activities(args.activity)
    from ..thermo.database import ThermoDatabase

    db = ThermoDatabase.load(include_unreviewed=args.include_unreviewed)
    if args.network_data:
        from ..network.energies import network_reaction_energy
        from .step_command import load_inputs

        inputs = load_inputs(argparse.Namespace(network=args.network_data), require_balanced=False)
        result = network_reaction_energy(inputs.model, conditions, args.equation, activities, db,
                                         compartments=inputs.environment.compartments)
    else:
        from ..thermo.library import ReactionLibrary

        library = ReactionLibrary.load(include_unreviewed=args.include_unreviewed)
        result = library.reaction_energy(args.equation, conditions, activities=activities)
    if args.json:
        payload = result.to_dict()
        payload["defaults"] = defaulted
        payload["include_unreviewed"] = bool(args.include_unreviewed)
        payload["network"] = args.network_data
        print_json(payload)
    else:
        sys.stdout.write(_text(result, defaulted, db))
    return 0
