"""Priority points: the documented rule that orders systems of the same verdict.

Verdicts come first (classically-broken, exposed, unassessed, within-margin, quantum-resistant).
Within a verdict, a system's priority is a sum of points a person can redo by hand:

- probability: the exposure probability as shown, in whole percent, times ``per_percent``;
- time: the years past the latest safe date (minus the margin, rounded to whole years, halves up,
  capped at ``time_cap_years`` either way), times ``per_year_overdue``: an overdue system gains,
  one with years of margin loses; no quantum deadline gives 0;
- criticality: points by the business criticality (critical, high, medium, low);
- interception: points by the exposure of its traffic (internet, partner, internal, isolated).

More points rank first; equal points fall back to the probability shown, then the margin shown
(one decimal), then criticality, exposure and the system id. No hidden decimal decides: every
compared value is the one the outputs display. The weights are part of the threat profile
(``priority:`` in a profile file); the defaults below are those of the shipped profiles.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

CRITICALITY_POINTS: tuple[tuple[str, float], ...] = (
    ("critical", 30.0), ("high", 20.0), ("medium", 10.0), ("low", 0.0),
)
INTERCEPTION_POINTS: tuple[tuple[str, float], ...] = (
    ("internet", 20.0), ("partner", 10.0), ("internal", 5.0), ("isolated", 0.0),
)


@dataclass(frozen=True)
class PriorityWeights:
    """How many points each factor gives (configurable in the threat profile)."""

    per_percent: float = 1.0
    """Points per whole percent of exposure probability shown."""
    per_year_overdue: float = 1.0
    """Points per whole year past the latest safe date (negative per year of margin)."""
    time_cap_years: float = 30.0
    """Years beyond which the time factor stops growing (either way)."""
    criticality: tuple[tuple[str, float], ...] = CRITICALITY_POINTS
    """Points per criticality value."""
    interception: tuple[tuple[str, float], ...] = INTERCEPTION_POINTS
    """Points per exposure value (how reachable the traffic is to an interceptor)."""

    def criticality_points(self, value: str) -> float:
        """Points of a criticality value."""
        return dict(self.criticality)[value]

    def interception_points(self, value: str) -> float:
        """Points of an exposure value."""
        return dict(self.interception)[value]


@dataclass(frozen=True)
class PriorityPart:
    """One factor of a priority."""

    factor: str
    """probability, time, criticality or interception."""
    shown: str
    """The factor's value as outputs show it: '93%', '28 years overdue', 'critical', 'internet'."""
    points: float
    """Points it contributes."""


@dataclass(frozen=True)
class Priority:
    """A system's priority points and how they add up."""

    points: float
    """The sum of the parts."""
    parts: tuple[PriorityPart, ...]
    """probability, time, criticality, interception (in that order)."""
    probability_shown: int | None
    """Exposure probability in whole percent, as displayed (None when not assessed)."""
    margin_shown: float | None
    """Margin in years to one decimal, as displayed (None when there is no quantum deadline)."""

    def part(self, factor: str) -> PriorityPart:
        """The part of one factor."""
        return next(p for p in self.parts if p.factor == factor)

    def text(self) -> str:
        """'151 = 93 (P 93%) + 28 (28 years overdue) + 30 (critical) + 0 (isolated)'."""
        terms = " + ".join(f"{p.points:g} ({p.shown})" for p in self.parts).replace("+ -", "- ")
        return f"{self.points:g} = {terms}"


def shown_percent(probability: float | None) -> int | None:
    """The probability as outputs show it, in whole percent (halves up)."""
    if probability is None:
        return None
    return math.floor(probability * 100 + 0.5)


def shown_margin(margin: float | None) -> float | None:
    """The margin as outputs show it: formatted to one decimal, exactly as the reports print it."""
    if margin is None or not math.isfinite(margin):
        return None
    return float(f"{margin:.1f}")


def whole_years(years: float) -> int:
    """Years rounded to a whole number, halves up."""
    return math.floor(years + 0.5)


def priority_of(
    weights: PriorityWeights,
    probability: float | None,
    margin: float | None,
    criticality: str,
    exposure: str,
) -> Priority:
    """The priority points of one system from its deciding use and its own facts."""
    percent = shown_percent(probability)
    parts = [PriorityPart("probability", "not assessed" if percent is None else f"P {percent}%",
                          weights.per_percent * (percent or 0))]
    margin_text = shown_margin(margin)
    if margin_text is None:
        parts.append(PriorityPart("time", "no quantum deadline", 0.0))
    else:
        overdue = max(-weights.time_cap_years, min(weights.time_cap_years, whole_years(-margin_text)))
        if overdue > 0:
            shown = f"{overdue:g} years overdue"
        elif overdue < 0:
            shown = f"{-overdue:g} years of margin"
        else:
            shown = "on the deadline"
        parts.append(PriorityPart("time", shown, weights.per_year_overdue * overdue))
    parts.append(PriorityPart("criticality", criticality, weights.criticality_points(criticality)))
    parts.append(PriorityPart("interception", exposure, weights.interception_points(exposure)))
    total = sum(p.points for p in parts)
    return Priority(points=total, parts=tuple(parts), probability_shown=percent, margin_shown=margin_text)
