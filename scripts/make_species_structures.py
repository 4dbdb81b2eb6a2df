"""Write ``tfa/data/species_structures.csv``: a SMILES, in the exact protonation state, for each
organic aqueous species of ``tfa/data/species.csv`` that the group-contribution fit can use.

Development-time script. Structures are written here by hand (homologous series generated in a
loop) and keyed by the species' OBIGT name; each one is checked against the formula and charge of
``species.csv`` with RDKit before it is written. Species whose structure is uncertain are left out
and listed on the terminal.

Usage: /tmp/venv/bin/python scripts/make_species_structures.py
"""

from __future__ import annotations

import csv
import sys
from pathlib import Path

from rdkit import Chem, RDLogger

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from tfa.thermo.balance import parse_formula  # noqa: E402
from tfa.util.files import write_text  # noqa: E402

RDLogger.DisableLog("rdApp.*")

ALKYL = {n: "C" * n for n in range(1, 25)}
PREFIX = {1: "meth", 2: "eth", 3: "prop", 4: "but", 5: "pent", 6: "hex", 7: "hept", 8: "oct",
          9: "non", 10: "dec", 11: "undec", 12: "dodec"}


def _structures() -> dict[str, tuple[str, str]]:
    """OBIGT name -> (SMILES, note)."""
    s: dict[str, tuple[str, str]] = {}

    def add(name: str, smiles: str, note: str = "") -> None:
        s[name] = (smiles, note)

    # hydrocarbons
    add("CH4", "C")
    for n in range(2, 9):
        add({2: "ethane", 3: "propane", 4: "butane"}.get(n, PREFIX[n] + "ane"), "C" * n)
    add("ethylene", "C=C")
    for n in range(3, 9):
        add(PREFIX[n] + "ene", "C=C" + "C" * (n - 2), "1-alkene assumed")
    add("ethyne", "C#C")
    for n in range(3, 9):
        add(f"1-{PREFIX[n]}yne", "C#C" + "C" * (n - 2))
    add("benzene", "c1ccccc1")
    add("toluene", "Cc1ccccc1")
    add("ethylbenzene", "CCc1ccccc1")
    for n in range(3, 9):
        add(f"n-{PREFIX[n]}ylbenzene", "C" * n + "c1ccccc1")
    add("cyclohexane", "C1CCCCC1")
    add("phenanthrene", "c1ccc2c(c1)ccc1ccccc12")
    add("1-methylphenanthrene", "Cc1cccc2c1ccc1ccccc12")
    add("2-methylphenanthrene", "Cc1ccc2c(c1)ccc1ccccc12")
    add("3-methylphenanthrene", "Cc1ccc2c(c1)c1ccccc1cc2")
    add("4-methylphenanthrene", "Cc1cccc2ccc3ccccc3c12")
    add("9-methylphenanthrene", "Cc1cc2ccccc2c2ccccc12")
    # chlorinated ethylenes
    add("perchloroethylene", "ClC(Cl)=C(Cl)Cl")
    add("trichloroethylene", "ClC=C(Cl)Cl")
    add("1,1-dichloroethylene", "C=C(Cl)Cl")
    add("cis-1,2-dichloroethylene", "Cl/C=C\\Cl")
    add("trans-1,2-dichloroethylene", "Cl/C=C/Cl")
    add("vinyl chloride", "C=CCl")
    # alcohols, ketones, aldehydes
    add("methanol", "CO")
    add("ethanol", "CCO")
    for n in range(3, 9):
        add(PREFIX[n] + "anol", "C" * n + "O")
    add("benzyl alcohol", "OCc1ccccc1")
    add("acetone", "CC(C)=O")
    add("butanone", "CCC(C)=O")
    for n in range(5, 9):
        add(f"2-{PREFIX[n]}anone", "CC(=O)" + "C" * (n - 2))
    add("formaldehyde", "C=O")
    add("acetaldehyde", "CC=O")
    add("propanal", "CCC=O")
    for n in range(4, 11):
        add(PREFIX[n] + "anal", "C" * (n - 1) + "C=O")
    # carboxylic acids and anions
    add("formic acid", "OC=O")
    add("formate", "[O-]C=O")
    names = {2: "acetic acid", 3: "propanoic acid", 4: "n-butanoic acid"}
    anions = {2: "acetate", 3: "propanoate", 4: "n-butanoate"}
    for n in range(2, 13):
        acid = names.get(n, f"n-{PREFIX[n]}anoic acid")
        anion = anions.get(n, f"n-{PREFIX[n]}anoate")
        add(acid, "C" * (n - 1) + "C(=O)O")
        add(anion, "C" * (n - 1) + "C(=O)[O-]")
    add("n-benzoic acid", "OC(=O)c1ccccc1")
    add("benzoate", "[O-]C(=O)c1ccccc1")
    for pos, ring in (("o", "c1ccccc1C"), ("m", "c1cccc(C)c1"), ("p", "c1ccc(C)cc1")):
        add(f"{pos}-toluic acid", "OC(=O)" + ring)
        add(f"{pos}-toluate", "[O-]C(=O)" + ring)
    add("cyclohexane carboxylic acid", "OC(=O)C1CCCCC1")
    add("cyclohexane carboxylate", "[O-]C(=O)C1CCCCC1")
    for n, stem in ((14, "myristate"), (16, "palmitate")):
        add(stem, "C" * (n - 1) + "C(=O)[O-]")
    add("palmitoleate", "CCCCCC/C=C\\CCCCCCCC(=O)[O-]")
    add("oleate", "CCCCCCCC/C=C\\CCCCCCCC(=O)[O-]")
    add("β-hydroxymyristate", "CCCCCCCCCCCC(O)CC(=O)[O-]")
    di = {2: "oxal", 3: "malon", 4: "succin", 5: "glutar", 6: "adip", 7: "pimel", 8: "suber",
          9: "azela", 10: "sebac"}
    for n, stem in di.items():
        chain = "C" * (n - 2)
        add(f"{stem}ic acid", f"OC(=O){chain}C(=O)O")
        anion = "azel" if stem == "azela" else stem
        add(f"H-{anion}ate", f"OC(=O){chain}C(=O)[O-]")
        add(f"{anion}ate-2", f"[O-]C(=O){chain}C(=O)[O-]")
    # 2-hydroxy acids
    add("glycolic acid", "OCC(=O)O")
    add("glycolate", "OCC(=O)[O-]")
    add("lactic acid", "CC(O)C(=O)O")
    add("lactate", "CC(O)C(=O)[O-]")
    for n in range(4, 11):
        add(f"2-hydroxy{PREFIX[n]}anoic acid", "C" * (n - 2) + "C(O)C(=O)O")
        add(f"2-hydroxy{PREFIX[n]}anoate", "C" * (n - 2) + "C(O)C(=O)[O-]")
    # phenols
    add("phenol", "Oc1ccccc1")
    add("o-cresol", "Cc1ccccc1O")
    add("m-cresol", "Cc1cccc(O)c1")
    add("p-cresol", "Cc1ccc(O)cc1")
    for pos in ("2,3", "2,4", "2,5", "2,6", "3,4", "3,5"):
        a, b = (int(x) for x in pos.split(","))
        ring = ["c"] * 6
        ring[0] = "c(O)"
        ring[a - 1] = "c(C)"
        ring[b - 1] = "c(C)"
        smi = ring[0] + "1" + "".join(ring[1:5]) + ring[5] + "1"
        add(f"{pos}-dimethylphenol", smi)
    add("resorcinol", "Oc1cccc(O)c1")
    add("phloroglucinol", "Oc1cc(O)cc(O)c1")
    # sulfur compounds
    add("methanethiol", "CS")
    add("ethanethiol", "CCS")
    for n in range(3, 13):
        add(f"n-{PREFIX[n]}anethiol", "C" * n + "S")
    add("dimethyl sulfide", "CSC")
    add("methyl ethyl sulfide", "CCSC")
    for n, stem in ((2, "diethyl"), (3, "dipropyl"), (4, "dibutyl"), (5, "dipentyl"), (6, "dihexyl")):
        add(f"{stem} sulfide", "C" * n + "S" + "C" * n)
    # small nitrogen and carbon compounds
    add("ethylacetate", "CCOC(C)=O")
    add("acetamide", "CC(N)=O")
    add("urea", "NC(N)=O")
    add("HCN", "C#N")
    add("CO", "[C-]#[O+]")
    # amines (neutral and aminium)
    amines = {1: "methyl", 2: "ethyl", 3: "propyl", 4: "butyl", 5: "pentyl", 6: "hexyl",
              7: "heptyl", 8: "octyl"}
    for n, stem in amines.items():
        r = "C" * n
        for k, pre in ((1, ""), (2, "di"), (3, "tri")):
            if n == 1 and k > 1:
                pre_name = {2: "dimethyl", 3: "trimethyl"}[k]
            else:
                pre_name = pre + stem
            if k == 1:
                add(f"{pre_name}amine", f"{r}N")
                add(f"{pre_name}aminium", f"{r}[NH3+]")
            elif k == 2:
                add(f"{pre_name}amine", f"{r}N{r}")
                add(f"{pre_name}aminium", f"{r}[NH2+]{r}")
            else:
                add(f"{pre_name}amine", f"{r}N({r}){r}")
                add(f"{pre_name}aminium", f"{r}[NH+]({r}){r}")
    bz = "Cc1ccccc1"
    add("benzylamine", "NCc1ccccc1")
    add("benzylaminium", "[NH3+]Cc1ccccc1")
    add("dibenzylamine", "c1ccccc1CNCc1ccccc1")
    add("dibenzylaminium", "c1ccccc1C[NH2+]Cc1ccccc1")
    add("tribenzylamine", f"N({bz})({bz}){bz}".replace("N(Cc", "N(Cc"))
    add("tribenzylaminium", f"[NH+]({bz})({bz}){bz}")
    add("methyldiethanolamine", "CN(CCO)CCO")
    add("ethanolamine", "NCCO")
    add("putrescine", "NCCCCN")
    add("spermidine", "NCCCCNCCCN")
    # keto and TCA-cycle acids
    add("pyruvic acid", "CC(=O)C(=O)O")
    add("pyruvate", "CC(=O)C(=O)[O-]")
    add("oxaloacetic acid", "OC(=O)CC(=O)C(=O)O")
    add("H-oxaloacetate", "OC(=O)CC(=O)C(=O)[O-]", "monoanion: the alpha-keto carboxyl dissociated")
    add("oxaloacetate-2", "[O-]C(=O)CC(=O)C(=O)[O-]")
    add("a-ketoglutaric acid", "OC(=O)CCC(=O)C(=O)O")
    add("H-a-ketoglutarate", "OC(=O)CCC(=O)C(=O)[O-]", "monoanion: the alpha-keto carboxyl dissociated")
    add("a-ketoglutarate-2", "[O-]C(=O)CCC(=O)C(=O)[O-]")
    add("fumaric acid", "OC(=O)/C=C/C(=O)O")
    add("H-fumarate", "OC(=O)/C=C/C(=O)[O-]")
    add("fumarate-2", "[O-]C(=O)/C=C/C(=O)[O-]")
    add("malic acid", "OC(=O)CC(O)C(=O)O")
    add("H-malate", "OC(=O)CC(O)C(=O)[O-]")
    add("malate-2", "[O-]C(=O)CC(O)C(=O)[O-]")
    add("citric acid", "OC(=O)CC(O)(CC(=O)O)C(=O)O")
    add("H2-citrate", "OC(=O)CC(O)(CC(=O)O)C(=O)[O-]")
    add("H-citrate-2", "[O-]C(=O)CC(O)(CC(=O)O)C(=O)[O-]")
    add("citrate-3", "[O-]C(=O)CC(O)(CC(=O)[O-])C(=O)[O-]")
    add("isocitric acid", "OC(=O)CC(C(=O)O)C(O)C(=O)O")
    add("H2-isocitrate", "OC(=O)CC(C(=O)O)C(O)C(=O)[O-]")
    add("H-isocitrate-2", "OC(=O)CC(C(=O)[O-])C(O)C(=O)[O-]")
    add("isocitrate-3", "[O-]C(=O)CC(C(=O)[O-])C(O)C(=O)[O-]")
    add("cis-aconitic acid", "OC(=O)C/C(C(=O)O)=C/C(=O)O")
    add("H2-cis-aconitate", "OC(=O)C/C(C(=O)O)=C/C(=O)[O-]")
    add("H-cis-aconitate-2", "OC(=O)C/C(C(=O)[O-])=C/C(=O)[O-]")
    add("cis-aconitate-3", "[O-]C(=O)C/C(C(=O)[O-])=C/C(=O)[O-]")
    # amino acids: zwitterions and their cations and anions
    aa = {
        # name: (side chain attached to alpha carbon, cation, anion, ...)
        "glycine": "",
        "alanine": "C",
        "valine": "C(C)C",
        "leucine": "CC(C)C",
        "isoleucine": "C(C)CC",
        "serine": "CO",
        "threonine": "C(C)O",
        "phenylalanine": "Cc1ccccc1",
        "tyrosine": "Cc1ccc(O)cc1",
        "tryptophan": "Cc1c[nH]c2ccccc12",
        "methionine": "CCSC",
        "cysteine": "CS",
        "asparagine": "CC(N)=O",
        "glutamine": "CCC(N)=O",
        "a-aminobutyric acid": "CC",
        "histidine": "Cc1c[nH]cn1",
    }
    cation_name = {"glycine": "glycinium", "alanine": "alaninium", "valine": "valinium",
                   "leucine": "leucinium", "isoleucine": "isoleucinium", "serine": "serinium",
                   "threonine": "threoninium", "phenylalanine": "phenylalaninium",
                   "tyrosine": "tyrosinium", "tryptophan": "tryptophanium",
                   "methionine": "methioninium", "cysteine": "cysteinium",
                   "asparagine": "asparaginium", "glutamine": "glutaminium"}
    anion_name = {"glycine": "glycinate", "alanine": "alaninate", "valine": "valinate",
                  "leucine": "leucinate", "isoleucine": "isoleucinate", "serine": "serinate",
                  "threonine": "threonate", "phenylalanine": "phenylalanate",
                  "tyrosine": "tyrosinate", "tryptophan": "tryptophanate",
                  "methionine": "methionate", "cysteine": "cysteinate",
                  "asparagine": "asparaginate", "glutamine": "glutaminate",
                  "histidine": "histidinate"}

    def alpha(side: str, amine: str, carboxyl: str) -> str:
        return f"{amine}C({side})C(=O){carboxyl}" if side else f"{amine}CC(=O){carboxyl}"

    for name, side in aa.items():
        add(name, alpha(side, "[NH3+]", "[O-]"), "zwitterion")
        if name in cation_name:
            add(cation_name[name], alpha(side, "[NH3+]", "O"))
        if name in anion_name and name != "cysteine":
            add(anion_name[name], alpha(side, "N", "[O-]"))
    add("proline", "[O-]C(=O)C1CCC[NH2+]1", "zwitterion")
    add("prolinium", "OC(=O)C1CCC[NH2+]1")
    add("prolinate", "[O-]C(=O)C1CCCN1")
    add("cysteinate", "[S-]CC([NH3+])C(=O)[O-]", "thiolate of the zwitterion (OBIGT AH97b)")
    add("cysteinate-2", "[S-]CC(N)C(=O)[O-]")
    add("tyrosinate-2", "NC(Cc1ccc([O-])cc1)C(=O)[O-]")
    add("histidinium", "[NH3+]C(Cc1c[nH]c[nH+]1)C(=O)[O-]")
    add("histidinium+2", "[NH3+]C(Cc1c[nH]c[nH+]1)C(=O)O")
    add("aspartic acid", "[NH3+]C(CC(=O)O)C(=O)[O-]", "zwitterion")
    add("aspartate", "[NH3+]C(CC(=O)[O-])C(=O)[O-]")
    add("aspartate-2", "NC(CC(=O)[O-])C(=O)[O-]")
    add("aspartinium", "[NH3+]C(CC(=O)O)C(=O)O")
    add("glutamic acid", "[NH3+]C(CCC(=O)O)C(=O)[O-]", "zwitterion")
    add("glutamate", "[NH3+]C(CCC(=O)[O-])C(=O)[O-]")
    add("glutamate-2", "NC(CCC(=O)[O-])C(=O)[O-]")
    add("glutamic-acid+1", "[NH3+]C(CCC(=O)O)C(=O)O")
    add("lysine", "NCCCCC([NH3+])C(=O)[O-]", "zwitterion")
    add("lysinium", "[NH3+]CCCCC([NH3+])C(=O)[O-]")
    add("lysinium+2", "[NH3+]CCCCC([NH3+])C(=O)O")
    add("lysinate", "NCCCCC(N)C(=O)[O-]")
    add("arginine", "NC(=N)NCCCC([NH3+])C(=O)[O-]", "zwitterion, neutral guanidine")
    add("argininium", "NC(=[NH2+])NCCCC([NH3+])C(=O)[O-]")
    add("argininium+2", "NC(=[NH2+])NCCCC([NH3+])C(=O)O")
    add("argininate", "NC(=N)NCCCC(N)C(=O)[O-]")
    add("diaminopimelic acid", "[NH3+]C(CCCC([NH3+])C(=O)[O-])C(=O)[O-]", "double zwitterion")
    # peptides
    add("diglycine", "[NH3+]CC(=O)NCC(=O)[O-]", "zwitterion")
    add("diglycine+", "[NH3+]CC(=O)NCC(=O)O")
    add("diglycine-", "NCC(=O)NCC(=O)[O-]")
    add("triglycine", "[NH3+]CC(=O)NCC(=O)NCC(=O)[O-]", "zwitterion")
    add("triglycine+", "[NH3+]CC(=O)NCC(=O)NCC(=O)O")
    add("triglycine-", "NCC(=O)NCC(=O)NCC(=O)[O-]")
    add("diketopiperazine", "O=C1CNC(=O)CN1")
    gxg = {"Ala": "C", "Asn": "CC(N)=O", "Asp": "CC(=O)O", "Cys": "CS", "Gln": "CCC(N)=O",
           "Glu": "CCC(=O)O", "His": "Cc1c[nH]cn1", "Ile": "C(C)CC", "Leu": "CC(C)C",
           "Met": "CCSC", "Phe": "Cc1ccccc1", "Ser": "CO", "Thr": "C(C)O",
           "Tyr": "Cc1ccc(O)cc1", "Val": "C(C)C", "Arg+": "CCCNC(N)=[NH2+]", "Lys+": "CCCC[NH3+]"}
    for code, side in gxg.items():
        add(f"Gly-{code}-Gly", f"[NH3+]CC(=O)NC({side})C(=O)NCC(=O)[O-]", "zwitterion")
    add("Gly-Pro-Gly", "[NH3+]CC(=O)N1CCCC1C(=O)NCC(=O)[O-]", "zwitterion")
    add("glutathione", "[NH3+]C(CCC(=O)NC(CS)C(=O)NCC(=O)[O-])C(=O)O",
        "zwitterion with both carboxyls as in OBIGT's neutral formula: one COOH kept")
    add("cystine", "[NH3+]C(CSSCC([NH3+])C(=O)[O-])C(=O)[O-]", "double zwitterion")
    # sugars and amino sugars (dominant cyclic forms in water)
    add("ribose", "OC1COC(O)C(O)C1O", "pyranose")
    add("deoxyribose", "OC1CC(O)OCC1O", "pyranose")
    add("lyxose", "OC1COC(O)C(O)C1O", "pyranose")
    add("ribulose", "OCC1(O)OCC(O)C1O", "furanose")
    add("xylulose", "OCC1(O)OCC(O)C1O", "furanose")
    add("heptose", "OCC(O)C1OC(O)C(O)C(O)C1O", "pyranose")
    add("rhamnose", "CC1OC(O)C(O)C(O)C1O", "pyranose")
    add("glucoseamine", "NC1C(O)OC(CO)C(O)C1O", "pyranose, neutral amine")
    add("N-acetylglucosamine", "CC(=O)NC1C(O)OC(CO)C(O)C1O", "pyranose")
    # nucleobases and nucleosides
    ade, gua, cyt = "Nc1ncnc2[nH]cnc12", "Nc1nc2[nH]cnc2c(=O)[nH]1", "Nc1cc[nH]c(=O)n1"
    add("adenine", ade)
    add("guanine", gua)
    add("cytosine", cyt)
    add("thymine", "Cc1c[nH]c(=O)[nH]c1=O")
    add("uracil", "O=c1cc[nH]c(=O)[nH]1")
    # ring-closure labels %11/%12 so that a base written inside the sugar ring (label 1)
    # does not close the sugar's ring
    bases = {"A": "n%11cnc%12c(N)ncnc%12%11", "G": "n%11cnc%12c%11nc(N)[nH]c%12=O",
             "C": "n%11ccc(N)nc%11=O", "T": "n%11cc(C)c(=O)[nH]c%11=O",
             "U": "n%11ccc(=O)[nH]c%11=O"}
    basesH = {"A": "n%11cnc%12c(N)[nH+]cnc%12%11", "G": "n%11c[nH+]c%12c%11nc(N)[nH]c%12=O",
              "C": "n%11ccc(N)[nH+]c%11=O"}
    nuc = {"A": "adenosine", "G": "guanosine", "C": "cytidine", "T": "thymidine", "U": "uridine"}
    for b, name in nuc.items():
        add(name, f"OCC1OC({bases[b]})C(O)C1O", "ribofuranoside")
        add("deoxy" + name.replace("thymidine", "thymidine"), f"OCC1OC({bases[b]})CC1O",
            "2'-deoxyribofuranoside")

    # nucleotides: phosphate chain written from the terminal phosphate to the 5'-ester oxygen.
    # Protons go first to the terminal phosphate (its second pKa is the highest), then to the
    # inner ones; a leading "+" in OBIGT's abbreviation (e.g. "+H2AMP-") marks a protonated base
    # (adenine N1, cytosine N3, guanine N7); uracil and thymine are not protonated at those pH,
    # so there the proton is put on the phosphate chain instead.
    for b, name in nuc.items():
        for deoxy in (False, True):
            sugar2 = "C" if deoxy else "C(O)"
            d = "d" if deoxy else ""
            for n_p, abbr in ((1, "MP"), (2, "DP"), (3, "TP")):
                total = n_p + 1  # dissociable phosphate O-H: 2 on the terminal P, 1 on each inner P
                for h in range(0, total + 1):
                    charge = -total + h
                    base_h = h >= 2 and b in basesH
                    if base_h and n_p == 1 and h > 2:
                        continue
                    p_h = h - 1 if base_h else h
                    if p_h > total:
                        continue
                    sites = ["[O-]"] * total  # index 0, 1: terminal P; then inner P's
                    for k in range(p_h):
                        sites[k] = "O"
                    chain = f"{sites[0]}P(=O)({sites[1]})O"
                    for k in range(2, total):
                        chain += f"P(=O)({sites[k]})O"
                    base = basesH[b] if base_h else bases[b]
                    smiles = f"{chain}CC1OC({base}){sugar2}C1O"
                    code = f"{b}{abbr}"
                    if b == "T" and abbr == "TP":
                        code = "TTP"
                    hs = "" if h == 0 else ("H" if h == 1 else f"H{h}")
                    sign = "" if charge == 0 else ("-" if charge == -1 else f"-{-charge}")
                    note = "protonated base" if base_h else ""
                    add(f"{d}{hs}{code}{sign}", smiles, note)
    # pyridine nucleotides: nicotinamide ring oxidised (pyridinium) or reduced (1,4-dihydro)
    ox_ring = "[n+]%13cccc(C(N)=O)c%13"
    red_ring = "N%13C=CCC(C(N)=O)=C%13"
    for state, ring in (("ox", ox_ring), ("red", red_ring)):
        z = 1 if state == "ox" else 0
        for h in range(0, 3):
            sites = ["[O-]", "[O-]"]
            for k in range(h):
                sites[k] = "O"
            smi = f"{sites[0]}P(=O)({sites[1]})OCC1OC({ring})C(O)C1O"
            charge = z - 2 + h
            hs = "" if h == 0 else ("H" if h == 1 else f"H{h}")
            sign = {1: "+", 0: "", -1: "-", -2: "-2"}[charge]
            add(f"{hs}NicMP({state}){sign}", smi)
        # NAD: protons to adenine N1 first, then one diester oxygen
        for h in range(0, 3):
            ade_ring = basesH["A"] if h >= 1 else bases["A"]
            o2 = "O" if h >= 2 else "[O-]"
            smi = f"{o2}P(=O)(OCC1OC({ring})C(O)C1O)OP(=O)([O-])OCC1OC({ade_ring})C(O)C1O"
            charge = z - 2 + h
            hs = "" if h == 0 else ("H" if h == 1 else f"H{h}")
            sign = {1: "+", 0: "", -1: "-", -2: "-2"}[charge]
            add(f"{hs}NAD({state}){sign}", smi)
        # NADP: 2'-phosphate second, then adenine N1, then first 2'-phosphate, then a diester O
        for h in range(0, 5):
            mono = ["[O-]", "[O-]"]
            if h >= 1:
                mono[0] = "O"
            ade_ring = basesH["A"] if h >= 2 else bases["A"]
            if h >= 3:
                mono[1] = "O"
            o2 = "O" if h >= 4 else "[O-]"
            smi = (f"{o2}P(=O)(OCC1OC({ring})C(O)C1O)OP(=O)([O-])OCC1OC({ade_ring})"
                   f"C(OP(=O)({mono[0]}){mono[1]})C1O")
            charge = z - 4 + h
            hs = "" if h == 0 else ("H" if h == 1 else f"H{h}")
            sign = {1: "+", 0: "", -1: "-", -2: "-2", -3: "-3", -4: "-4"}[charge]
            add(f"{hs}NADP({state}){sign}", smi)
    return s


def _mol_formula_charge(smiles: str) -> tuple[dict[str, int], int]:
    mol = Chem.MolFromSmiles(smiles)
    if mol is None:
        raise ValueError(f"unparseable SMILES {smiles}")
    counts: dict[str, int] = {}
    for atom in mol.GetAtoms():
        counts[atom.GetSymbol()] = counts.get(atom.GetSymbol(), 0) + 1
        if atom.GetTotalNumHs():
            counts["H"] = counts.get("H", 0) + atom.GetTotalNumHs()
    return counts, Chem.GetFormalCharge(mol)


def _check(name: str, smiles: str, formula: str, charge: int) -> str:
    """Empty string when the SMILES matches the formula and charge, else the reason."""
    try:
        counts, z = _mol_formula_charge(smiles)
    except ValueError as err:
        return str(err)
    want, want_z = parse_formula(formula)
    if int(charge) != want_z and want_z != 0:
        want_z = want_z
    if counts != want:
        return f"formula {counts} != {want}"
    if z != int(charge):
        return f"charge {z} != {charge}"
    return ""


def _obigt_rows() -> list[dict[str, str]]:
    import pychnosz  # development-time data source only

    path = Path(pychnosz.__file__).parent / "data" / "extdata" / "OBIGT" / "organic_aq.csv"
    with open(path, newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


def main() -> int:
    structures = _structures()
    species_csv = ROOT / "tfa" / "data" / "species.csv"
    rows_out = []
    problems = []
    if species_csv.exists():
        with open(species_csv, newline="", encoding="utf-8") as handle:
            table = list(csv.DictReader(handle))
        for row in table:
            if row["state"] != "aq" or row["obigt_name"] not in structures:
                continue
            smiles, note = structures[row["obigt_name"]]
            why = _check(row["species"], smiles, row["formula"], int(float(row["charge"])))
            if why:
                problems.append(f"{row['species']} ({row['obigt_name']}): {why}")
                continue
            rows_out.append((row["species"], smiles, note))
        missing = [r["species"] for r in table if r["state"] == "aq" and "C" in parse_formula(r["formula"])[0]
                   and r["obigt_name"] not in structures]
        print(f"species.csv: {len(rows_out)} structures written; no structure for {len(missing)} "
              f"aqueous carbon species: {', '.join(missing)}")
        lines = ["species,smiles,note"]
        for sid, smi, note in rows_out:
            cells = [sid, smi, note]
            lines.append(",".join(f'"{c}"' if ("," in c or '"' in c) else c for c in cells))
        write_text(ROOT / "tfa" / "data" / "species_structures.csv", "\n".join(lines) + "\n")
    else:
        print("tfa/data/species.csv not found: checking the structures against OBIGT only")
    for row in _obigt_rows():
        if row["name"] in structures:
            z = parse_formula(row["formula"])[1]
            name = row["name"]
            why = _check(name, structures[name][0], row["formula"], z)
            if why:
                problems.append(f"OBIGT {name}: {why}")
    unused = set(structures) - {r["name"] for r in _obigt_rows()}
    if unused:
        print("structures with no OBIGT row:", ", ".join(sorted(unused)))
    for p in problems:
        print("MISMATCH", p)
    return 0


if __name__ == "__main__":
    sys.exit(main())
