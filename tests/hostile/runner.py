"""Run the pqtriage CLI of this checkout in a child process, measuring time and peak memory."""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
HARD_TIMEOUT = 60.0
"""A child still running after this is killed and the test fails."""


@dataclass(frozen=True)
class Outcome:
    """What one CLI run did."""

    code: int
    """Exit status."""
    stdout: str
    """Standard output (decoded with replacement: hostile bytes must not crash the test)."""
    stderr: str
    """Standard error."""
    seconds: float
    """Wall-clock time."""
    peak_rss: int
    """Peak resident memory of the child in bytes."""


def run_cli(*args: str, cwd: Path | None = None) -> Outcome:
    """Run ``pqtriage ARGS`` (this checkout's main()) with no terminal, no colour, width 100."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT)
    env.update({"NO_COLOR": "1", "TERM": "dumb", "COLUMNS": "100"})
    env.pop("FORCE_COLOR", None)
    code = "import sys; from pqtriage.cli import main; sys.exit(main(sys.argv[1:]))"
    with tempfile.TemporaryFile() as out, tempfile.TemporaryFile() as err:
        started = time.perf_counter()
        child = subprocess.Popen([sys.executable, "-c", code, *args], cwd=cwd or ROOT, env=env,
                                 stdin=subprocess.DEVNULL, stdout=out, stderr=err)
        while True:
            pid, status, usage = os.wait4(child.pid, os.WNOHANG)
            if pid:
                break
            if time.perf_counter() - started > HARD_TIMEOUT:
                child.kill()
                os.wait4(child.pid, 0)
                raise AssertionError(f"pqtriage {' '.join(args)} still running after {HARD_TIMEOUT} s")
            time.sleep(0.005)
        seconds = time.perf_counter() - started
        child.returncode = os.waitstatus_to_exitcode(status)
        out.seek(0)
        err.seek(0)
        return Outcome(child.returncode, out.read().decode("utf-8", "replace"),
                       err.read().decode("utf-8", "replace"), seconds, usage.ru_maxrss * 1024)
