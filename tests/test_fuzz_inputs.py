"""A few hundred random bad inputs, from every class the hardening covers (equations, condition
and option values, table cells, environment files, notes of network files, output folders, map
axes), each run as a command in this process: every one must end with exit code 2, one line on
stderr, no traceback, nothing on stdout and nothing written. The generator is seeded, so a
failure can be replayed. Plumbing (no science)."""

from __future__ import annotations

import random
import shutil
from pathlib import Path

import pytest

from tfa.cli import main

SEED = 17
EQUATION = "H2 + CO2tot <=> formate + H2O"
BAD_NUMBERS = ["nan", "NaN", "inf", "-inf", "1e400", "-1e400", "1/0", "1" * 60, "seven", "0x10",
               "1e", "--1", "1,5", "1e-400x", "None", "True"]


def bad_number(rng: random.Random) -> str:
    return rng.choice(BAD_NUMBERS + [f"{rng.choice(['-', ''])}1e{rng.randint(16, 300)}"])


def equations(rng: random.Random, count: int) -> list[list[str]]:
    """``tfa dg`` with equations no grammar or database can take."""
    forms = ["{c} H2 + CO2tot <=> formate + H2O", "H2 + CO2tot <=> {c} formate + H2O",
             "-{n} H2 + CO2tot <=> formate + H2O", "H2 <=> <=> formate", "H2 + + CO2tot <=> formate",
             "<=> ", "H2 CO2tot formate", "{junk} <=> formate", "H2 + CO2tot <=> {junk}"]
    cases = []
    for _ in range(count):
        form = rng.choice(forms)
        junk = "".join(rng.choice("xyzQ#%") for _ in range(rng.randint(3, 9)))
        cases.append(["dg", form.format(c=rng.choice(["1/0", "9" * 50, "0", "0/5", "20000"]),
                                        n=rng.randint(1, 9), junk=junk)])
    return cases


def options(rng: random.Random, count: int, folder: Path) -> list[list[str]]:
    """Condition and problem options with values that are no number or beyond the caps."""
    numeric = ["--temperature", "--ph", "--ionic-strength", "--pressure", "--pmg", "--k-sigma",
               "--time-limit", "--min-driving-force"]
    counts = ["--draws", "--alternatives", "--h2-levels", "--seed"]
    cases = []
    for _ in range(count):
        kind = rng.random()
        if kind < 0.5:
            option = rng.choice(numeric)
            value = rng.choice([bad_number(rng), "-5", "1e9"] if option != "--temperature"
                               else [bad_number(rng), "-5", "400"])
            cases.append(["assess", str(folder), option, value])
        elif kind < 0.75:
            option = rng.choice(counts)
            huge = ["1e12", "99999999"] if option != "--seed" else ["1e40"]
            cases.append(["assess", str(folder), option,
                          rng.choice(["-1", "1.5", "many", "", *huge])])
        else:
            low, high = rng.choice([("1", "0"), ("-1", "1"), ("nan", "1"), ("1e-40", "1"),
                                    ("1e-9", "1e9"), ("a", "b")])
            cases.append(["assess", str(folder), "--h2-range", f"{low}:{high}"])
    return cases


def tables(rng: random.Random, count: int, folder: Path, scratch: Path) -> list[list[str]]:
    """A cell of the reactions or compounds table replaced by a bad value."""
    reactions = (folder / "reactions.tsv").read_text().splitlines()
    compounds = (folder / "compounds.tsv").read_text().splitlines()
    cases = []
    for k in range(count):
        case = scratch / f"table{k}"
        shutil.copytree(folder, case)
        name, lines, columns = rng.choice([
            ("reactions.tsv", reactions, {1: "equation", 6: "lower_bound", 7: "upper_bound"}),
            ("compounds.tsv", compounds, {4: "charge", 6: "conc_min", 7: "conc_max", 3: "formula"})])
        data = [i for i, line in enumerate(lines) if line and not line.startswith(("#", "id\t"))]
        row = rng.choice(data)
        cells = lines[row].split("\t")
        column = rng.choice(list(columns))
        if columns[column] == "equation":
            cells[column] = rng.choice(["1/0 co2 <=> for", "-1 co2 <=> for", f"{'7' * 45} co2 <=> for",
                                        "co2 <=> nothing_here", "co2 <=>> for"])
        elif columns[column] == "formula":
            cells[column] = rng.choice(["C3H3O3X", "((", "C-1"])
        else:
            cells[column] = bad_number(rng)
        text = lines[:row] + ["\t".join(cells)] + lines[row + 1:]
        (case / name).write_text("\n".join(text) + "\n")
        cases.append(["feasible", str(case), "--modes", "native"])
    return cases


ENVIRONMENT_MUTATIONS = [
    ("temperature_C = 25.0", "temperature_C = {n}"), ("pH = 7.0", "pH = {n}"),
    ("ionic_strength_M = 0.1", "ionic_strength_M = {n}"), ("h2 = 1.0e-3", "h2 = {n}"),
    ("flux = 0.01", "flux = {n}"), ("default = [1.0e-6, 1.0e-2]", "default = [{n}, 1.0e-2]"),
    ("[bounds]\n", "[bounds]\n{word} = [1e-6, 1e-3]\n"), ("[feed]\n", "[feed]\n{word} = 1e-3\n"),
    ('allowed = ["ac"]', 'allowed = ["{word}"]'), ('reaction = "DM_mal"', 'reaction = "{word}"'),
    ("pH = 7.0", "ph_value = 7.0"), ("[demand]", "[demands]"), ("flux = 0.01", "flux = \"0.01\""),
    ('[demand]\nreaction = "DM_mal"\nflux = 0.01\n', ""), ("pH = 7.0", "pH = 7.0 +"),
    ("temperature_C = 25.0", "temperature_C = 150.0"), ("h2 = 1.0e-3", "h2 = [1, 2]"),
]


def environments(rng: random.Random, count: int, folder: Path, scratch: Path) -> list[list[str]]:
    """Environment files with a bad value, an unknown key, a missing demand, broken TOML."""
    base = (folder / "environment.toml").read_text()
    numbers = ["1e300", "-1", "nan", "inf", "-inf"]
    cases = []
    for k in range(count):
        old, new = rng.choice(ENVIRONMENT_MUTATIONS)
        word = rng.choice(["atpp", "h2s", "glucose", "DM_pyr", "x"])
        path = scratch / f"env{k}.toml"
        text = base.replace(old, new.format(n=rng.choice(numbers), word=word))
        if text == base:
            text = base.replace("[conditions]", "[conditions]\nsalinity = 3")
        path.write_bytes(rng.choice([b"", b"\xef\xbb\xbf"]) + text.encode())
        cases.append(["feasible", str(folder), "--environment", str(path), "--modes", "native"])
    return cases


def notes(rng: random.Random, count: int, folder: Path, scratch: Path) -> list[list[str]]:
    """SBML and cobra JSON whose note names a file outside their folder, a device or a pipe."""
    import tfa
    from tfa.network.io_sbml import write_cobra_json, write_sbml

    model = tfa.load_network(folder)
    own = scratch / "sbml"
    own.mkdir()
    (own / "placeholder.tsv").write_text("id\n")
    model.notes["reaction_values_path"] = str(own / "placeholder.tsv")
    shutil.copy(folder / "environment.toml", own / "environment.toml")
    templates = {".xml": write_sbml(model, own / "template.xml").read_text(),
                 ".json": write_cobra_json(model, own / "template.json").read_text()}
    cases = []
    for k in range(count):
        suffix = rng.choice([".xml", ".json"])
        target = rng.choice(["/etc/hostname", "/dev/zero", "/dev/stdin", "../../etc/passwd",
                             "/proc/self/environ", "values_dir"])
        path = own / f"net{k}{suffix}"
        path.write_text(templates[suffix].replace("placeholder.tsv", target))
        cases.append(["feasible", str(path), "--modes", "native"])
    (own / "values_dir").mkdir()
    return cases


def outputs_and_axes(rng: random.Random, count: int, folder: Path, scratch: Path) -> list[list[str]]:
    """Output folders that cannot hold results, and map axes with impossible values."""
    a_file = scratch / "a_file"
    a_file.write_text("mine")
    foreign = scratch / "foreign"
    foreign.mkdir()
    (foreign / "notes.txt").write_text("mine")
    places = [str(a_file), str(a_file / "sub"), str(foreign), str(scratch / ("y" * 300))]
    axes = ["temperature=500,600", "h2=-1", "ph=nan", "pressure=0.5", "ph=1:2:0",
            "temperature=0:100:1000000", "salinity=1,2", "ph=7,7", "h2=0:1:3:log", "ph"]
    cases = []
    for _ in range(count):
        if rng.random() < 0.5:
            command = rng.choice([["feasible", str(folder)], ["robustness", str(folder), "--draws", "1"],
                                  ["assess", str(folder)],
                                  ["map", str(folder), "--x", "ph=7", "--y", "h2=1e-3"]])
            cases.append([*command, "--out", rng.choice(places)])
        else:
            cases.append(["map", str(folder), "--x", rng.choice(axes), "--y", "ionic_strength=0.1",
                          "--modes", "native"])
    return cases


def files_under(folder: Path) -> set[str]:
    return {str(p.relative_to(folder)) for p in folder.rglob("*")}


def test_random_bad_inputs_are_refused_cleanly(mini_folder, tmp_path, capsys, monkeypatch):
    rng = random.Random(SEED)
    scratch = tmp_path / "scratch"
    scratch.mkdir()
    cases = (equations(rng, 50) + options(rng, 80, mini_folder)
             + tables(rng, 60, mini_folder, scratch) + environments(rng, 60, mini_folder, scratch)
             + notes(rng, 20, mini_folder, scratch) + outputs_and_axes(rng, 40, mini_folder, scratch))
    assert len(cases) >= 300
    monkeypatch.chdir(tmp_path)
    capsys.readouterr()
    before = files_under(tmp_path)
    for argv in cases:
        code = main([*argv, "-q"] if argv[0] != "dg" else argv)
        captured = capsys.readouterr()
        lines = captured.err.strip().splitlines()
        where = f"tfa {' '.join(argv)[:160]!r}: exit {code}, stderr {captured.err[:400]!r}"
        assert code == 2, where
        assert len(lines) == 1 and f"tfa {argv[0]}: error: " in lines[0], where
        assert "Traceback" not in captured.err and captured.out == "", where
    assert files_under(tmp_path) == before             # nothing written anywhere


@pytest.mark.parametrize("seed", [SEED])
def test_the_generator_is_reproducible(seed, mini_folder):
    assert equations(random.Random(seed), 5) == equations(random.Random(seed), 5)
