"""The group table of the group-contribution estimates and the pKa rules of ionisable sites.

Our own table (:mod:`tfa.thermo.group_contribution` fits it and cuts structures into it): atom
groups own the heavy atoms they match, corrections count a structural feature; the pKa rules
(SMARTS of the protonated and deprotonated forms, pKa values and their sources) give the
protonation states of an estimated species (:mod:`tfa.thermo.estimates`).
"""

from __future__ import annotations

from dataclasses import dataclass

@dataclass(frozen=True)
class GroupDefinition:
    """One group: ``name``, SMARTS ``pattern`` (every atom of it is owned, context goes in
    recursive SMARTS ``$()``), ``kind`` ("atoms", "correction" or "ring"), ``description``."""

    name: str
    pattern: str
    kind: str = "atoms"
    description: str = ""


_G = GroupDefinition
#: Our group table, applied top to bottom (larger and more specific groups first).
GROUPS: tuple[GroupDefinition, ...] = (
    # --- one-off small molecules (their own group; refused in cross-validation) ---
    _G("carbon monoxide", "[C-]#[O+]"),
    _G("hydrogen cyanide", "[CH1]#N"),
    _G("methane", "[CH4]"),
    _G("formaldehyde", "[CH2]=O"),
    _G("urea", "[NX3H2]C(=O)[NX3H2]"),
    # --- phosphorus ---
    _G("terminal phosphate -PO3H2", "[PX4;$(P[OX2H0])](=O)([OX2H1])[OX2H1]"),
    _G("terminal phosphate -PO3H-", "[PX4;$(P[OX2H0])](=O)([OX2H1])[OX1-]"),
    _G("terminal phosphate -PO3(2-)", "[PX4;$(P[OX2H0])](=O)([OX1-])[OX1-]"),
    _G("inner phosphate -PO2H-", "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX2H1]"),
    _G("inner phosphate -PO2(-)-", "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX1-]"),
    _G("acyl phosphate oxygen C(=O)-O-P", "[OX2H0;$(O(C=O)P)]"),
    _G("phosphoanhydride oxygen P-O-P", "[OX2H0;$(O(P)P)]"),
    _G("phosphate ester oxygen C-O-P", "[OX2H0;$(O([#6])P)]"),
    # --- carboxyl and relatives ---
    _G("formic carboxyl H-COOH", "[CX3H1](=O)[OX2H1]"),
    _G("formic carboxylate H-COO-", "[CX3H1](=O)[OX1-]"),
    _G("carboxylic acid -COOH", "[CX3H0](=O)[OX2H1]"),
    _G("carboxylate -COO-", "[CX3H0](=O)[OX1-]"),
    _G("thioester -C(=O)S-", "[CX3](=O)[SX2H0;$(S[#6])]"),
    _G("ester -C(=O)O-", "[CX3;!$(C(=O)OP)](=O)[OX2H0;$(O[#6])]"),
    _G("guanidine (neutral)", "[NX3H2]C(=[NX2H1])[NX3H1]"),
    _G("guanidinium", "[NX3H2]C(=[NX3H2+])[NX3H1]"),
    _G("amide -C(=O)NH2", "[CX3](=O)[NX3H2]"),
    _G("amide -C(=O)NH-", "[CX3](=O)[NX3H1]"),
    _G("amide -C(=O)N<", "[CX3](=O)[NX3H0]"),
    _G("aldehyde -CHO", "[CX3H1;$(C[#6])]=O"),
    _G("ketone >C=O", "[CX3H0;$(C([#6])[#6])]=O"),
    _G("aromatic carbonyl c=O", "[c]=O"),
    # --- oxygen ---
    _G("hydroxyl on sp3 carbon -OH", "[OX2H1;$(O[CX4])]"),
    _G("hydroxyl on aromatic carbon -OH", "[OX2H1;$(Oc)]"),
    _G("phenolate -O-", "[OX1-;$(Oc)]"),
    _G("ether -O-", "[OX2H0;$(O([#6])[#6])]"),
    # --- nitrogen ---
    _G("ammonium -NH3+", "[NX4H3+]"),
    _G("ammonium >NH2+", "[NX4H2+]"),
    _G("ammonium >NH+-", "[NX4H1+]"),
    _G("amine -NH2", "[NX3H2;$(N[CX4])]"),
    _G("amine >NH", "[NX3H1;$(N([CX4])[CX4])]"),
    _G("amine >N-", "[NX3H0;$(N([CX4])([CX4])[CX4])]"),
    _G("amino on aromatic ring -NH2", "[NX3H2;$(Nc)]"),
    _G("ring N of a 1,4-dihydropyridine", "[NX3H0;R;$(N(C=C)C=C)]"),
    _G("aromatic n (pyridine type)", "[nX2]"),
    _G("aromatic nH (pyrrole type)", "[nX3H1+0]"),
    _G("aromatic n substituted", "[nX3H0+0]"),
    _G("aromatic nH+ (protonated)", "[nX3H1+]"),
    _G("aromatic n+ substituted (pyridinium)", "[nX3H0+]"),
    # --- sulfur, halogen ---
    _G("thiol -SH", "[SX2H1]"),
    _G("thiolate -S-", "[SX1-]"),
    _G("disulfide -S-S-", "[SX2H0;$(S[SX2])]"),
    _G("sulfide -S-", "[SX2H0;$(S([#6])[#6])]"),
    _G("chlorine on carbon", "[Cl;$(Cl[#6])]"),
    # --- carbon skeleton ---
    _G("-CH3", "[CX4H3]"),
    _G("-CH2-", "[CX4H2]"),
    _G(">CH-", "[CX4H1]"),
    _G(">C<", "[CX4H0]"),
    _G("=CH2", "[CX3H2]=C"),
    _G("=CH-", "[CX3H1]=C"),
    _G("=C<", "[CX3H0]=C"),
    _G("#CH", "[CX2H1]#C"),
    _G("#C-", "[CX2H0]#C"),
    _G("aromatic CH next to n", "[cH1;$(c~n)]"),
    _G("aromatic C next to n", "[cH0;$(c~n)]"),
    _G("aromatic CH", "[cH1]"),
    _G("aromatic C fused", "[cH0;$(c(:a)(:a):a)]"),
    _G("aromatic C substituted", "[cH0]"),
    # --- corrections (own no atoms) ---
    _G("correction: alpha-ammonium carboxylate", "[NX4+][CX4][CX3](=O)[OX1-]", "correction",
       "charge interaction of a zwitterionic amino acid"),
    _G("correction: adjacent carbonyls", "[CX3](=O)[CX3]=O", "correction",
       "two carbonyl carbons bonded to each other (oxalate, 2-oxo acids)"),
    _G("correction: acetal carbon", "[CX4]([OX2])[OX2]", "correction",
       "carbon bearing two oxygens (cyclic sugars, nucleosides)"),
    _G("correction: oxygens on adjacent sp3 carbons", "[OX2][CX4][CX4][OX2]", "correction",
       "two singly bonded oxygens on neighbouring saturated carbons (diols, sugars, ribose and "
       "glycerol phosphates)"),
    _G("correction: amino group next to a carbonyl carbon", "[NX3H2,NX4+][CX4][CX3]=O",
       "correction", "alpha-amino acids and peptides, amine or ammonium form"),
    _G("correction: non-aromatic ring", "", "ring", "number of non-aromatic rings (SSSR)"),
)

#: Names used in the refusal message for atoms no group covers.
_CONTEXT_HINTS: tuple[tuple[str, str], ...] = (
    ("[SX2;$(SC=O)]", "S in a thioester"),
    ("[CX3;$(C(=O)OP)]", "C of an acyl phosphate"),
    ("[OX1;$(O=COP)]", "O of an acyl phosphate"),
    ("[#16]", "S"),
    ("[#15]", "P"),
)


@dataclass(frozen=True)
class PkaRule:
    """An ionisable site: SMARTS of its protonated and deprotonated forms (first atom = the atom
    that carries or loses the proton), its pKa values (highest first: one per proton), and the
    source of the values."""

    name: str
    protonated: str
    deprotonated: str
    pkas: tuple[float, ...]
    source: str


#: pKa rules (25 degC, I = 0), most specific first. A site is counted once.
PKA_RULES: tuple[PkaRule, ...] = (
    PkaRule("alpha-carboxyl of an amino acid", "[OX2H1;$(OC(=O)[CX4][NX4+,NX3])]",
            "[OX1-;$(OC(=O)[CX4][NX4+,NX3])]", (2.3,),
            "glycine pKa1 2.35 (CRC Handbook of Chemistry and Physics, from memory)"),
    PkaRule("carboxylic acid", "[OX2H1;$(O[CX3]=O);!$(OC(=O)OP)]", "[OX1-;$(O[CX3]=O)]", (4.5,),
            "common practice (acetic acid 4.76, CRC Handbook, from memory)"),
    PkaRule("terminal phosphate", "[PX4;$(P[OX2H0])](=O)([OX2H1])",
            "[PX4;$(P[OX2H0])](=O)([OX1-])", (6.5, 1.5),
            "common practice: second pKa of phosphate monoesters about 6.5 (Alberty 2003, "
            "ch. 3-4 tables, from memory); first pKa about 1.5"),
    PkaRule("inner phosphate", "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX2H1]",
            "[PX4;$(P([OX2H0])[OX2H0])](=O)[OX1-]", (1.0,), "common practice"),
    PkaRule("alpha-ammonium of an amino acid", "[NX4H3+;$(N[CX4]C(=O)[O,OX1-])]",
            "[NX3H2;$(N[CX4]C(=O)[O,OX1-])]", (9.6,),
            "glycine pKa2 9.78, alanine 9.87 (CRC Handbook, from memory)"),
    PkaRule("primary alkylammonium", "[NX4H3+]", "[NX3H2;$(N[CX4])]", (10.6,),
            "methylamine 10.66 (CRC Handbook, from memory)"),
    PkaRule("secondary alkylammonium", "[NX4H2+]", "[NX3H1;$(N([CX4])[CX4])]", (11.0,),
            "dimethylamine 10.73, diethylamine 11.0 (CRC Handbook, from memory)"),
    PkaRule("tertiary alkylammonium", "[NX4H1+]", "[NX3H0;$(N([CX4])([CX4])[CX4])]", (9.8,),
            "trimethylamine 9.80 (CRC Handbook, from memory)"),
    PkaRule("imidazolium", "[nX3H1+;r5]", "[nX2;r5;$(n1c[nH]cc1),$(n1cc[nH]c1)]", (6.0,),
            "histidine side chain 6.0 (CRC Handbook, from memory)"),
    PkaRule("guanidinium", "[NX3H2+]=C(N)N", "[NX2H1]=C(N)N", (12.5,),
            "arginine side chain 12.5 (CRC Handbook, from memory)"),
    PkaRule("thiol next to an ammonium (cysteine type)", "[SX2H1;$(S[CX4][CX4][NX4+,NX3])]",
            "[SX1-;$(S[CX4][CX4][NX4+,NX3])]", (8.3,),
            "cysteine side chain 8.3 (CRC Handbook, from memory)"),
    PkaRule("thiol", "[SX2H1]", "[SX1-]", (10.0,), "common practice (alkanethiols 10-10.6)"),
    PkaRule("phenol", "[OX2H1;$(Oc)]", "[OX1-;$(Oc)]", (10.0,),
            "phenol 9.99 (CRC Handbook, from memory)"),
)
