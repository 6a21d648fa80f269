"""Threat profile: when a cryptographically relevant quantum computer (CRQC) arrives.

A profile is either a probability distribution of the arrival year of a reference task
(RSA-2048 factored within 24 hours) or a single ``crqc_year`` for a deterministic what-if.
Pure: the YAML is read in pqtriage.sources.profile_file.

The distribution (docs/threat-model.md section 4):

- the survey's cumulative probabilities at its horizons, linear in between, from 0 at the
  survey's publication; a survey that reports a range gives two curves (optimistic and
  pessimistic ends) and the profile's central curve is a fixed blend of them;
- beyond the last horizon a cautious tail: the probability keeps growing at the rate of the
  last survey interval until it reaches 1, at the latest at the planning horizon, so that no
  as-of date makes a quantum-vulnerable algorithm safe;
- one shared arrival, conditioned once: an algorithm shifted by ``s`` years from the
  reference task falls at ``max(T + s, as_of)``, where T is the reference arrival. "No CRQC by
  the as-of date" moves the probability the distribution placed before the as-of date to the
  as-of date itself (it may arrive at any moment); it is never spread over later years, so a
  quiet year never lowers the probability for a fixed calendar date, and every algorithm
  reads the same distribution.
"""

from __future__ import annotations

import bisect
import datetime as dt
import math
from dataclasses import dataclass, field
from functools import cached_property

from pqtriage.model.priority import PriorityWeights

PLANNING_HORIZON_YEARS = 100.0
"""The cautious tail puts all remaining probability within this many years of the survey."""

Curve = tuple[tuple[float, ...], tuple[float, ...]]
"""(decimal years, cumulative probabilities), both non-decreasing, starting at (start, 0)."""


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


def tail_end(points: tuple[tuple[float, float], ...], start: float, end_years: float | None) -> float | None:
    """Decimal year at which the cautious tail reaches probability 1 (None: no tail needed).

    The rate of the last survey interval continues (linear CDF) until the probability is 1;
    never later than the planning horizon; ``end_years`` (years after ``start``) overrides.
    """
    if not points or points[-1][1] >= 1.0:
        return None
    last_year, last_p = points[-1]
    horizon = start + PLANNING_HORIZON_YEARS
    if end_years is not None:
        return max(last_year + 1e-9, min(start + end_years, horizon))
    before_year, before_p = (start, 0.0) if len(points) == 1 else points[-2]
    rate = (last_p - before_p) / (last_year - before_year) if last_year > before_year else 0.0
    if rate <= 0:
        return max(last_year + 1e-9, horizon)
    return min(last_year + (1.0 - last_p) / rate, max(horizon, last_year + 1e-9))


def make_curve(points: tuple[tuple[float, float], ...], start: float, end: float | None) -> Curve:
    """The piecewise-linear CDF through the points, from (start, 0), with its tail to 1."""
    years = [start] + [y for y, _ in points]
    probs = [0.0] + [p for _, p in points]
    if end is not None and end > years[-1]:
        years.append(end)
        probs.append(1.0)
    return tuple(years), tuple(probs)


def curve_at(curve: Curve, year: float) -> float:
    """Evaluate a curve: 0 before its start, linear between knots, its last value after."""
    years, probs = curve
    if year <= years[0]:
        return 0.0
    index = bisect.bisect_left(years, year)
    if index >= len(years):
        return probs[-1]
    lo_year, hi_year = years[index - 1], years[index]
    lo_p, hi_p = probs[index - 1], probs[index]
    if hi_year <= lo_year:
        return hi_p
    return lo_p + (hi_p - lo_p) * (year - lo_year) / (hi_year - lo_year)


def blend(low: Curve, high: Curve, position: float) -> Curve:
    """The curve low + position x (high - low), exact on the union of both curves' knots."""
    knots = sorted(set(low[0]) | set(high[0]))
    probs = []
    for year in knots:
        a, b = curve_at(low, year), curve_at(high, year)
        probs.append(a + position * (b - a))
    return tuple(knots), tuple(probs)


def curve_quantile(curve: Curve, probability: float) -> float:
    """Earliest year at which the curve reaches ``probability`` (inf if it never does)."""
    years, probs = curve
    if probability <= 0.0:
        return years[0]
    index = bisect.bisect_left(probs, probability)
    if index >= len(probs):
        return math.inf
    lo_year, hi_year = years[index - 1], years[index]
    lo_p, hi_p = probs[index - 1], probs[index]
    if hi_p <= lo_p:
        return hi_year
    return lo_year + (probability - lo_p) * (hi_year - lo_year) / (hi_p - lo_p)


@dataclass(frozen=True)
class ThreatProfile:
    """What the user assumes about CRQC arrival, and how much risk they accept."""

    name: str
    """Short identifier (survey-2025-upper, what-if-2035 ...)."""
    description: str
    """One line for reports."""
    source: str
    """Where the distribution comes from (title, publisher and date), or 'user what-if'."""
    risk_tolerance: float
    """Accepted probability that data is exposed; z is read at this quantile."""
    reference_task: str
    """The task the distribution refers to (RSA-2048 factored within 24 hours)."""
    reference_year: float
    """Decimal year from which the distribution's horizons count."""
    points: tuple[tuple[float, float], ...]
    """The central curve at the survey's horizons: (decimal year, cumulative probability),
    increasing in year, never decreasing in probability; linear in between, the cautious
    tail after the last one."""
    crqc_year: int | None = None
    """Deterministic what-if: every Shor-attackable algorithm falls on 1 January of this year."""
    per_algorithm_arrival: bool = True
    """Whether algorithms get their own arrival from resource estimates."""
    caveat: str = ""
    """Caveat about the source to repeat in every report."""
    qubit_doubling_years: float | None = None
    """Years for usable qubits to double, when the profile overrides the hardware file."""
    optimistic: tuple[tuple[float, float], ...] = ()
    """The survey's optimistic end at the same horizons; empty when the profile has no band."""
    pessimistic: tuple[tuple[float, float], ...] = ()
    """The survey's pessimistic end at the same horizons; empty when the profile has no band."""
    central_position: float = 1.0
    """Where the central curve sits in the band: 0 the optimistic end, 1 the pessimistic end."""
    row_flags: tuple[str, ...] = ()
    """Verification flag of each survey row (V, V2, M), in order."""
    tail_end_years: float | None = None
    """Years after the reference date at which the tail reaches 1 (None: the last interval's
    rate decides)."""
    priority: PriorityWeights = field(default_factory=PriorityWeights)
    """Points that order systems of the same verdict (docs/method.md, "Ranking")."""

    @property
    def deterministic(self) -> bool:
        """True for a crqc_year what-if."""
        return self.crqc_year is not None

    @property
    def has_band(self) -> bool:
        """True when the survey gives a range (two ends) to sample between."""
        return bool(self.optimistic) and self.optimistic != self.pessimistic

    @cached_property
    def band_curves(self) -> tuple[Curve, Curve]:
        """(optimistic, pessimistic) CDFs with their tails; both the central curve without a band."""
        start = self.reference_year
        low_points = self.optimistic or self.points
        high_points = self.pessimistic or self.points
        low_end = tail_end(low_points, start, self.tail_end_years)
        high_end = tail_end(high_points, start, self.tail_end_years)
        if low_end is not None and high_end is not None:
            high_end = min(high_end, low_end)  # keeps the pessimistic end above the optimistic
        return make_curve(low_points, start, low_end), make_curve(high_points, start, high_end)

    @cached_property
    def central_curve(self) -> Curve:
        """The central CDF with its tail (a blend of the band's ends when there is a band)."""
        if not self.optimistic:
            return make_curve(self.points, self.reference_year,
                              tail_end(self.points, self.reference_year, self.tail_end_years))
        low, high = self.band_curves
        return blend(low, high, self.central_position)

    @cached_property
    def tail_end_year(self) -> float | None:
        """Decimal year at which the central curve reaches probability 1, if it has a tail."""
        if self.crqc_year is not None or not self.points or self.points[-1][1] >= 1.0:
            return None
        year = curve_quantile(self.central_curve, 1.0)
        return None if math.isinf(year) else year

    def cdf(self, year: float) -> float:
        """Unconditioned P(reference arrival < year) on the central curve (tail included)."""
        if self.crqc_year is not None:
            # Strict: Mosca's x + y > z, so data that must hold exactly until z is not exposed.
            return 1.0 if year > self.crqc_year else 0.0
        return curve_at(self.central_curve, year)

    def arrival_probability(self, year: float, as_of: float, shift_years: float = 0.0) -> float:
        """P(the algorithm falls before ``year``), with no CRQC by ``as_of``.

        The algorithm falls at max(T + shift, as_of), T the reference arrival: the probability
        the distribution placed before the as-of date is held at the as-of date, never
        renormalised over later years (one shared arrival, conditioned once).
        """
        if math.isinf(shift_years) or year <= as_of:
            return 0.0
        return self.cdf(year - shift_years)

    def quantile(self, probability: float, as_of: float, shift_years: float = 0.0) -> float:
        """Earliest decimal year at which the algorithm has fallen with ``probability``.

        max(as_of, F^-1(probability) + shift); math.inf beyond the planning horizon.
        """
        if math.isinf(shift_years):
            return math.inf
        if self.crqc_year is not None:
            return max(float(self.crqc_year) + shift_years, as_of)
        year = curve_quantile(self.central_curve, probability)
        return max(year + shift_years, as_of)
