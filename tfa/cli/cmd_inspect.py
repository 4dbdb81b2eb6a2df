"""``tfa inspect``: balance status, data coverage and the energy of every reaction of a network.

NETWORK is a reactions table (``.tsv``/``.csv``, with ``compounds.tsv`` beside it and optionally
``reaction_values.tsv`` and ``environment.toml``), a folder holding them, or an SBML/JSON file.
With no NETWORK the bundled network and its environment (the Kestrel Ridge vent field) are used.
The environment is ``--environment FILE``, else ``environment.toml`` beside the network, else the
bundled one. Nothing is written to disk. Bad input exits with code 2 and a message naming the
file and line.
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

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


def _network_folder(path: Path) -> Path:
    return path if path.is_dir() else path.parent


def _load(args: argparse.Namespace):
    """(model, environment, literature path or None, environment path), as every command
    resolves them (:func:`tfa.cli.step_command.load_inputs`)."""
    from .step_command import load_inputs

    inputs = load_inputs(args, require_balanced=False)
    return inputs.model, inputs.environment, inputs.literature_path, Path(inputs.environment_source)


def _fmt(value: float) -> str:
    return "—" if value is None or (isinstance(value, float) and math.isnan(value)) else f"{value:.2f}"


def run(args: argparse.Namespace) -> int:
    from ..network.checks import balance_report
    from ..network.coverage import coverage
    from ..thermo.database import ThermoDatabase

    model, environment, literature, env_path = _load(args)
    db = ThermoDatabase.load(include_unreviewed=args.include_unreviewed)
    balance = balance_report(model)
    unbalanced = balance[~balance["balanced"].astype(bool)]
    report = coverage(model, environment, db, literature if literature else [],
                      estimate=not args.no_estimates)
    if args.to_verify:
        return _to_verify(report, args)
    if args.json:
        payload = report.to_dict()
        payload["environment_file"] = str(env_path)
        payload["literature_file"] = str(literature) if literature else None
        payload["balance"] = {
            "internal_reactions": int(len(balance)),
            "balanced": int(len(balance) - len(unbalanced)),
            "unbalanced": [{"id": r.reaction, "message": r.message} for r in unbalanced.itertuples()],
        }
        payload["include_unreviewed"] = bool(args.include_unreviewed)
        print_json(payload)
        return 0
    out = sys.stdout
    out.write(f"network      {model.id}: {len(model.reactions)} reactions ({report.total} internal), "
              f"{len(model.metabolites)} compounds\n")
    out.write(f"environment  {environment.name} ({env_path})\n")
    out.write(f"conditions   {report.conditions.describe()}\n")
    out.write(f"literature   {literature or 'none'}\n")
    if unbalanced.empty:
        out.write(f"balance      all {len(balance)} internal reactions balance\n")
    else:
        out.write(f"balance      {len(unbalanced)} of {len(balance)} internal reactions do not balance:\n")
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
    for d in report.disagreements:
        out.write(f"disagreement literature value {d['id']} ({d['source_key']}): residual "
                  f"{d['residual_kJ_per_mol']:.1f} kJ/mol, {d['studentized']:.1f} σ\n")
    frame = report.to_frame()
    frame["delta_g_standard_kJ_per_mol"] = frame["delta_g_standard_kJ_per_mol"].map(_fmt)
    frame["sigma_kJ_per_mol"] = frame["sigma_kJ_per_mol"].map(_fmt)
    frame["flags"] = [len(r.audit_flags) or "" for r in report.reactions]
    frame["provenance"] = frame["provenance"].map(_cut)
    out.write("\n")
    print_table(frame[["reaction", "delta_g_standard_kJ_per_mol", "sigma_kJ_per_mol", "source",
                       "status", "flags", "pathway", "provenance"]]
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
