#!/usr/bin/env python
"""Drift of tfa's constant-Cp reaction energies from the HKF equations of state.

For each reaction below (all species are OBIGT species, balanced with H+ and H2O), compare the
untransformed standard reaction Gibbs energy ΔrG° computed by ``tfa.thermo.temperature`` from
the bundled table (constant Cp°, 1 bar) with pychnosz's ``subcrt`` (HKF for aqueous species,
Maier-Kelley for gases, the IAPWS/HGK water model; at Psat) at 25, 60, 80, 100 and 150 degC.

``acceptance=True`` marks the reactions that tests/test_thermo_hkf.py holds to 0.1 kJ/mol at
25 degC, 0.5 at 60 degC and 1.5 at 100 degC (others, if any, are reported here only). The last
columns show the drift of the constant-ΔH fallback (Cp dropped) for comparison.

Development-time script (pychnosz is a test/development dependency, never a runtime one).
Run: ``/tmp/venv/bin/python scripts/hkf_drift.py [--markdown]``.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import sys
from dataclasses import dataclass, replace

import numpy as np

from tfa.constants import CELSIUS_ZERO
from tfa.thermo.species import Species, load_species
from tfa.thermo.temperature import standard_gibbs

TEMPERATURES_C = (25.0, 60.0, 80.0, 100.0, 150.0)
#: Acceptance tolerances, kJ/mol, by temperature in degC (the design notes (docs/design)).
TOLERANCES = {25.0: 0.1, 60.0: 0.5, 100.0: 1.5}
#: Temperatures at which the constant-ΔH fallback is also shown, degC.
CONSTANT_H_SHOWN = (80.0, 100.0)


@dataclass(frozen=True)
class DriftReaction:
    """A reaction as {species id of the bundled table: coefficient} (negative = consumed)."""

    label: str
    stoichiometry: dict[str, float]
    acceptance: bool = True


REACTIONS: tuple[DriftReaction, ...] = (
    DriftReaction("4 H2 + CO2 = CH4 + 2 H2O", {"H2": -4, "CO2": -1, "CH4": 1, "H2O(l)": 2}),
    DriftReaction("H2 + CO2 = formate + H+", {"H2": -1, "CO2": -1, "formate": 1, "H+": 1}),
    DriftReaction("HCO3- + H+ = CO2 + H2O", {"HCO3-": -1, "H+": -1, "CO2": 1, "H2O(l)": 1}),
    DriftReaction("NH4+ = NH3 + H+", {"NH4+": -1, "NH3": 1, "H+": 1}),
    DriftReaction("H2S = HS- + H+", {"H2S": -1, "HS-": 1, "H+": 1}),
    DriftReaction("H2PO4- = HPO4-2 + H+", {"H2PO4-": -1, "HPO4-2": 1, "H+": 1}),
    DriftReaction("acetic acid = acetate + H+", {"acetic acid": -1, "acetate": 1, "H+": 1}),
    DriftReaction("glycine = glycinate + H+", {"glycine": -1, "glycinate": 1, "H+": 1}),
    DriftReaction("glycinium = glycine + H+", {"glycinium": -1, "glycine": 1, "H+": 1}),
    DriftReaction("acetate + H2O = CH4 + HCO3-",
                  {"acetate": -1, "H2O(l)": -1, "CH4": 1, "HCO3-": 1}),
    DriftReaction("ATP-4 + H2O = ADP-3 + HPO4-2 + H+",
                  {"ATP-4": -1, "H2O(l)": -1, "ADP-3": 1, "HPO4-2": 1, "H+": 1}),
    DriftReaction("pyruvate + H2 = lactate", {"pyruvate": -1, "H2": -1, "lactate": 1}),
    DriftReaction("fumarate-2 + H2 = succinate-2",
                  {"fumarate-2": -1, "H2": -1, "succinate-2": 1}),
    DriftReaction("malate-2 = fumarate-2 + H2O",
                  {"malate-2": -1, "fumarate-2": 1, "H2O(l)": 1}),
    DriftReaction("oxaloacetate-2 + H2 = malate-2",
                  {"oxaloacetate-2": -1, "H2": -1, "malate-2": 1}),
    DriftReaction("pyruvate + NH4+ + H2 = alanine + H2O",
                  {"pyruvate": -1, "NH4+": -1, "H2": -1, "alanine": 1, "H2O(l)": 1}),
    DriftReaction("NAD(ox)- + H2 = NAD(red)-2 + H+",
                  {"NAD(ox)-": -1, "H2": -1, "NAD(red)-2": 1, "H+": 1}),
    DriftReaction("2-oxoglutarate-2 + CO2 + H2 = isocitrate-3 + H+",
                  {"a-ketoglutarate-2": -1, "CO2": -1, "H2": -1, "isocitrate-3": 1, "H+": 1}),
    DriftReaction("citrate-3 = cis-aconitate-3 + H2O",
                  {"citrate-3": -1, "cis-aconitate-3": 1, "H2O(l)": 1}),
    DriftReaction("acetylphosphate-2 + H2O = acetate + HPO4-2 + H+ (LDS+26)",
                  {"acetylphosphate-2": -1, "H2O(l)": -1, "acetate": 1, "HPO4-2": 1, "H+": 1}),
    DriftReaction("MgATP-2 + H2O = MgADP- + HPO4-2 + H+",
                  {"MgATP-2": -1, "H2O(l)": -1, "MgADP-": 1, "HPO4-2": 1, "H+": 1}),
    DriftReaction("H2(g) = H2(aq)", {"H2(g)": -1, "H2": 1}),
    DriftReaction("CO2(g) = CO2(aq)", {"CO2(g)": -1, "CO2": 1}),
    DriftReaction("CH4(g) = CH4(aq)", {"CH4(g)": -1, "CH4": 1}),
    DriftReaction("H2S(g) = H2S(aq)", {"H2S(g)": -1, "H2S": 1}),
    DriftReaction("NH3(g) = NH3(aq)", {"NH3(g)": -1, "NH3": 1}),
    DriftReaction("CO(g) = CO(aq)", {"CO(g)": -1, "CO": 1}),
)


def species_by_id() -> dict[str, Species]:
    return {s.id: s for s in load_species()}


def tfa_reaction_gibbs(reaction: DriftReaction, celsius: float,
                       table: dict[str, Species] | None = None,
                       constant_enthalpy: bool = False) -> float:
    """ΔrG° (kJ/mol) from the bundled table with constant-Cp integration, 1 bar.

    ``constant_enthalpy=True`` drops Cp (the constant-ΔH fallback) for comparison. Species that
    the table's generator re-anchored to biochemical values enter with the source's own G (the
    shift is removed; it is the same at every temperature), so that this compares the
    integration with HKF, not the data with their source.
    """
    table = table or species_by_id()
    ids = list(reaction.stoichiometry)
    members = [replace(table[i], G=table[i].G - (table[i].shift or 0.0)) for i in ids]
    if constant_enthalpy:
        members = [replace(m, Cp=None) for m in members]
    values, _ = standard_gibbs(members, celsius + CELSIUS_ZERO)
    return float(np.dot([reaction.stoichiometry[i] for i in ids], values))


def hkf_reaction_gibbs(reaction: DriftReaction, celsius: list[float],
                       table: dict[str, Species] | None = None) -> np.ndarray:
    """ΔrG° (kJ/mol) from pychnosz ``subcrt`` (HKF, Psat) at the given temperatures."""
    import pychnosz

    table = table or species_by_id()
    names, states, coeffs = [], [], []
    for sid, nu in reaction.stoichiometry.items():
        sp = table[sid]
        names.append("water" if sid == "H2O(l)" else _obigt_name(sp))
        states.append(sp.state)
        coeffs.append(nu)
    with contextlib.redirect_stdout(io.StringIO()):
        result = pychnosz.subcrt(names, coeffs, state=states, T=list(celsius), P="Psat")
    return np.asarray(result.out["G"], dtype=float) / 1000.0


def _obigt_name(sp: Species) -> str:
    from importlib import resources
    import csv

    global _OBIGT_NAMES
    if _OBIGT_NAMES is None:
        text = resources.files("tfa.data").joinpath("species.csv").read_text(encoding="utf-8")
        _OBIGT_NAMES = {r["species"]: r["obigt_name"] for r in csv.DictReader(io.StringIO(text))}
    return _OBIGT_NAMES[sp.id]


_OBIGT_NAMES: dict[str, str] | None = None


def drift_table() -> list[dict]:
    """One row per reaction: ΔrG° (HKF) at 25 degC and the drift (tfa − HKF) per temperature."""
    table = species_by_id()
    rows = []
    for reaction in REACTIONS:
        hkf = hkf_reaction_gibbs(reaction, list(TEMPERATURES_C), table)
        row = {"reaction": reaction.label, "acceptance": reaction.acceptance,
               "dG25_hkf": float(hkf[0])}
        for t, ref in zip(TEMPERATURES_C, hkf):
            row[t] = tfa_reaction_gibbs(reaction, t, table) - float(ref)
            row[("dH", t)] = tfa_reaction_gibbs(reaction, t, table, True) - float(ref)
        rows.append(row)
    return rows


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="constant-Cp vs HKF drift per reaction")
    parser.add_argument("--markdown", action="store_true", help="print a Markdown table")
    args = parser.parse_args(argv)
    import warnings

    warnings.simplefilter("ignore")
    rows = drift_table()
    heads = (["reaction", "test", "ΔrG°25 HKF"] + [f"Δ {t:g}°C" for t in TEMPERATURES_C]
             + [f"ΔH-const {t:g}°C" for t in CONSTANT_H_SHOWN])
    if args.markdown:
        print("| " + " | ".join(heads) + " |")
        print("|" + "---|" * len(heads))
    else:
        print(f"{'reaction':58s} {'test':4s} {'dG25':>9s} " + " ".join(f"{h:>8s}" for h in heads[3:]))
    for r in rows:
        cells = ([f"{r[t]:+.3f}" for t in TEMPERATURES_C]
                 + [f"{r[('dH', t)]:+.2f}" for t in CONSTANT_H_SHOWN])
        flag = "yes" if r["acceptance"] else "no"
        if args.markdown:
            print(f"| {r['reaction']} | {flag} | {r['dG25_hkf']:.2f} | " + " | ".join(cells) + " |")
        else:
            print(f"{r['reaction']:58s} {flag:4s} {r['dG25_hkf']:9.2f} "
                  + " ".join(f"{c:>8s}" for c in cells))
    worst = {t: max(abs(r[t]) for r in rows if r["acceptance"]) for t in TEMPERATURES_C}
    print("largest |drift| among acceptance reactions, kJ/mol: "
          + ", ".join(f"{t:g} degC {worst[t]:.3f}" for t in TEMPERATURES_C))
    worst_h = {t: max(abs(r[("dH", t)]) for r in rows) for t in CONSTANT_H_SHOWN}
    print("largest |drift| with constant ΔH instead (no Cp), kJ/mol: "
          + ", ".join(f"{t:g} degC {worst_h[t]:.2f}" for t in CONSTANT_H_SHOWN))
    return 0


if __name__ == "__main__":
    sys.exit(main())
