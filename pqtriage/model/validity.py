"""Remaining validity of a certificate or key: how long its signatures must still be trusted.

Pure: dates in, years out. A certificate valid until ``not_after`` still vouches for what it
signed until then, so a signature use resting on it needs x (Mosca's shelf-life of the
signature) of at least the time left at the as-of date.
"""

from __future__ import annotations

import datetime as dt

DAYS_PER_YEAR = 365.25
"""Julian year (common practice, no source)."""
MAX_YEARS = 100.0
"""Longest remaining validity taken at face value (the longest trust_years an inventory may give);
a certificate valid until 9999 (RFC 5280 §4.1.2.5 allows 99991231235959Z for "no
well-defined expiration") is trusted for that long, not for eight thousand years."""


def remaining_years(not_after: dt.date, as_of: dt.date) -> float:
    """Years from ``as_of`` to the end of validity ``not_after``; 0 when it has expired.

    Rounded to 0.01 year (about four days), the precision the reports show.
    """
    days = (not_after - as_of).days
    return round(min(MAX_YEARS, max(0, days) / DAYS_PER_YEAR), 2)
