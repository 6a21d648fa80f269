"""Quarter arithmetic of the planning calendar (calendar quarters: common practice, no source)."""

from __future__ import annotations

import datetime

from pqtriage.plan.calendar import (
    duration_quarters,
    last_finish_quarter,
    plan_origin,
    quarter_end,
    quarter_label,
    quarter_of,
    quarter_start,
)

D = datetime.date


def test_plan_starts_at_the_next_quarter_boundary() -> None:
    origin = plan_origin(D(2026, 5, 10))
    assert quarter_start(origin, 0) == D(2026, 7, 1)
    assert quarter_label(origin, 0) == "2026-Q3"
    # A plan made on a quarter's first day starts that day.
    assert quarter_start(plan_origin(D(2026, 4, 1)), 0) == D(2026, 4, 1)
    # Year boundary: a plan made in December starts on 1 January.
    assert quarter_start(plan_origin(D(2026, 12, 31)), 0) == D(2027, 1, 1)


def test_quarter_ends_are_calendar_quarter_ends() -> None:
    origin = plan_origin(D(2027, 1, 1))
    assert [quarter_end(origin, q) for q in range(4)] == [
        D(2027, 3, 31),
        D(2027, 6, 30),
        D(2027, 9, 30),
        D(2027, 12, 31),
    ]
    assert quarter_label(origin, 5) == "2028-Q2"


def test_latest_finish_quarter_for_a_deadline() -> None:
    origin = plan_origin(D(2027, 1, 1))
    # 2030-12-31 is the last day of 2030-Q4: that quarter still meets it.
    assert quarter_label(origin, last_finish_quarter(origin, D(2030, 12, 31))) == "2030-Q4"
    # 2030-12-30 is not: the quarter before is the last one that meets it.
    assert quarter_label(origin, last_finish_quarter(origin, D(2030, 12, 30))) == "2030-Q3"
    assert quarter_of(origin, D(2026, 12, 31)) == -1


def test_duration_is_whole_quarters_rounded_up() -> None:
    assert duration_quarters(1.0) == 4
    assert duration_quarters(0.75) == 3
    assert duration_quarters(0.8) == 4
    assert duration_quarters(0.01) == 1
    assert duration_quarters(2.5) == 10
