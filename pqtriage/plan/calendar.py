"""The planning calendar: calendar quarters counted from the plan's start.

Quarter 0 is the first calendar quarter that starts on or after the ``as_of``
date (so a plan made on 2026-05-10 starts on 2026-07-01, one made on 2026-04-01
starts that day). A migration occupying quarters ``s..f`` starts on the first
day of quarter ``s`` and finishes on the last day of quarter ``f``.
"""

from __future__ import annotations

import datetime
import math

LAST_QUARTER = 9999 * 4 + 3
"""Absolute number of the last calendar quarter Python's dates reach (9999-Q4)."""


def absolute_quarter(day: datetime.date) -> int:
    """Number of the calendar quarter containing ``day`` (year * 4 + quarter index)."""
    return day.year * 4 + (day.month - 1) // 3


def plan_origin(as_of: datetime.date) -> int:
    """Absolute quarter number of the plan's quarter 0 for a plan made on ``as_of``."""
    quarter = absolute_quarter(as_of)
    return quarter if as_of == _first_day(quarter) else quarter + 1


def _first_day(quarter: int) -> datetime.date:
    year, index = divmod(quarter, 4)
    return datetime.date(year, index * 3 + 1, 1)


def quarter_start(origin: int, quarter: int) -> datetime.date:
    """First day of plan quarter ``quarter``."""
    return _first_day(origin + quarter)


def quarter_end(origin: int, quarter: int) -> datetime.date:
    """Last day of plan quarter ``quarter``."""
    return _first_day(origin + quarter + 1) - datetime.timedelta(days=1)


def quarter_label(origin: int, quarter: int) -> str:
    """Calendar label of plan quarter ``quarter``, for example ``2027-Q3``."""
    year, index = divmod(origin + quarter, 4)
    return f"{year}-Q{index + 1}"


def quarter_of(origin: int, day: datetime.date) -> int:
    """Plan quarter containing ``day`` (negative when before the plan's start)."""
    return absolute_quarter(day) - origin


def last_finish_quarter(origin: int, deadline: datetime.date) -> int:
    """Latest plan quarter whose last day falls on or before ``deadline``."""
    quarter = quarter_of(origin, deadline)
    return quarter if quarter_end(origin, quarter) <= deadline else quarter - 1


def duration_quarters(migration_years: float) -> int:
    """Whole quarters a migration of ``migration_years`` occupies (at least one)."""
    # Rounded first so that 0.75 years * 4 = 3.0000000000000004 stays 3 quarters.
    return max(1, math.ceil(round(migration_years * 4, 6)))
