"""``tfa inspect``: balance status, data coverage and the energy of every reaction of a network.

NETWORK is a reactions table (``.tsv``/``.csv``, with ``compounds.tsv`` beside it and optionally
``reaction_values.tsv`` and ``environment.toml``), a folder holding them, or an SBML/JSON file.
With no NETWORK the bundled network and its environment (the Kestrel Ridge vent field) are used.
The environment is ``--environment FILE``, else ``environment.toml`` beside the network, else a
neutral default built from the network. Nothing is written to disk.

The one checker: every check the analyses make on their inputs runs here too
(:mod:`tfa.assessment.input_check`), so an input error that ``tfa feasible`` would meet is
reported with the same message, naming the file and line; the report is printed first, then the
errors, and the exit code is 2. Warnings alone leave it 0.
"""

from __future__ import annotations

import argparse
import math
import sys

from .options import add_network_options, add_output_options
from .output import print_json, print_table

#: Provenance text is cut to this many characters in the text output (JSON keeps all of it).
PROVENANCE_WIDTH = 70


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "inspect",
        help="balance, data coverage and ΔrG'° of every reaction of a network at an environment",
        description="Check a network: is every reaction balanced, where does each reaction's "
        "transformed standard Gibbs energy come from (species data, a literature value, "
        "reconciled literature values, an estimate, or nothing), and what is it at the "
        "environment's temperature, pH and ionic strength. Without NETWORK the bundled network "
        "is inspected at its own environment.",
        epilog="example: tfa inspect models/ancestral_core/reactions.tsv --environment my_vent.toml --json",
    )
    add_network_options(parser)
    parser.add_argument("--no-estimates", action="store_true",
                        help="do not estimate compounds without data (they stay placeholders)")
    parser.add_argument("--to-verify", action="store_true",
                        help="list only the numbers to verify before publishing: recalled and "
                        "common-practice values, estimates, re-anchored species data and "
                        "carrier potentials, open audit disagreements, with their sources")
    add_output_options(parser)
    parser.set_defaults(run=run)


def _load(args: argparse.Namespace):
    """(inputs, the read error a strict reading gives or None), as every command resolves
    them (:func:`tfa.cli.step_command.load_inputs`): an unbalanced reaction, which the
    analyses refuse on reading, is read anyway so that the report shows it."""
    from ..errors import InputError
    from .step_command import load_inputs

    try:
        return load_inputs(args), None
    except InputError as err:
        return load_inputs(args, require_balanced=False), err


def _fmt(value: float) -> str:
    return "—" if value is None or (isinstance(value, float) and math.isnan(value)) else f"{value:.2f}"


def run(args: argparse.Namespace) -> int:
    from ..assessment.input_check import check_inputs
    from ..network.checks import balance_report
    from ..network.coverage import coverage
    from ..thermo.database import ThermoDatabase

    inputs, read_error = _load(args)
    model, environment, literature = inputs.model, inputs.environment, inputs.literature_path
    db = ThermoDatabase.load(include_unreviewed=args.include_unreviewed)
    balance = balance_report(model)
    balance = balance[balance["reaction"] != environment.demand_reaction]  # the demand is no reaction
    unbalanced = balance[~balance["balanced"].astype(bool)]
    report = coverage(model, environment, db, literature, estimate=not args.no_estimates)
    check = check_inputs(inputs)
    errors = ([str(read_error)] if read_error is not None else []) + check.errors
    if args.to_verify:
        code = _to_verify(report, args)
    elif args.json:
        code = _json(args, inputs, report, balance, unbalanced, check, errors)
    else:
        code = _text(args, inputs, report, balance, unbalanced, check)
    for text in errors:
        sys.stderr.write(f"tfa inspect: error: {text}\n")
    return 2 if errors else code


def _json(args, inputs, report, balance, unbalanced, check, errors) -> int:
    payload = report.to_dict()
    payload["environment_file"] = inputs.environment_source
    payload["literature_file"] = str(inputs.literature_path) if inputs.literature_path else None
    payload["balance"] = {
        "internal_reactions": int(len(balance)),
        "balanced": int(len(balance) - len(unbalanced)),
        "unbalanced": [{"id": r.reaction, "message": r.message} for r in unbalanced.itertuples()],
    }
    payload["include_unreviewed"] = bool(args.include_unreviewed)
    completion = inputs.completion
    if completion is not None:
        payload["roles"] = completion.roles.rows(_needed_by())
        payload["identifiers"] = completion.mapping.to_frame().to_dict(orient="records")
    payload["not_applicable"] = check.not_applicable
    payload["errors"] = errors
    print_json(payload)
    return 0


def _needed_by() -> dict[str, list[str]]:
    """Role -> the modes that need it."""
    from ..modes import MODES

    out: dict[str, list[str]] = {}
    for mode in MODES.values():
        for need in mode.needs:
            out.setdefault(need, []).append(mode.id)
    return out


def _text(args, inputs, report, balance, unbalanced, check) -> int:
    import pandas as pd

    from ..network.default_environment import NEUTRAL_NAME

    model, environment, literature = inputs.model, inputs.environment, inputs.literature_path
    out = sys.stdout
    out.write(f"network      {model.id}: {len(model.reactions)} reactions ({report.total} internal"
              + (f", demand {environment.demand_reaction}" if environment.demand_reaction else "")
              + f"), {len(model.metabolites)} compounds\n")
    out.write(f"environment  {environment.name} ({inputs.environment_source})\n")
    if environment.name == NEUTRAL_NAME:
        out.write(f"             {environment.description}\n")
    out.write(f"conditions   {report.conditions.describe()}\n")
    from ..network.compartments import describe_compartments

    if environment.compartments:
        out.write(f"compartments {describe_compartments(environment)}\n")
    out.write(f"literature   {literature or 'the library of tfa/data (reaction_values.csv)'}\n")
    _identifiers(out, inputs, args.verbose)
    if unbalanced.empty:
        out.write(f"balance      all {len(balance)} internal reactions balance\n")
    else:
        out.write(f"balance      {len(unbalanced)} of {len(balance)} internal reactions do not "
                  "balance (marked NO below; they get no energy):\n")
        for row in unbalanced.itertuples():
            out.write(f"  {row.reaction}: {row.message}\n")
    counts, fractions = report.counts, report.fractions
    out.write("coverage     " + ", ".join(f"{k} {counts[k]} ({100 * fractions[k]:.0f}%)"
                                          for k in counts if counts[k]) + "\n")
    out.write(f"             reviewed species data or cited literature values (restated or "
              f"reconciled): {100 * report.reviewed_or_cited_fraction:.1f}% of {report.total}\n")
    statuses = report.status_counts
    out.write("status       " + ", ".join(f"{k} {v}" for k, v in statuses.items() if v)
              + "  (tfa inspect --to-verify lists what to check)\n")
    if check.not_applicable:
        out.write("modes        not applicable: " + "; ".join(
            f"{m} ({why})" for m, why in check.not_applicable.items()) + "\n")
    for d in report.disagreements:
        out.write(f"disagreement literature value {d['id']} ({d['source_key']}): residual "
                  f"{d['residual_kJ_per_mol']:.1f} kJ/mol, {d['studentized']:.1f} σ\n")
    if inputs.completion is not None:
        out.write("\nroles (declared in the compounds table, or inferred from thermo keys)\n")
        print_table(pd.DataFrame(inputs.completion.roles.rows(_needed_by())))
    frame = report.to_frame()
    off = set(unbalanced["reaction"])
    frame["balanced"] = ["NO" if r in off else "yes" for r in frame["reaction"]]
    frame["delta_g_standard_kJ_per_mol"] = frame["delta_g_standard_kJ_per_mol"].map(_fmt)
    frame["sigma_kJ_per_mol"] = frame["sigma_kJ_per_mol"].map(_fmt)
    frame["flags"] = [len(r.audit_flags) or "" for r in report.reactions]
    frame["provenance"] = frame["provenance"].map(_cut)
    out.write("\n")
    print_table(frame[["reaction", "balanced", "delta_g_standard_kJ_per_mol", "sigma_kJ_per_mol",
                       "source", "status", "flags", "pathway", "provenance"]]
                .rename(columns={"delta_g_standard_kJ_per_mol": "ΔrG'° kJ/mol",
                                 "sigma_kJ_per_mol": "σ kJ/mol"}))
    missing = report.without_reviewed_data()
    if missing:
        out.write(f"\nwithout reviewed species data or cited values ({len(missing)}): "
                  + ", ".join(f"{r.reaction_id} ({r.source})" for r in missing) + "\n")
    flagged: dict[str, list[str]] = {}
    for r in report.reactions:
        for flag in r.audit_flags:
            flagged.setdefault(flag, []).append(r.reaction_id)
    if flagged:
        out.write(f"\nopen audit disagreements and class checks ({len(flagged)}):\n")
        for flag, ids in flagged.items():
            out.write(f"  {flag}\n    touches {', '.join(ids)}\n")
    return 0


def _identifiers(out, inputs, verbose: bool) -> None:
    """The identifier mapping in one line (every match with --verbose)."""
    completion = inputs.completion
    if completion is None or not completion.mapping.found:
        return
    mapping = completion.mapping
    frame = mapping.to_frame()
    matched = frame[frame["thermo_key"] != ""]
    counts = ", ".join(f"{k} {v}" for k, v in matched["evidence"].value_counts().items())
    left = frame[frame["thermo_key"] == ""]["compound"].tolist()
    out.write(f"identifiers  {len(matched)} of {len(frame)} compounds matched to the thermodynamic "
              f"data ({counts})" + (f"; none for {', '.join(left)}" if left else "")
              + ("" if verbose else "; --verbose lists every match") + "\n")
    if verbose:
        print_table(frame)


def _cut(text: str) -> str:
    return text if len(text) <= PROVENANCE_WIDTH else text[: PROVENANCE_WIDTH - 1] + "…"


def _to_verify(report, args: argparse.Namespace) -> int:
    """Print the numbers to verify before publishing (text or JSON)."""
    frame = report.to_verify()
    if args.json:
        print_json({"network": report.network, "conditions": report.conditions.to_dict(),
                    "to_verify": frame.to_dict(orient="records")})
        return 0
    out = sys.stdout
    out.write(f"numbers to verify before publishing: {report.network} at "
              f"{report.conditions.describe()} ({len(frame)} items)\n")
    for kind, group in frame.groupby("kind", sort=False):
        out.write(f"\n{kind} ({len(group)})\n")
        for row in group.itertuples():
            value = "" if row.value != row.value else f"{row.value:.4g}"
            sigma = "" if row.sigma != row.sigma else f" +/- {row.sigma:.3g}"
            head = f"  {row.item}: {value}{sigma} {row.unit}".rstrip()
            out.write(f"{head}  [{row.status or 'flag'}; {row.source or 'no source'}]\n")
            if row.citation:
                out.write(f"      source: {row.citation}\n")
            if row.conditions:
                out.write(f"      conditions: {row.conditions}\n")
            out.write(f"      {row.note}\n")
            if row.used_by:
                out.write(f"      used by: {row.used_by}\n")
    return 0
