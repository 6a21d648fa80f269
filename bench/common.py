"""Shared benchmark helpers: child-process timing, peak memory, profiles, machine info.

Every figure is a ratio measured in the same run against a bare floor (the
cheapest program that does the unavoidable part of the work), so a slower or
faster machine moves both sides and the ratio stays comparable.
"""

from __future__ import annotations

import argparse
import datetime as dt
import json
import os
import platform
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
"""The checkout the benchmarks measure (its pqtriage is imported, not an installed one)."""


def child_env() -> dict[str, str]:
    """Environment for child processes: this checkout first on the path, no colour."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    env.pop("FORCE_COLOR", None)
    env["NO_COLOR"] = "1"
    env["TERM"] = "dumb"
    env["COLUMNS"] = "100"
    return env


@dataclass(frozen=True)
class Run:
    """One measured child process."""

    seconds: float
    """Wall-clock time from spawn to exit."""
    peak_rss_bytes: int
    """Peak resident memory of the child (getrusage ru_maxrss)."""
    returncode: int
    """Exit status."""
    stderr: str
    """Last part of the child's standard error (for diagnosing a failed run)."""
    cpu_seconds: float = 0.0
    """CPU time of the child, user plus system (getrusage via wait4): other load on the
    machine does not inflate it the way it inflates wall-clock time."""


def run_child(argv: list[str], timeout: float = 600.0) -> Run:
    """Run argv in a child process; measure wall time and its own peak RSS via wait4."""
    with tempfile.TemporaryFile() as err:
        started = time.perf_counter()
        child = subprocess.Popen(argv, cwd=ROOT, env=child_env(), stdin=subprocess.DEVNULL,
                                 stdout=subprocess.DEVNULL, stderr=err)
        deadline = started + timeout
        while True:
            pid, status, usage = os.wait4(child.pid, os.WNOHANG)
            if pid:
                break
            if time.perf_counter() > deadline:
                child.kill()
                pid, status, usage = os.wait4(child.pid, 0)
                break
            time.sleep(0.002)
        seconds = time.perf_counter() - started
        child.returncode = os.waitstatus_to_exitcode(status)
        err.seek(0)
        tail = err.read()[-2000:].decode("utf-8", "replace")
    # ru_maxrss is in KiB on Linux.
    return Run(seconds, int(usage.ru_maxrss) * 1024, child.returncode, tail,
               usage.ru_utime + usage.ru_stime)


def best_of(argv: list[str], repeat: int, timeout: float = 600.0) -> Run:
    """The fastest of ``repeat`` runs (least disturbed by other load); peak RSS is the largest."""
    runs = [run_child(argv, timeout) for _ in range(max(1, repeat))]
    for run in runs:
        if run.returncode not in (0, 1):
            raise RuntimeError(f"{' '.join(argv)} exited {run.returncode}: {run.stderr.strip()}")
    fastest = min(runs, key=lambda r: r.seconds)
    return Run(fastest.seconds, max(r.peak_rss_bytes for r in runs), fastest.returncode, fastest.stderr,
               min(r.cpu_seconds for r in runs))


def median_seconds(argv: list[str], repeat: int) -> float:
    """Median wall time of ``repeat`` runs (for short runs such as a cold start)."""
    return statistics.median(run_child(argv).seconds for _ in range(repeat))


def pqtriage_argv(*args: str) -> list[str]:
    """argv running this checkout's CLI the way the console script does (main(argv))."""
    code = "import sys; from pqtriage.cli import main; sys.exit(main(sys.argv[1:]))"
    return [sys.executable, "-c", code, *args]


def profile_summary(args: list[str], lines: int = 18) -> str:
    """cProfile the CLI with ``args`` in a child; return the top functions by cumulative time."""
    code = (
        "import cProfile, io, pstats, sys\n"
        "from pqtriage.cli import main\n"
        "prof = cProfile.Profile()\n"
        "prof.runcall(main, sys.argv[1:])\n"
        "out = io.StringIO()\n"
        f"pstats.Stats(prof, stream=out).strip_dirs().sort_stats('cumulative').print_stats({lines})\n"
        "sys.stderr.write(out.getvalue())\n"
    )
    result = subprocess.run([sys.executable, "-c", code, *args], check=False, cwd=ROOT, env=child_env(),
                            capture_output=True, text=True, timeout=1200)
    text = result.stderr
    start = text.find("ncalls")
    return text[start:].rstrip() if start >= 0 else text[-3000:]


@dataclass
class Figure:
    """One benchmark figure: measured against its floor, with its goal."""

    name: str
    """Short title."""
    measured: str
    """What was timed."""
    floor: str
    """What it is compared against."""
    goal: str
    """The goal in words."""
    met: bool | None
    """Whether the goal is met (None = skipped)."""
    rows: list[dict[str, Any]] = field(default_factory=list)
    """Table rows: size, seconds, floor seconds, ratio, peak memory ..."""
    notes: list[str] = field(default_factory=list)
    """Anything a reader needs: why skipped, linearity, what would fix a miss."""
    profile: str = ""
    """Profile summary of the measured command, for a missed goal."""


def machine_info() -> dict[str, str]:
    """The machine and software the numbers were measured on."""
    cpu = platform.processor() or platform.machine()
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    memory = "unknown"
    try:
        for line in Path("/proc/meminfo").read_text().splitlines():
            if line.startswith("MemTotal"):
                memory = f"{int(line.split()[1]) / 1024 / 1024:.1f} GiB"
                break
    except OSError:
        pass
    from importlib import metadata

    versions = {}
    for package in ("PyYAML", "rich", "typer", "cryptography", "hypothesis"):
        try:
            versions[package] = metadata.version(package)
        except metadata.PackageNotFoundError:
            versions[package] = "absent"
    try:
        import yaml

        c_loader = "yes" if getattr(yaml, "__with_libyaml__", False) else "no"
    except ImportError:
        c_loader = "no"
    return {
        "date": dt.datetime.now(dt.UTC).strftime("%Y-%m-%d %H:%M UTC"),
        "cpu": cpu,
        "cores": str(os.cpu_count()),
        "memory": memory,
        "os": f"{platform.system()} {platform.release()}",
        "python": f"{platform.python_implementation()} {platform.python_version()}",
        "libyaml C loader": c_loader,
        **{f"{k} version": v for k, v in versions.items()},
    }


def work_dir() -> Path:
    """A folder for generated benchmark data (kept between scripts of one run_all)."""
    folder = Path(os.environ.get("PQTRIAGE_BENCH_DIR") or Path(tempfile.gettempdir()) / "pqtriage-bench")
    folder.mkdir(parents=True, exist_ok=True)
    return folder


def mib(value: int) -> str:
    """Bytes as MiB text."""
    return f"{value / 1024 / 1024:.0f} MiB"


def main_for(measure: Callable[[argparse.Namespace], list[Figure]], description: str) -> None:
    """Command line of a bench script: print a text summary, or --json FILE for run_all."""
    parser = argparse.ArgumentParser(description=description)
    parser.add_argument("--json", help="write the figures as JSON to this file")
    parser.add_argument("--quick", action="store_true", help="smaller sizes and fewer repeats")
    parser.add_argument("--profile", action="store_true", help="profile a missed goal")
    args = parser.parse_args()
    figures = measure(args)
    if args.json:
        Path(args.json).write_text(json.dumps([asdict(f) for f in figures], indent=2), encoding="utf-8")
    for figure in figures:
        state = {True: "MET", False: "MISSED", None: "SKIPPED"}[figure.met]
        print(f"{figure.name}: {state} (goal: {figure.goal})")
        for row in figure.rows:
            print("  " + ", ".join(f"{k}={v}" for k, v in row.items()))
        for note in figure.notes:
            print(f"  note: {note}")
        if figure.profile:
            print(figure.profile)
