"""A run with worker processes stopped by a termination signal sent to its own process alone (what 'timeout', a
batch scheduler's time limit and 'kill PID' send) ended, but its worker stayed behind, re-parented and asleep,
holding about 100 MB, until killed by hand (hostile tester, sixteenth round, case 04).  Now the command stops as
Ctrl-C stops it: its workers are ended, no output is left, exit 143 (128 + 15, the shell's convention for SIGTERM)."""

import contextlib
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def _children(pid: int) -> list[int]:
    found = []
    for entry in os.listdir("/proc"):
        if entry.isdigit():
            try:
                fields = Path(f"/proc/{entry}/stat").read_text().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[1]) == pid:
                found.append(int(entry))
    return found


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


@pytest.mark.skipif(not Path("/proc").is_dir(), reason="reads the process table from /proc")
def test_a_terminated_bootstrap_ends_its_workers(tmp_path: Path):
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    out = tmp_path / "boot.json"
    run = subprocess.Popen([sys.executable, "-m", "cfa_tool", "bootstrap", str(ROOT / "models" / "rider_three_factors.cfa"),
                            "--data", str(ROOT / "demo" / "rider_survey.csv"), "--replications", "100000",
                            "--workers", "2", "--json", str(out)],
                           stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, env=env, cwd=tmp_path)
    workers: list[int] = []
    try:
        for _ in range(600):  # until the worker is forked (the fit before it takes a moment)
            workers = [pid for pid in _children(run.pid) if _alive(pid)]
            if workers:
                break
            time.sleep(0.1)
        assert workers, "the bootstrap started no worker process"
        time.sleep(0.5)
        run.send_signal(signal.SIGTERM)
        assert run.wait(timeout=60) == 143
        assert "stopped by a termination signal" in run.stderr.read().decode()
        for _ in range(100):
            if not any(_alive(pid) for pid in workers):
                break
            time.sleep(0.1)
        assert not any(_alive(pid) for pid in workers)
        assert not out.exists()
    finally:
        if run.poll() is None:
            run.kill()
        for pid in set(_children(run.pid)) | set(workers):  # never leave a worker behind, whatever failed
            with contextlib.suppress(ProcessLookupError):
                os.kill(pid, signal.SIGKILL)
