"""Scheduler properties (hypothesis) and input errors.

Properties of a feasible list schedule (common practice, no source): every task placed
exactly once, no start before every dependency has finished nor before its release,
capacity never exceeded in any quarter, and the same input (in any order) gives the
same plan.
"""

from __future__ import annotations

import random
from collections import defaultdict

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.errors import EXIT_BAD_INPUT, PlanError, UsageError
from pqtriage.plan.scheduler import (
    Capacity,
    Slot,
    Task,
    _gate,
    _shape,
    effective_ranks,
    find_cycle,
    schedule,
)


@st.composite
def task_sets(draw: st.DrawFn) -> list[Task]:
    count = draw(st.integers(min_value=1, max_value=12))
    tasks = []
    for index in range(count):
        # Dependencies only on earlier tasks: the graph is acyclic by construction.
        deps = draw(st.sets(st.integers(min_value=0, max_value=max(0, index - 1)), max_size=3))
        deps = {d for d in deps if d < index}
        tasks.append(
            Task(
                id=f"s{index:02d}",
                duration=draw(st.integers(min_value=1, max_value=8)),
                release=draw(st.sampled_from([0, 0, 4])),
                depends_on=tuple(sorted(f"s{d:02d}" for d in deps)),
                priority_rank=draw(st.integers(min_value=1, max_value=6)),
                effort_person_weeks=float(draw(st.integers(min_value=0, max_value=120))),
            )
        )
    return tasks


capacities = st.builds(
    Capacity,
    concurrent=st.none() | st.integers(min_value=1, max_value=4),
    person_weeks_per_quarter=st.none() | st.sampled_from([5.0, 13.0, 40.0]),
)


@settings(max_examples=150, deadline=None)
@given(task_sets(), capacities)
def test_schedule_is_feasible(tasks: list[Task], capacity: Capacity) -> None:
    slots = schedule(tasks, capacity)
    # Every task exactly once.
    assert sorted(slots) == sorted(t.id for t in tasks)
    running: dict[int, int] = defaultdict(int)
    weeks: dict[int, float] = defaultdict(float)
    for task in tasks:
        slot = slots[task.id]
        assert slot.start >= max(0, task.release)
        assert slot.duration >= task.duration
        for dep in task.depends_on:
            assert slots[dep].finish < slot.start, (dep, task.id)
        # The effort is spread evenly and fully over the quarters the migration runs.
        assert abs(slot.load * slot.duration - task.effort_person_weeks) < 1e-6
        for quarter in range(slot.start, slot.finish + 1):
            running[quarter] += 1
            weeks[quarter] += slot.load
    if capacity.concurrent is not None:
        assert max(running.values()) <= capacity.concurrent
    if capacity.person_weeks_per_quarter is not None:
        assert max(weeks.values()) <= capacity.person_weeks_per_quarter + 1e-6


@settings(max_examples=100, deadline=None)
@given(task_sets(), capacities, st.randoms(use_true_random=False))
def test_same_input_in_any_order_gives_the_same_plan(
    tasks: list[Task], capacity: Capacity, rnd: random.Random
) -> None:
    first = schedule(tasks, capacity)
    shuffled = list(tasks)
    rnd.shuffle(shuffled)
    assert schedule(shuffled, capacity) == first
    assert schedule(tasks, capacity) == first


@settings(max_examples=100, deadline=None)
@given(task_sets())
def test_without_capacity_limit_every_task_starts_as_early_as_allowed(tasks: list[Task]) -> None:
    slots = schedule(tasks, Capacity())
    for task in tasks:
        ready = max([task.release, *(slots[d].finish + 1 for d in task.depends_on)])
        assert slots[task.id].start == ready


def test_priority_orders_the_start_and_a_dependency_inherits_urgency() -> None:
    tasks = [
        Task("a", 2, 0, (), 3, 0.0),
        Task("b", 2, 0, (), 2, 0.0),
        Task("pki", 2, 0, (), 9, 0.0),
        Task("c", 2, 0, ("pki",), 1, 0.0),
    ]
    slots = schedule(tasks, Capacity(concurrent=1))
    # pki waits on nothing but rank 1 (c) waits on it, so it goes first, then c, b, a.
    assert [s.id for s in sorted(slots.values(), key=lambda s: s.start)] == ["pki", "c", "b", "a"]
    assert slots["c"].gate == "dependency"
    assert slots["b"].gate == "capacity"


def test_a_migration_larger_than_the_capacity_is_lengthened() -> None:
    (slot,) = schedule(
        [Task("big", 2, 0, (), 1, 60.0)], Capacity(person_weeks_per_quarter=20.0)
    ).values()
    assert (slot.duration, slot.load, slot.stretched) == (3, 20.0, True)


def test_a_cycle_is_an_input_error_naming_the_cycle() -> None:
    tasks = [
        Task("a", 1, 0, ("c",), 1, 0.0),
        Task("b", 1, 0, ("a",), 1, 0.0),
        Task("c", 1, 0, ("b",), 1, 0.0),
        Task("d", 1, 0, (), 1, 0.0),
    ]
    with pytest.raises(PlanError) as caught:
        schedule(tasks, Capacity())
    assert "dependency cycle: a -> c -> b -> a" in caught.value.diagnostics()
    assert caught.value.exit_code == EXIT_BAD_INPUT


def test_self_dependency_is_a_cycle() -> None:
    assert find_cycle({"a": ("a",)}) == ["a", "a"]
    assert find_cycle({"a": ("b",), "b": ()}) is None


def test_unknown_dependency_is_an_input_error() -> None:
    with pytest.raises(PlanError, match="system 'a' depends on unknown system\\(s\\) ghost"):
        schedule([Task("a", 1, 0, ("ghost",), 1, 0.0)], Capacity())


def test_capacity_must_allow_some_work() -> None:
    with pytest.raises(UsageError):
        Capacity(concurrent=0)
    with pytest.raises(UsageError):
        Capacity(person_weeks_per_quarter=0.0)


def reference_schedule(tasks: list[Task], capacity: Capacity) -> dict[str, Slot]:
    """Greedy list scheduling as the module docstring defines it, quarter by quarter and task by
    task over every quarter of its window (the earlier, quadratic implementation): the oracle
    the event-driven scheduler must match exactly."""
    ranks = effective_ranks(tasks)
    order = sorted(tasks, key=lambda t: (ranks[t.id], t.priority_rank, t.id))
    shapes = {t.id: _shape(t, capacity) for t in tasks}
    running: dict[int, int] = defaultdict(int)
    weeks: dict[int, float] = defaultdict(float)
    slots: dict[str, Slot] = {}
    pending = list(order)
    quarter = 0
    while pending:
        waiting: list[Task] = []
        for task in pending:
            deps_done = all(d in slots and slots[d].finish < quarter for d in task.depends_on)
            duration, load, stretched = shapes[task.id]
            window = range(quarter, quarter + duration)
            fits = all(
                (capacity.concurrent is None or running[q] + 1 <= capacity.concurrent)
                and (capacity.person_weeks_per_quarter is None
                     or weeks[q] + load <= capacity.person_weeks_per_quarter + 1e-9)
                for q in window
            )
            if not (deps_done and task.release <= quarter and fits):
                waiting.append(task)
                continue
            for q in window:
                running[q] += 1
                weeks[q] += load
            ready = max((slots[d].finish + 1 for d in task.depends_on), default=0)
            slots[task.id] = Slot(task.id, quarter, quarter + duration - 1, load, stretched, ready,
                                  task.release, _gate(quarter, ready, task.release))
        pending = waiting
        quarter += 1
    return slots


@settings(max_examples=400, deadline=None)
@given(task_sets(), capacities)
def test_event_driven_schedule_matches_the_quarter_by_quarter_definition(
    tasks: list[Task], capacity: Capacity
) -> None:
    assert schedule(tasks, capacity) == reference_schedule(tasks, capacity)


def test_schedule_of_a_long_chain_is_fast_and_exact() -> None:
    """20,000 chained systems (each waits on the one before): the earlier scheduler visited
    every quarter with every pending task; this one places each task once."""
    import resource

    tasks = [Task(f"s{i:05d}", 8, 0, (f"s{i - 1:05d}",) if i else (), 1, 104.0) for i in range(20_000)]
    before = resource.getrusage(resource.RUSAGE_SELF)
    slots = schedule(tasks, Capacity(concurrent=3, person_weeks_per_quarter=40.0))
    after = resource.getrusage(resource.RUSAGE_SELF)
    assert slots["s19999"].start == 19_999 * 8 and slots["s19999"].finish == 20_000 * 8 - 1
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    assert cpu < 20.0, cpu  # CPU seconds, a margin of about 20x over this machine idle
