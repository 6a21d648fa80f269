"""Triage to JSON of 1k, 10k and 100k uses against PyYAML's C loader reading the same file.

Goals (issue 7): at most 3x the floor at 100k uses, cost linear in size, peak
memory under 1 GiB. Run: python bench/bench_triage.py [--quick] [--profile]
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.common import Figure, best_of, main_for, mib, pqtriage_argv, profile_summary, work_dir
from bench.synthetic import write_inventory

AS_OF = "2026-12-01"
GOAL_RATIO = 3.0
GOAL_MEMORY = 1024 * 1024 * 1024
LINEAR_EXPONENT = 1.15
"""Growth exponent accepted as linear: time ~ size^k with k at most this between the two largest sizes."""


def floor_argv(path: Path) -> list[str]:
    """The bare floor: PyYAML's C loader (CSafeLoader) reading the file, nothing else."""
    code = ("import sys, yaml\n"
            "with open(sys.argv[1], encoding='utf-8') as f:\n"
            "    yaml.load(f.read(), Loader=yaml.CSafeLoader)\n")
    return [sys.executable, "-c", code, str(path)]


def triage_args(path: Path, out: Path) -> list[str]:
    """CLI arguments of the measured run."""
    return ["triage", str(path), "--as-of", AS_OF, "--format", "json", "-o", str(out)]


def growth_exponent(small: tuple[int, float], large: tuple[int, float]) -> float:
    """k in time ~ size^k between two measurements."""
    return math.log(large[1] / small[1]) / math.log(large[0] / small[0])


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure."""
    sizes = (1_000, 10_000) if args.quick else (1_000, 10_000, 100_000)
    folder = work_dir()
    figure = Figure(
        name="Triage to JSON",
        measured="pqtriage triage INVENTORY --format json -o FILE (whole process)",
        floor="python -c yaml.load(text, Loader=CSafeLoader) on the same file (whole process)",
        goal=f"at most {GOAL_RATIO:g}x the floor at the largest size, linear, peak memory under 1 GiB",
        met=None,
    )
    timings: list[tuple[int, float]] = []
    ratio = math.inf
    peak = 0
    for uses in sizes:
        path = write_inventory(folder, uses)
        repeat = 1 if uses >= 100_000 else 3
        floor = best_of(floor_argv(path), repeat)
        run = best_of(pqtriage_argv(*triage_args(path, folder / f"triage-{uses}.json")), repeat)
        ratio = run.seconds / floor.seconds
        peak = max(peak, run.peak_rss_bytes)
        timings.append((uses, run.seconds))
        figure.rows.append({
            "uses": f"{uses:,}", "file": mib(path.stat().st_size), "pqtriage s": f"{run.seconds:.2f}",
            "floor s": f"{floor.seconds:.2f}", "ratio": f"{ratio:.2f}x",
            "peak memory": mib(run.peak_rss_bytes), "floor memory": mib(floor.peak_rss_bytes),
        })
    exponent = growth_exponent(timings[-2], timings[-1])
    linear = exponent <= LINEAR_EXPONENT
    figure.notes.append(f"growth exponent between {timings[-2][0]:,} and {timings[-1][0]:,} uses: "
                        f"{exponent:.2f} (linear if at most {LINEAR_EXPONENT})")
    figure.met = ratio <= GOAL_RATIO and linear and peak < GOAL_MEMORY
    if not figure.met:
        figure.notes.append("missed: see the profile below for where the time goes")
        if args.profile:
            path = write_inventory(folder, sizes[-1])
            figure.profile = profile_summary(triage_args(path, folder / "profile.json"))
    return [figure]


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
