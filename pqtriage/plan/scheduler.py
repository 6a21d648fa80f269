"""List scheduling of migrations in whole quarters under a capacity limit.

Deterministic: quarter by quarter, the systems whose dependencies have finished
and whose vendor delay has passed start in priority order while capacity
allows. The priority of a system is the most urgent rank among itself and all
systems that (transitively) wait on it, so a PKI needed by the most urgent
system goes first; ties go by the system's own rank, then its id. A system that
does not fit leaves the capacity to the next one (greedy list scheduling).
"""

from __future__ import annotations

import heapq
import math
from collections import Counter, defaultdict
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from pqtriage.errors import PlanError, UsageError, chain_text, quoted

_TOLERANCE = 1e-9


@dataclass(frozen=True)
class Capacity:
    """How much migration work can run at once; None on both means unlimited."""

    concurrent: int | None = None
    """Most migrations in progress in any quarter."""
    person_weeks_per_quarter: float | None = None
    """Most person-weeks of migration work in any quarter."""

    def __post_init__(self) -> None:
        if self.concurrent is not None and self.concurrent < 1:
            raise UsageError(
                f"capacity of {self.concurrent} migrations in parallel cannot schedule anything",
                hint="give at least 1",
            )
        if self.person_weeks_per_quarter is not None and not self.person_weeks_per_quarter > 0:
            raise UsageError(
                f"capacity of {self.person_weeks_per_quarter} person-weeks per quarter "
                "cannot schedule anything",
                hint="give a positive number",
            )

    def describe(self) -> str:
        """Short text for reports, for example '2 migrations in parallel'."""
        parts = []
        if self.concurrent is not None:
            parts.append(
                f"{self.concurrent} migration{'s' if self.concurrent != 1 else ''} in parallel"
            )
        if self.person_weeks_per_quarter is not None:
            parts.append(f"{self.person_weeks_per_quarter:g} person-weeks per quarter")
        return " and ".join(parts) or "unlimited"


UNLIMITED = Capacity()
"""No capacity limit: only dependencies and vendor readiness constrain the plan."""


def parse_capacity(text: str | None) -> Capacity:
    """Parse a ``--capacity`` value: ``N`` (migrations in parallel) or ``Npw`` (person-weeks
    per quarter); both may be given joined by a comma, for example ``3,40pw``. None or empty
    means unlimited.

    Raises:
        UsageError: for anything else.
    """
    if text is None or not text.strip():
        return Capacity()
    concurrent: int | None = None
    weeks: float | None = None
    for part in (p.strip().lower() for p in text.split(",")):
        try:
            if part.endswith("pw"):
                weeks = float(part[:-2])
            else:
                concurrent = int(part)
        except ValueError as exc:
            raise UsageError(
                f"--capacity '{text}' is not understood",
                hint="give N migrations in parallel (3), N person-weeks per quarter (40pw), or both (3,40pw)",
            ) from exc
    return Capacity(concurrent=concurrent, person_weeks_per_quarter=weeks)


@dataclass(frozen=True)
class Task:
    """One migration to place in the calendar."""

    id: str
    """System id."""
    duration: int
    """Planned length in quarters (at least 1)."""
    release: int
    """Earliest plan quarter it may start (vendor readiness delay)."""
    depends_on: tuple[str, ...]
    """Ids that must finish before it starts."""
    priority_rank: int
    """Triage rank, 1 most urgent."""
    effort_person_weeks: float
    """Total effort, spread evenly over the quarters it runs."""


@dataclass(frozen=True)
class Slot:
    """Where a task landed."""

    id: str
    """System id."""
    start: int
    """First plan quarter of the migration."""
    finish: int
    """Last plan quarter of the migration (inclusive)."""
    load: float
    """Person-weeks per quarter while it runs."""
    stretched: bool
    """True when the duration was lengthened so that its load fits the capacity."""
    dependency_ready: int
    """First quarter after every dependency finished (0 without dependencies)."""
    release: int
    """Earliest start allowed by vendor readiness."""
    gate: str
    """What fixed the start: plan-start, dependency, vendor or capacity."""

    @property
    def duration(self) -> int:
        """Quarters occupied."""
        return self.finish - self.start + 1


def find_cycle(depends_on: Mapping[str, Sequence[str]]) -> list[str] | None:
    """A dependency cycle as [a, b, ..., a], or None; deterministic (ids visited sorted)."""
    state: dict[str, int] = {}  # 1 = on the current path, 2 = done
    children_of: dict[str, list[str]] = {}  # sorted once per node, not at every step
    for root in sorted(depends_on):
        if state.get(root):
            continue
        path: list[str] = []
        stack: list[tuple[str, int]] = [(root, 0)]
        while stack:
            node, index = stack.pop()
            if index == 0:
                state[node] = 1
                path.append(node)
            children = children_of.get(node)
            if children is None:
                children = children_of[node] = sorted(depends_on.get(node, ()))
            if index < len(children):
                stack.append((node, index + 1))
                child = children[index]
                if state.get(child) == 1:
                    return path[path.index(child) :] + [child]
                if not state.get(child):
                    stack.append((child, 0))
            else:
                state[node] = 2
                path.pop()
    return None


def _listed(ids: Sequence[str], shown: int = 5) -> str:
    names = ", ".join(quoted(i, 60)[1:-1] for i in ids[:shown])
    return names + (f" and {len(ids) - shown:,} more" if len(ids) > shown else "")


def check_dependencies(tasks: Sequence[Task]) -> None:
    """Refuse duplicate ids, unknown dependency ids and cycles.

    Raises:
        PlanError: naming the system and the offending id, or the cycle.
    """
    ids = [t.id for t in tasks]
    counts = Counter(ids)
    duplicates = sorted(i for i, n in counts.items() if n > 1)
    if duplicates:
        raise PlanError(f"system id(s) {_listed(duplicates)} appear more than once")
    known = set(ids)
    for task in tasks:
        missing = [d for d in task.depends_on if d not in known]
        if missing:
            raise PlanError(
                f"system {quoted(task.id)} depends on unknown system(s) {_listed(missing)}",
                hint="add them to the inventory or remove them from depends_on",
            )
    cycle = find_cycle({t.id: t.depends_on for t in tasks})
    if cycle:
        raise PlanError(
            f"dependency cycle: {chain_text(cycle[:-1], closed=True)}",
            hint="remove one depends_on link of the cycle",
        )


def topological_order(tasks: Sequence[Task]) -> list[str]:
    """Ids with every dependency before its dependants; ties by id (input must be acyclic)."""
    remaining = {t.id: len(set(t.depends_on)) for t in tasks}
    dependants: dict[str, list[str]] = defaultdict(list)
    for task in tasks:
        for dep in set(task.depends_on):
            dependants[dep].append(task.id)
    ready = [i for i, count in remaining.items() if not count]
    heapq.heapify(ready)  # smallest id first, as a sorted list would give, in O(n log n)
    order: list[str] = []
    while ready:
        current = heapq.heappop(ready)
        order.append(current)
        for child in dependants[current]:
            remaining[child] -= 1
            if not remaining[child]:
                heapq.heappush(ready, child)
    return order


def effective_ranks(tasks: Sequence[Task]) -> dict[str, int]:
    """Most urgent rank among each task and everything that transitively depends on it."""
    by_id = {t.id: t for t in tasks}
    result = {t.id: t.priority_rank for t in tasks}
    for task_id in reversed(topological_order(tasks)):
        for dep in by_id[task_id].depends_on:
            result[dep] = min(result[dep], result[task_id])
    return result


def _shape(task: Task, capacity: Capacity) -> tuple[int, float, bool]:
    """Duration and per-quarter load, stretched when the load alone exceeds the capacity."""
    duration = task.duration
    limit = capacity.person_weeks_per_quarter
    if limit is not None and task.effort_person_weeks / duration > limit + _TOLERANCE:
        duration = math.ceil(task.effort_person_weeks / limit - _TOLERANCE)
        return duration, task.effort_person_weeks / duration, True
    return duration, task.effort_person_weeks / duration, False


class _LoadIndex:
    """Tasks waiting for capacity, by priority position: the first one whose load fits.

    A segment tree of the smallest load below each node (math.inf where no task waits), so
    finding the most urgent waiting task with load <= room, adding and removing one are
    O(log n) each.
    """

    def __init__(self, size: int):
        self.leaves = 1
        while self.leaves < max(1, size):
            self.leaves *= 2
        self.tree = [math.inf] * (2 * self.leaves)
        self.count = 0

    def set(self, position: int, load: float) -> None:
        node = position + self.leaves
        self.count += (load != math.inf) - (self.tree[node] != math.inf)
        self.tree[node] = load
        node //= 2
        while node:
            self.tree[node] = min(self.tree[2 * node], self.tree[2 * node + 1])
            node //= 2

    def first_fitting(self, room: float) -> int | None:
        """Lowest position whose load is at most ``room``, or None."""
        tree = self.tree
        if tree[1] > room:
            return None
        node = 1
        while node < self.leaves:
            node = 2 * node if tree[2 * node] <= room else 2 * node + 1
        return node - self.leaves


def schedule(tasks: Sequence[Task], capacity: Capacity) -> dict[str, Slot]:
    """Place every task exactly once, respecting dependencies, releases and capacity.

    Greedy list scheduling, quarter by quarter (this module's docstring), computed by events:
    only quarters where a task becomes ready (its dependencies finished, its vendor delay
    passed) or a running task has finished can start anything, because every running task
    started at or before the current quarter, so the load of the quarters ahead never grows
    and a task fits its whole window exactly when it fits its first quarter. Time and memory
    are O((systems + dependencies) log systems), whatever the durations.

    Raises:
        PlanError: on duplicate ids, unknown dependencies or a dependency cycle.
    """
    check_dependencies(tasks)
    ranks = effective_ranks(tasks)
    order = sorted(tasks, key=lambda t: (ranks[t.id], t.priority_rank, t.id))
    position = {t.id: index for index, t in enumerate(order)}
    shapes = [_shape(t, capacity) for t in order]
    waiting_deps = [len(set(t.depends_on)) for t in order]
    dependants: list[list[int]] = [[] for _ in order]
    for index, task in enumerate(order):
        for dep in set(task.depends_on):
            dependants[position[dep]].append(index)
    dependency_ready = [0] * len(order)
    # (quarter it may start, position): tasks whose dependencies are all placed.
    upcoming = [(max(t.release, 0), i) for i, t in enumerate(order) if not waiting_deps[i]]
    heapq.heapify(upcoming)
    limit = capacity.person_weeks_per_quarter
    unlimited = capacity.concurrent is None and limit is None
    by_load = _LoadIndex(len(order)) if limit is not None else None
    by_rank: list[int] = []  # waiting tasks by position, when only the count is limited
    running: list[tuple[int, float]] = []  # (finish, load) of started tasks
    running_count = 0
    running_weeks = 0.0
    slots: dict[str, Slot] = {}

    def start(index: int, quarter: int) -> None:
        nonlocal running_count, running_weeks
        task = order[index]
        duration, load, stretched = shapes[index]
        finish = quarter + duration - 1
        ready = dependency_ready[index]
        slots[task.id] = Slot(
            id=task.id, start=quarter, finish=finish, load=load, stretched=stretched,
            dependency_ready=ready, release=task.release, gate=_gate(quarter, ready, task.release),
        )
        if not unlimited:
            heapq.heappush(running, (finish, load))
            running_count += 1
            running_weeks += load
        for child in dependants[index]:
            dependency_ready[child] = max(dependency_ready[child], finish + 1)
            waiting_deps[child] -= 1
            if not waiting_deps[child]:
                heapq.heappush(upcoming, (max(order[child].release, dependency_ready[child], 0), child))

    while upcoming or (by_load.count if by_load else by_rank):
        waiting = by_load.count if by_load is not None else len(by_rank)
        quarter = upcoming[0][0] if upcoming else math.inf
        if waiting and running:
            quarter = min(quarter, running[0][0] + 1)  # capacity frees up after a finish
        assert quarter != math.inf, "waiting tasks with nothing running cannot happen"
        quarter = int(quarter)
        while running and running[0][0] < quarter:
            _, load = heapq.heappop(running)
            running_count -= 1
            running_weeks = running_weeks - load if running_count else 0.0
        while upcoming and upcoming[0][0] <= quarter:
            _, index = heapq.heappop(upcoming)
            if unlimited:
                start(index, quarter)
            elif by_load is not None:
                by_load.set(index, shapes[index][1])
            else:
                heapq.heappush(by_rank, index)
        if unlimited:
            continue
        while capacity.concurrent is None or running_count < capacity.concurrent:
            if by_load is not None:
                assert limit is not None
                index_found = by_load.first_fitting(limit + _TOLERANCE - running_weeks)
                if index_found is None:
                    break
                by_load.set(index_found, math.inf)
            elif by_rank:
                index_found = heapq.heappop(by_rank)
            else:
                break
            start(index_found, quarter)
    return slots


def _gate(start: int, dependency_ready: int, release: int) -> str:
    earliest = max(dependency_ready, release, 0)
    if start > earliest:
        return "capacity"
    if earliest == 0:
        return "plan-start"
    return "dependency" if dependency_ready >= release else "vendor"
