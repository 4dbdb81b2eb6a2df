"""Worker processes end with their coordinator: a robustness run on two worker processes whose
coordinator is killed with SIGKILL leaves no worker alive 5 s later (they lived on for more than
7 minutes, holding the caller's output pipes open). Plumbing (no science)."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest


def children(pid: int) -> list[int]:
    """Process ids whose parent is ``pid`` (from /proc)."""
    found = []
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            try:
                fields = (entry / "stat").read_text().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[1]) == pid:
                found.append(int(entry.name))
    return found


def alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


@pytest.mark.slow
def test_workers_die_with_a_killed_coordinator(mini_folder, tmp_path):
    proc = subprocess.Popen([sys.executable, "-m", "tfa", "robustness", str(mini_folder), "--draws",
                             "2000", "--modes", "native", "--no-threshold", "--workers", "2",
                             "--out", str(tmp_path / "results"), "-q"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    try:
        workers: list[int] = []
        deadline = time.monotonic() + 120
        while len(workers) < 2 and time.monotonic() < deadline and proc.poll() is None:
            time.sleep(0.2)
            workers = [pid for pid in children(proc.pid) if alive(pid)]
        assert len(workers) >= 2, "the pool did not start"
        time.sleep(1.0)                             # the workers are busy with draws
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait(timeout=10)
        time.sleep(5.0)
        assert [pid for pid in workers if alive(pid)] == []
        out, err = proc.communicate(timeout=10)     # nobody holds the pipes open any more
    finally:
        if proc.poll() is None:
            proc.kill()
