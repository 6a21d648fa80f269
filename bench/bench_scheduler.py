"""Growth of the migration scheduler and critical path on dependency chains, to 100k systems.

Goal: linear in systems plus edges (time ~ systems^k with k at most 1.15, fitted by least
squares on log time against log size over every size). A chain is the worst shape for a
quarter-by-quarter scheduler: each system waits for the one before, so the plan is as long
as the chain; the event-driven scheduler places each system once.

Measured in-process with CPU time (time.process_time), best of the repeats, for unlimited
capacity and for "3 migrations in parallel, 40 person-weeks per quarter". The whole
``pqtriage plan`` of a 100k chain cannot be timed: it ends past the year 9999 and is refused.
Run: python bench/bench_scheduler.py [--quick] [--json FILE]
"""

from __future__ import annotations

import argparse
import gc
import math
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.common import Figure, main_for
from pqtriage.plan.critical_path import critical_path
from pqtriage.plan.scheduler import Capacity, Task, schedule

LINEAR_EXPONENT = 1.15
"""Growth exponent accepted as linear."""
CAPACITIES = {"unlimited": Capacity(), "3,40pw": Capacity(concurrent=3, person_weeks_per_quarter=40.0)}


def chain(size: int) -> list[Task]:
    """``size`` systems of two-year migrations (8 quarters), each depending on the one before."""
    return [Task(f"s{i:06d}", 8, 0, (f"s{i - 1:06d}",) if i else (), 1 + i % 7, 104.0) for i in range(size)]


def seconds(tasks: list[Task], capacity: Capacity, repeat: int) -> float:
    """Best CPU seconds of schedule + critical path."""
    depends = {t.id: t.depends_on for t in tasks}
    best = math.inf
    for _ in range(repeat):
        gc.collect()
        started = time.process_time()
        slots = schedule(tasks, capacity)
        path = critical_path(slots, depends)
        best = min(best, time.process_time() - started)
        assert len(slots) == len(tasks) and len(path) == len(tasks)
    return best


def floor_seconds(tasks: list[Task], repeat: int) -> float:
    """Best CPU seconds of what any scheduler must do: index the ids, resolve every dependency
    and sort by priority (O(n log n)). Its time per system grows too, from 1k to 100k systems,
    as the dictionaries outgrow the processor's caches."""
    best = math.inf
    for _ in range(repeat):
        gc.collect()
        started = time.process_time()
        index = {t.id: i for i, t in enumerate(tasks)}
        resolved = [[index[d] for d in t.depends_on] for t in tasks]
        order = sorted(tasks, key=lambda t: (t.priority_rank, t.id))
        best = min(best, time.process_time() - started)
        assert len(resolved) == len(order)
    return best


def fitted_exponent(points: list[tuple[int, float]]) -> float:
    """Least-squares slope of log(time) against log(size)."""
    xs = [math.log(size) for size, _ in points]
    ys = [math.log(max(value, 1e-9)) for _, value in points]
    mean_x, mean_y = sum(xs) / len(xs), sum(ys) / len(ys)
    return sum((x - mean_x) * (y - mean_y) for x, y in zip(xs, ys, strict=True)) / sum(
        (x - mean_x) ** 2 for x in xs
    )


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure."""
    sizes = (1_000, 3_000, 10_000) if args.quick else (1_000, 3_000, 10_000, 30_000, 100_000)
    figure = Figure(
        name="Scheduler on chains",
        measured="schedule() and critical_path() of N chained systems, CPU seconds, in-process",
        floor="index the ids, resolve each dependency, sort by priority (what any scheduler does)",
        goal=f"linear to {sizes[-1]:,} chained systems: growth exponent k, relative to the floor's, "
             f"at most {LINEAR_EXPONENT}",
        met=None,
    )
    timings: dict[str, list[tuple[int, float]]] = {name: [] for name in CAPACITIES}
    floors: list[tuple[int, float]] = []
    for size in sizes:
        tasks = chain(size)
        floor = floor_seconds(tasks, 1 if size >= 30_000 else 3)
        floors.append((size, floor))
        row: dict[str, str] = {"systems": f"{size:,}", "floor s": f"{floor:.3f}"}
        for name, capacity in CAPACITIES.items():
            value = seconds(tasks, capacity, 1 if size >= 30_000 else 3)
            timings[name].append((size, value))
            row[f"{name} s"] = f"{value:.3f}"
            row[f"{name} µs per system"] = f"{value / size * 1e6:.1f}"
            row[f"{name} / floor"] = f"{value / floor:.1f}x"
        figure.rows.append(row)
    floor_exponent = fitted_exponent(floors)
    exponents = {name: fitted_exponent(points) for name, points in timings.items()}
    figure.notes.append(f"fitted growth exponent of the floor: {floor_exponent:.2f}")
    for name, exponent in exponents.items():
        figure.notes.append(f"fitted growth exponent, capacity {name}: {exponent:.2f}; relative to the "
                            f"floor: {exponent - floor_exponent + 1:.2f} (linear if at most {LINEAR_EXPONENT})")
    figure.notes.append("the scheduler it replaced visited every quarter with every waiting system: "
                        "4,000 chained systems took about 120 s and 2,000 about 34 s (k about 2)")
    figure.met = all(exponent - floor_exponent + 1 <= LINEAR_EXPONENT for exponent in exponents.values())
    return [figure]


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
