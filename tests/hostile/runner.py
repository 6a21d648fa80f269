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
HARD_TIMEOUT = 300.0
"""Hang guard only: a child still running after this is killed and the test fails. Budgets of
work are asserted on the child's CPU time (``cpu_seconds``), which other load on the machine
does not inflate the way it inflates wall-clock time."""


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
    """Wall-clock time (informational: never asserted, it grows with the machine's load)."""
    cpu_seconds: float
    """CPU time of the child, user plus system (getrusage(2) via wait4)."""
    peak_rss: int
    """Peak resident memory of the child in bytes (its own, not inherited: see _CODE)."""


_CODE = """\
import os, sys
from pqtriage.cli import main
try:
    code = main(sys.argv[1:])
finally:
    # VmHWM is the peak RSS of this process's own memory map, which exec() starts afresh.
    # wait4's ru_maxrss is not: Linux carries the parent's peak across fork + exec, so a
    # child of a large pytest process would report pytest's size (proc(5), getrusage(2)).
    try:
        with open('/proc/self/status', encoding='ascii') as status:
            peak = next(line.split()[1] for line in status if line.startswith('VmHWM:'))
        with open(os.environ['PQTRIAGE_TEST_PEAK_FILE'], 'w', encoding='ascii') as out:
            out.write(peak)
    except (OSError, KeyError, StopIteration):
        pass
sys.exit(code)
"""


def run_cli(*args: str, cwd: Path | None = None) -> Outcome:
    """Run ``pqtriage ARGS`` (this checkout's main()) with no terminal, no colour, width 100."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT)
    env.update({"NO_COLOR": "1", "TERM": "dumb", "COLUMNS": "100"})
    env.pop("FORCE_COLOR", None)
    with tempfile.TemporaryFile() as out, tempfile.TemporaryFile() as err, \
            tempfile.NamedTemporaryFile("r", encoding="ascii") as peak_file:
        env["PQTRIAGE_TEST_PEAK_FILE"] = peak_file.name
        started = time.perf_counter()
        child = subprocess.Popen([sys.executable, "-c", _CODE, *args], cwd=cwd or ROOT, env=env,
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
        peak_kib = peak_file.read().strip()
        peak = int(peak_kib) * 1024 if peak_kib.isdigit() else usage.ru_maxrss * 1024
        cpu = usage.ru_utime + usage.ru_stime
        return Outcome(child.returncode, out.read().decode("utf-8", "replace"),
                       err.read().decode("utf-8", "replace"), seconds, cpu, peak)
