"""Write ``tfa/data/cross_references.csv``: identifiers of other databases (ChEBI, KEGG, MetaNetX,
InChIKey, BiGG) -> the compound of our thermodynamic data they name, with the evidence.

Development-time script. Two open sources, both on the package registries:

1. Our own compound tables: the structures of ``tfa/data/species_structures.csv`` (per species)
   and ``tfa/data/compounds_without_species.csv`` give each compound its InChIKeys (computed here
   with RDKit); the names and synonyms of ``tfa/data/compounds.csv``.
2. The genome-scale models that cobra ships as package data (``cobra/data/salmonella.xml.gz``
   and ``iJO1366.xml.gz``, BiGG Models namespace; King et al. 2016, Nucleic Acids Res. 44:D515, from memory;
   cobra's licence is LGPL-2.0-or-later OR GPL-2.0-or-later, per its package metadata). Their
   metabolite annotations carry the other databases' identifiers; salmonella's also carry
   InChIKeys.

A model metabolite (one BiGG id) is matched to our compound by structure first: its InChIKey
against ours (``structure``: connectivity and stereo layer equal; ``structure, stereo not
compared``: connectivity only, accepted when our structure has at most one stereocentre and no
stereo double bond, so that the other form can only be the enantiomer with the same formation
energy, or when every word of its name is in one of our names); else by name
(``name``: its name equals our compound's name or a synonym, a leading D-/L- aside, and every
element but H agrees). Every identifier of the matched metabolite
is then written with that evidence. An identifier that the sources attach to two different
compounds of ours is left out (counted in the header).

Usage: .venv/bin/python scripts/make_cross_references.py
"""

from __future__ import annotations

import csv
import io
import re
import sys
from collections import defaultdict
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from tfa.thermo.balance import parse_formula  # noqa: E402
from tfa.thermo.compounds import normalise_name  # noqa: E402
from tfa.util.files import write_text  # noqa: E402

DATA = ROOT / "tfa" / "data"
OUT = DATA / "cross_references.csv"
#: Model files of cobra's package data read, in order (the first name of a BiGG id wins).
MODELS = ("salmonella.xml.gz", "iJO1366.xml.gz")
#: Annotation keys of the models -> our namespace names.
NAMESPACES = {"inchi_key": "inchikey", "chebi": "chebi", "kegg.compound": "kegg",
              "metanetx.chemical": "metanetx", "bigg.metabolite": "bigg"}
#: Evidence, strongest first.
EVIDENCE = ("structure", "structure, stereo not compared", "name")
#: Stereo descriptors ignored when names are compared.
#: Leading D-/L- descriptors (an anomer prefix before them too): the other form they name is the
#: enantiomer, whose formation energy in water is the same.
_STEREO = re.compile(r"^(?:(?:alpha|beta)-(?=[dl]-))?[dl]-")
_STEREO_WORDS = {"alpha", "beta", "d", "l"}


def _rows(name: str) -> list[dict[str, str]]:
    with open(DATA / name, newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(line for line in handle if not line.startswith("#")))


def plain_name(name: str) -> str:
    """A name without stereo descriptors, case, spaces or punctuation (for comparison only).

    >>> plain_name("alpha-D-Ribose 5-phosphate"), plain_name("beta-Alanine")
    ('ribose5phosphate', 'betaalanine')
    """
    text = normalise_name(name)
    text = _STEREO.sub("", text)
    return re.sub(r"[\s,()'\-]", "", text)


def without_formula(name: str, formula: str) -> str:
    """A model's metabolite name without the formula some models append to it.

    >>> without_formula("ATP C10H12N5O13P3", "C10H12N5O13P3"), without_formula("Coenzyme A", "X")
    ('ATP', 'Coenzyme A')
    """
    tail = f" {formula}"
    return name[: -len(tail)].strip() if formula and name.endswith(tail) else name


def name_words(name: str) -> frozenset[str]:
    """The words of a name, without stereo descriptors.

    >>> sorted(name_words("Nicotinamide adenine dinucleotide - reduced"))
    ['adenine', 'dinucleotide', 'nicotinamide', 'reduced']
    """
    words = re.split(r"[^a-z0-9]+", normalise_name(name))
    return frozenset(w for w in words if w and w not in _STEREO_WORDS)


def names_agree(names: set[str], ours: set[str]) -> bool:
    """Whether every word of a model name is in one of our names: the guard against a
    diastereomer when only the connectivity of two structures is compared.

    >>> names_agree({"L-allo-Threonine"}, {"threonine"}), names_agree({"NADH"}, {"NADH"})
    (False, True)
    """
    words = [name_words(n) for n in ours]
    return any(a and any(a <= b for b in words) for a in map(name_words, names))


def heavy_elements(formula: str) -> dict[str, int]:
    """Element counts without H (protonation states differ in H only)."""
    try:
        counts, _ = parse_formula(formula)
    except Exception:  # noqa: BLE001 - R groups and the like: no comparison possible
        return {}
    return {e: n for e, n in counts.items() if e != "H"}


def our_compounds():
    """id -> (plain names, heavy elements, InChIKeys, most stereo elements of a structure
    (centres and double bonds), names)."""
    from rdkit import Chem, RDLogger

    RDLogger.DisableLog("rdApp.*")
    structures = {r["species"]: r["smiles"] for r in _rows("species_structures.csv")}
    out = {}

    def add(cid: str, name: str, synonyms: str, formula: str, smiles: list[str]) -> None:
        keys, centres = set(), 0
        for text in smiles:
            mol = Chem.MolFromSmiles(text)
            if mol is None:
                continue
            keys.add(Chem.MolToInchiKey(mol))
            elements = Chem.FindPotentialStereo(mol)
            double = any(e.type == Chem.StereoType.Bond_Double for e in elements)
            # a stereo double bond's other form is a diastereomer: count it as "many"
            centres = max(centres, 2 if double else len(elements))
        names = {cid, name, *[s for s in synonyms.split(";") if s.strip()]}
        names = {n for n in names if n}
        out[cid] = ({plain_name(n) for n in names}, heavy_elements(formula), keys, centres, names)

    for row in _rows("compounds.csv"):
        species = [s for s in row["species"].split(";") if s]
        add(row["id"], row["name"], row["synonyms"], row["formula"],
            [structures[s] for s in species if s in structures])
    for row in _rows("compounds_without_species.csv"):
        add(row["id"], row["name"], row["synonyms"], row["formula"],
            [row["smiles"]] if row.get("smiles") else [])
    for row in _rows("potentials.csv"):
        for state in ("oxidised", "reduced"):
            add(row[state], row[state], row[f"{state}_synonyms"], row[f"{state}_formula"], [])
    return out


def model_metabolites():
    """BiGG id -> {"names", "formula", namespace -> set of identifiers}, from cobra's models."""
    import cobra
    from cobra.io import read_sbml_model

    folder = Path(cobra.__file__).parent / "data"
    merged: dict[str, dict] = {}
    for file in MODELS:
        model = read_sbml_model(str(folder / file))
        for met in model.metabolites:
            bigg = met.annotation.get("bigg.metabolite") or re.sub(r"_[a-z]\d?$", "", met.id)
            entry = merged.setdefault(bigg, {"names": set(), "formula": met.formula or "",
                                             **{ns: set() for ns in NAMESPACES.values()}})
            if met.name:
                entry["names"].add(without_formula(met.name, met.formula or ""))
            entry["bigg"].add(bigg)
            for key, namespace in NAMESPACES.items():
                values = met.annotation.get(key) or []
                for value in [values] if isinstance(values, str) else values:
                    entry[namespace].add(value.strip())
    return merged


def match(entry: dict, ours: dict) -> tuple[str, str] | None:
    """(our compound id, evidence) of one model metabolite, or None."""
    names = {plain_name(n) for n in entry["names"]}
    heavy = heavy_elements(entry["formula"])
    full, skeleton = set(), set()
    for key in entry["inchikey"]:
        for cid, (_plain, _heavy, keys, centres, our_names) in ours.items():
            if any(k[:25] == key[:25] for k in keys):
                full.add(cid)
            elif any(k[:14] == key[:14] for k in keys) and (
                    centres <= 1 or names_agree(entry["names"], our_names)):
                skeleton.add(cid)
    for found, evidence in ((full, EVIDENCE[0]), (skeleton, EVIDENCE[1])):
        if len(found) == 1:
            return next(iter(found)), evidence
        if len(found) > 1:
            return None
    by_name = {cid for cid, (our_names, our_heavy, _k, _c, _n) in ours.items()
               if names & our_names and (not heavy or not our_heavy or heavy == our_heavy)}
    if len(by_name) == 1:
        return next(iter(by_name)), EVIDENCE[2]
    return None


def main() -> None:
    ours = our_compounds()
    found: dict[tuple[str, str], set[tuple[str, str]]] = defaultdict(set)
    for cid, (_plain, _heavy, keys, _centres, _names) in ours.items():
        for key in keys:
            found[("inchikey", key)].add((cid, EVIDENCE[0]))
    matched = 0
    metabolites = model_metabolites()
    for bigg, entry in sorted(metabolites.items()):
        result = match(entry, ours)
        if result is None:
            continue
        matched += 1
        for namespace in NAMESPACES.values():
            for identifier in entry[namespace]:
                found[(namespace, identifier)].add(result)
    rows, dropped = [], 0
    for (namespace, identifier), targets in sorted(found.items()):
        compounds = {cid for cid, _ in targets}
        if len(compounds) > 1:
            dropped += 1
            continue
        best = min(targets, key=lambda t: EVIDENCE.index(t[1]))
        rows.append((namespace, identifier, best[0], best[1]))
    counts = defaultdict(int)
    for row in rows:
        counts[row[0]] += 1
    header = [
        "# Identifiers of other databases -> compound of the tfa thermodynamic data "
        "(tfa/data/compounds.csv and the carriers of potentials.csv).",
        "# Generated by scripts/make_cross_references.py; do not edit by hand.",
        "# Sources: our own compound tables (this project, MIT licence; InChIKeys computed with RDKit from "
        "species_structures.csv and compounds_without_species.csv; names and synonyms) and the "
        "metabolite annotations of the models cobra ships as package data (salmonella, "
        "iJO1366; BiGG Models namespace, King et al. 2016, Nucleic Acids Res. 44:D515, from memory), cobra "
        "licence LGPL-2.0-or-later OR GPL-2.0-or-later.",
        "# evidence: structure (InChIKey connectivity and stereo equal), structure, stereo not "
        "compared (connectivity only; at most one stereocentre and no stereo double bond, or every word of the name in ours), name (name "
        "or synonym equal, every element but H equal).",
        f"# {matched} of {len(metabolites)} model metabolites matched; {dropped} identifiers "
        "attached to two compounds of ours left out; rows per namespace: "
        + ", ".join(f"{k} {v}" for k, v in sorted(counts.items())) + ".",
    ]
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(["namespace", "identifier", "compound", "evidence"])
    writer.writerows(rows)
    write_text(OUT, "\n".join(header) + "\n" + buffer.getvalue())
    print(f"wrote {OUT} ({len(rows)} rows; {matched} of {len(metabolites)} model metabolites "
          f"matched; {dropped} ambiguous identifiers left out)")


if __name__ == "__main__":
    main()
