"""``tfa estimate SMILES_OR_NAME``: group-contribution estimate of a species' formation energy.

The argument is read as a structure first (SMILES, or InChI starting ``InChI=``); if it is not
one, it is looked up as a name: a compound of the bundled network's compounds table
(``models/ancestral_core/compounds.tsv``, column ``smiles``) or a species of
``tfa/data/species_structures.csv``.
"""

from __future__ import annotations

import argparse
import csv
import sys
from pathlib import Path

from ..errors import InputError
from .options import add_output_options
from .output import print_json


def register(subparsers) -> None:
    parser = subparsers.add_parser(
        "estimate",
        help="estimate a species' formation energy by group contribution",
        description="Estimate ΔfG° (298.15 K, 1 bar, I = 0) of an aqueous species from its "
        "structure by group contribution, with its standard uncertainty, the groups found and "
        "the protonation states given by pKa rules.",
    )
    parser.add_argument("structure", metavar="SMILES_OR_NAME",
                        help="SMILES or InChI in the protonation state wanted, or a compound name")
    add_output_options(parser)
    parser.set_defaults(run=run)


def _bundled_compounds_table() -> Path | None:
    try:
        from importlib import resources

        path = Path(str(resources.files("tfa.models"))) / "ancestral_core" / "compounds.tsv"
    except (ModuleNotFoundError, TypeError):  # pragma: no cover
        return None
    return path if path.exists() else None


def _lookup_name(name: str) -> tuple[str, str] | None:
    """(SMILES, where found) for a compound or species name, or None."""
    wanted = name.strip().lower()
    table = _bundled_compounds_table()
    if table is not None:
        with open(table, newline="", encoding="utf-8") as handle:
            for row in csv.DictReader(handle, delimiter="\t"):
                smiles = (row.get("smiles") or "").strip()
                if not smiles:
                    continue
                names = [row.get("id", ""), row.get("name", "")]
                names += (row.get("synonyms") or "").split(";")
                if wanted in {n.strip().lower() for n in names if n}:
                    return smiles, f"compound '{row.get('id', name)}' of {table.name}"
    from ..thermo.group_contribution import load_structures

    for species, (smiles, _note) in load_structures().items():
        if species.lower() == wanted:
            return smiles, f"species '{species}' of species_structures.csv"
    return None


def _resolve(text: str) -> tuple[str, str]:
    from ..thermo.group_contribution import StructureError, parse_structure

    try:
        parse_structure(text)
        return text, "structure given"
    except StructureError as err:
        found = _lookup_name(text)
        if found is None:
            raise InputError(
                f"'{text}' is neither a readable SMILES/InChI nor a known compound or species name; "
                "give a SMILES such as 'CC(=O)C(=O)[O-]' or a name from the compounds table"
            ) from err
        return found


def run(args: argparse.Namespace) -> int:
    from ..thermo.estimates import estimate_species
    from ..thermo.group_contribution import fitted_model

    smiles, where = _resolve(args.structure)
    estimate = estimate_species(smiles, name=args.structure)
    cv = fitted_model().cross_validation()
    if args.json:
        out = estimate.to_dict()
        out["resolved_from"] = where
        out["cross_validation"] = {"mae_kJ": cv.mae, "rmse_kJ": cv.rmse, "n": cv.n}
        print_json(out)
        return 0
    w = sys.stdout.write
    w(f"{estimate.name}  ({where})\n")
    w(f"structure  {estimate.smiles}\n")
    w(f"formula    {estimate.formula}  charge {estimate.charge:+d}  nH {estimate.n_h}\n")
    w(f"ΔfG°       {estimate.G:.1f} ± {estimate.sigma_G:.1f} kJ/mol  (298.15 K, 1 bar, I = 0)\n")
    for label, value, unit in (("ΔfH°", estimate.H, "kJ/mol"), ("S°", estimate.S, "J/mol/K"),
                               ("Cp°", estimate.Cp, "J/mol/K")):
        w(f"{label:<10} {'n/a' if value is None else f'{value:.1f} {unit}'}\n")
    w("groups:\n")
    for name, n in estimate.groups.items():
        w(f"  {n:3d}  {name}\n")
    if estimate.sites:
        w("ionisable sites (pKa rules):\n")
        for site in estimate.sites:
            pk = ", ".join(f"{p:.1f}" for p in site.pkas)
            w(f"  {site.rule}: pKa {pk}  [{site.source}]\n")
    w("protonation states:\n")
    for formula, charge, n_h, g in estimate.protonation_states:
        w(f"  {formula:<14} {charge:+d}  nH {n_h:3d}  ΔfG° {g:.1f} kJ/mol\n")
    w(f"uncertainty: leave-one-out MAE {cv.mae:.1f}, RMSE {cv.rmse:.1f} kJ/mol over {cv.n} species\n")
    return 0
