"""What the commands print and return: only JSON on stdout with --json, quiet ends on a broken
pipe or a closed stdout, ASCII consoles, exit code 1 for an answer stopped by the time limit,
model-range warnings recorded in summary.json and the report, schedulers and results files
checked before anything is written. Plumbing (no science); the mini network keeps runs short."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

from tfa.cli import main
from tfa.errors import UndeterminedError
from tfa.util.points import read_results

EQUATION = "H2 + CO2tot <=> formate + H2O"


def tfa(*args: str, **options) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "tfa", *args], capture_output=True, text=True,
                          timeout=300, **options)


def test_robustness_json_is_only_json_on_stdout(mini_folder):
    """`tfa robustness --json -q | python -m json.tool`: the solver's banner came first on
    stdout (workers included)."""
    pipeline = (f"{sys.executable} -m tfa robustness {mini_folder} --draws 2 --modes native "
                f"--no-threshold --workers 2 --json -q | {sys.executable} -m json.tool")
    run = subprocess.run(["bash", "-o", "pipefail", "-c", pipeline], capture_output=True,
                         text=True, timeout=300)
    assert run.returncode == 0, run.stderr
    assert json.loads(run.stdout)["analysis"] == "robustness"


def test_a_broken_pipe_ends_quietly(mini_folder):
    """`tfa feasible ... | head -1` and a reader that goes away at once: formerly a
    BrokenPipeError traceback."""
    run = subprocess.run(["bash", "-c", f"{sys.executable} -m tfa feasible {mini_folder} "
                                        "--modes native | head -1"],
                         capture_output=True, text=True, timeout=300)
    assert run.stdout.startswith("network mini") and run.stdout.count("\n") == 1
    assert "Traceback" not in run.stderr and "Exception" not in run.stderr
    proc = subprocess.Popen([sys.executable, "-m", "tfa", "dg", EQUATION, "--json"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    proc.stdout.close()                       # the reader is gone before anything is written
    err = proc.stderr.read()
    assert proc.wait(timeout=120) in (0, 1)
    assert "Traceback" not in err and "Exception" not in err, err


def test_a_closed_stdout_ends_quietly():
    run = subprocess.run(["bash", "-c", f"{sys.executable} -m tfa dg '{EQUATION}' >&-"],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0 and run.stderr == "", run.stderr


def test_an_ascii_console_gets_the_ascii_symbols():
    """Δ and σ on an ASCII-only console were a UnicodeEncodeError traceback."""
    run = tfa("dg", EQUATION, env=dict(os.environ, PYTHONIOENCODING="ascii"))
    assert run.returncode == 0, run.stderr
    assert "dG'0" in run.stdout and "+/-" in run.stdout and run.stdout.isascii()


def test_an_answer_stopped_by_the_time_limit_is_undetermined_with_exit_1(mini_folder, capsys,
                                                                         monkeypatch):
    """tfa feasible exited 0 after hitting its time limit (the help promises 1). The solver
    stopping is stood in for by the error it raises then."""
    import importlib

    feasibility = importlib.import_module("tfa.analyses.feasibility")

    def stopped(*args, **kwargs):
        raise UndeterminedError("the solver stopped at the time limit of 5 s without an answer")

    monkeypatch.setattr(feasibility, "feasibility", stopped)
    code = main(["feasible", str(mini_folder), "--modes", "native", "--time-limit", "5"])
    captured = capsys.readouterr()
    assert code == 1
    assert "undetermined" in captured.out and "raise --time-limit" in captured.err


def test_model_range_warnings_reach_summary_and_report(mini_folder, tmp_path, capsys):
    """Range warnings never reached report.html or summary.json."""
    out = tmp_path / "results"
    assert main(["assess", str(mini_folder), "--skip", "ranges,robustness,h2_scan,census,precursors,"
                 "energy_profile,h2_threshold,driving_force,gradient,binding_constraints,"
                 "verdict_margins,couplings,currencies,route_comparison", "--ionic-strength", "0.7",
                 "--temperature", "160", "--pressure", "10", "--out", str(out)]) == 0
    err = capsys.readouterr().err
    summary = json.loads((out / "summary.json").read_text())
    assert any("Debye-Hueckel" in w for w in summary["warnings"])
    assert any("constant-Cp" in w for w in summary["warnings"])
    report = (out / "report.html").read_text()
    assert "Debye-Hueckel" in report and "constant-Cp" in report
    # one table at the end, one row per distinct warning (two different sentences, two rows)
    table = err[err.index("warnings ("):]
    assert "Debye-Hueckel" in table and "constant-Cp" in table and "more like it" not in table
    assert "Traceback" not in err


@pytest.mark.parametrize("command", [["robustness", "--draws", "1"],
                                     ["map", "--x", "ph=7", "--y", "h2=1e-3"]])
def test_a_nonsense_or_unreachable_scheduler_writes_nothing(mini_folder, tmp_path, capsys,
                                                            monkeypatch, command):
    """A nonsense address was a traceback; an unreachable one left a results header that
    blocked the next run."""
    from tfa.util import points

    monkeypatch.setattr(points, "SCHEDULER_TIMEOUT", 1.0)
    out = tmp_path / "results"
    for address in ("nonsense", "tcp://127.0.0.1:9"):
        code = main([command[0], str(mini_folder), *command[1:], "--modes", "native",
                     "--no-threshold", "--scheduler", address, "--out", str(out), "-q"])
        err = capsys.readouterr().err
        assert code == 2 and "cannot reach the Dask scheduler" in err, err
        assert len(err.strip().splitlines()) == 1
        assert not out.exists() and sorted(p.name for p in tmp_path.iterdir()) == ["mini"]
    assert main([command[0], str(mini_folder), *command[1:], "--modes", "native",
                 "--no-threshold", "--out", str(out), "-q"]) == 0   # nothing blocks the next run
    capsys.readouterr()


def test_resume_skips_torn_and_mistyped_lines(mini_folder, tmp_path, capsys):
    """A torn or mistyped line in a robustness results file was a traceback on --resume; now
    such a line is skipped and its draw computed again."""
    out = tmp_path / "results"
    argv = ["robustness", str(mini_folder), "--draws", "3", "--modes", "native", "--no-threshold",
            "--out", str(out), "--json", "-q"]
    assert main(argv) == 0
    first = json.loads(capsys.readouterr().out)
    journal = out / "robustness.jsonl"
    lines = journal.read_text().splitlines()
    mangled = [lines[0], lines[1], "[1, 2]", '"text"', lines[2].replace('"result":{', '"result":"x","y":{'),
               '{"id": 5, "point": {}, "result": {}}', lines[3][:20]]
    journal.write_text("\n".join(mangled) + "\n" + lines[4][:30])
    assert main([*argv, "--resume"]) == 0
    resumed = json.loads(capsys.readouterr().out)
    assert resumed["summary"] == first["summary"]
    assert resumed["draws"] == first["draws"] and resumed["feasibility"] == first["feasibility"]
    _, records = read_results(journal)
    assert len(records) == 4                                   # the mean and three draws


def test_a_read_only_home_does_not_break_the_model_cache(mini_folder):
    """cobra makes its model cache under the home folder when imported; a home that cannot hold
    it was a NotADirectoryError traceback."""
    env = {k: v for k, v in os.environ.items() if k != "XDG_CACHE_HOME"}
    run = tfa("feasible", str(mini_folder), "--modes", "native", "-q", env=dict(env, HOME="/dev/null"))
    assert run.returncode == 0 and "Traceback" not in run.stderr, run.stderr
