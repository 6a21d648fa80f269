"""The Markdown report of the 10k and 100k inventories against the JSON run of the same file.

Goals (issue 7): linear in size, under 2x the JSON run at 100k uses.
Run: python bench/bench_report.py [--quick] [--profile]
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.bench_triage import AS_OF, LINEAR_EXPONENT, growth_exponent, triage_args
from bench.common import Figure, best_of, main_for, mib, pqtriage_argv, profile_summary, work_dir
from bench.synthetic import write_inventory

GOAL_RATIO = 2.0


def report_args(path: Path, out: Path) -> list[str]:
    """CLI arguments of the measured run."""
    return ["report", str(path), "--as-of", AS_OF, "-o", str(out)]


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure."""
    sizes = (1_000, 10_000) if args.quick else (10_000, 100_000)
    folder = work_dir()
    figure = Figure(
        name="Markdown report",
        measured="pqtriage report INVENTORY -o FILE.md (whole process)",
        floor="pqtriage triage INVENTORY --format json -o FILE.json on the same file, same run",
        goal=f"under {GOAL_RATIO:g}x the JSON run at the largest size, linear",
        met=None,
    )
    timings: list[tuple[int, float]] = []
    ratio = 0.0
    for uses in sizes:
        path = write_inventory(folder, uses)
        repeat = 1 if uses >= 100_000 else 3
        json_run = best_of(pqtriage_argv(*triage_args(path, folder / f"report-{uses}.json")), repeat)
        run = best_of(pqtriage_argv(*report_args(path, folder / f"report-{uses}.md")), repeat)
        ratio = run.seconds / json_run.seconds
        timings.append((uses, run.seconds))
        figure.rows.append({
            "uses": f"{uses:,}", "report s": f"{run.seconds:.2f}", "JSON run s": f"{json_run.seconds:.2f}",
            "ratio": f"{ratio:.2f}x", "report size": mib((folder / f"report-{uses}.md").stat().st_size),
            "peak memory": mib(run.peak_rss_bytes),
        })
    exponent = growth_exponent(timings[-2], timings[-1])
    linear = exponent <= LINEAR_EXPONENT
    figure.notes.append(f"growth exponent between {timings[-2][0]:,} and {timings[-1][0]:,} uses: "
                        f"{exponent:.2f} (linear if at most {LINEAR_EXPONENT})")
    figure.met = ratio < GOAL_RATIO and linear
    if not figure.met and args.profile:
        path = write_inventory(folder, sizes[-1])
        figure.profile = profile_summary(report_args(path, folder / "profile.md"))
    return [figure]


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
