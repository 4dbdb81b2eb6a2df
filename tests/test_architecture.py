"""The shape of the code, checked: one step per analysis that reaches every output, one name and
default per option, a fast and light ``--help``, one vocabulary for every column, one-way layers,
modules of one job (at most 600 lines), and a repository that points nowhere outside itself.

This is plumbing rather than science (the science is checked against published values in the
test_thermo_*, test_engine_* and test_network_* modules).
"""

from __future__ import annotations

import ast
import json
import re
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest

from tfa.report.tables import compare_table_files

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "tfa"
#: Modules of each layer (the first path component under tfa/); a module may import from its own
#: layer and the layers before it, never after.
LAYERS = [
    {"constants", "errors", "conditions", "equation", "vocabulary", "modes", "util", "water",
     "__init__", "data"},
    {"thermo"},
    {"network", "models"},
    {"verify"},
    {"problem"},
    {"analyses"},
    {"report"},
    {"assessment"},
    {"cli", "__main__"},
]
#: Heavy libraries a ``--help`` must not import.
HEAVY = ("cobra", "optlang", "rdkit", "matplotlib")


# ------------------------------------------------------------------ one step per analysis
def _toy_step():
    """A toy analysis, the number of internal reactions per pathway tag: one Step subclass."""
    from tfa.assessment import Section, Step

    class PathwayCountStep(Step):
        id = "pathway_counts"
        label = "pathway counts"
        title = "Reactions per pathway"
        question = "how many reactions does each pathway have?"

        def run(self, ctx):
            tags = [str((r.notes or {}).get("pathway") or "") for r in ctx.model.reactions]
            frame = pd.Series(tags).value_counts().rename_axis("pathway").reset_index(name="reactions")
            return frame.sort_values(["reactions", "pathway"], ascending=[False, True])

        def tables(self, result, ctx):
            return {"pathway_counts": result}

        def summary_lines(self, result, ctx):
            return [f"pathways: {len(result)} tags, the largest {result.iloc[0]['pathway']}"]

        def sections(self, result, ctx):
            return [Section(self.title, "Internal reactions per pathway tag.",
                            tables=[("pathway_counts", "Reactions per pathway")])]

    return PathwayCountStep()


@pytest.fixture()
def toy_step():
    from tfa.assessment import register_step, unregister_step

    step = register_step(_toy_step())          # the one registration line
    yield step
    unregister_step(step.id)


def test_a_new_step_reaches_files_summary_and_report(toy_step, tmp_path, capsys):
    from tfa.cli import main

    out = tmp_path / "out"
    skip = ("feasibility,h2_scan,h2_threshold,gradient,driving_force,energy_profile,ranges,robustness,"
            "couplings,currencies,route_comparison")
    assert main(["assess", "--skip", skip, "--out", str(out), "-q"]) == 0
    printed = capsys.readouterr().out
    assert "pathways: " in printed
    frame = pd.read_csv(out / "pathway_counts.csv")
    assert list(frame.columns) == ["pathway", "reactions"] and frame["reactions"].sum() > 100
    assert compare_table_files(out / "pathway_counts.csv", out / "pathway_counts.json") == []
    summary = json.loads((out / "summary.json").read_text())
    assert "pathway_counts" in summary["steps"] and any("pathways: " in s for s in summary["summary"])
    page = (out / "report.html").read_text()
    assert "Reactions per pathway" in page and "Internal reactions per pathway tag." in page


def test_assess_help_lists_the_registered_steps():
    from tfa.assessment.registry import step_ids
    from tfa.cli.cmd_assess import STEP_IDS

    assert list(STEP_IDS) == step_ids()


# ------------------------------------------------------------------ options
def _options_by_command():
    """command -> {flag: (dest, default, help)} of every visible option."""
    import argparse

    from tfa.cli import build_parser

    parser = build_parser()
    commands = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    out = {}
    for name, sub in commands.choices.items():
        flags = {}
        for action in sub._actions:
            if action.help == argparse.SUPPRESS or not action.option_strings:
                continue
            for flag in action.option_strings:
                flags[flag] = (action.dest, action.default, action.help)
        out[name] = flags
    return out


def test_options_meaning_the_same_have_one_name_and_one_default():
    from tfa.cli.options import COMMAND_DEFAULTS

    options = _options_by_command()
    by_flag: dict[str, set] = {}
    by_dest: dict[str, set] = {}
    for command, flags in options.items():
        for flag, (dest, default, text) in flags.items():
            if dest in COMMAND_DEFAULTS and command in COMMAND_DEFAULTS[dest]:
                assert default == COMMAND_DEFAULTS[dest][command], (command, flag)
                continue
            by_flag.setdefault(flag, set()).add((dest, repr(default), text))
            if flag.startswith("--"):
                by_dest.setdefault(dest, set()).add(flag)
    different = {flag: seen for flag, seen in by_flag.items() if len(seen) > 1}
    assert different == {}, different
    synonyms = {dest: flags for dest, flags in by_dest.items() if len(flags) > 1}
    assert synonyms == {}, synonyms
    # the old dialects are gone from the help (they still work, with a deprecation message)
    visible = {flag for flags in options.values() for flag in flags}
    assert not visible & {"--pathway", "--levels", "--range", "--serial", "--robustness-draws",
                          "--no-robustness", "--ranges-compounds", "--allow-uphill"}
    assert {"--route", "--h2-range", "--h2-levels", "--modes", "--mode", "--workers"} <= visible


def test_old_spellings_still_work_and_say_so(capsys):
    from tfa.cli import build_parser
    from tfa.cli.options import report_deprecations

    args = build_parser().parse_args(["h2-scan", "--levels", "1e-8:1e-2:4"])
    assert (args.h2_range, args.h2_levels) == ("1e-8:1e-2", 4)
    report_deprecations(args)
    assert "--levels is deprecated" in capsys.readouterr().err
    args = build_parser().parse_args(["driving-force", "--pathway", "HDCR"])
    assert args.route == "HDCR"


@pytest.mark.parametrize("argv", [["--help"], ["feasible", "--help"], ["assess", "--help"]])
def test_help_imports_nothing_heavy(argv):
    run = subprocess.run([sys.executable, "-X", "importtime", "-m", "tfa", *argv],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr[-2000:]
    imported = {line.split("|")[-1].strip().split(".")[0]
                for line in run.stderr.splitlines() if line.startswith("import time:")}
    assert not imported & set(HEAVY), imported & set(HEAVY)


def test_public_api_is_listed():
    import tfa

    assert {"assess", "load_network", "load_environment", "ThermoDatabase", "Conditions",
            "Step", "register_step", "MODES"} <= set(dir(tfa))
    assert "annotations" not in dir(tfa)


# ------------------------------------------------------------------ vocabulary
@pytest.mark.slow
def test_every_column_and_key_is_in_the_vocabulary(bundled_run):
    from tfa.vocabulary import COLUMNS, SUMMARY_KEYS

    out = bundled_run.out
    for csv_path in sorted(out.glob("*.csv")):
        columns = list(pd.read_csv(csv_path, nrows=0).columns)
        unknown = [c for c in columns if c not in COLUMNS]
        assert unknown == [], (csv_path.name, unknown)
        assert compare_table_files(csv_path, csv_path.with_suffix(".json")) == [], csv_path.name
    summary = json.loads((out / "summary.json").read_text())
    unknown = [k for k in summary if k not in COLUMNS and k not in SUMMARY_KEYS]
    assert unknown == []


# ------------------------------------------------------------------ layers and modules
def _layer(module_path: Path) -> int:
    top = module_path.relative_to(PACKAGE).parts[0].removesuffix(".py")
    return next(k for k, layer in enumerate(LAYERS) if top in layer)


def _imports(path: Path) -> list[tuple[str, list[str]]]:
    """(imported tfa module, names) of every import in a file (TYPE_CHECKING blocks included)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    package = ".".join(path.relative_to(ROOT).with_suffix("").parts[:-1])
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")[: len(package.split(".")) - node.level + 1]
                module = ".".join(base + ([node.module] if node.module else []))
            else:
                module = node.module or ""
            if module.startswith("tfa"):
                found.append((module, [a.name for a in node.names]))
        elif isinstance(node, ast.Import):
            found.extend((a.name, []) for a in node.names if a.name.startswith("tfa"))
    return found


def test_layers_import_only_downwards_and_the_cli_no_private_name():
    wrong = []
    for path in PACKAGE.rglob("*.py"):
        own = _layer(path)
        for module, names in _imports(path):
            parts = module.split(".")
            if len(parts) < 2:
                continue
            target = PACKAGE.joinpath(*parts[1:2])
            target = target if target.is_dir() else target.with_suffix(".py")
            if _layer(target) > own:
                wrong.append(f"{path.relative_to(ROOT)} imports {module}")
            if path.parent.name == "cli" and parts[1] != "cli":
                wrong += [f"{path.relative_to(ROOT)} imports private {module}.{n}"
                          for n in names if n.startswith("_")]
    assert wrong == []


def test_no_module_over_600_lines():
    long = {str(p.relative_to(ROOT)): n for p in PACKAGE.rglob("*.py")
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > 600}
    assert long == {}


def test_every_package_ships_in_the_wheel():
    """A package missing from pyproject's list installs from a checkout but not from a wheel."""
    import tomllib

    listed = set(tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]["packages"])
    found = {".".join(p.parent.relative_to(ROOT).parts) for p in PACKAGE.rglob("__init__.py")}
    assert found - listed == set()


def test_the_repository_points_nowhere_outside_itself():
    # as a new maintainer would search: case-insensitive, so the design notes are named
    # "docs/design" in prose
    pattern = re.compile(r"\bDESIGN\.md\b|\.\./shared|\bissues? #?[0-9]+\b", re.I)
    hits = []
    for folder in ("tfa", "tests", "scripts", "docs", "models"):
        for path in (ROOT / folder).rglob("*"):
            if path.is_file() and path.suffix in (".py", ".md", ".toml", ".tsv", ".csv", ".txt"):
                if pattern.search(path.read_text(encoding="utf-8", errors="ignore")):
                    hits.append(str(path.relative_to(ROOT)))
    if pattern.search((ROOT / "README.md").read_text(encoding="utf-8")):
        hits.append("README.md")
    assert hits == [] and [p.name for p in (ROOT / "docs").glob("design.*")] == ["design" + ".md"]


# ------------------------------------------------------------------ progress
#: Most solves of the thermodynamic problem one progress line may stand for: the grain of the
#: display's real work (a line per mode, H2 level, extreme or draw), counted rather than timed.
MOST_SOLVES_PER_LINE = 40


def _labels(writes) -> list[tuple[int, str]]:
    """(index of the write, label) of each line the terminal showed, the elapsed seconds at its
    end left out."""
    shown = []
    for k, (_, text) in enumerate(writes):
        for part in text.split("\r\033[K"):
            if part.strip():
                shown.append((k, re.sub(r" \(?\d+ s\)?$", "", part.strip())))
    return shown


@pytest.mark.slow
def test_progress_line_changes_at_the_grain_of_the_work(bundled_run):
    """The bundled assessment's progress line changes at the grain of its real work: no line
    stands for more than MOST_SOLVES_PER_LINE solves of the thermodynamic problem (counted by
    conftest's SolveCounter; no clock involved, so the check does not depend on the machine)."""
    labels = _labels(bundled_run.terminal.writes)
    assert len(labels) > 20 and bundled_run.solves.marks
    starts = [k for k, _ in labels]
    per_line: dict[int, int] = {}
    for mark in bundled_run.solves.marks:
        line = max((i for i, k in enumerate(starts) if k < mark), default=0)
        # consecutive frames with the same label are one line
        while line > 0 and labels[line - 1][1] == labels[line][1]:
            line -= 1
        per_line[line] = per_line.get(line, 0) + 1
    worst = max(per_line, key=per_line.get)
    assert per_line[worst] <= MOST_SOLVES_PER_LINE, (labels[worst][1], per_line[worst])
    assert any("ranges:" in label and "extremes" in label for _, label in labels)
    assert any("H2 scan:" in label and "levels" in label for _, label in labels)
