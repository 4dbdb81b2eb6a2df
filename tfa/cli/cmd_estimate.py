"""``tfa estimate SMILES_OR_NAME``: group-contribution estimate of a species' formation energy.

The argument is read as a structure first (SMILES, or InChI starting ``InChI=``); if it is not
one, it is looked up as a compound of the network (``--network PATH``, default the bundled
network: its id, name, a synonym or its thermo key; its ``smiles``, else the structure of the
compound its thermo key names), then as a compound or species of the thermodynamic data
(``tfa/data/species_structures.csv``, ``compounds_without_species.csv``).
"""

from __future__ import annotations

import argparse
import sys

from ..errors import InputError
from .options import add_option, add_output_options
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
                        help="SMILES or InChI in the protonation state wanted, or a compound (id, "
                        "name or synonym) of the network or of the thermodynamic data")
    add_option(parser, "network_data")
    add_output_options(parser)
    parser.set_defaults(run=run)


def _from_network(name: str, network: str | None) -> tuple[str, str] | None:
    """(structure, where) of a compound of the network (the bundled one by default): its own
    ``smiles`` (or a structure in its annotation), else the structure of the compound of the
    thermodynamic data its ``thermo_key`` names."""
    from ..network.identifiers import find_metabolite, structure_of
    from ..thermo.database import ThermoDatabase
    from ..thermo.estimates import compound_structure
    from .step_command import load_inputs

    model = load_inputs(argparse.Namespace(network=network), require_balanced=False).model
    met = find_metabolite(model, name)
    if met is None:
        return None
    where = f"compound '{met.id}' of network {model.id}"
    structure = structure_of(met)
    if structure:
        return structure, where
    key = str((met.notes or {}).get("thermo_key") or "")
    found = compound_structure(ThermoDatabase.load(), key) if key else None
    return (found[0], f"{where}, thermo key {key}: {found[1]}") if found else None


def _from_data(name: str) -> tuple[str, str] | None:
    """(structure, where) of a compound or a species of the thermodynamic data."""
    from ..thermo.database import ThermoDatabase
    from ..thermo.estimates import compound_structure
    from ..thermo.group_contribution import load_structures

    db = ThermoDatabase.load()
    if name in db.registry:
        found = compound_structure(db, name)
        if found:
            return found
    for species, (smiles, _note) in load_structures().items():
        if species.lower() == name.strip().lower():
            return smiles, f"species '{species}' of species_structures.csv"
    return None


def _resolve(text: str, network: str | None) -> tuple[str, str]:
    from ..thermo.database import ThermoDatabase
    from ..thermo.group_contribution import StructureError, parse_structure

    try:
        parse_structure(text)
        return text, "structure given"
    except StructureError as err:
        found = _from_network(text, network) or _from_data(text)
        if found is None:
            close = ThermoDatabase.load().registry.close_matches(text, n=3)
            hint = f" (did you mean {', '.join(close)}?)" if close else ""
            raise InputError(
                f"'{text}' is neither a readable SMILES/InChI nor a compound with a structure of "
                f"{'network ' + network if network else 'the bundled network'} or of the "
                f"thermodynamic data{hint}; give a SMILES such as 'CC(=O)C(=O)[O-]', or a compound "
                "id of the network (tfa inspect lists them; --network PATH for your own)"
            ) from err
        return found


def run(args: argparse.Namespace) -> int:
    from ..thermo.estimates import estimate_species
    from ..thermo.group_contribution import fitted_model

    smiles, where = _resolve(args.structure, args.network_data)
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
        kinds: dict[tuple, int] = {}
        for site in estimate.sites:   # each kind of site once, with its count
            key = (site.rule, site.pkas, site.source)
            kinds[key] = kinds.get(key, 0) + 1
        for (rule, pkas, source), count in kinds.items():
            pk = ", ".join(f"{p:.1f}" for p in pkas)
            w(f"  {count:3d}  {rule}: pKa {pk}  [{source}]\n")
    w("protonation states:\n")
    for formula, charge, n_h, g in estimate.protonation_states:
        w(f"  {formula:<14} {charge:+d}  nH {n_h:3d}  ΔfG° {g:.1f} kJ/mol\n")
    w(f"uncertainty: leave-one-out MAE {cv.mae:.1f}, RMSE {cv.rmse:.1f} kJ/mol over {cv.n} species\n")
    return 0
