"""What would fix each missed date: more capacity, an earlier start, a vendor date.

For a missed date we compute the latest quarter the migration could start and
still meet it, then compare that with what held the start back: unfinished
dependencies, the vendor readiness delay, or the capacity (the start came later
than both). Each fix says whether removing that one obstacle would be enough.
"""

from __future__ import annotations

import datetime
from collections.abc import Mapping
from dataclasses import dataclass

from pqtriage.plan.calendar import last_finish_quarter, quarter_end, quarter_of, quarter_start
from pqtriage.plan.scheduler import Slot


@dataclass(frozen=True)
class Fix:
    """One change that would remove an obstacle to meeting a date."""

    kind: str
    """more-capacity, earlier-dependencies, vendor-date, shorter-migration or none-possible."""
    text: str
    """What to change, in words, with dates."""
    sufficient: bool
    """True when this change alone would let the date be met."""


@dataclass(frozen=True)
class Miss:
    """A date the planned migration misses, and how it could be met."""

    target: str
    """start-by, or the deadline as policy/milestone."""
    date: datetime.date
    """The date missed."""
    latest_start: datetime.date | None
    """Latest planned start that would meet it; None when no start in the plan can."""
    fixes: tuple[Fix, ...]
    """Changes that would help, most direct first."""


def latest_start_quarter(origin: int, target: str, date: datetime.date, duration: int) -> int:
    """Latest plan quarter to start a migration of ``duration`` quarters and meet ``date``."""
    if target == "start-by":
        return quarter_of(origin, date)  # the start (first day of the quarter) is on or before it
    return last_finish_quarter(origin, date) - duration + 1


def find_fixes(
    origin: int,
    slot: Slot,
    target: str,
    date: datetime.date,
    vendor_readiness: str,
    dependency_slots: Mapping[str, Slot],
) -> Miss:
    """Explain one missed date of one scheduled system.

    Args:
        origin: absolute quarter of the plan's quarter 0.
        slot: where the system was scheduled.
        target: ``start-by`` or ``policy/milestone``.
        date: the date missed (start-by date or last day of the deadline).
        vendor_readiness: the readiness used for the release delay.
        dependency_slots: slots of the system's direct dependencies.
    """
    latest = latest_start_quarter(origin, target, date, slot.duration)
    fixes: list[Fix] = []
    if latest < 0:
        if target == "start-by":
            fixes.append(
                Fix(
                    "none-possible",
                    f"the start-by date {date} is before the plan starts "
                    f"({quarter_start(origin, 0)}); start as early as possible: the data is "
                    "exposed for longer than its shelf-life allows",
                    False,
                )
            )
        else:
            allowed = last_finish_quarter(origin, date) + 1
            if allowed >= 1:
                fixes.append(
                    Fix(
                        "shorter-migration",
                        f"starting on {quarter_start(origin, 0)}, the migration must take at "
                        f"most {allowed} quarter(s) instead of {slot.duration} to finish by {date}",
                        max(slot.dependency_ready, slot.release) == 0,
                    )
                )
            else:
                fixes.append(
                    Fix(
                        "none-possible",
                        f"{date} is before the plan's first quarter ends; no schedule can meet it",
                        False,
                    )
                )
        return Miss(target, date, None, tuple(fixes))
    start_date = quarter_start(origin, latest)
    earliest = max(slot.dependency_ready, slot.release)
    if slot.dependency_ready > latest:
        late = sorted(
            (s for s in dependency_slots.values() if s.finish >= latest), key=lambda s: s.id
        )
        names = ", ".join(f"{s.id} (finishes {quarter_end(origin, s.finish)})" for s in late)
        fixes.append(
            Fix(
                "earlier-dependencies",
                f"dependencies {names} must finish by {quarter_end(origin, latest - 1)} "
                f"so that this system can start by {start_date}",
                slot.release <= latest,
            )
        )
    if slot.release > latest:
        fixes.append(
            Fix(
                "vendor-date",
                f"post-quantum support from the vendor by {start_date} (vendor readiness "
                f"'{vendor_readiness}' delays the earliest start to "
                f"{quarter_start(origin, slot.release)})",
                slot.dependency_ready <= latest,
            )
        )
    if slot.start > earliest and earliest <= latest:
        fixes.append(
            Fix(
                "more-capacity",
                f"more capacity (or a higher priority) so that it starts on "
                f"{quarter_start(origin, earliest)} instead of {quarter_start(origin, slot.start)}, "
                f"finishing {quarter_end(origin, earliest + slot.duration - 1)}",
                True,
            )
        )
    if slot.stretched:
        fixes.append(
            Fix(
                "more-capacity",
                "more person-weeks per quarter: the migration was lengthened to fit the capacity",
                False,
            )
        )
    return Miss(target, date, start_date, tuple(fixes))
