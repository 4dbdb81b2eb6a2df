#!/usr/bin/env python
"""Generate the bundled species, compound and source tables of ``tfa`` from OBIGT.

Development-time script. It reads the OBIGT thermodynamic database that the ``pychnosz``
package carries (``pychnosz/data/extdata/OBIGT/*.csv`` and ``.../thermo/refs.csv``) and writes,
deterministically (sorted rows, fixed float formatting):

- ``tfa/data/species.csv``   one row per species (standard molal properties, 298.15 K, 1 bar)
- ``tfa/data/compounds.csv`` one row per reactant (compound as biochemists name it)
- ``tfa/data/sources.csv``   one row per source key used by a bundled species

The runtime package reads only these tables; it never imports pychnosz.

Rules applied (documented here because the tables carry no free-text notes)
-------------------------------------------------------------------------
Which OBIGT row
    OBIGT sometimes carries one species name in several files. pychnosz loads by default, in
    this order, H2O_aq, inorganic_aq, organic_aq, (crystals), inorganic_gas, organic_gas,
    organic_liq; its ``info(name, state)`` returns the first match. We read the same files in the
    same order and take the first row of a given (name, state). The optional files (SLOP98,
    SUPCRT92, DEW, AD) are not used, so every bundled value is the one pychnosz's ``subcrt``
    uses by default (checked in tests/test_thermo_species.py).
Units
    Rows whose ``E_units`` is ``cal`` are converted with 4.184 J/cal (thermochemical calorie).
    G and H are written in kJ/mol, S and Cp in J/(mol K), V in cm3/mol.
Missing Cp or V
    Some rows leave Cp° or V° at 298.15 K empty but give the parameters of their equation of
    state (HKF for aqueous species, Maier-Kelley heat-capacity coefficients for gases). We then
    evaluate that same row's equation of state at 298.15 K and 1 bar with pychnosz (``subcrt``)
    and write the result: the number is the source's own, at the reference state. Where the
    parameters are absent too, the cell stays empty and the runtime flags the species
    (constant-ΔH fallback). Gases: OBIGT gives V° = 0 (the standard state of a gas is the ideal
    gas at 1 bar at every pressure), kept as is.
Water
    OBIGT computes liquid water from a water model (H2O_aq.csv has no numbers; sources JOH92,
    HGK84). We take its properties at 298.15 K and 1 bar from ``pychnosz.water``
    (G −237.181 kJ/mol, H −285.837 kJ/mol, S 69.92 J/(mol K), Cp 75.36 J/(mol K), V 18.07 cm3/mol,
    in OBIGT's apparent-energy convention) and check them against these published numbers.
Hydrated CO2
    The total-CO2 reactant uses the hydrated convention: its neutral member is the composite
    row ``CO2(aq)+H2O`` whose G, H, S, Cp and V are the sums of CO2(aq) and liquid water
    (formula H2CO3, n_h 2), a pseudoisomer of HCO3− and CO3−2.
Hydrated formaldehyde
    In water formaldehyde is almost entirely methanediol, CH2(OH)2; OBIGT's ``formaldehyde``
    (Schulte & Shock 1993, SS93) is the unhydrated HCHO(aq) species, while biochemical tables
    (Thauer et al. 1977) and concentration bounds refer to total formaldehyde. The
    ``formaldehyde`` reactant therefore carries, besides HCHO(aq), the composite row
    ``methanediol-H2O`` (methanediol minus one water: formula CH2O like HCHO, same charge and n_h,
    so both are members of one pseudoisomer group and equations keep their water) with

        G = G(HCHO) − RT ln K_h,   H = H(HCHO) + ΔH_h,   S = S(HCHO) + (ΔH_h + RT ln K_h)/T,
        Cp = Cp(HCHO) (ΔCp_h = 0),   V = V(HCHO) (ΔV_h = 0)

    at T = 298.15 K, where K_h = [CH2(OH)2]/[HCHO] (water activity 1) is the hydration constant
    and ΔH_h its enthalpy: K_h = 2.0e3 at 25 degC (Bell 1966, Adv. Phys. Org. Chem. 4:1, review
    of the measurements, which range about 1.3e3-2.3e3; from memory) and ΔH_h = −33 kJ/mol
    (van 't Hoff slope of the measurements between about 20 and 80 degC, Winkelman et al. 2002,
    Chem. Eng. Sci. 57:4067, about −31 kJ/mol; older values up to −36; from memory). Constant
    ΔH_h is the van 't Hoff form in which such data are fitted, hence ΔCp_h = 0; ΔV_h is not
    known to us and is neglected (a few cm3/mol move G by less than 0.2 kJ/mol at 250 bar). The
    hydrate holds K_h/(1 + K_h) = 99.95 % of total formaldehyde at 25 degC and about 99.7 % at
    70 degC, so the reactant's ΔfG'° is that of total formaldehyde, −128.2 kJ/mol at 25 degC
    (Thauer et al. 1977 give −130.5 kJ/mol, from memory). Source keys of the row: SS93 and
    Bel66 (both in the sources tables; Bel66 and WVO+02 in tfa/data/literature_sources.csv).
Protons of the outer fluid
    A cell (or a mineral compartment) bathed by a fluid of another pH sees two proton pools. The
    compound ``H+`` (kind proton) is the inner pool: fixed by the pH of the conditions, transformed
    energy 0, never an activity. The compound ``H+(outside)`` (kind aqueous) is the outer pool: its
    one species ``H+(outside)`` is a copy of OBIGT's H+ row (ΔfG° = ΔfH° = S° = Cp° = V° = 0 by
    convention, z = +1, nH = 1), so Alberty's transform at the inner pH gives
    ΔfG'° = RT ln10 pH_in (the extended Debye-Hückel term vanishes since z² − nH = 0), and with
    its activity fixed at 10^(−pH_out) by the environment its transformed chemical potential is
    μ'_out = RT ln10 (pH_in − pH_out): moving one proton in, H+(outside) -> H+, has
    ΔrG' = −RT ln10 (pH_in − pH_out), the chemical part of the proton-motive force (Mitchell's
    chemiosmotic relation; Nicholls & Ferguson, Bioenergetics, 4th ed. 2013, from memory). The
    electrical part (membrane potential) is not represented and is thereby taken as 0.
Species ids
    Aqueous species keep their OBIGT name (unique within state aq); gases get ``<formula>(g)``
    with the formula as OBIGT writes it (NH3(g)),
    liquid water ``H2O(l)``. ``formula`` is the element composition in Hill order without the
    charge (the charge has its own column).
Reference species of a compound
    ``compounds.csv`` gives the formula and charge of one member: the one without Mg that
    predominates at pH 7, 298.15 K, I = 0 (lowest ΔfG° + n_h·RT·ln10·7).
Peer review (``sources.csv``)
    ``peer_reviewed = no`` when the citation is a submitted manuscript, unpublished work, a
    thesis or dissertation, a computer data file, or a note of the database maintainers
    (citation mentioning "OBIGT database" or "vignette"). Everything else (journal papers,
    published books, government data compilations such as NBS/NIST tables and US Bureau of
    Mines bulletins) is ``yes``. The 2026 key LDS+26 ("submitted manuscript") is therefore
    ``no``; the test suite checks this.
Names
    Every id, name and synonym (compared case-insensitively) must point to exactly one compound;
    the script stops with an error naming both compounds when two claim the same name.
Crystals
    Elemental sulfur is OBIGT's rhombic sulfur (``sulfur``, state ``cr``, McCollom & Shock 1997):
    a compound of kind ``solid`` (activity 1). Its constant-Cp integration holds to the
    rhombic-monoclinic transition at 95.5 degC; above it the monoclinic form differs by less than
    0.1 kJ/mol (transition enthalpy about 0.4 kJ/mol, from memory).
Corrections (:func:`apply_corrections`; the reasons and anchors are in ``QUARANTINED``,
``MG_COMPLEXES`` and ``CORRECTIONS`` below, and on every corrected row)
    1. Quarantine: species of the unreviewed source that cannot exist are left out (acetyl
       phosphate without a methyl proton, 1,3-bisphosphoglycerate with a fifth acidic proton).
    2. Mg complexes of orthophosphate and pyrophosphate, from binding constants at I = 0.1 M
       (Smith & Martell 1976, from memory) carried to I = 0 with the extended Debye-Hueckel
       equation; binding enthalpy, dCp and dV taken as 0. Row flag ``Mg complex (binding
       constant)``.
    3. Re-anchoring: a reactant whose species data disagree with measured biochemical equilibria
       is shifted as a whole (ΔfG° and ΔfH° of every species by the same amount, S°, Cp° and V°
       kept, so pKa values and the temperature dependence stay those of the source) by the
       weighted least-squares fit to its anchors, s = Σ w_a (value_a − computed_a)/ν_a / Σ w_a
       with w_a = (ν_a/σ_a)²; each anchor is a reaction over reactants of the table with its
       ΔrG'°, σ, pH, ionic strength, pMg, source and whether it is recalled. The anchors are
       computed with the runtime's own Legendre transform (tfa.thermo.legendre) at 25 degC. Row
       flag ``re-anchored``, the shift in ``shift_kJ``, the anchors' source keys in ``anchor``,
       the anchors and the reason in ``note``. Applied in order: pyrophosphate, lactate,
       2-oxoglutarate, then glutamate and glutamine (their equilibria with 2-oxoglutarate), and
       glucose (OBIGT's only row is unreviewed; re-anchored to Alberty's value and credited to
       it). Checked and left as they are, against the values of tfa/data/reaction_values.csv
       (``tfa audit``): succinate, fumarate, malate, oxaloacetate, citrate, isocitrate,
       cis-aconitate, propanoate, butanoate, acetate, pyruvate, alanine, aspartate.

Run: ``.venv/bin/python scripts/make_species_table.py`` (writes into tfa/data/; prints each
correction's fit).
"""

from __future__ import annotations

import argparse
import contextlib
import csv
import io
import math
import re
import sys
from dataclasses import dataclass
from importlib import resources
from pathlib import Path

import pandas as pd

CALORIE = 4.184
R_KJ = 8.314462618e-3
T_REF = 298.15
LN10 = math.log(10.0)

#: pychnosz's default load order (aqueous, gas and liquid files; of the crystals only the
#: inorganic file, for the rows named with ``|cr``: elemental sulfur).
DEFAULT_FILES = ("H2O_aq.csv", "inorganic_aq.csv", "organic_aq.csv", "inorganic_cr.csv",
                 "inorganic_gas.csv", "organic_gas.csv", "organic_liq.csv")

#: Published 25 degC properties of liquid water used to check pychnosz.water (OBIGT/SUPCRT92
#: values, Johnson et al. 1992 Comp. Geosci. 18:899; G, H in kJ/mol, S, Cp in J/mol/K, V cm3/mol).
WATER_CHECK = {"G": -237.18, "H": -285.83, "S": 69.91, "Cp": 75.35, "V": 18.07}

COMPOSITE_CO2 = "CO2(aq)+H2O"
WATER_ID = "H2O(l)"

#: Protons of the outer fluid: a copy of OBIGT's H+ row under its own id (module docstring).
OUTER_PROTON = "H+(outside)"

#: Hydrated formaldehyde (methanediol minus one water); see the module docstring.
COMPOSITE_HCHO = "methanediol-H2O"
#: Hydration constant K_h = [CH2(OH)2]/[HCHO] at 298.15 K (Bell 1966, from memory).
HCHO_HYDRATION_K = 2.0e3
#: Hydration enthalpy, kJ/mol (Winkelman et al. 2002, van 't Hoff fit, from memory).
HCHO_HYDRATION_H_KJ = -33.0
#: Source key of the hydration data (in tfa/data/literature_sources.csv, not in OBIGT).
HCHO_HYDRATION_SOURCE = "Bel66"


# --------------------------------------------------------------------------------------------
# Reactant table. Species are written as OBIGT names (state aq unless marked):
#   "name"        aqueous species
#   "name|gas"    gas,  "name|liq" liquid
#   WATER_ID, COMPOSITE_CO2 special rows built by this script.
# Columns: id, name, kind, synonyms, species
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class ReactantDef:
    id: str
    name: str
    kind: str
    synonyms: tuple[str, ...]
    species: tuple[str, ...]


def R_(id_: str, name: str, kind: str, synonyms: str, species: str) -> ReactantDef:
    """One reactant: synonyms and species as ';'-separated text (readable table below)."""
    syn = tuple(s.strip() for s in synonyms.split(";") if s.strip())
    sp = tuple(s.strip() for s in species.split(";") if s.strip())
    return ReactantDef(id_, name, kind, syn, sp)


AQ, GAS, WATER, PROTON, SOLID = "aqueous", "gas", "water", "proton", "solid"

REACTANTS: list[ReactantDef] = [
    # --- water, proton, inorganic feed compounds ---------------------------------------------
    R_("H2O", "water", WATER, "water; H2O(l)", WATER_ID),
    R_("H+", "proton", PROTON, "proton; hydrogen ion; H(+)", "H+"),
    R_(OUTER_PROTON, "hydrogen ion of the outer fluid", AQ,
       "outer proton; proton of the outer fluid; external proton", OUTER_PROTON),
    R_("H2", "hydrogen (dissolved)", AQ, "dihydrogen; H2(aq); hydrogen", "H2"),
    R_("H2(g)", "hydrogen gas", GAS, "hydrogen gas; dihydrogen gas", "hydrogen|gas"),
    R_("CO2", "carbon dioxide (dissolved, unhydrated)", AQ, "CO2(aq); carbon dioxide", "CO2"),
    R_("CO2(g)", "carbon dioxide gas", GAS, "carbon dioxide gas", "carbon dioxide|gas"),
    R_("CO2tot", "total carbon dioxide (hydrated CO2, bicarbonate, carbonate)", AQ,
       "total CO2; CO2 total; dissolved inorganic carbon; DIC; bicarbonate; hydrogencarbonate; "
       "HCO3-; HCO3; carbonate; CO3-2; carbonic acid; H2CO3",
       f"{COMPOSITE_CO2}; HCO3-; CO3-2; MgCO3"),
    R_("CH4", "methane (dissolved)", AQ, "methane; CH4(aq)", "CH4"),
    R_("CH4(g)", "methane gas", GAS, "methane gas", "methane|gas"),
    R_("CO", "carbon monoxide (dissolved)", AQ, "carbon monoxide; CO(aq)", "CO"),
    R_("CO(g)", "carbon monoxide gas", GAS, "carbon monoxide gas", "carbon monoxide|gas"),
    R_("H2S", "hydrogen sulfide (dissolved, H2S + HS-)", AQ,
       "hydrogen sulfide; H2S(aq); sulfide; bisulfide; hydrosulfide; HS-", "H2S; HS-"),
    R_("H2S(g)", "hydrogen sulfide gas", GAS, "hydrogen sulfide gas", "hydrogen sulfide|gas"),
    R_("ammonia", "ammonia (dissolved, NH3 + NH4+)", AQ,
       "NH3; NH3(aq); ammonium; NH4+; NH4", "NH3; NH4+"),
    R_("NH3(g)", "ammonia gas", GAS, "ammonia gas", "ammonia|gas"),
    R_("N2", "nitrogen (dissolved)", AQ, "dinitrogen; N2(aq); nitrogen", "N2"),
    R_("N2(g)", "nitrogen gas", GAS, "nitrogen gas; dinitrogen gas", "nitrogen|gas"),
    R_("O2", "oxygen (dissolved)", AQ, "dioxygen; O2(aq); oxygen", "O2"),
    R_("O2(g)", "oxygen gas", GAS, "oxygen gas; dioxygen gas", "oxygen|gas"),
    R_("phosphate", "orthophosphate", AQ,
       "Pi; orthophosphate; phosphoric acid; H3PO4; HPO4-2; H2PO4-; inorganic phosphate",
       "H3PO4; H2PO4-; HPO4-2; PO4-3"),
    R_("pyrophosphate", "pyrophosphate", AQ,
       "PPi; diphosphate; pyrophosphoric acid; inorganic pyrophosphate",
       "H4P2O7; H3P2O7-; H2P2O7-2; HP2O7-3; P2O7-4"),
    R_("sulfate", "sulfate", AQ, "SO4-2; sulphate; hydrogen sulfate; bisulfate",
       "HSO4-; SO4-2"),
    R_("sulfite", "sulfite", AQ, "SO3-2; sulphite; hydrogen sulfite; bisulfite; HSO3-",
       "HSO3-; SO3-2"),
    R_("thiosulfate", "thiosulfate", AQ, "S2O3-2; thiosulphate; hydrogen thiosulfate",
       "H2S2O3; HS2O3-; S2O3-2"),
    R_("S0", "elemental sulfur (rhombic, solid)", SOLID,
       "S; sulfur; sulphur; elemental sulfur; S(s); S(cr); sulfur (rhombic); S8", "sulfur|cr"),
    R_("magnesium", "magnesium ion", AQ, "Mg2+; Mg+2; Mg++; magnesium ion", "Mg+2"),
    # --- C1-C3 organics -----------------------------------------------------------------------
    R_("formate", "formate", AQ, "formic acid; methanoate; HCOO-; HCOOH",
       "formic acid; formate"),
    R_("acetate", "acetate", AQ, "acetic acid; ethanoate; CH3COO-; CH3COOH",
       "acetic acid; acetate"),
    R_("propanoate", "propanoate", AQ, "propionate; propanoic acid; propionic acid",
       "propanoic acid; propanoate"),
    R_("butanoate", "butanoate", AQ, "butyrate; butanoic acid; butyric acid",
       "n-butanoic acid; n-butanoate"),
    R_("methanol", "methanol", AQ, "methyl alcohol; CH3OH", "methanol"),
    R_("ethanol", "ethanol", AQ, "ethyl alcohol", "ethanol"),
    R_("formaldehyde", "formaldehyde (total: methanediol and HCHO)", AQ,
       "methanal; HCHO; methanediol; methylene glycol; formaldehyde hydrate",
       f"formaldehyde; {COMPOSITE_HCHO}"),
    R_("acetaldehyde", "acetaldehyde", AQ, "ethanal", "acetaldehyde"),
    R_("methanethiol", "methanethiol", AQ, "methyl mercaptan; CH3SH", "methanethiol"),
    R_("HCN", "hydrogen cyanide", AQ, "hydrogen cyanide; hydrocyanic acid", "HCN"),
    R_("urea", "urea", AQ, "carbamide", "urea"),
    R_("glycolate", "glycolate", AQ, "glycolic acid; hydroxyacetate; hydroxyacetic acid",
       "glycolic acid; glycolate"),
    R_("lactate", "lactate", AQ, "lactic acid; 2-hydroxypropanoate; L-lactate",
       "lactic acid; lactate"),
    R_("pyruvate", "pyruvate", AQ, "pyruvic acid; 2-oxopropanoate",
       "pyruvic acid; pyruvate"),
    R_("oxalate", "oxalate", AQ, "oxalic acid", "oxalic acid; H-oxalate; oxalate-2"),
    R_("malonate", "malonate", AQ, "malonic acid", "malonic acid; H-malonate; malonate-2"),
    R_("glycerol", "glycerol", AQ, "glycerin; propane-1,2,3-triol", "glycerol"),
    R_("ethanolamine", "ethanolamine", AQ, "2-aminoethanol", "ethanolamine"),
    R_("putrescine", "putrescine", AQ, "1,4-diaminobutane", "putrescine"),
    R_("spermidine", "spermidine", AQ, "", "spermidine"),
    # --- citric-acid cycle ---------------------------------------------------------------------
    R_("citrate", "citrate", AQ, "citric acid",
       "citric acid; H2-citrate; H-citrate-2; citrate-3"),
    R_("isocitrate", "isocitrate", AQ, "isocitric acid",
       "isocitric acid; H2-isocitrate; H-isocitrate-2; isocitrate-3"),
    R_("cis-aconitate", "cis-aconitate", AQ, "cis-aconitic acid; aconitate",
       "cis-aconitic acid; H2-cis-aconitate; H-cis-aconitate-2; cis-aconitate-3"),
    R_("2-oxoglutarate", "2-oxoglutarate", AQ,
       "alpha-ketoglutarate; 2-ketoglutarate; oxoglutarate; a-ketoglutarate; AKG; "
       "2-oxoglutaric acid; alpha-ketoglutaric acid",
       "a-ketoglutaric acid; H-a-ketoglutarate; a-ketoglutarate-2"),
    R_("succinate", "succinate", AQ, "succinic acid; butanedioate",
       "succinic acid; H-succinate; succinate-2"),
    R_("fumarate", "fumarate", AQ, "fumaric acid", "fumaric acid; H-fumarate; fumarate-2"),
    R_("malate", "malate", AQ, "malic acid; L-malate", "malic acid; H-malate; malate-2"),
    R_("oxaloacetate", "oxaloacetate", AQ, "oxaloacetic acid; oxalacetate; OAA",
       "oxaloacetic acid; H-oxaloacetate; oxaloacetate-2"),
    R_("glutarate", "glutarate", AQ, "glutaric acid", "glutaric acid; H-glutarate; glutarate-2"),
    # --- phosphorylated C2/C3 intermediates (LDS+26, unreviewed) -------------------------------
    R_("acetyl phosphate", "acetyl phosphate", AQ, "acetylphosphate; acetyl-P; AcP",
       "acetylphosphate; acetylphosphate-1; acetylphosphate-2; acetylphosphate-3"),
    R_("glycerate", "glycerate", AQ, "glyceric acid; D-glycerate", "glyceric acid; glycerate-1"),
    R_("3-phosphoglycerate", "3-phosphoglycerate", AQ,
       "3-phospho-D-glycerate; 3PG; 3-PGA; glycerate 3-phosphate",
       "3-phosphoglycerate; 3-phosphoglycerate-1; 3-phosphoglycerate-2; 3-phosphoglycerate-3"),
    R_("1,3-bisphosphoglycerate", "1,3-bisphosphoglycerate", AQ,
       "bisphosphoglycerate; 1,3-BPG; 3-phospho-D-glyceroyl phosphate; BPG",
       "bisphosphoglycerate; bisphosphoglycerate-1; bisphosphoglycerate-2; "
       "bisphosphoglycerate-3; bisphosphoglycerate-4; bisphosphoglycerate-5"),
    R_("phosphoenolpyruvate", "phosphoenolpyruvate", AQ, "PEP",
       "phosphoenolpyruvate; phosphoenolpyruvate-1; phosphoenolpyruvate-2; "
       "phosphoenolpyruvate-3"),
    R_("glycerol 3-phosphate", "glycerol 3-phosphate", AQ,
       "glycerol-3-phosphate; 3-phosphoglycerol; sn-glycerol 3-phosphate; G3P",
       "3-phosphoglycerol; 3-phosphoglycerol-1; 3-phosphoglycerol-2"),
    # --- sugars and sugar phosphates -----------------------------------------------------------
    R_("ribose", "D-ribose", AQ, "D-ribose", "ribose"),
    R_("deoxyribose", "2-deoxy-D-ribose", AQ, "2-deoxyribose; 2-deoxy-D-ribose", "deoxyribose"),
    R_("arabinose", "arabinose", AQ, "", "arabinose"),
    R_("xylose", "xylose", AQ, "", "xylose"),
    R_("lyxose", "lyxose", AQ, "", "lyxose"),
    R_("ribulose", "ribulose", AQ, "D-ribulose", "ribulose"),
    R_("xylulose", "xylulose", AQ, "D-xylulose", "xylulose"),
    R_("glucose", "D-glucose", AQ, "D-glucose; dextrose", "glucose"),
    R_("fructose", "D-fructose", AQ, "D-fructose", "fructose"),
    R_("galactose", "D-galactose", AQ, "D-galactose", "galactose"),
    R_("mannose", "D-mannose", AQ, "D-mannose", "mannose"),
    R_("sorbose", "sorbose", AQ, "L-sorbose", "sorbose"),
    R_("rhamnose", "rhamnose", AQ, "L-rhamnose", "rhamnose"),
    R_("heptose", "heptose", AQ, "", "heptose"),
    R_("glucosamine", "glucosamine", AQ, "glucoseamine; D-glucosamine", "glucoseamine"),
    R_("N-acetylglucosamine", "N-acetylglucosamine", AQ, "GlcNAc", "N-acetylglucosamine"),
    R_("glucose 6-phosphate", "D-glucose 6-phosphate", AQ, "glucose-6-phosphate; G6P",
       "glucose-6-phosphate; glucose-6-phosphate-1; glucose-6-phosphate-2"),
    R_("fructose 6-phosphate", "D-fructose 6-phosphate", AQ, "fructose-6-phosphate; F6P",
       "fructose-6-phosphate; fructose-6-phosphate-1; fructose-6-phosphate-2"),
    R_("mannose 6-phosphate", "D-mannose 6-phosphate", AQ, "mannose-6-phosphate; M6P",
       "mannose-6-phosphate; mannose-6-phosphate-1; mannose-6-phosphate-2"),
    R_("galactose 1-phosphate", "D-galactose 1-phosphate", AQ, "galactose-1-phosphate; Gal1P",
       "galactose-1-phosphate; galactose-1-phosphate-1; galactose-1-phosphate-2"),
    R_("ribose 5-phosphate", "D-ribose 5-phosphate", AQ, "ribose-5-phosphate; R5P",
       "ribose-5-phosphate; ribose-5-phosphate-1; ribose-5-phosphate-2"),
    R_("ribulose 5-phosphate", "D-ribulose 5-phosphate", AQ,
       "ribulose-5-phosphate; ribulosephosphate; Ru5P",
       "ribulosephosphate; ribulosephosphate-; ribulosephosphate-2"),
    # --- nucleobases and nucleosides -----------------------------------------------------------
    R_("adenine", "adenine", AQ, "Ade", "adenine"),
    R_("guanine", "guanine", AQ, "Gua", "guanine"),
    R_("cytosine", "cytosine", AQ, "Cyt", "cytosine"),
    R_("thymine", "thymine", AQ, "Thy", "thymine"),
    R_("uracil", "uracil", AQ, "Ura", "uracil"),
    R_("adenosine", "adenosine", AQ, "Ado", "adenosine"),
    R_("guanosine", "guanosine", AQ, "Guo", "guanosine"),
    R_("cytidine", "cytidine", AQ, "Cyd", "cytidine"),
    R_("uridine", "uridine", AQ, "Urd", "uridine"),
    # OBIGT's "thymidine" is the ribonucleoside (C10H14N2O6): ribothymidine. The name
    # "thymidine" alone is left unmapped because biochemists use it for deoxythymidine.
    R_("ribothymidine", "ribothymidine (5-methyluridine)", AQ, "5-methyluridine", "thymidine"),
    R_("deoxyadenosine", "2'-deoxyadenosine", AQ, "2'-deoxyadenosine; dAdo", "deoxyadenosine"),
    R_("deoxyguanosine", "2'-deoxyguanosine", AQ, "2'-deoxyguanosine; dGuo", "deoxyguanosine"),
    R_("deoxycytidine", "2'-deoxycytidine", AQ, "2'-deoxycytidine; dCyd", "deoxycytidine"),
    R_("deoxyuridine", "2'-deoxyuridine", AQ, "2'-deoxyuridine; dUrd", "deoxyuridine"),
    R_("deoxythymidine", "2'-deoxythymidine", AQ, "2'-deoxythymidine; dThd",
       "deoxythymidine"),
    # --- nucleotides: (id, name, OBIGT stem, number of phosphates) expanded below ---------------
    # --- cofactors ------------------------------------------------------------------------------
    R_("NAD", "NAD+ (oxidised nicotinamide adenine dinucleotide)", AQ,
       "NAD+; NAD(ox); NADox; nicotinamide adenine dinucleotide",
       "H2NAD(ox)+; HNAD(ox); NAD(ox)-"),
    R_("NADH", "NADH (reduced nicotinamide adenine dinucleotide)", AQ, "NAD(red); NADred",
       "H2NAD(red); HNAD(red)-; NAD(red)-2"),
    R_("NADP", "NADP+ (oxidised nicotinamide adenine dinucleotide phosphate)", AQ,
       "NADP+; NADP(ox); NADPox; nicotinamide adenine dinucleotide phosphate",
       "H4NADP(ox)+; H3NADP(ox); H2NADP(ox)-; HNADP(ox)-2; NADP(ox)-3"),
    R_("NADPH", "NADPH (reduced nicotinamide adenine dinucleotide phosphate)", AQ,
       "NADP(red); NADPred",
       "H4NADP(red); H3NADP(red)-; H2NADP(red)-2; HNADP(red)-3; NADP(red)-4"),
    R_("NMN", "nicotinamide mononucleotide (oxidised)", AQ,
       "nicotinamide mononucleotide; NMN+; NicMP(ox)",
       "H2NicMP(ox)+; HNicMP(ox); NicMP(ox)-"),
    R_("NMNH", "nicotinamide mononucleotide (reduced)", AQ, "NicMP(red)",
       "H2NicMP(red); HNicMP(red)-; NicMP(red)-2"),
    R_("cAMP", "3',5'-cyclic AMP", AQ, "cyclic AMP; 3',5'-cyclic AMP; cyclic adenosine monophosphate",
       "cyclic-HAMP; cyclic-AMP-1"),
]

#: Nucleotides: id, name, base letter in OBIGT names, deoxy?, phosphates. OBIGT's TMP/TDP/TTP
#: are ribothymidine nucleotides; they get ids ribo-TMP etc. so that "TMP" means nothing wrong.
NUCLEOTIDE_BASES = {"A": "adenosine", "G": "guanosine", "C": "cytidine", "U": "uridine",
                    "T": "ribothymidine"}
_PHOS = {1: "MP", 2: "DP", 3: "TP"}
_PHOS_WORD = {1: "monophosphate", 2: "diphosphate", 3: "triphosphate"}


def _nucleotides() -> list[ReactantDef]:
    """Expand the nucleotide families of LaRowe & Helgeson (2006) into reactants."""
    out = []
    mg_species = {"AMP": "MgAMP", "ADP": "MgADP-; MgHADP; Mg2ADP+",
                  "ATP": "MgATP-2; MgHATP-; MgH2ATP; Mg2ATP"}
    for deoxy in (False, True):
        for base, nucleoside in NUCLEOTIDE_BASES.items():
            for n_p in (1, 2, 3):
                stem = base + _PHOS[n_p]                       # e.g. ATP
                prefix = "d" if deoxy else ""
                max_h = n_p + 1                                # fully protonated H(n+1)XNP
                charges = [-(n_p + 1) + k for k in range(max_h + 1)]
                names = []
                for k, z in enumerate(charges):
                    hpart = "" if k == 0 else ("H" if k == 1 else f"H{k}")
                    zpart = "" if z == 0 else ("-" if z == -1 else f"{z:+d}".replace("+", "+"))
                    names.append(f"{prefix}{hpart}{stem}{zpart}")
                if deoxy:
                    if base == "T":
                        ident, nuc = f"dT{_PHOS[n_p]}", "2'-deoxythymidine"
                    else:
                        ident, nuc = f"d{stem}", "2'-deoxy" + nucleoside
                elif base == "T":
                    ident, nuc = f"ribo-T{_PHOS[n_p]}", nucleoside
                else:
                    ident, nuc = stem, nucleoside
                name = f"{nuc} 5'-{_PHOS_WORD[n_p]}"
                synonyms = [name, name.replace(" 5'-", " ")]
                if not deoxy and base != "T":
                    synonyms.append(f"{nucleoside} {_PHOS_WORD[n_p]}".replace(" 5'-", " "))
                species = names + ([] if deoxy else mg_species.get(stem, "").split("; "))
                out.append(ReactantDef(ident, name, AQ,
                                       tuple(dict.fromkeys(s for s in synonyms if s)),
                                       tuple(s for s in species if s)))
    return out


#: Amino acids: id, three-letter code, OBIGT species from most protonated to least.
AMINO_ACIDS = [
    ("alanine", "Ala", "alaninium; alanine; alaninate"),
    ("arginine", "Arg", "argininium+2; argininium; arginine; argininate"),
    ("asparagine", "Asn", "asparaginium; asparagine; asparaginate"),
    ("aspartate", "Asp", "aspartinium; aspartic acid; aspartate; aspartate-2"),
    ("cysteine", "Cys", "cysteinium; cysteine; cysteinate; cysteinate-2"),
    ("glutamine", "Gln", "glutaminium; glutamine; glutaminate"),
    ("glutamate", "Glu", "glutamic-acid+1; glutamic acid; glutamate; glutamate-2"),
    ("glycine", "Gly", "glycinium; glycine; glycinate"),
    ("histidine", "His", "histidinium+2; histidinium; histidine; histidinate"),
    ("isoleucine", "Ile", "isoleucinium; isoleucine; isoleucinate"),
    ("leucine", "Leu", "leucinium; leucine; leucinate"),
    ("lysine", "Lys", "lysinium+2; lysinium; lysine; lysinate"),
    ("methionine", "Met", "methioninium; methionine; methionate"),
    ("phenylalanine", "Phe", "phenylalaninium; phenylalanine; phenylalanate"),
    ("proline", "Pro", "prolinium; proline; prolinate"),
    ("serine", "Ser", "serinium; serine; serinate"),
    ("threonine", "Thr", "threoninium; threonine; threonate"),
    ("tryptophan", "Trp", "tryptophanium; tryptophan; tryptophanate"),
    ("tyrosine", "Tyr", "tyrosinium; tyrosine; tyrosinate; tyrosinate-2"),
    ("valine", "Val", "valinium; valine; valinate"),
]
_ACID_NAMES = {"aspartate": "aspartic acid; L-aspartic acid", "glutamate": "glutamic acid; "
               "L-glutamic acid"}


def _amino_acids() -> list[ReactantDef]:
    out = []
    for ident, code, species in AMINO_ACIDS:
        syn = f"{code}; L-{ident}"
        if ident in _ACID_NAMES:
            syn += "; " + _ACID_NAMES[ident]
        out.append(R_(ident, ident, AQ, syn, species))
    return out


# --------------------------------------------------------------------------------------------
# Homologous series and other small organic compounds with peer-reviewed aqueous data. They
# widen the training set of the group-contribution estimator (tfa/thermo/group_contribution.py):
# a -CH2- increment can only be fitted from series that differ by -CH2- alone. Only aqueous
# species, and only sources that sources.csv marks peer reviewed (checked in
# tests/test_thermo_species.py). Sources (OBIGT keys): SH90 Shock & Helgeson 1990; PS01
# Plyasunov & Shock 2001; Sho93 Shock 1993; SS93 Schulte & Shock 1993; Sho95 Shock 1995; DSM+97
# Dale et al. 1997; SR04 Schulte & Rogers 2004; Sch10 Schulte 2010; Kit14 Kitadai 2014; LA16
# LaRowe & Amend 2016; LA19 LaRowe & Amend 2019; RSS+24 Robinson et al. 2024.
# Left out: chlorinated ethylenes and methylphenanthrenes (no metabolic relevance, groups of their
# own), Gly-X-Gly tripeptides (no G in OBIGT), glutathione and cystine (thesis data).
# --------------------------------------------------------------------------------------------

#: Alkyl stems by carbon number; common names of the n-alkanoates.
_STEM = {2: "eth", 3: "prop", 4: "but", 5: "pent", 6: "hex", 7: "hept", 8: "oct", 9: "non",
         10: "dec", 11: "undec", 12: "dodec"}
_FATTY_COMMON = {5: "valerate; valeric acid", 6: "caproate; caproic acid",
                 7: "enanthate; enanthic acid", 8: "caprylate; caprylic acid",
                 9: "pelargonate; pelargonic acid", 10: "caprate; capric acid",
                 11: "undecylate", 12: "laurate; lauric acid"}
_ALKYL = {1: "methyl", 2: "ethyl", 3: "propyl", 4: "butyl", 5: "pentyl", 6: "hexyl",
          7: "heptyl", 8: "octyl"}


def _homologous_series() -> list[ReactantDef]:
    out: list[ReactantDef] = []
    # n-alkanes (SH90; hexane PS01)
    for n in range(2, 9):
        name = {2: "ethane", 3: "propane"}.get(n, f"n-{_STEM[n]}ane")
        obigt = {2: "ethane", 3: "propane"}.get(n, f"{_STEM[n]}ane")
        out.append(R_(name, name, AQ, obigt if n > 3 else "", obigt))
    # ethylene (PS01) and 1-alkenes (SH90)
    out.append(R_("ethylene", "ethylene", AQ, "ethene", "ethylene"))
    for n in range(3, 9):
        obigt = f"{_STEM[n]}ene"
        out.append(R_(f"1-{obigt}", f"1-{obigt}", AQ, f"{obigt}", obigt))
    # aromatic hydrocarbons (PS01, SH90) and cyclohexane (PS01)
    out.append(R_("benzene", "benzene", AQ, "", "benzene"))
    out.append(R_("toluene", "toluene", AQ, "methylbenzene", "toluene"))
    out.append(R_("ethylbenzene", "ethylbenzene", AQ, "", "ethylbenzene"))
    for n in range(3, 9):
        out.append(R_(f"n-{_STEM[n]}ylbenzene", f"n-{_STEM[n]}ylbenzene", AQ,
                      f"{_STEM[n]}ylbenzene; 1-phenyl{_STEM[n]}ane", f"n-{_STEM[n]}ylbenzene"))
    out.append(R_("cyclohexane", "cyclohexane", AQ, "", "cyclohexane"))
    # primary alcohols (PS01 propanol, SH90 butanol to octanol)
    for n in range(3, 9):
        obigt = f"{_STEM[n]}anol"
        out.append(R_(f"1-{obigt}", f"1-{obigt}", AQ, f"{obigt}; n-{obigt}; {_STEM[n]}an-1-ol",
                      obigt))
    out.append(R_("benzyl alcohol", "benzyl alcohol", AQ, "phenylmethanol", "benzyl alcohol"))
    # aldehydes (SS93)
    for n in range(3, 11):
        obigt = f"{_STEM[n]}anal"
        syn = {3: "propionaldehyde", 4: "butyraldehyde", 5: "valeraldehyde"}.get(n, "")
        out.append(R_(obigt, obigt, AQ, syn, obigt))
    # methyl ketones (SH90)
    out.append(R_("acetone", "acetone", AQ, "propanone; 2-propanone", "acetone"))
    out.append(R_("butanone", "butanone", AQ, "2-butanone; methyl ethyl ketone", "butanone"))
    for n in range(5, 9):
        obigt = f"2-{_STEM[n]}anone"
        out.append(R_(obigt, obigt, AQ, f"{_STEM[n]}an-2-one", obigt))
    # n-alkanoic acids C5-C12 and their anions (Sho95)
    for n in range(5, 13):
        anion, acid = f"{_STEM[n]}anoate", f"{_STEM[n]}anoic acid"
        out.append(R_(anion, anion, AQ, f"{acid}; n-{anion}; n-{acid}; {_FATTY_COMMON[n]}",
                      f"n-{acid}; n-{anion}"))
    # long-chain fatty acid anions (LA16; OBIGT gives the anion only)
    out.append(R_("myristate", "myristate", AQ, "tetradecanoate; myristic acid; "
                  "tetradecanoic acid", "myristate"))
    out.append(R_("palmitate", "palmitate", AQ, "hexadecanoate; palmitic acid; "
                  "hexadecanoic acid", "palmitate"))
    out.append(R_("palmitoleate", "palmitoleate", AQ, "palmitoleic acid", "palmitoleate"))
    out.append(R_("oleate", "oleate", AQ, "oleic acid", "oleate"))
    out.append(R_("3-hydroxymyristate", "3-hydroxymyristate", AQ,
                  "beta-hydroxymyristate; 3-hydroxytetradecanoate", "β-hydroxymyristate"))
    # alpha,omega-dicarboxylic acids C6-C10 (Sho95)
    for stem, anion in (("adip", "adip"), ("pimel", "pimel"), ("suber", "suber"),
                        ("azela", "azel"), ("sebac", "sebac")):
        out.append(R_(f"{anion}ate", f"{anion}ate", AQ, f"{stem}ic acid",
                      f"{stem}ic acid; H-{anion}ate; {anion}ate-2"))
    # 2-hydroxy acids C4-C10 (Sho95)
    for n in range(4, 11):
        anion, acid = f"2-hydroxy{_STEM[n]}anoate", f"2-hydroxy{_STEM[n]}anoic acid"
        out.append(R_(anion, anion, AQ, acid, f"{acid}; {anion}"))
    # aromatic and alicyclic carboxylic acids (Sho95; LA19)
    out.append(R_("benzoate", "benzoate", AQ, "benzoic acid", "n-benzoic acid; benzoate"))
    for pos in ("o", "m", "p"):
        out.append(R_(f"{pos}-toluate", f"{pos}-toluate", AQ, f"{pos}-toluic acid",
                      f"{pos}-toluic acid; {pos}-toluate"))
    out.append(R_("cyclohexanecarboxylate", "cyclohexanecarboxylate", AQ,
                  "cyclohexanecarboxylic acid; cyclohexane carboxylic acid",
                  "cyclohexane carboxylic acid; cyclohexane carboxylate"))
    # phenols (DSM+97; LA19)
    out.append(R_("phenol", "phenol", AQ, "hydroxybenzene", "phenol"))
    for pos in ("o", "m", "p"):
        out.append(R_(f"{pos}-cresol", f"{pos}-cresol", AQ, "", f"{pos}-cresol"))
    for pos in ("2,3", "2,4", "2,5", "2,6", "3,4", "3,5"):
        out.append(R_(f"{pos}-dimethylphenol", f"{pos}-dimethylphenol", AQ,
                      f"{pos}-xylenol", f"{pos}-dimethylphenol"))
    out.append(R_("resorcinol", "resorcinol", AQ, "1,3-dihydroxybenzene", "resorcinol"))
    out.append(R_("phloroglucinol", "phloroglucinol", AQ, "1,3,5-trihydroxybenzene",
                  "phloroglucinol"))
    # n-alkanethiols (SR04; methanethiol is above)
    out.append(R_("ethanethiol", "ethanethiol", AQ, "ethyl mercaptan", "ethanethiol"))
    for n in range(3, 13):
        obigt = f"n-{_STEM[n]}anethiol"
        out.append(R_(f"1-{_STEM[n]}anethiol", f"1-{_STEM[n]}anethiol", AQ,
                      f"{obigt}; {_STEM[n]}ane-1-thiol", obigt))
    # dialkyl sulfides (Sch10)
    for obigt, syn in (("dimethyl sulfide", "DMS; methylthiomethane"),
                       ("methyl ethyl sulfide", "ethyl methyl sulfide"),
                       ("diethyl sulfide", ""), ("dipropyl sulfide", ""),
                       ("dibutyl sulfide", ""), ("dipentyl sulfide", ""),
                       ("dihexyl sulfide", "")):
        out.append(R_(obigt, obigt, AQ, syn, obigt))
    # alkylamines and their aminium ions (RSS+24): primary, secondary, tertiary, C1-C8 chains
    for n, alkyl in _ALKYL.items():
        for prefix in ("", "di", "tri"):
            base = f"{prefix}{alkyl}amine"
            out.append(R_(base, base, AQ, f"{prefix}{alkyl}ammonium",
                          f"{prefix}{alkyl}aminium; {base}"))
    for prefix in ("", "di", "tri"):
        base = f"{prefix}benzylamine"
        out.append(R_(base, base, AQ, f"{prefix}benzylammonium", f"{prefix}benzylaminium; {base}"))
    # amide, ester (Sho93)
    out.append(R_("acetamide", "acetamide", AQ, "ethanamide", "acetamide"))
    out.append(R_("ethyl acetate", "ethyl acetate", AQ, "ethylacetate; ethyl ethanoate",
                  "ethylacetate"))
    # amino acids beyond the twenty (SH90 zwitterion only; LA16) and glycine peptides (Kit14)
    out.append(R_("2-aminobutanoate", "2-aminobutanoate", AQ,
                  "2-aminobutyrate; alpha-aminobutyric acid; 2-aminobutanoic acid",
                  "a-aminobutyric acid"))
    out.append(R_("diaminopimelate", "2,6-diaminopimelate", AQ,
                  "diaminopimelic acid; meso-diaminopimelate; DAP", "diaminopimelic acid"))
    out.append(R_("diglycine", "glycylglycine", AQ, "Gly-Gly; glycylglycine",
                  "diglycine+; diglycine; diglycine-"))
    out.append(R_("triglycine", "glycylglycylglycine", AQ, "Gly-Gly-Gly; glycylglycylglycine",
                  "triglycine+; triglycine; triglycine-"))
    out.append(R_("diketopiperazine", "2,5-diketopiperazine", AQ,
                  "glycine anhydride; cyclo(Gly-Gly); piperazine-2,5-dione", "diketopiperazine"))
    return out


def all_reactants() -> list[ReactantDef]:
    return REACTANTS + _amino_acids() + _nucleotides() + _homologous_series()


# --------------------------------------------------------------------------------------------
# Formula parsing
# --------------------------------------------------------------------------------------------

_TOKEN = re.compile(r"([A-Z][a-z]?|\(|\)|\d+(?:\.\d+)?)")


def parse_formula(text: str) -> tuple[dict[str, int], int]:
    """Element counts and charge of an OBIGT formula such as ``Mg(HCO3)+`` or ``C4H5O4-2``."""
    m = re.match(r"^(.*?)([+-]\d*)?$", text)
    body, zpart = m.group(1), m.group(2)
    charge = 0
    if zpart:
        sign = 1 if zpart[0] == "+" else -1
        charge = sign * (int(zpart[1:]) if len(zpart) > 1 else 1)
    stack: list[dict[str, int]] = [{}]
    tokens = _TOKEN.findall(body)
    if "".join(tokens) != body:
        raise ValueError(f"cannot read formula {text!r}")
    i = 0
    while i < len(tokens):
        tok = tokens[i]
        mult = 1
        if i + 1 < len(tokens) and tokens[i + 1][0].isdigit():
            mult = int(tokens[i + 1])
        if tok == "(":
            stack.append({})
            i += 1
            continue
        if tok == ")":
            group = stack.pop()
            for el, n in group.items():
                stack[-1][el] = stack[-1].get(el, 0) + n * mult
            i += 2 if mult != 1 or (i + 1 < len(tokens) and tokens[i + 1][0].isdigit()) else 1
            continue
        if tok[0].isdigit():
            raise ValueError(f"cannot read formula {text!r}")
        stack[-1][tok] = stack[-1].get(tok, 0) + mult
        i += 2 if (i + 1 < len(tokens) and tokens[i + 1][0].isdigit()) else 1
    if len(stack) != 1:
        raise ValueError(f"unbalanced parentheses in formula {text!r}")
    return {k: v for k, v in stack[0].items() if v}, charge


def hill_formula(counts: dict[str, int]) -> str:
    """Hill order: C, H, then the other elements alphabetically (no charge)."""
    order = []
    if "C" in counts:
        order = ["C"] + (["H"] if "H" in counts else [])
    order += sorted(e for e in counts if e not in order)
    return "".join(e + (str(counts[e]) if counts[e] != 1 else "") for e in order)


# --------------------------------------------------------------------------------------------
# Reading OBIGT
# --------------------------------------------------------------------------------------------

def pychnosz_data_dir() -> Path:
    return Path(str(resources.files("pychnosz"))) / "data" / "extdata"


def read_obigt(extdata: Path) -> dict[tuple[str, str], dict]:
    """First row per (name, state) in pychnosz's default load order, with its file name."""
    rows: dict[tuple[str, str], dict] = {}
    for fname in DEFAULT_FILES:
        frame = pd.read_csv(extdata / "OBIGT" / fname, dtype={"ref2": str, "ref1": str})
        for rec in frame.to_dict("records"):
            key = (rec["name"], rec["state"])
            if key not in rows:
                rec["_file"] = fname
                rows[key] = rec
    return rows


def _num(value) -> float | None:
    if value is None:
        return None
    try:
        x = float(value)
    except (TypeError, ValueError):
        return None
    return None if math.isnan(x) else x


def _str(value) -> str:
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return ""
    return str(value).strip()


@dataclass
class SpeciesRow:
    species: str
    reactant: str
    formula: str
    state: str
    charge: int
    n_h: int
    n_mg: int
    G: float
    H: float | None
    S: float | None
    Cp: float | None
    V: float | None
    source: str
    source2: str
    obigt_name: str
    flag: str = ""
    shift: float | None = None
    anchor: str = ""
    note: str = ""


def _eos_at_reference(names_states: list[tuple[str, str]]) -> dict[tuple[str, str], dict]:
    """Cp (J/mol/K) and V (cm3/mol) at 298.15 K, 1 bar from the rows' equations of state.

    pychnosz's ``info(index)`` fills a missing Cp and V of an HKF row from its parameters; for
    gases (Maier-Kelley Cp coefficients) ``subcrt`` at 25 degC, 1 bar gives Cp. ``subcrt`` is not
    used for V: for rows in J units (pychnosz 1.5.3) it returns V multiplied by 4.184 (e.g.
    ethanolamine, LA16: 234.1 instead of 55.95 cm3/mol).
    """
    if not names_states:
        return {}
    import pychnosz

    out = {}
    with contextlib.redirect_stdout(io.StringIO()):
        pychnosz.reset()
        for name, state in names_states:
            row = pychnosz.info(pychnosz.info(name, state)).iloc[0]
            f = CALORIE if row["E_units"] == "cal" else 1.0
            cp = _num(row["Cp"])
            cp = None if cp is None else cp * f
            if cp is None:
                res = pychnosz.subcrt([name], state=[state], T=25, P=1)
                frame = res.out["species_data"][0] if "species_data" in res.out else res.out
                cp = _num(frame["Cp"].iloc[0])
            out[(name, state)] = {"Cp": cp, "V": _num(row["V"])}
    return out


def water_properties() -> dict[str, float]:
    """Liquid water at 298.15 K, 1 bar from pychnosz.water, in kJ/mol, J/mol/K, cm3/mol."""
    import pychnosz

    pychnosz.reset()
    w = pychnosz.water(["G", "H", "S", "Cp", "V"], T=298.15, P=1)
    props = {"G": float(w["G"]) / 1000.0, "H": float(w["H"]) / 1000.0, "S": float(w["S"]),
             "Cp": float(w["Cp"]), "V": float(w["V"])}
    for key, ref in WATER_CHECK.items():
        tol = 0.02 if key in ("G", "H") else 0.05
        if abs(props[key] - ref) > tol:
            raise SystemExit(f"pychnosz water {key} = {props[key]} differs from the published "
                             f"{ref}; check the pychnosz version")
    return props


def hydrated_formaldehyde(hcho: dict, reactant: str) -> SpeciesRow:
    """The composite row of hydrated formaldehyde from OBIGT's HCHO(aq) row (module docstring).

    G = G(HCHO) − RT ln K_h, H = H(HCHO) + ΔH_h, S = S(HCHO) + (ΔH_h − ΔG_h)/T with
    ΔG_h = −RT ln K_h at 298.15 K; Cp and V those of HCHO (ΔCp_h = ΔV_h = 0). kJ/mol, J/mol/K.
    """
    f = CALORIE if hcho["E_units"] == "cal" else 1.0
    G, H, S, Cp = (_num(hcho[k]) * f for k in ("G", "H", "S", "Cp"))
    dg = -R_KJ * T_REF * math.log(HCHO_HYDRATION_K)            # kJ/mol
    dh = HCHO_HYDRATION_H_KJ
    ds = (dh - dg) / T_REF * 1000.0                               # J/mol/K
    counts, charge = parse_formula(str(hcho["formula"]))
    return SpeciesRow(COMPOSITE_HCHO, reactant, hill_formula(counts), "aq", charge,
                      counts.get("H", 0), 0, G / 1000.0 + dg, H / 1000.0 + dh, S + ds, Cp,
                      _num(hcho["V"]), _str(hcho["ref1"]), HCHO_HYDRATION_SOURCE,
                      "formaldehyde+hydration")


def build_species(reactants: list[ReactantDef], obigt: dict) -> list[SpeciesRow]:
    rows: list[SpeciesRow] = []
    seen: dict[str, str] = {}
    missing: list[str] = []
    need_eos: list[tuple[str, str]] = []
    pending: list[tuple[SpeciesRow, tuple[str, str]]] = []
    water = water_properties()
    water_row_src = obigt[("water", "liq")]

    def add(row: SpeciesRow) -> None:
        if row.species in seen:
            raise SystemExit(f"species {row.species!r} listed in reactants {seen[row.species]!r} "
                             f"and {row.reactant!r}; a species belongs to one reactant")
        seen[row.species] = row.reactant
        rows.append(row)

    for reac in reactants:
        for spec in reac.species:
            if spec == WATER_ID:
                add(SpeciesRow(WATER_ID, reac.id, "H2O", "liq", 0, 2, 0, water["G"], water["H"],
                               water["S"], water["Cp"], water["V"], _str(water_row_src["ref1"]),
                               _str(water_row_src["ref2"]), "water"))
                continue
            if spec == COMPOSITE_CO2:
                co2 = obigt[("CO2", "aq")]
                f = CALORIE if co2["E_units"] == "cal" else 1.0
                vals = {k: _num(co2[k]) for k in ("G", "H", "S", "Cp", "V")}
                add(SpeciesRow(COMPOSITE_CO2, reac.id, "CH2O3", "aq", 0, 2, 0,
                               vals["G"] * f / 1000 + water["G"], vals["H"] * f / 1000 + water["H"],
                               vals["S"] * f + water["S"], vals["Cp"] * f + water["Cp"],
                               vals["V"] + water["V"], _str(co2["ref1"]),
                               _str(water_row_src["ref1"]), "CO2+water"))
                continue
            if spec == COMPOSITE_HCHO:
                add(hydrated_formaldehyde(obigt[("formaldehyde", "aq")], reac.id))
                continue
            sid = None
            if spec == OUTER_PROTON:                    # OBIGT's H+ row under its own id
                spec, sid = "H+", OUTER_PROTON
            name, _, state = spec.partition("|")
            state = state or "aq"
            rec = obigt.get((name, state))
            if rec is None:
                missing.append(f"{reac.id}: {name} ({state})")
                continue
            counts, charge = parse_formula(str(rec["formula"]))
            if state == "aq" and name != "H+" and _num(rec.get("z.T")) is not None and rec["model"] == "HKF":
                if int(round(_num(rec["z.T"]))) != charge:   # e.g. cysteinate (AH97b): HKF z 0
                    print(f"note: {name}: charge {charge} from the formula, HKF z = "
                          f"{rec['z.T']} in {rec['_file']}; the formula's charge is used",
                          file=sys.stderr)
            f = CALORIE if rec["E_units"] == "cal" else 1.0
            G = _num(rec["G"])
            if G is None:
                missing.append(f"{reac.id}: {name} ({state}) has no G")
                continue
            H, S, Cp, V = (_num(rec[k]) for k in ("H", "S", "Cp", "V"))
            sid = sid or (f"{rec['formula']}(g)" if state == "gas" else name)
            row = SpeciesRow(sid, reac.id, hill_formula(counts), state, charge,
                             counts.get("H", 0), counts.get("Mg", 0), G * f / 1000.0,
                             None if H is None else H * f / 1000.0,
                             None if S is None else S * f, None if Cp is None else Cp * f, V,
                             _str(rec["ref1"]), _str(rec["ref2"]), name)
            if Cp is None or V is None:
                need_eos.append((name, state))
                pending.append((row, (name, state)))
            add(row)
    if missing:
        raise SystemExit("not found in OBIGT (default files):\n  " + "\n  ".join(missing))
    eos = _eos_at_reference(need_eos)
    for row, key in pending:
        if row.Cp is None and eos[key]["Cp"] is not None:
            row.Cp = eos[key]["Cp"]
        if row.V is None and eos[key]["V"] is not None:
            row.V = eos[key]["V"]
    return rows


# --------------------------------------------------------------------------------------------
# Corrections: quarantined species, magnesium complexes, re-anchored reactants
# --------------------------------------------------------------------------------------------
#
# The OBIGT rows are the sources' own numbers. Checked against measured biochemical equilibria,
# a few of them disagree by more than their uncertainty allows; other data are missing for the
# magnesium convention. The corrections below are applied after the rows are read, each with
# its reason written into the row (columns flag, shift_kJ, anchor, note of species.csv), so
# that a reader of the table sees which numbers are the sources' and which are ours.

#: Species of the unreviewed source that cannot exist: left out of the table, with the reason.
QUARANTINED: dict[str, str] = {
    "acetylphosphate-3": "C2H2O5P(3-) would be acetyl phosphate after the loss of a C-H proton "
    "of its methyl group; the source gives that step pKa 7.18, so at pH 7 this species would "
    "make up most of acetyl phosphate. Acetyl phosphate has two ionisable P-OH protons only "
    "(pKa about 1 and 4.8-5.0); C-H acids of this kind have pKa above 20 (from memory)",
    "bisphosphoglycerate-5": "C3H3O10P2(5-) would be 1,3-bisphosphoglycerate after the loss of a "
    "fifth proton with pKa 6.25; the molecule has four P-OH protons, and its remaining O-H "
    "(secondary alcohol) has a pKa near 13-14 (from memory)",
}


@dataclass(frozen=True)
class MagnesiumComplex:
    """A Mg2+ complex built from its ligand species and a binding constant.

    ``log_beta`` is log10 of the overall constant of L + n Mg2+ = MgnL at 25 degC and the ionic
    strength ``ionic_strength`` (mol/L); :func:`magnesium_complex_row` carries it to I = 0.
    """

    species: str
    ligand: str
    n_mg: int
    log_beta: float
    ionic_strength: float
    source: str
    note: str


#: Magnesium complexes of orthophosphate and pyrophosphate, for the pMg transform (Alberty 2003,
#: ch. 4). OBIGT has none. The constants are at 25 degC, I = 0.1 M, from the critical
#: compilation of Smith & Martell (1976, key SM76; recalled, from memory); the Mg complexes of
#: H2PO4(-), PO4(3-) and of the more protonated pyrophosphates are left out (below 1 % of the
#: reactant at pH 6-8 and pMg >= 2).
MG_COMPLEXES: tuple[MagnesiumComplex, ...] = (
    MagnesiumComplex("MgHPO4", "HPO4-2", 1, 1.88, 0.1, "SM76",
                     "Mg2+ + HPO4(2-) = MgHPO4, log K 1.88 at I = 0.1 M (Smith & Martell 1976, "
                     "from memory; Alberty 2003 lists DfG(MgHPO4) = -1566.87 kJ/mol, log K 2.8 "
                     "at I = 0, from memory)"),
    MagnesiumComplex("MgHP2O7-", "HP2O7-3", 1, 3.06, 0.1, "SM76",
                     "Mg2+ + HP2O7(3-) = MgHP2O7(-), log K 3.06 at I = 0.1 M (Smith & Martell "
                     "1976, from memory)"),
    MagnesiumComplex("MgP2O7-2", "P2O7-4", 1, 5.41, 0.1, "SM76",
                     "Mg2+ + P2O7(4-) = MgP2O7(2-), log K 5.41 at I = 0.1 M (Smith & Martell "
                     "1976, from memory)"),
    MagnesiumComplex("Mg2P2O7", "P2O7-4", 2, 7.74, 0.1, "SM76",
                     "2 Mg2+ + P2O7(4-) = Mg2P2O7, log beta 7.74 (5.41 + 2.33) at I = 0.1 M "
                     "(Smith & Martell 1976, from memory)"),
)

#: Which reactant each complex joins.
MG_COMPLEX_REACTANT = {"MgHPO4": "phosphate", "MgHP2O7-": "pyrophosphate",
                       "MgP2O7-2": "pyrophosphate", "Mg2P2O7": "pyrophosphate"}
MAGNESIUM_ION = "Mg+2"
#: Debye-Hueckel slope A = alpha/ln 10 at 25 degC, kg^1/2 mol^-1/2 (alpha = 1.17582, Alberty 2003).
DEBYE_HUCKEL_A = 1.17582 / LN10


def magnesium_complex_row(cx: MagnesiumComplex, ligand: SpeciesRow, mg: SpeciesRow) -> SpeciesRow:
    """The species row of a Mg complex (kJ/mol, J/mol/K, cm3/mol).

    log beta0 = log beta(I) - d(z^2) A sqrt(I)/(1 + 1.6 sqrt(I)) with d(z^2) = z_cx^2 - z_L^2
    - 4 n (extended Debye-Hueckel, B = 1.6, Alberty 2003); G = G(L) + n G(Mg2+) - RT ln10
    log beta0. The binding enthalpy is not known to us and is taken as 0 (so log beta is
    independent of temperature): H = H(L) + n H(Mg2+), S = S(L) + n S(Mg2+) + R ln10 log beta0;
    Cp and V are additive (binding dCp = dV = 0). All three are approximations of this table,
    stated in the row's note.
    """
    z = ligand.charge + 2 * cx.n_mg
    root = math.sqrt(cx.ionic_strength)
    dz2 = z * z - ligand.charge ** 2 - 4 * cx.n_mg
    log_beta0 = cx.log_beta - dz2 * DEBYE_HUCKEL_A * root / (1.0 + 1.6 * root)
    counts, _ = parse_formula(ligand.formula)
    counts["Mg"] = counts.get("Mg", 0) + cx.n_mg

    def add(a, b):
        return None if a is None or b is None else a + cx.n_mg * b

    g = ligand.G + cx.n_mg * mg.G - R_KJ * T_REF * LN10 * log_beta0
    s = add(ligand.S, mg.S)
    s = None if s is None else s + 1000.0 * R_KJ * LN10 * log_beta0
    note = (f"{cx.note}; log beta {log_beta0:.2f} at I = 0; binding enthalpy taken as 0, binding "
            "Cp and V as 0 (not known to us)")
    return SpeciesRow(cx.species, MG_COMPLEX_REACTANT[cx.species], hill_formula(counts), "aq", z,
                      ligand.n_h, cx.n_mg, g, add(ligand.H, mg.H), s, add(ligand.Cp, mg.Cp),
                      add(ligand.V, mg.V), cx.source, ligand.source, "", "Mg complex (binding constant)",
                      None, cx.source, note)


@dataclass(frozen=True)
class Anchor:
    """A measured (or recalled) biochemical value that a correction reproduces.

    ``reaction`` is written over reactant ids of the table (H+ left implicit: its transformed
    energy is 0); ``value`` is its ΔrG'° (kJ/mol) at 25 degC and the stated pH, ionic strength
    (mol/L) and pMg (None: no Mg2+). With ``formation=True`` the value is instead ΔfG° (I = 0,
    untransformed) of the target's species named in ``reaction``.
    """

    reaction: str
    value: float
    sigma: float
    source: str
    where: str
    ph: float = 7.0
    ionic_strength: float = 0.25
    pmg: float | None = None
    recalled: bool = True
    formation: bool = False

    def describe(self) -> str:
        conditions = (f"pH {self.ph:g}, I = {self.ionic_strength:g} M, "
                      + ("no Mg2+" if self.pmg is None else f"pMg {self.pmg:g}"))
        what = "DfG" if self.formation else "DrG'"
        return (f"{self.reaction}: {what} {self.value:+.1f} +/- {self.sigma:g} kJ/mol at 25 degC, "
                f"{conditions} ({self.where}{'; from memory' if self.recalled else ''})")


@dataclass(frozen=True)
class Correction:
    """Shift of every species of ``target`` (ΔfG° and ΔfH° by the same amount, S°, Cp°, V° kept,
    so pKa values and the temperature dependence are unchanged) fitted to its anchors."""

    target: str
    anchors: tuple[Anchor, ...]
    reason: str
    new_source: str = ""


#: The corrections, applied in this order (a later one sees the earlier ones). The reasons and
#: the anchors are the documentation; the fitted shifts are printed by the script and written
#: into species.csv (shift_kJ). Anchors whose printed source we did not have at hand say so.
CORRECTIONS: tuple[Correction, ...] = (
    Correction(
        "pyrophosphate",
        (Anchor("pyrophosphate + H2O <=> 2 phosphate", -22.7, 1.5, "Alb03",
                "Alberty 2003, computed from his species table (P2O7(4-) -1919.86, HP2O7(3-) "
                "-1973.86, H2P2O7(2-) -2012.21, HPO4(2-) -1096.1, H2PO4(-) -1137.3 kJ/mol), which "
                "rests on the equilibrium measurements of Flodgaard & Fleron 1974"),
         Anchor("ATP + H2O <=> AMP + pyrophosphate", -45.6, 2.0, "FA95",
                "Frey & Arabshahi 1995, -10.9 kcal/mol at pH 7; Mg2+ and ionic strength of the "
                "measurement not recalled, compared here without Mg2+ at I = 0.25")),
        "OBIGT's pyrophosphate (SSWS97) sits 13 kJ/mol too low against OBIGT's orthophosphate "
        "(SH88) and the nucleotides (LH06a/b): PPi hydrolysis came out -10.2 kJ/mol and ATP -> "
        "AMP + PPi -59.2 kJ/mol, while ATP -> AMP + 2 Pi agreed with Alberty (2003)"),
    Correction(
        "lactate",
        (Anchor("pyruvate + H2(g) <=> lactate", -43.2, 1.5, "TJD77",
                "Thauer et al. 1977, E'0(pyruvate/lactate) = -190 mV against -414 mV for "
                "H+/H2, pH 7, values at infinite dilution", ionic_strength=0.0),
         Anchor("pyruvate + NADH <=> lactate + NAD", -25.1, 1.5, "NC08",
                "Nelson & Cox 2008, lactate dehydrogenase; the equilibrium was measured by "
                "Hakala et al. 1956; I not stated, 0.25 M taken")),
        "Shock's (1995) lactate against Canovas & Shock's (2016) pyruvate gave pyruvate + NADH -> "
        "lactate + NAD+ 8 kJ/mol less favourable than measured"),
    Correction(
        "2-oxoglutarate",
        (Anchor("isocitrate + NAD + H2O <=> 2-oxoglutarate + CO2tot + NADH", -8.4, 2.5, "NC08",
                "Nelson & Cox 2008, citric acid cycle table (NAD+-isocitrate dehydrogenase); "
                "CO2 taken as total CO2, I not stated, 0.25 M taken"),
         Anchor("pyruvate + succinate <=> acetate + 2-oxoglutarate", 2.1, 2.5, "NC08",
                "derived: pyruvate and 2-oxoglutarate dehydrogenase complexes -33.4 and -33.5 "
                "kJ/mol, acetyl-CoA hydrolysis -31.4 and succinyl-CoA hydrolysis -33.4 (succinyl-"
                "CoA synthetase -2.9 with GTP hydrolysis -30.5), all Nelson & Cox 2008; the two "
                "2-oxo acids have equal ferredoxin potentials, about -500 mV (Thauer et al. "
                "1977; Buckel & Thauer 2013)")),
        "Canovas & Shock's (2016) 2-oxoglutarate is too stable: 2-oxoglutarate:ferredoxin "
        "oxidoreductase came out 8-13 kJ/mol easier than pyruvate:ferredoxin oxidoreductase "
        "although both couples sit near -500 mV, and isocitrate dehydrogenase points the same way"),
    Correction(
        "glutamate",
        (Anchor("glutamate + pyruvate <=> 2-oxoglutarate + alanine", 1.0, 1.5, "Kre53",
                "Krebs 1953, alanine aminotransferase K = 1.52 in the glutamate + pyruvate "
                "direction of alanine + 2-oxoglutarate; I 0.1 M taken", ph=7.4, ionic_strength=0.1),
         Anchor("aspartate + 2-oxoglutarate <=> oxaloacetate + glutamate", 4.7, 1.5, "Kre53",
                "Krebs 1953, aspartate aminotransferase K = 0.148; I 0.1 M taken", ph=7.4,
                ionic_strength=0.1)),
        "after the 2-oxoglutarate correction the two transaminations of glutamate, whose "
        "equilibrium constants are among the best measured in metabolism, would be 6-8 kJ/mol "
        "off: glutamate moves with 2-oxoglutarate"),
    Correction(
        "glutamine",
        (Anchor("glutamine + H2O <=> glutamate + ammonia", -14.2, 1.5, "BKH59",
                "Benzinger et al. 1959, glutaminase equilibrium and heat, -3.4 kcal/mol; I not "
                "recalled, 0.1 M taken", ionic_strength=0.1),),
        "glutamine hydrolysis after the glutamate correction"),
    Correction(
        "glucose",
        (Anchor("glucose", -915.90, 1.0, "Alb03",
                "Alberty 2003, DfG of D-glucose(aq) at I = 0, after Goldberg & Tewari 1989",
                ionic_strength=0.0, formation=True),),
        "OBIGT's only glucose row is the unreviewed LDS+26 (G -912.53 kJ/mol; its HKF "
        "parameters are Amend & Plyasunov's, AP01.1): G and H are re-anchored to a reviewed "
        "value and the row credited to it; S, Cp and V stay those of the row (S from LDS+26, "
        "not reviewed)",
        new_source="Alb03"),
)


def _transformed_reactant(members: list[SpeciesRow], ph: float, ionic_strength: float,
                          pmg: float | None, g_mg: float) -> float:
    """ΔfG'° of a reactant at 25 degC from its rows, as the runtime computes it (species with Mg
    left out without a pMg; Alberty's transform, tfa.thermo.legendre)."""
    from tfa.thermo.legendre import reactant_energy, transformed_species_energy

    if pmg is None:
        members = [m for m in members if m.n_mg == 0] or members
    g = [m.G for m in members]
    n_mg = [m.n_mg if pmg is not None else 0 for m in members]
    values = transformed_species_energy(g, [m.charge for m in members], [m.n_h for m in members],
                                        T_REF, ph, ionic_strength, n_mg, pmg, g_mg)
    return reactant_energy(values, T_REF)


def _anchor_energy(anchor: Anchor, by_reactant: dict[str, list[SpeciesRow]], g_mg: float):
    """(ΔrG'° computed from the rows, stoichiometry) of an anchor reaction."""
    from tfa.equation import parse_equation

    stoich = parse_equation(anchor.reaction).stoichiometry()
    total = 0.0
    for reactant, nu in stoich.items():
        if reactant == "H+":
            continue
        if reactant not in by_reactant:
            raise SystemExit(f"anchor {anchor.reaction!r}: reactant {reactant!r} is not in the table")
        total += nu * _transformed_reactant(by_reactant[reactant], anchor.ph, anchor.ionic_strength,
                                            anchor.pmg, g_mg)
    return total, stoich


def apply_corrections(rows: list[SpeciesRow]) -> list[SpeciesRow]:
    """Drop the quarantined species, add the Mg complexes and re-anchor the reactants of
    :data:`CORRECTIONS` (printing each fit)."""
    rows = [r for r in rows if r.species not in QUARANTINED]
    by_id = {r.species: r for r in rows}
    mg = by_id[MAGNESIUM_ION]
    for cx in MG_COMPLEXES:
        rows.append(magnesium_complex_row(cx, by_id[cx.ligand], mg))
    by_reactant: dict[str, list[SpeciesRow]] = {}
    for r in rows:
        by_reactant.setdefault(r.reactant, []).append(r)
    for corr in CORRECTIONS:
        members = by_reactant[corr.target]
        numerator = denominator = 0.0
        parts = []
        for anchor in corr.anchors:
            if anchor.formation:
                row = next(m for m in members if m.species == anchor.reaction)
                computed, nu = row.G, 1.0
            else:
                computed, stoich = _anchor_energy(anchor, by_reactant, mg.G)
                nu = stoich.get(corr.target, 0.0)
                if not nu:
                    raise SystemExit(f"anchor {anchor.reaction!r} does not involve {corr.target}")
            implied = (anchor.value - computed) / nu
            weight = (nu / anchor.sigma) ** 2
            numerator += weight * implied
            denominator += weight
            parts.append((anchor, computed, implied))
        shift = numerator / denominator
        for m in members:
            m.G += shift
            if m.H is not None:
                m.H += shift
            m.flag = "; ".join(f for f in (m.flag, "re-anchored") if f)
            m.shift = (m.shift or 0.0) + shift
            m.anchor = ";".join(dict.fromkeys(a.source for a in corr.anchors))
            m.note = " | ".join(n for n in (m.note, (
                f"DfG and DfH shifted by {shift:+.2f} kJ/mol (S, Cp, V kept) to fit "
                + "; ".join(a.describe() for a, _, _ in parts) + f". Reason: {corr.reason}")) if n)
            if corr.new_source:
                if m.source and m.source != corr.new_source:
                    m.note += f". Row of {m.source} (HKF parameters {m.source2 or 'same'})"
                m.source2 = m.source2 or m.source
                m.source = corr.new_source
        print(f"re-anchored {corr.target}: {shift:+.2f} kJ/mol", file=sys.stderr)
        for anchor, computed, implied in parts:
            print(f"    {anchor.reaction}: before {computed:.2f}, anchor {anchor.value:.2f}, "
                  f"implied shift {implied:+.2f}", file=sys.stderr)
    return rows


# --------------------------------------------------------------------------------------------
# Compounds, names, sources
# --------------------------------------------------------------------------------------------

def reference_species(members: list[SpeciesRow]) -> SpeciesRow:
    """The member without Mg that predominates at pH 7, 298.15 K, I = 0."""
    plain = [m for m in members if m.n_mg == 0] or members
    rt = R_KJ * T_REF
    return min(plain, key=lambda m: (m.G + m.n_h * rt * LN10 * 7.0, m.species))


def check_names(reactants: list[ReactantDef]) -> None:
    owner: dict[str, str] = {}
    for reac in reactants:
        for label in dict.fromkeys((reac.id, reac.name) + reac.synonyms):
            key = label.strip().lower()
            if key in owner and owner[key] != reac.id:
                raise SystemExit(f"name clash: {label!r} names both {owner[key]!r} and "
                                 f"{reac.id!r}; remove it from one of them")
            owner[key] = reac.id


UNREVIEWED_PATTERNS = ("submitted", "unpublished", "in prep", "dissertation", "thesis",
                       "computer data file", "computer file", "obigt database", "vignette",
                       "personal communication", "written communication")


def is_peer_reviewed(key: str, citation: str) -> bool:
    text = citation.lower()
    if key.startswith("OBIGT"):
        return False
    return not any(p in text for p in UNREVIEWED_PATTERNS)


#: Source keys of rows this script builds from non-OBIGT data; they are listed in
#: tfa/data/literature_sources.csv (merged with sources.csv at runtime), not here.
NON_OBIGT_SOURCES = frozenset({HCHO_HYDRATION_SOURCE, "Alb03", "SM76"})


def build_sources(rows: list[SpeciesRow], extdata: Path) -> list[dict]:
    refs = pd.read_csv(extdata / "thermo" / "refs.csv", dtype=str, keep_default_na=False)
    by_key = {}
    for rec in refs.to_dict("records"):
        by_key.setdefault(rec["key"], rec)
    keys = sorted({k for r in rows for k in (r.source, r.source2)
                   if k and k not in NON_OBIGT_SOURCES})
    out = []
    for key in keys:
        rec = by_key.get(key)
        if rec is None:
            raise SystemExit(f"source key {key!r} not in refs.csv")
        url = rec.get("URL", "")
        doi = url.split("doi.org/", 1)[1] if "doi.org/" in url else ""
        year = rec.get("year", "")
        citation = _clean_html(rec["citation"])
        out.append({"key": key, "authors": _clean_html(rec["author"]), "year": year,
                    "citation": citation, "doi": doi,
                    "peer_reviewed": "yes" if is_peer_reviewed(key, citation) else "no",
                    "note": _clean_html(rec.get("note", ""))})
    return out


def _clean_html(text: str) -> str:
    text = re.sub(r"<[^>]+>", "", text or "")
    return (text.replace("&quot;", '"').replace("&Delta;", "Δ").replace("&omega;", "ω")
            .replace("&amp;", "&").strip())


def _fmt(x: float | None, digits: int = 6) -> str:
    if x is None:
        return ""
    text = f"{round(x, digits):.{digits}f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def _csv(header: list[str], rows: list[list]) -> str:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(header)
    writer.writerows(rows)
    return buf.getvalue()


def _write(path: Path, text: str) -> None:
    tmp = path.with_suffix(path.suffix + ".part")
    tmp.write_text(text, encoding="utf-8")
    tmp.replace(path)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path,
                        default=Path(__file__).resolve().parents[1] / "tfa" / "data")
    args = parser.parse_args(argv)

    extdata = pychnosz_data_dir()
    reactants = all_reactants()
    check_names(reactants)
    ids = [r.id for r in reactants]
    if len(ids) != len(set(ids)):
        raise SystemExit("duplicate reactant id")
    obigt = read_obigt(extdata)
    rows = apply_corrections(build_species(reactants, obigt))

    by_reactant: dict[str, list[SpeciesRow]] = {}
    for r in rows:                                   # creation order = order in the table
        by_reactant.setdefault(r.reactant, []).append(r)
    rows.sort(key=lambda r: (r.reactant.lower(), r.reactant, r.species))
    species_text = _csv(
        ["species", "reactant", "formula", "state", "charge", "n_h", "n_mg", "G_kJ", "H_kJ",
         "S_J_K", "Cp_J_K", "V_cm3", "source", "source2", "obigt_name", "flag", "shift_kJ",
         "anchor", "note"],
        [[r.species, r.reactant, r.formula, r.state, r.charge, r.n_h, r.n_mg, _fmt(r.G),
          _fmt(r.H), _fmt(r.S), _fmt(r.Cp), _fmt(r.V), r.source, r.source2, r.obigt_name,
          r.flag, _fmt(r.shift, 4), r.anchor, r.note]
         for r in rows])

    comp_rows = []
    for reac in sorted(reactants, key=lambda r: (r.id.lower(), r.id)):
        members = by_reactant[reac.id]
        ref = reference_species(members)
        member_ids = [m.species for m in members]
        synonyms = [s for s in dict.fromkeys(reac.synonyms) if s.lower() != reac.id.lower()]
        comp_rows.append([reac.id, reac.name, ";".join(synonyms), reac.kind, ";".join(member_ids),
                          ref.formula, ref.charge])
    compounds_text = _csv(["id", "name", "synonyms", "kind", "species", "formula", "charge"],
                          comp_rows)

    sources = build_sources(rows, extdata)
    sources_text = _csv(["key", "authors", "year", "citation", "doi", "peer_reviewed", "note"],
                        [[s[k] for k in ("key", "authors", "year", "citation", "doi",
                                         "peer_reviewed", "note")] for s in sources])

    args.out.mkdir(parents=True, exist_ok=True)
    _write(args.out / "species.csv", species_text)
    _write(args.out / "compounds.csv", compounds_text)
    _write(args.out / "sources.csv", sources_text)
    print(f"{len(rows)} species, {len(comp_rows)} compounds, {len(sources)} sources -> {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
