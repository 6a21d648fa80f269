"""Build a migration plan: deadlines, schedule, checks and fixes for every system.

Pure: candidates, policies and settings in, a :class:`Plan` out. The formatters
(pqtriage.formats: table, markdown, json and svg views of a plan) only read a Plan.
"""

from __future__ import annotations

import datetime
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from types import MappingProxyType

from pqtriage.errors import PlanError, chain_text, quoted
from pqtriage.plan.calendar import (
    LAST_QUARTER,
    duration_quarters,
    plan_origin,
    quarter_end,
    quarter_start,
)
from pqtriage.plan.critical_path import critical_path
from pqtriage.plan.deadlines import (
    Deadline,
    SystemDeadlines,
    organisation_milestones,
    system_deadlines,
)
from pqtriage.plan.fixes import Miss, find_fixes
from pqtriage.plan.inputs import POLICY_CATEGORIES, VENDOR_READINESS, PlanCandidate
from pqtriage.plan.policies import Policy
from pqtriage.plan.scheduler import UNLIMITED, Capacity, Slot, Task, schedule

DEFAULT_VENDOR_DELAY_QUARTERS: Mapping[str, int] = MappingProxyType(
    {"available": 0, "announced": 4, "unknown": 4}
)
"""Quarters the earliest start waits for vendor post-quantum support, per readiness."""
FIX_NOW_VERDICTS: tuple[str, ...] = ("classically-broken",)
"""Verdicts whose fix needs no post-quantum product (RC4, DES, 3DES, SHA-1, MD5, short
RSA or DH: broken or disallowed against classical attacks today). Such a system is on the
"fix now" track: its earliest start is the first plan quarter whatever the vendor readiness,
because a classical replacement (AES-GCM, SHA-256, a 3072-bit group) is available today."""
FIX_NOW = "fix now"
POST_QUANTUM = "post-quantum"
DEFAULT_PERSON_WEEKS_PER_YEAR = 52.0
"""Effort assumed when none is given: one person full time for the migration's duration."""


@dataclass(frozen=True)
class PlanSettings:
    """Documented defaults of the planner, overridable by the caller."""

    vendor_delay_quarters: Mapping[str, int] = field(
        default_factory=lambda: DEFAULT_VENDOR_DELAY_QUARTERS
    )
    """Delay of the earliest start per vendor readiness (quarters)."""
    default_vendor_readiness: str = "unknown"
    """Readiness assumed when a system gives none."""
    person_weeks_per_year: float = DEFAULT_PERSON_WEEKS_PER_YEAR
    """Default effort per year of migration_years, in person-weeks."""


DEFAULT_SETTINGS = PlanSettings()
"""The documented defaults."""


@dataclass(frozen=True)
class DeadlineResult:
    """One deadline of a system and whether the planned finish meets it."""

    deadline: Deadline
    """The deadline."""
    met: bool
    """True when the planned finish is on or before the deadline's date."""
    slack_days: int
    """Deadline date minus planned finish, in days (negative when missed)."""


@dataclass(frozen=True)
class SystemPlan:
    """The plan of one system."""

    candidate: PlanCandidate
    """What the triage handed in."""
    slot: Slot
    """Scheduled quarters."""
    planned_start: datetime.date
    """First day of the first quarter of the migration."""
    planned_finish: datetime.date
    """Last day of the last quarter of the migration."""
    earliest_start: datetime.date
    """Earliest start the vendor readiness allows."""
    effort_person_weeks: float
    """Effort used (given or default)."""
    effort_assumed: bool
    """True when the effort is the documented default."""
    vendor_readiness: str
    """Readiness used (given or default)."""
    vendor_assumed: bool
    """True when the readiness is the documented default."""
    deadlines: SystemDeadlines
    """Applicable deadlines per use and merged."""
    results: tuple[DeadlineResult, ...]
    """Each merged deadline with its check, earliest first."""
    meets_start_by: bool | None
    """Planned start on or before the Mosca start-by date; None without a start-by date."""
    start_by_slack_days: int | None
    """Start-by date minus planned start, in days; None without a start-by date."""
    meets_deadlines: bool | None
    """False if any deadline is missed; None if none is missed but some is undetermined."""
    deadline_slack_days: int | None
    """Smallest slack over the deadlines; None without deadlines."""
    misses: tuple[Miss, ...]
    """Every missed date with the fixes that would help."""
    on_critical_path: bool
    """True when the system is on the plan's critical path."""
    track: str = POST_QUANTUM
    """FIX_NOW for a classically broken system (starts at once), else POST_QUANTUM."""


def plan_track(candidate: PlanCandidate) -> str:
    """FIX_NOW when the candidate's verdict is in FIX_NOW_VERDICTS, else POST_QUANTUM."""
    return FIX_NOW if candidate.verdict in FIX_NOW_VERDICTS else POST_QUANTUM


def plan_status(system: SystemPlan) -> str:
    """Short status word of a system's plan: misses deadline, late start, undetermined, on time."""
    if system.meets_deadlines is False:
        return "misses deadline"
    if system.meets_start_by is False:
        return "late start"
    if system.meets_deadlines is None:
        return "undetermined"
    return "on time"


@dataclass(frozen=True)
class Plan:
    """A whole migration plan."""

    as_of: datetime.date
    """Date the plan was made for."""
    origin: int
    """Absolute quarter number of plan quarter 0."""
    capacity: Capacity
    """Capacity used."""
    policies: tuple[Policy, ...]
    """Policies applied."""
    systems: tuple[SystemPlan, ...]
    """Every system once, by planned start, then priority rank, then id."""
    critical_path: tuple[str, ...]
    """Ids of the critical path, first migration first."""
    organisation_milestones: tuple[Deadline, ...]
    """Milestones for the organisation as a whole."""
    settings: PlanSettings
    """Defaults used."""

    @property
    def start(self) -> datetime.date:
        """First day of the plan."""
        return quarter_start(self.origin, 0)


def _validate(candidates: Sequence[PlanCandidate]) -> None:
    for item in candidates:
        where = f"system '{item.id}'"
        if item.policy_category is not None and item.policy_category not in POLICY_CATEGORIES:
            raise PlanError(
                f"{where}: unknown policy_category '{item.policy_category}'",
                hint=f"use one of: {', '.join(POLICY_CATEGORIES)}",
            )
        if item.vendor_readiness is not None and item.vendor_readiness not in VENDOR_READINESS:
            raise PlanError(
                f"{where}: unknown vendor_readiness '{item.vendor_readiness}'",
                hint=f"use one of: {', '.join(VENDOR_READINESS)}",
            )
        if not item.migration_years > 0:
            raise PlanError(f"{where}: migration_years must be positive")
        if item.effort_person_weeks is not None and item.effort_person_weeks < 0:
            raise PlanError(f"{where}: effort_person_weeks must not be negative")


def _check_calendar(candidates: Sequence[PlanCandidate], slots: Mapping[str, Slot], origin: int,
                    path: tuple[str, ...]) -> None:
    """Refuse a schedule that ends after 9999-12-31 (dates, and every output, stop there)."""
    if not slots:
        return
    last = max(slots.values(), key=lambda s: (s.finish, s.id))
    if origin + last.finish <= LAST_QUARTER:
        return
    item = next(c for c in candidates if c.id == last.id)
    year = (origin + last.finish) // 4
    chain = f", at the end of a dependency chain of {chain_text(list(path))}" if len(path) > 1 else ""
    raise PlanError(
        f"the plan runs past the year 9999: system {quoted(item.id)} would finish in {year}{chain}",
        place=item.place,
        hint="check migration_years and depends_on along the chain, or give more capacity",
    )


def build_plan(
    candidates: Sequence[PlanCandidate],
    as_of: datetime.date,
    policies: Sequence[Policy],
    capacity: Capacity = UNLIMITED,
    settings: PlanSettings = DEFAULT_SETTINGS,
) -> Plan:
    """Schedule every candidate and check it against its start-by date and deadlines.

    Raises:
        PlanError: for an unknown dependency, a dependency cycle or an invalid input value.
    """
    _validate(candidates)
    origin = plan_origin(as_of)
    tasks = []
    shaped: dict[str, tuple[float, bool, str, bool]] = {}
    for item in candidates:
        duration = duration_quarters(item.migration_years)
        effort = item.effort_person_weeks
        effort_assumed = effort is None
        if effort is None:
            effort = settings.person_weeks_per_year * item.migration_years
        readiness = item.vendor_readiness or settings.default_vendor_readiness
        shaped[item.id] = (effort, effort_assumed, readiness, item.vendor_readiness is None)
        tasks.append(
            Task(
                id=item.id,
                duration=duration,
                release=0 if plan_track(item) == FIX_NOW
                else settings.vendor_delay_quarters.get(readiness, 0),
                depends_on=tuple(item.depends_on),
                priority_rank=item.priority_rank,
                effort_person_weeks=effort,
            )
        )
    slots = schedule(tasks, capacity)
    path = critical_path(slots, {t.id: t.depends_on for t in tasks})
    _check_calendar(candidates, slots, origin, path)
    systems = [
        _system_plan(item, slots, origin, policies, shaped[item.id], item.id in path)
        for item in candidates
    ]
    systems.sort(key=lambda s: (s.slot.start, s.candidate.priority_rank, s.candidate.id))
    return Plan(
        as_of=as_of,
        origin=origin,
        capacity=capacity,
        policies=tuple(policies),
        systems=tuple(systems),
        critical_path=path,
        organisation_milestones=organisation_milestones(policies),
        settings=settings,
    )


def _system_plan(
    item: PlanCandidate,
    slots: Mapping[str, Slot],
    origin: int,
    policies: Sequence[Policy],
    shaped: tuple[float, bool, str, bool],
    on_path: bool,
) -> SystemPlan:
    effort, effort_assumed, readiness, readiness_assumed = shaped
    slot = slots[item.id]
    start = quarter_start(origin, slot.start)
    finish = quarter_end(origin, slot.finish)
    found = system_deadlines(item, policies)
    results = tuple(
        DeadlineResult(d, finish <= d.date, (d.date - finish).days) for d in found.deadlines
    )
    dependency_slots = {d: slots[d] for d in item.depends_on}
    misses = []
    meets_start_by = None
    start_slack = None
    if item.start_by is not None:
        meets_start_by = start <= item.start_by
        start_slack = (item.start_by - start).days
        if not meets_start_by:
            misses.append(
                find_fixes(origin, slot, "start-by", item.start_by, readiness, dependency_slots)
            )
    for result in results:
        if not result.met:
            target = f"{result.deadline.policy}/{result.deadline.milestone}"
            misses.append(
                find_fixes(origin, slot, target, result.deadline.date, readiness, dependency_slots)
            )
    if any(not r.met for r in results):
        meets: bool | None = False
    elif found.undetermined:
        meets = None
    else:
        meets = True
    return SystemPlan(
        candidate=item,
        slot=slot,
        planned_start=start,
        planned_finish=finish,
        earliest_start=quarter_start(origin, slot.release),
        effort_person_weeks=effort,
        effort_assumed=effort_assumed,
        vendor_readiness=readiness,
        vendor_assumed=readiness_assumed,
        deadlines=found,
        results=results,
        meets_start_by=meets_start_by,
        start_by_slack_days=start_slack,
        meets_deadlines=meets,
        deadline_slack_days=min((r.slack_days for r in results), default=None),
        misses=tuple(misses),
        on_critical_path=on_path,
        track=plan_track(item),
    )
