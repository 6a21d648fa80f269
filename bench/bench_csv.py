"""Triage of a CSV inventory within the budget of the same inventory in YAML (issue 12).

The CSV holds the same uses as the YAML benchmark's synthetic inventory (one row per use, the
system columns repeated on every row, as spreadsheets export them). Goal: at the largest size,
the CSV run takes at most the YAML run's budget, GOAL_RATIO times the floor (PyYAML's C loader
reading the YAML file), and its peak memory stays within MEMORY_MARGIN of the YAML run's.
Run: python bench/bench_csv.py [--quick] [--profile]
"""

from __future__ import annotations

import argparse
import csv
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import yaml

from bench.bench_triage import GOAL_RATIO, floor_argv, triage_args
from bench.common import Figure, best_of, main_for, mib, pqtriage_argv, profile_summary, work_dir
from bench.synthetic import write_inventory

MEMORY_MARGIN = 1.10
"""CSV peak memory accepted, as a multiple of the YAML run's on the same uses."""
COLUMNS = ("id", "name", "owner", "shelf_life_years", "migration_years", "exposure", "criticality",
           "purpose", "algorithm", "key_size", "curve", "protocol", "trust_years", "notes")
"""The synthetic inventory's fields as CSV columns."""


def write_csv(folder: Path, uses: int) -> tuple[Path, Path]:
    """The YAML benchmark inventory and the same uses as CSV (written once, then reused)."""
    source = write_inventory(folder, uses)
    path = folder / f"inventory-{uses}.csv"
    if not path.exists():
        document = yaml.load(source.read_text(encoding="utf-8"), Loader=yaml.CSafeLoader)
        defaults = document.get("defaults", {})
        with path.open("w", encoding="utf-8", newline="") as stream:
            writer = csv.writer(stream)
            writer.writerow(("organization", *COLUMNS))
            for system in document["systems"]:
                head = {**defaults, **{k: v for k, v in system.items() if k != "uses"}}
                for use in system["uses"] or [{}]:
                    row = {**head, **use}
                    writer.writerow((document["organization"], *("" if row.get(c) is None else row[c]
                                                                 for c in COLUMNS)))
    return source, path


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure."""
    sizes = (1_000, 10_000) if args.quick else (1_000, 10_000, 100_000)
    folder = work_dir()
    figure = Figure(
        name="CSV triage",
        measured="pqtriage triage INVENTORY.csv --format json -o FILE (whole process), beside the same for YAML",
        floor="python -c yaml.load(text, Loader=CSafeLoader) on the YAML file (whole process)",
        goal=f"the CSV run within the YAML budget: at most {GOAL_RATIO:g}x the floor at the largest size, "
             f"peak memory at most {MEMORY_MARGIN:g}x the YAML run's",
        met=None,
    )
    ratio = 0.0
    memory = 0.0
    for uses in sizes:
        source, path = write_csv(folder, uses)
        repeat = 1 if uses >= 100_000 else 3
        floor = best_of(floor_argv(source), repeat)
        from_yaml = best_of(pqtriage_argv(*triage_args(source, folder / f"yaml-{uses}.json")), repeat)
        from_csv = best_of(pqtriage_argv(*triage_args(path, folder / f"csv-{uses}.json")), repeat)
        if from_csv.returncode != 0:
            raise SystemExit(f"the CSV run failed: {from_csv.stderr}")
        ratio = from_csv.seconds / floor.seconds
        memory = from_csv.peak_rss_bytes / from_yaml.peak_rss_bytes
        figure.rows.append({
            "uses": f"{uses:,}", "CSV file": mib(path.stat().st_size), "CSV s": f"{from_csv.seconds:.2f}",
            "YAML s": f"{from_yaml.seconds:.2f}", "floor s": f"{floor.seconds:.2f}",
            "CSV / floor": f"{ratio:.2f}x", "CSV / YAML": f"{from_csv.seconds / from_yaml.seconds:.2f}x",
            "CSV peak memory": mib(from_csv.peak_rss_bytes), "YAML peak memory": mib(from_yaml.peak_rss_bytes),
        })
    figure.met = ratio <= GOAL_RATIO and memory <= MEMORY_MARGIN
    if not figure.met:
        figure.notes.append("missed: see the profile below for where the time goes")
        if args.profile:
            _, path = write_csv(folder, sizes[-1])
            figure.profile = profile_summary(triage_args(path, folder / "profile.json"))
    return [figure]


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
