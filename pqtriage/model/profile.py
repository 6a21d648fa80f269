"""Threat profile: when a cryptographically relevant quantum computer (CRQC) arrives.

A profile is either a probability distribution of the arrival year of a
reference task (RSA-2048 factored within about a day) or a single
``crqc_year`` for a deterministic what-if. Pure: the YAML is read in
pqtriage.sources.profile_file.
"""

from __future__ import annotations

import bisect
import datetime as dt
import math
from dataclasses import dataclass


def decimal_year(day: dt.date) -> float:
    """Calendar date as a decimal year (2026-07-02 -> about 2026.5)."""
    start = dt.date(day.year, 1, 1)
    length = (dt.date(day.year + 1, 1, 1) - start).days
    return day.year + (day - start).days / length


def date_of(year: float) -> dt.date:
    """Decimal year back to a calendar date (inverse of decimal_year, to the day)."""
    whole = math.floor(year)
    start = dt.date(whole, 1, 1)
    length = (dt.date(whole + 1, 1, 1) - start).days
    return start + dt.timedelta(days=min(length - 1, int(round((year - whole) * length))))


@dataclass(frozen=True)
class ThreatProfile:
    """What the user assumes about CRQC arrival, and how much risk they accept."""

    name: str
    """Short identifier (survey-2025-upper, what-if-2035 ...)."""
    description: str
    """One line for reports."""
    source: str
    """Where the distribution comes from (title and identifier), or 'user what-if'."""
    risk_tolerance: float
    """Accepted probability that data is exposed; z is read at this quantile."""
    reference_task: str
    """The task the distribution refers to (RSA-2048 factored within about a day)."""
    reference_year: float
    """Decimal year from which the distribution's horizons count."""
    points: tuple[tuple[float, float], ...]
    """Cumulative arrival probability at decimal years, increasing; linear in between,
    flat after the last point (the rest of the mass lies beyond the horizon)."""
    crqc_year: int | None = None
    """Deterministic what-if: every Shor-attackable algorithm falls on 1 January of this year."""
    per_algorithm_arrival: bool = True
    """Whether algorithms get their own arrival from resource estimates (issue-level option)."""
    caveat: str = ""
    """Caveat about the source to repeat in every report."""
    qubit_doubling_years: float | None = None
    """Years for physical-qubit capacity to double (used by per-algorithm arrivals)."""

    @property
    def deterministic(self) -> bool:
        """True for a crqc_year what-if."""
        return self.crqc_year is not None

    def _cdf(self, year: float) -> float:
        """Unconditioned P(arrival < year) of the reference task."""
        if self.crqc_year is not None:
            # Strict: Mosca's x + y > z, so data that must hold exactly until z is not exposed.
            return 1.0 if year > self.crqc_year else 0.0
        years = [p[0] for p in self.points]
        if year <= self.reference_year:
            return 0.0
        index = bisect.bisect_left(years, year)
        if index >= len(self.points):
            return self.points[-1][1]
        hi_year, hi_p = self.points[index]
        lo_year, lo_p = (self.reference_year, 0.0) if index == 0 else self.points[index - 1]
        if hi_year == lo_year:
            return hi_p
        return lo_p + (hi_p - lo_p) * (year - lo_year) / (hi_year - lo_year)

    def arrival_probability(self, year: float, as_of: float, shift_years: float = 0.0) -> float:
        """P(the algorithm falls before ``year`` | it has not fallen by ``as_of``).

        The algorithm's arrival is the reference arrival plus ``shift_years``.
        Conditioning keeps a later run from pushing the threat later: the survey's
        horizons count from its publication, and "no CRQC yet" is known on ``as_of``.
        """
        if math.isinf(shift_years):
            return 0.0
        if year <= as_of:
            return 0.0
        before = self._cdf(as_of - shift_years)
        if before >= 1.0:
            return 1.0  # the what-if year is already past: treat as arrived
        return max(0.0, (self._cdf(year - shift_years) - before) / (1.0 - before))

    def quantile(self, probability: float, as_of: float, shift_years: float = 0.0) -> float:
        """Earliest decimal year at which the conditioned arrival probability reaches ``probability``.

        Returns math.inf when the distribution never reaches it within its horizon.
        """
        if math.isinf(shift_years):
            return math.inf
        if self.crqc_year is not None:
            return max(float(self.crqc_year) + shift_years, as_of)
        before = self._cdf(as_of - shift_years)
        if before >= 1.0:
            return as_of
        target = before + probability * (1.0 - before)
        lo_year, lo_p = self.reference_year, 0.0
        for hi_year, hi_p in self.points:
            if hi_p >= target and hi_year > lo_year:
                if hi_p == lo_p:
                    year = hi_year
                else:
                    year = lo_year + (target - lo_p) * (hi_year - lo_year) / (hi_p - lo_p)
                return max(year + shift_years, as_of)
            lo_year, lo_p = hi_year, hi_p
        return math.inf
