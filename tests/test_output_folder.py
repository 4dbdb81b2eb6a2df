"""Output folders hold exactly one run: bad places are refused up front (exit code 2, nothing
computed), a second writer is locked out, an interruption (SIGINT, SIGKILL) or a full disk
leaves the previous result byte for byte, a rerun with fewer analyses leaves no file of the
earlier run, and leftovers of killed runs are cleaned. Plumbing (no science); the mini network
keeps each run to a few seconds."""

from __future__ import annotations

import errno
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tfa.cli import main
from tfa.util import outdir
from tfa.util.outdir import MARKER, OutputError, OutputFolder, check_output_folder, output_lock

#: Steps left out to keep a run of ``tfa assess`` on the mini network to about a second.
SKIP_SLOW = ("ranges,robustness,h2_scan,census,energy_profile,precursors,gradient,binding_constraints,"
             "verdict_margins,couplings,currencies,route_comparison")


def snapshot(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())}


def assess(folder: Path, out: Path, *more: str) -> int:
    return main(["assess", str(folder), "--skip", SKIP_SLOW, "--out", str(out), "-q", *more])


# ------------------------------------------------------------------ refused up front
def test_bad_places_are_refused_before_anything_runs(tmp_path, capsys, mini_folder):
    """--out naming a file, a folder under a file, a name too long, a foreign folder: formerly
    tracebacks for robustness and map."""
    a_file = tmp_path / "a_file"
    a_file.write_text("mine")
    foreign = tmp_path / "my_documents"
    foreign.mkdir()
    (foreign / "thesis.txt").write_text("do not delete")
    cases = {str(a_file): "is not a folder", str(a_file / "sub"): "is a file, not a folder",
             str(tmp_path / ("x" * 300)): "too long", str(foreign): "tfa did not write"}
    for command in (["robustness", "--draws", "1"], ["map", "--x", "ph=7", "--y", "h2=1e-3"],
                    ["assess", "--skip", SKIP_SLOW], ["feasible"]):
        for out, words in cases.items():
            code = main([*command, str(mini_folder), "--out", out, "-q"])
            err = capsys.readouterr().err
            assert code == 2 and words in err and len(err.strip().splitlines()) == 1, err
    assert (foreign / "thesis.txt").read_text() == "do not delete"
    assert a_file.read_text() == "mine"


def test_a_read_only_place_is_refused(tmp_path, monkeypatch):
    """A read-only folder (as root, permissions do not stop writes, so the check is shown on
    the access test the code makes)."""
    real = os.access
    monkeypatch.setattr(outdir.os, "access", lambda path, mode: False if "ro" in str(path)
                        else real(path, mode))
    (tmp_path / "ro").mkdir()
    with pytest.raises(OutputError, match="read-only"):
        check_output_folder(tmp_path / "ro" / "results")


def test_a_second_writer_is_locked_out(tmp_path, mini_folder, capsys):
    """Two --overwrite robustness runs into one folder lost results and reported failed draws
    with exit 0."""
    out = tmp_path / "results"
    script = ("import sys, time; from tfa.util.outdir import output_lock\n"
              "with output_lock(sys.argv[1]):\n    print('locked', flush=True); time.sleep(30)\n")
    holder = subprocess.Popen([sys.executable, "-c", script, str(out)], stdout=subprocess.PIPE,
                              text=True)
    try:
        assert holder.stdout.readline().strip() == "locked"
        code = main(["robustness", str(mini_folder), "--draws", "1", "--modes", "native",
                     "--no-threshold", "--out", str(out), "--overwrite", "-q"])
        err = capsys.readouterr().err
        assert code == 2 and "another tfa run" in err and str(holder.pid) in err
    finally:
        holder.kill()
        holder.wait()
    with output_lock(out):       # the kernel dropped the dead holder's lock
        with output_lock(out):   # re-entrant in one process
            pass


# ------------------------------------------------------------------ one run per folder
def test_a_rerun_with_fewer_analyses_leaves_no_file_of_the_earlier_run(tmp_path, mini_folder):
    """A successful rerun with --no-robustness kept the earlier robustness_* files."""
    out = tmp_path / "results"
    assert assess(mini_folder, out) == 0
    first = snapshot(out)
    assert {"feasibility.csv", "h2_threshold.csv", "report.html", MARKER} <= set(first)
    assert assess(mini_folder, out, "--skip", f"{SKIP_SLOW},h2_threshold,driving_force") == 0
    second = snapshot(out)
    assert not any(name.startswith(("h2_threshold", "driving_force")) for name in second)
    assert set(second) < set(first)
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".")] == []  # no leftovers


def test_a_full_disk_leaves_the_previous_result_as_it_was(tmp_path, mini_folder, capsys,
                                                          monkeypatch):
    """'No space left on device' was a traceback, and the rerun changed files before failing."""
    out = tmp_path / "results"
    assert assess(mini_folder, out) == 0
    before = snapshot(out)
    from tfa.util import files

    real = files.atomic_path
    calls = []

    def full_disk(path):
        calls.append(path)
        if len(calls) > 3:
            raise OSError(errno.ENOSPC, "No space left on device", str(path))
        return real(path)

    monkeypatch.setattr(files, "atomic_path", full_disk)
    code = assess(mini_folder, out, "--ph", "7.2")
    err = capsys.readouterr().err
    assert code == 2 and "No space left on device" in err and "left as it was" in err
    assert snapshot(out) == before
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".")] == []


def test_leftovers_of_a_killed_run_are_cleaned(tmp_path):
    out = tmp_path / "results"
    partial = tmp_path / ".results.tfa-partial"
    partial.mkdir()
    (partial / "feasibility.csv").write_text("half")
    (partial / ".report.html.abc.part").write_text("torn")
    with OutputFolder(out) as folder:
        assert list(folder.staging.iterdir()) == []
        (folder.staging / "new.csv").write_text("new")
    assert sorted(p.name for p in out.iterdir()) == [MARKER, "new.csv"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["results"]


def test_a_swap_cut_between_its_two_renames_is_recovered(tmp_path, monkeypatch):
    """Where the system has no atomic exchange, the old result waits under .NAME.tfa-old."""
    out = tmp_path / "results"
    with OutputFolder(out) as folder:
        (folder.staging / "a.csv").write_text("first")
    os.rename(out, tmp_path / ".results.tfa-old")          # killed between the renames
    with OutputFolder(out) as folder:                       # the next run puts it back first
        assert (out / "a.csv").read_text() == "first"
        (folder.staging / "b.csv").write_text("second")
    monkeypatch.setattr(outdir, "_exchange", lambda a, b: False)
    with OutputFolder(out) as folder:
        (folder.staging / "c.csv").write_text("third")
    assert sorted(p.name for p in out.iterdir()) == [MARKER, "c.csv"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["results"]


# ------------------------------------------------------------------ interruptions
def _run_and_signal(folder: Path, out: Path, sig: int, delay: float) -> subprocess.Popen:
    """Start a rerun that changes every file (another pH), wait until it writes its files, then
    send ``sig`` after ``delay`` seconds."""
    proc = subprocess.Popen([sys.executable, "-m", "tfa", "assess", str(folder), "--skip", SKIP_SLOW,
                             "--out", str(out), "--ph", "7.3", "-v"],
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    for line in proc.stderr:
        if "writing files" in line:
            break
    time.sleep(delay)
    proc.send_signal(sig)
    proc.stderr.read()
    proc.wait(timeout=60)
    return proc


@pytest.mark.slow
def test_an_interrupted_rerun_leaves_the_old_result_or_the_new_one_never_a_mix(tmp_path,
                                                                               mini_folder):
    """Ctrl-C or SIGKILL while tfa assess wrote left 25 new and 9 old files. Here each signal
    lands at several points of the writing; every time the folder holds the previous result
    byte for byte, or the complete new one."""
    out = tmp_path / "results"
    new_reference = tmp_path / "reference"
    assert main(["assess", str(mini_folder), "--skip", SKIP_SLOW, "--out", str(new_reference),
                 "--ph", "7.3", "-q"]) == 0
    reference = snapshot(new_reference)
    new_names = set(reference)
    timed = {"summary.json", "report.html", MARKER}       # carry timings or the time written
    outcomes = []
    for sig in (signal.SIGINT, signal.SIGKILL):
        for delay in (0.0, 0.2, 1.0):
            assert assess(mini_folder, out) == 0
            before = snapshot(out)
            assert set(before) == new_names            # the same files, other contents
            _run_and_signal(mini_folder, out, sig, delay)
            after = snapshot(out)
            if after == before:
                outcomes.append("old")
            else:
                assert set(after) == new_names, (sig, delay)
                assert b"pH 7.30" in after["summary.json"] and b"pH 7.30" in after["report.html"]
                assert {n: after[n] for n in new_names - timed} == \
                    {n: reference[n] for n in new_names - timed}, (sig, delay)
                outcomes.append("new")
    assert "old" in outcomes and "new" in outcomes      # the signals landed before and after
