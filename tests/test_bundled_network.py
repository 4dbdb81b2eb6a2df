"""The bundled ancestral H2-fed core network (models/ancestral_core/): content, balance, structures,
literature values and plain flux balance in the demo environment.

Sources of the checks
---------------------
- Balance: the reactant convention of R. A. Alberty, Thermodynamics of Biochemical Reactions,
  Wiley 2003, ch. 3-4 (every element except H exact; H residual equals charge residual).
- Structures: RDKit computes formula and formal charge from each SMILES, independently of the
  formula written in the table.
- Flux balance: the stoichiometric matrix solved by cobra's LP (Orth, Thiele & Palsson 2010,
  Nat. Biotechnol. 28:245, "What is flux balance analysis?"): without an electron donor (H2) or
  a carbon source (CO2) no carbon can be reduced, so the demand must be impossible; with every
  feed closed, no ATP or H2 may be made (a stoichiometric loop would be a defect of the network).
- Energy conservation by the geochemical proton gradient: Mitchell's chemiosmotic relation,
  dG = -2.303 RT (pH_in - pH_out) per H+ entering with the membrane potential taken as 0
  (Nicholls & Ferguson, Bioenergetics, 4th ed. 2013, ch. 3, from memory); H+/ATP of the
  F-type ATP synthase 3-5, set by the c-ring size (common practice).
- Phosphoryl-transfer values are compared with the ATP hydrolysis energy of Alberty 2003 (pH 7,
  I = 0.25 M, -36.0 kJ/mol in tfa/data/reaction_values.csv) only through their documented sums.
"""

from __future__ import annotations

import csv
import math
import re
import tomllib
from pathlib import Path

import pytest

from tfa.equation import parse_equation
from tfa.thermo.balance import check_balance, parse_formula

ROOT = Path(__file__).resolve().parents[1]
FOLDER = ROOT / "models" / "ancestral_core"
DATA = ROOT / "tfa" / "data"

pytestmark = pytest.mark.skipif(not (FOLDER / "reactions.tsv").exists(),
                                reason="models/ancestral_core/ not written yet")


def _table(path: Path) -> list[dict[str, str]]:
    lines = [ln for ln in path.read_text(encoding="utf-8").splitlines()
             if ln.strip() and not ln.lstrip().startswith("#")]
    return list(csv.DictReader(lines, delimiter="\t"))


@pytest.fixture(scope="module")
def compounds() -> dict[str, dict[str, str]]:
    return {row["id"]: row for row in _table(FOLDER / "compounds.tsv")}


@pytest.fixture(scope="module")
def reactions() -> list[dict[str, str]]:
    return _table(FOLDER / "reactions.tsv")


@pytest.fixture(scope="module")
def values() -> list[dict[str, str]]:
    return _table(FOLDER / "reaction_values.tsv")


def _formulas(compounds):
    return {cid: (parse_formula(row["formula"], where=cid)[0], int(row["charge"]))
            for cid, row in compounds.items()}


def _stoich(text: str, where: str) -> dict[str, float]:
    return parse_equation(text, where=where, allow_empty_side=True).stoichiometry()


def _is_boundary(text: str) -> bool:
    eq = parse_equation(text, allow_empty_side=True)
    return not eq.reactants or not eq.products


# ----------------------------------------------------------------------------- content
def test_size_and_unique_ids(compounds, reactions):
    ids = [r["id"] for r in reactions]
    assert len(ids) == len(set(ids)), "duplicate reaction ids"
    assert len(_table(FOLDER / "compounds.tsv")) == len(compounds), "duplicate compound ids"
    assert len(reactions) >= 120
    assert len(compounds) >= 100
    assert all(re.fullmatch(r"[a-z0-9_]+", cid) for cid in compounds)


def test_every_compound_used_is_defined_and_every_defined_is_used(compounds, reactions):
    used: set[str] = set()
    for r in reactions:
        used |= set(_stoich(r["equation"], r["id"]))
    assert used - set(compounds) == set()
    assert set(compounds) - used == set()


def test_every_internal_reaction_balances(compounds, reactions):
    formulas = _formulas(compounds)
    checked = 0
    for r in reactions:
        if _is_boundary(r["equation"]):
            continue
        report = check_balance(_stoich(r["equation"], r["id"]), formulas)
        assert report.ok, f"{r['id']}: {report.message}"
        # protons are written explicitly: nothing is left for the buffer
        assert report.hydrogen_residual == 0 and report.charge_residual == 0, r["id"]
        checked += 1
    assert checked >= 110


def test_an_unbalanced_equation_is_caught(compounds):
    """The balance check itself can fail: CO2 -> formate without its electron donor H2 leaves
    charge -1 that no proton exchange explains (Alberty 2003, reactant convention)."""
    formulas = _formulas(compounds)
    assert check_balance({"h2": -1, "co2": -1, "for": 1, "h": 1}, formulas).ok
    report = check_balance({"co2": -1, "for": 1, "h": 1}, formulas)
    assert not report.ok and "charge" in report.message


def test_ec_and_pathway_on_every_reaction(reactions):
    ec_re = re.compile(r"^\d+\.\d+\.\d+\.\d+$")
    for r in reactions:
        assert r["pathway"].strip(), f"{r['id']} has no pathway tag"
        if r["pathway"] in ("boundary", "demand"):
            continue
        if r["ec"]:
            assert all(ec_re.match(e) for e in r["ec"].split(";")), r["id"]
        else:  # only reactions without a known enzyme may lack an EC number
            assert re.search(r"spontaneous|non-enzymatic", r["name"] + r["notes"]), r["id"]


def test_required_pathways_and_compounds(compounds, reactions):
    tags = {r["pathway"] for r in reactions}
    for tag in ("acetyl-CoA pathway (methyl branch)", "acetyl-CoA pathway (carbonyl branch)",
                "gluconeogenesis", "pentose phosphates", "reductive TCA", "amino acids",
                "pyrimidines", "carriers", "boundary", "demand"):
        assert tag in tags
    for cid in ("h2", "co2", "for", "co", "accoa", "actp", "ac", "pyr", "pep", "g3p", "dhap", "f6p",
                "g6p", "r5p", "prpp", "oaa", "mal", "fum", "succ", "succoa", "akg", "cbp", "orot", "ump",
                "gly", "ala", "ser", "cys", "asp", "asn", "glu", "gln", "thr", "val", "ile", "pro"):
        assert cid in compounds, cid
    amino = [c for c, row in compounds.items() if "[NH3+]" in row["smiles"] or "[NH2+]" in row["smiles"]]
    proteinogenic = {"gly", "ala", "ser", "cys", "asp", "asn", "glu", "gln", "thr", "val", "ile", "pro"}
    assert proteinogenic <= set(amino)
    ecs = {e for r in reactions for e in r["ec"].split(";")}
    # textbook enzymes the issue names: acetate kinase, H2:NAD+, H2:ferredoxin, ferredoxin-NADP+
    assert {"2.7.2.1", "1.12.1.2", "1.12.7.2", "1.18.1.2", "2.5.1.47", "6.3.4.16", "4.1.1.23"} <= ecs
    # cysteine takes its sulfur from H2S
    oass = next(r for r in reactions if r["ec"] == "2.5.1.47")
    assert "h2s" in _stoich(oass["equation"], "OASS")


def test_boundary_reactions(reactions):
    boundary = {r["id"]: r for r in reactions if r["pathway"] == "boundary"}
    for cid in ("h2", "co2", "h2s", "pi", "nh4", "h2o", "h", "h_out", "ac", "for"):
        assert f"EX_{cid}" in boundary
    for outlet in ("EX_ac", "EX_for"):
        assert float(boundary[outlet]["lower_bound"]) == 0.0  # export only
    demand = [r for r in reactions if r["pathway"] == "demand"]
    assert len(demand) == 1 and demand[0]["id"] == "demand_precursors"
    parts = _stoich(demand[0]["equation"], "demand")
    assert all(v < 0 for v in parts.values()) and len(parts) >= 15


# ----------------------------------------------------------------------------- compounds
def test_roles(compounds):
    roles = {row["role"] for row in compounds.values() if row["role"]}
    assert {"proton", "water", "h2", "phosphate", "atp", "adp", "amp", "pyrophosphate",
            "red:NAD:2", "ox:NAD:2", "red:NADP:2", "ox:NADP:2", "red:Fd:2", "ox:Fd:2"} <= roles
    pairs: dict[str, set[str]] = {}
    for row in compounds.values():
        if row["role"].startswith(("red:", "ox:")):
            kind, pair, n = row["role"].split(":")
            pairs.setdefault(pair, set()).add(kind)
            assert int(n) == 2
    assert all(kinds == {"red", "ox"} for kinds in pairs.values())


def test_smiles_match_formula_and_charge(compounds):
    from rdkit import Chem, RDLogger
    from rdkit.Chem.rdMolDescriptors import CalcMolFormula

    RDLogger.DisableLog("rdApp.*")
    without = [cid for cid, row in compounds.items() if not row["smiles"]]
    assert set(without) == {"fdox", "fdred"}  # only the ferredoxin carrier has no structure
    for cid, row in compounds.items():
        if not row["smiles"]:
            continue
        mol = Chem.MolFromSmiles(row["smiles"])
        assert mol is not None, cid
        counts, _ = parse_formula(re.sub(r"[+-]\d*$", "", CalcMolFormula(mol)))
        if cid in ("h", "h_out"):
            counts = {"H": 1}
        assert counts == parse_formula(row["formula"])[0], cid
        assert Chem.GetFormalCharge(mol) == int(row["charge"]), cid


def test_thermo_keys_exist_and_are_pseudoisomers(compounds):
    path = DATA / "compounds.csv"
    if not path.exists():
        pytest.skip("tfa/data/compounds.csv not generated yet")
    with open(path, newline="", encoding="utf-8") as fh:
        known = {row["id"]: row for row in csv.DictReader(fh)}
    with open(DATA / "potentials.csv", newline="", encoding="utf-8") as fh:
        for row in csv.DictReader(fh):
            known[row["oxidised"]] = {"formula": row["oxidised_formula"], "charge": "0"}
            known[row["reduced"]] = {"formula": row["reduced_formula"], "charge": "0"}
    keyed = {cid: row for cid, row in compounds.items() if row["thermo_key"]}
    assert len(keyed) >= 50
    for cid, row in keyed.items():
        assert row["thermo_key"] in known, f"{cid}: thermo_key {row['thermo_key']!r} unknown"
        mine, _ = parse_formula(row["formula"])
        theirs, _ = parse_formula(known[row["thermo_key"]]["formula"])
        # same compound up to protons (Alberty's pseudoisomer group): elements other than H equal
        mine.pop("H", None)
        theirs.pop("H", None)
        assert mine == theirs, f"{cid}: {row['formula']} vs {known[row['thermo_key']]['formula']}"


def test_no_thermo_key_for_unreviewed_only_compounds(compounds):
    """Acetyl phosphate, PEP, 3-phosphoglycerate... have species data only from the unreviewed
    2026 source (the design notes (docs/design)): they must take their energy from reviewed literature values."""
    for cid in ("actp", "pep", "pg3", "bpg", "f6p", "g6p", "r5p", "ru5p", "glyc3p", "coa", "accoa", "thf"):
        assert compounds[cid]["thermo_key"] == "", cid


# ----------------------------------------------------------------------------- literature values
def test_reaction_values_are_balanced_sourced_and_used(compounds, reactions, values):
    formulas = _formulas(compounds)
    sources = {row["key"] for row in _table(FOLDER / "sources.tsv")}
    lit = DATA / "literature_sources.csv"
    if lit.exists():
        with open(lit, newline="", encoding="utf-8") as fh:
            sources |= {row["key"] for row in csv.DictReader(fh)}
    ids = {v["id"] for v in values}
    for v in values:
        report = check_balance(_stoich(v["equation"], v["id"]), formulas)
        assert report.ok, f"{v['id']}: {report.message}"
        assert v["source_key"] in sources, v["id"]
        assert float(v["sigma_kJ_per_mol"]) > 0, v["id"]
        assert float(v["delta_g_standard_kJ_per_mol"]) != 0.0, v["id"]
        assert v["temperature_C"] and v["ph"] and v["ionic_strength"], v["id"]
        assert "memory" in v["note"] or "common practice" in v["note"], v["id"]
    for r in reactions:
        if r["energy_source"] not in ("", "auto"):
            assert r["energy_source"] in ids, r["id"]


def test_values_link_every_compound_without_data_or_are_listed(compounds, values):
    """Every compound without a thermo_key appears in some literature value, except those the
    README lists as awaiting an estimate."""
    in_values = set()
    for v in values:
        in_values |= set(_stoich(v["equation"], v["id"]))
    readme = (FOLDER / "README.md").read_text(encoding="utf-8")
    for cid, row in compounds.items():
        if not row["thermo_key"] and cid not in in_values:
            assert f"`{cid}`" in readme, f"{cid}: no data, no value, not listed in README"


def test_phosphoryl_values_are_mutually_consistent(values):
    """Nelson & Cox (Lehninger) tables: PGK = BPG hydrolysis - ATP hydrolysis, pyruvate kinase =
    PEP hydrolysis - ATP hydrolysis (ATP hydrolysis -30.5 kJ/mol in the same tables, from memory),
    within the stated uncertainties."""
    by_id = {v["id"]: float(v["delta_g_standard_kJ_per_mol"]) for v in values}
    atp = -30.5
    assert by_id["pgk"] == pytest.approx(-(by_id["bpg_hydrolysis"] - atp), abs=2.0)
    assert by_id["pyk"] == pytest.approx(by_id["pep_hydrolysis"] - atp, abs=2.0)
    assert by_id["pfk"] + by_id["fbpase"] == pytest.approx(atp, abs=2.5)


def test_formaldehyde_thf_value_is_on_the_total_formaldehyde_basis(values):
    """Kallen & Jencks 1966 (J. Biol. Chem. 241:5851, from memory): association constant about
    3.2e4 M-1 for total formaldehyde + THF at pH 7.2, 25 degC, i.e. -RT ln K = -25.7 kJ/mol. The
    database's formaldehyde is total formaldehyde (hydrate + HCHO), so no hydration correction
    (about -19 kJ/mol, which the value carried before) may be applied."""
    row = {v["id"]: v for v in values}["hcho_thf"]
    rt = 8.314462618e-3 * 298.15
    assert float(row["delta_g_standard_kJ_per_mol"]) == pytest.approx(-rt * math.log(3.2e4), abs=0.3)
    assert float(row["temperature_C"]) == 25 and float(row["ph"]) == 7.2
    assert "total" in row["note"]


def test_acyl_phosphate_kinase_analogues_lie_in_the_textbook_range(values):
    """Aspartate and glutamate 5-kinase (acyl phosphates without a measured constant at hand) must
    lie within their sigma of the range spanned by the acyl-phosphate kinases of Nelson & Cox
    (Lehninger tables, from memory; ATP hydrolysis -30.5): acetate kinase -(-43.1) - 30.5 = +12.6
    to phosphoglycerate kinase +18.5; and the two acyl-phosphate reductases must equal the
    glyceraldehyde-3-phosphate dehydrogenase value they are taken from."""
    by_id = {v["id"]: v for v in values}
    low = -float(by_id["actp_hydrolysis"]["delta_g_standard_kJ_per_mol"]) - 30.5
    high = float(by_id["pgk"]["delta_g_standard_kJ_per_mol"])
    for rid in ("ak", "g5k"):
        g, sigma = float(by_id[rid]["delta_g_standard_kJ_per_mol"]), float(by_id[rid]["sigma_kJ_per_mol"])
        assert low - sigma <= g <= high + sigma, rid
        assert sigma >= (high - low) / 2, rid
    for rid in ("asd", "g5sd"):
        assert float(by_id[rid]["delta_g_standard_kJ_per_mol"]) == float(by_id["gapdh"]["delta_g_standard_kJ_per_mol"]), rid


def test_every_internal_reaction_has_an_energy_at_the_demo_setting():
    """No placeholder: every internal reaction carries a value with a source and sigma; at least
    85 % come from reviewed species data or cited literature values (the design notes (docs/design): never silently
    zero, every energy with provenance and a standard uncertainty)."""
    from tfa.network import coverage
    from tfa.network import bundled
    from tfa.network import environment
    report = coverage.coverage(bundled.load_bundled_network(), environment.bundled_environment())
    assert not [r.reaction_id for r in report.reactions if r.source in ("placeholder", "none")]
    for r in report.reactions:
        assert math.isfinite(r.standard) and math.isfinite(r.uncertainty), r.reaction_id
        assert r.provenance, r.reaction_id
    assert report.reviewed_or_cited_fraction >= 0.85, report.counts
    by_id = {r.reaction_id: r for r in report.reactions}
    for rid in ("AK", "ASD", "G5K", "G5SD", "P5CS", "ATCase", "DHOase", "DHODH"):
        assert by_id[rid].source == "literature", rid
    # pyrroline-5-carboxylate reductase has no value of its own: the three glutamate-branch values
    # and the species data of glutamate and proline close the chain
    assert by_id["P5CR"].source == "reconciled"


# ----------------------------------------------------------------------------- environment
def test_environment_is_the_invented_demo_setting(compounds):
    env = tomllib.loads((FOLDER / "environment.toml").read_text(encoding="utf-8"))
    assert env["environment"]["name"] == "Kestrel Ridge vent field"
    assert "invented" in env["environment"]["description"].lower()
    c = env["conditions"]
    assert 0 < c["temperature_C"] < 150 and 5 < c["pH"] < 11 and 0 <= c["ionic_strength_M"] < 1
    assert set(env["feed"]) == {"h2", "pi"}
    # carbon, sulfide and ammonia as the totals a geochemist measures, speciated by tfa
    assert set(env["fluid"]) == {"dissolved_inorganic_carbon_M", "total_sulfide_M", "total_ammonia_M"}
    # the outer fluid is a compartment more acidic than the cell (the ocean side of an alkaline
    # vent), within the range the demo assumes (pH 5.5-6.5)
    ph_out = env["compartments"]["out"]["pH"]
    assert 5.5 - 1e-6 <= ph_out <= 6.5 and ph_out < c["pH"]
    assert env["compartments"]["out"]["membrane_potential_mV"] == 0.0
    assert set(env["ion_stoichiometry"]) == {"ATPS_GRAD", "ECH", "RNF"}
    assert all(k in compounds for k in env["bounds"] if k != "default")
    assert env["demand"]["reaction"] == "demand_precursors"
    assert set(env["outlets"]["allowed"]) <= set(compounds)


# ----------------------------------------------------------------------------- gradient module
GRADIENT_PATHWAY = "energy conservation (geochemical proton gradient)"


def test_gradient_module_is_present_balanced_and_uses_the_outer_compartment(compounds, reactions):
    row = compounds["h_out"]
    assert row["thermo_key"] == "H+" and row["formula"] == "H" and int(row["charge"]) == 1
    assert row["compartment"] == "out" and row["role"] == ""   # H+ of the outer fluid
    module = [r for r in reactions if r["pathway"] == GRADIENT_PATHWAY]
    assert [r["id"] for r in module] == ["ATPS_GRAD", "ECH", "RNF"]
    atps = module[0]
    assert atps["ec"] == "7.1.2.2" and "assumption" in atps["notes"]
    stoich = _stoich(atps["equation"], "ATPS_GRAD")
    # ADP + Pi -> ATP + H2O with n H+ taken from outside, n within the common-practice 3-5
    assert stoich["adp"] == -1 and stoich["pi"] == -1 and stoich["atp"] == 1 and stoich["h2o"] == 1
    assert 3 <= -stoich["h_out"] <= 5
    for r in module:
        report = check_balance(_stoich(r["equation"], r["id"]), _formulas(compounds))
        assert report.ok and report.hydrogen_residual == 0 and report.charge_residual == 0, r["id"]
    # the energy-converting hydrogenase takes ions in while H2 reduces ferredoxin; Rnf gives
    # them out while ferredoxin reduces NAD+ (Buckel & Thauer 2013, from memory)
    ech, rnf = _stoich(module[1]["equation"], "ECH"), _stoich(module[2]["equation"], "RNF")
    assert ech["h2"] == -1 and ech["fdred"] == 1 and ech["h_out"] < 0
    assert rnf["fdred"] == -1 and rnf["nadh"] == 1 and rnf["h_out"] > 0
    users = {r["id"] for r in reactions if "h_out" in _stoich(r["equation"], r["id"])}
    assert users == {"ATPS_GRAD", "ECH", "RNF", "EX_h_out"}


def test_outer_protons_pay_for_atp_at_the_demo_setting():
    """Mitchell's relation at the demo setting: n H+ entering from pH_out to pH_in release
    n RT ln10 (pH_in - pH_out) (Δψ = 0 here); within the bounds of the environment (ATP >= min,
    ADP <= max, Pi fed) this must exceed the cost of ADP + Pi -> ATP + H2O, else the module
    could not make ATP. R of CODATA 2018."""
    from tfa.network import energies
    from tfa.network import bundled
    from tfa.network import environment
    model, env = bundled.load_bundled_network(), environment.bundled_environment()
    with model:
        tm = energies.prepare(model, env, "native")
        g0 = tm.energies["ATPS_GRAD"].standard
        stoich = {m.id: c for m, c in tm.model.reactions.ATPS_GRAD.metabolites.items()}
    c = env.conditions
    rt = 8.314462618e-3 * c.temperature
    ph_out = env.compartments["out"].ph
    n = -stoich["h_out"]
    assert n == env.ion_stoichiometry["ATPS_GRAD"] == 4
    from tfa.thermo import ThermoDatabase
    synthesis = ThermoDatabase.load().reaction_energy("ADP + phosphate <=> ATP + H2O", c).standard
    gain = n * rt * math.log(10) * (c.ph - ph_out)
    assert g0 == pytest.approx(synthesis - gain, abs=1e-6)
    assert 30.0 < synthesis < 50.0
    atp_min, adp_max = env.bounds["atp"][0], env.bounds["adp"][1]
    best = g0 + rt * (math.log(atp_min) - math.log(adp_max) - math.log(env.feed["pi"]))
    assert best < -1.0, f"ATP synthesis uphill by {best:.1f} kJ/mol at best"
    cost = best + gain
    assert 40.0 < cost < 60.0    # ATP synthesis at these bounds (in vivo 45-55, common practice)


def test_what_the_gradient_pays_for_at_the_demo_setting():
    """With the gradient both the native and the H2-only modes have a certified steady state;
    without it (compartment out at the cell's pH) the H2-only mode needs exactly one step
    driven uphill, ATP synthesis: with H2 in place of the carriers only the gradient makes ATP.
    The fumarate-dependent dihydroorotate dehydrogenase (EC 1.3.98.1) takes the electrons that
    H2 cannot take from dihydroorotate."""
    from tfa.network import energies
    from tfa.network import bundled
    from tfa.network import environment
    from tfa.analyses import feasibility
    from tfa.network.compartments import without_gradient
    from tfa.problem import ProblemOptions

    model, env = bundled.load_bundled_network(), environment.bundled_environment()
    options = ProblemOptions(time_limit=120)
    for mode in ("native", "h2_only"):
        with_gradient = feasibility(energies.prepare(model, env, mode), options)
        assert with_gradient.feasible and all(c.passed for c in with_gradient.certificates), mode
    fluxes = with_gradient.to_frame().set_index("reaction")["flux"]
    assert fluxes["ATPS_GRAD"] > 1e-6 and fluxes["DHODH_FUM"] > 1e-6
    without = feasibility(energies.prepare(model, without_gradient(env), "h2_only"), options)
    assert not without.feasible and not without.demand_impossible
    # one step must then be driven; with the physiological carrier states of the environment
    # more than one single step will do (ATP synthesis itself, or running the aldehyde:ferredoxin
    # oxidoreductase backwards), so only the size is pinned here
    assert without.diagnosis.size == 1


# ----------------------------------------------------------------------------- flux balance
@pytest.fixture()
def model():
    from tfa.network import io_table
    return io_table.read_network(FOLDER / "reactions.tsv")


def _close(model, *ids):
    for rid in ids:
        model.reactions.get_by_id(rid).bounds = (0.0, 0.0)


def test_native_network_makes_the_demand_from_the_feed(model):
    model.objective = "demand_precursors"
    assert model.slim_optimize() > 1.0


@pytest.mark.parametrize("withheld", ["EX_h2", "EX_co2", "EX_nh4", "EX_pi", "EX_h2s"])
def test_no_demand_without_a_feed(model, withheld):
    _close(model, withheld)
    model.objective = "demand_precursors"
    value = model.slim_optimize(error_value=0.0)
    assert value == pytest.approx(0.0, abs=1e-7)


def test_the_gradient_alone_makes_no_demand_and_no_reductant(model):
    """With only the outer protons fed (and water, H+), ATP may be made from the gradient, but
    no carbon can be fixed and no H2 made: the module adds energy, not matter."""
    import cobra

    _close(model, *[r.id for r in model.boundary if r.id not in ("EX_h2o", "EX_h", "EX_h_out")])
    sink = cobra.Reaction("test_h2_sink", lower_bound=0.0, upper_bound=1000.0)
    sink.add_metabolites({model.metabolites.get_by_id("h2"): -1})
    model.add_reactions([sink])
    for objective in ("test_h2_sink", "demand_precursors"):
        model.objective = objective
        assert model.slim_optimize(error_value=0.0) == pytest.approx(0.0, abs=1e-7), objective
    model.objective = "ATPM"   # the gradient does drive ATP hydrolysis (the check can fail)
    assert model.slim_optimize(error_value=0.0) > 1.0


def test_no_atp_or_reductant_from_nothing(model):
    """With every feed closed, plain flux balance finds no H2 and no demand; it does find ATP
    made from nothing, through the reactions whose imposed directions were lifted (direction
    review: formate-THF ligase, aldehyde and GAP:ferredoxin oxidoreductases, ferredoxin-NAD(P)+
    reductases, citrate lyase), a stoichiometric loop; the thermodynamic constraints exclude it
    (next test)."""
    import cobra

    _close(model, *[r.id for r in model.boundary if r.id not in ("EX_h2o", "EX_h")])
    sink = cobra.Reaction("test_h2_sink", lower_bound=0.0, upper_bound=1000.0)
    sink.add_metabolites({model.metabolites.get_by_id("h2"): -1})
    model.add_reactions([sink])
    for objective in ("test_h2_sink", "demand_precursors"):
        model.objective = objective
        assert model.slim_optimize(error_value=0.0) == pytest.approx(0.0, abs=1e-7), objective
    model.objective = "ATPM"
    assert model.slim_optimize(error_value=0.0) > 1.0     # the loop plain flux balance allows


@pytest.mark.slow
def test_the_energies_exclude_atp_from_nothing():
    """The same question with the energies: no feed, no gradient, ATP hydrolysis (ATPM) as the
    demand. Every internal cycle sums to zero transformed energy and each step needs the least
    driving force, and ATP synthesis costs at least +40 kJ/mol within the bounds, so no steady
    state exists (the solver's proof, re-asked of the second solver)."""
    import dataclasses

    from tfa.analyses import feasibility
    from tfa.network import bundled, energies, environment
    from tfa.network.compartments import without_gradient
    from tfa.problem import ProblemOptions

    model, env = bundled.load_bundled_network(), environment.bundled_environment()
    nothing = dataclasses.replace(without_gradient(env), feed={}, outlets=(),
                                  demand_reaction="ATPM", demand_flux=0.01)
    result = feasibility(energies.prepare(model, nothing, "native"), ProblemOptions(time_limit=120),
                         diagnose=False)
    assert not result.feasible
    assert result.verification["status"] in ("proven", "solver proof")


@pytest.mark.slow
def test_the_assessment_says_what_the_gradient_does_for_ferredoxin_and_for_each_mode(capsys):
    """At the demo setting: whether ferredoxin can be reduced by H2 with
    the gradient's help and how much gradient that needs; the verdicts with and without the
    gradient and the least gradient at which H2-only runs. Checked against hand arithmetic:
    2 H+ at ΔpH 2 raise the reachable red/ox ratio by 10^(2×2) = 1e4 (Mitchell 1961); H2-only
    runs only when 4 H+ pay for ATP synthesis (≥ 46.6 kJ/mol within the bounds: ΔpH ≥ 46.6 /
    (4 × 6.5695) = 1.77 at 70 °C; this README's figure)."""
    import json

    from tfa.cli import main

    assert main(["gradient", "--modes", "native,h2_only", "--json"]) == 0
    payload = json.loads(capsys.readouterr().out)
    tables = payload["tables"]
    verdicts = {(r["mode"], r["gradient"]): r for r in tables["gradient_verdicts"]}
    assert verdicts["h2_only", "with"]["feasible"] and not verdicts["h2_only", "without"]["feasible"]
    native_with, native_without = verdicts["native", "with"], verdicts["native", "without"]
    # without the gradient the native network needs more H2, or (with the physiological carrier
    # states) runs at no H2 level at all
    assert (native_without["h2_threshold"] is None and not native_without["feasible"]) or \
        native_with["h2_threshold"] < native_without["h2_threshold"]
    least = {r["mode"]: r for r in tables["least_gradient"]}
    assert least["h2_only"]["feasible"] and 1.77 <= least["h2_only"]["delta_ph"] <= 2.0
    assert least["h2_only"]["status"] in ("proven", "solver proof")
    fd = {(r["reaction"], r["gradient"]): r for r in tables["carrier_by_h2"]}
    direct, coupled = fd["HYD_FD", "with"], fd["ECH", "with"]
    assert coupled["reduced_to_oxidised_max"] / direct["reduced_to_oxidised_max"] == \
        pytest.approx(1e4, rel=1e-6)
    assert 0 < coupled["needed_per_ion_kJ_per_mol"] < 13.1   # less than the demo's 13.1 per H+


def test_ion_coupled_redox_energies_against_published_potentials():
    """At 25 °C, pH 7, I = 0 with no gradient the ion-coupled enzymes reduce to their soluble
    reactions, whose ΔrG'° follow from E'° (Thauer, Jungermann & Decker 1977, Bacteriol. Rev.
    41:100, table of redox potentials, from memory): Fd (−420 mV) to NAD+ (−320 mV):
    −2F(0.100 V) = −19.3 kJ/mol; H2(aq) to Fd: −2F(−0.420 + 0.414) − ΔfG°(H2, aq) ≈ +1.2 −
    17.7 = −16.5 kJ/mol (H2(aq) 17.7 kJ/mol, Shock & Helgeson 1988, from memory); dihydroorotate
    (−290 mV, from memory) to fumarate (+33 mV): −62.3 kJ/mol. At the demo setting each H+ that
    enters brings −RT ln10 × 2 = −13.139 kJ/mol (Mitchell 1961), so ECH − HYD_FD = 2 × that and
    RNF − FNOR = −2 × that, exactly."""
    import dataclasses

    from tfa.conditions import Conditions
    from tfa.network import bundled, energies, environment
    from tfa.network.compartments import without_gradient

    model, env = bundled.load_bundled_network(), environment.bundled_environment()
    flat = without_gradient(env)
    at25 = dataclasses.replace(flat, conditions=Conditions.from_celsius(25, ph=7.0),
                               compartments={k: dataclasses.replace(c, ph=7.0, ionic_strength=0.0)
                                             for k, c in flat.compartments.items()})
    e = energies.prepare(model, at25, "native").energies
    assert e["RNF"].standard == pytest.approx(e["FNOR"].standard, abs=1e-9)
    assert e["ECH"].standard == pytest.approx(e["HYD_FD"].standard, abs=1e-9)
    assert e["FNOR"].standard == pytest.approx(-19.3, abs=3.0)
    assert e["HYD_FD"].standard == pytest.approx(-16.5, abs=3.0)
    assert e["DHODH_FUM"].standard == pytest.approx(-62.3, abs=8.0)
    demo = energies.prepare(model, env, "native").energies
    per_h = -8.314462618e-3 * env.conditions.temperature * math.log(10) * 2.0
    assert per_h == pytest.approx(-13.139, abs=1e-3)
    assert demo["ECH"].standard - demo["HYD_FD"].standard == pytest.approx(2 * per_h, abs=1e-6)
    assert demo["RNF"].standard - demo["FNOR"].standard == pytest.approx(-2 * per_h, abs=1e-6)
