"""Uncertainty as ranges: a seeded, stratified Monte Carlo over what the threat model assumes.

Three things vary (docs/threat-model.md section 6):

- where the arrival curve lies in the survey's range, between its optimistic end (0) and its
  pessimistic end (1), one position per sample for every horizon;
- the doubling time of usable qubits, between the hardware file's low and high values;
- the construction: the family default, or another construction the band samples.

The design is stratified so that the central value (the profile's curve, the hardware file's
doubling time, the default construction: what verdicts and the ranking use) always lies in
the band: eight equal strata, survey side x doubling side x default or other construction,
each side of a parameter starting at its central value. Every quantity the band reports
(P(exposed), z, start-by) is monotone in the survey position and in the shift, so the one
stratum with the pessimistic side of both and the default construction (an eighth of the
samples) lies at or above the central value, and its mirror at or below it: both ends of the
10-90 % band (order statistics) enclose the central value.

Pure. The vectorised evaluation over the samples is pqtriage.model.band_evaluation (numpy).
"""

from __future__ import annotations

import datetime as dt
import math
import random
from collections.abc import Sequence
from dataclasses import dataclass

LOW_PERCENTILE = 10
"""Lower end of the reported band."""
HIGH_PERCENTILE = 90
"""Upper end of the reported band."""
STRATA = 8
"""survey side x doubling side x default or other construction."""


@dataclass(frozen=True)
class BandSettings:
    """How the band is sampled (hardware file ``monte_carlo`` and ``qubit_doubling_years``)."""

    samples: int = 256
    """Number of samples; a multiple of 8 (one equal share per stratum)."""
    seed: int = 20261202
    """Seed of the sampler: the same seed gives the same band."""
    doubling_years: float = 1.0
    """Central doubling time of usable qubits."""
    doubling_low: float = 0.8
    """Fastest doubling time sampled."""
    doubling_high: float = 1.6
    """Slowest doubling time sampled."""

    def __post_init__(self) -> None:
        if self.samples < STRATA or self.samples % STRATA:
            raise ValueError(f"samples must be a positive multiple of {STRATA}")
        if not 0 < self.doubling_low <= self.doubling_years <= self.doubling_high:
            raise ValueError("doubling range must satisfy 0 < low <= central <= high")


@dataclass(frozen=True)
class SampleDesign:
    """The samples: one survey position, doubling time and construction choice each."""

    positions: tuple[float, ...]
    """Survey position per sample: 0 the optimistic end, 1 the pessimistic end."""
    doubling_years: tuple[float, ...]
    """Doubling time per sample."""
    other_method: tuple[bool, ...]
    """True where the sample uses a construction other than the default."""
    pick: tuple[float, ...]
    """Uniform number in [0, 1) choosing among the other constructions."""
    settings: BandSettings
    """What produced the design."""
    central_position: float
    """The profile's central position."""

    @property
    def size(self) -> int:
        """Number of samples."""
        return len(self.positions)


def make_design(settings: BandSettings, central_position: float, has_band: bool = True) -> SampleDesign:
    """The stratified design for a profile whose central curve sits at ``central_position``."""
    rng = random.Random(settings.seed)
    share = settings.samples // STRATA
    positions: list[float] = []
    doubling: list[float] = []
    other: list[bool] = []
    pick: list[float] = []
    c = central_position
    log_c = math.log(settings.doubling_years)
    for stratum in range(STRATA):
        survey_up, doubling_up, use_other = bool(stratum & 1), bool(stratum & 2), bool(stratum & 4)
        for _ in range(share):
            r = rng.random()
            if not has_band:
                positions.append(c)
            elif survey_up:
                positions.append(c + (1.0 - c) * r)
            else:
                positions.append(c - c * r)
            r = rng.random()
            end = math.log(settings.doubling_high if doubling_up else settings.doubling_low)
            doubling.append(math.exp(log_c + (end - log_c) * r))
            other.append(use_other)
            pick.append(rng.random())
    return SampleDesign(tuple(positions), tuple(doubling), tuple(other), tuple(pick), settings, c)


def choose(design: SampleDesign, default: str, others: Sequence[str]) -> list[str]:
    """The construction of each sample: the default, or one of ``others`` (the default if none)."""
    if not others:
        return [default] * design.size
    return [
        others[min(len(others) - 1, int(p * len(others)))] if o else default
        for o, p in zip(design.other_method, design.pick, strict=True)
    ]


@dataclass(frozen=True)
class Band:
    """The 10th and 90th percentiles of one quantity over the samples."""

    low: float
    """10th percentile (order statistic)."""
    high: float
    """90th percentile (order statistic)."""

    def contains(self, value: float) -> bool:
        """Whether ``value`` lies in the band (ends included)."""
        return self.low <= value <= self.high

    def enclosing(self, value: float, tolerance: float = 1e-9) -> Band:
        """The band with an end moved onto ``value`` when it misses it by float rounding only
        (the central value and the samples are computed along different float paths)."""
        low = value if value < self.low <= value + tolerance else self.low
        high = value if value - tolerance <= self.high < value else self.high
        return Band(low, high)


@dataclass(frozen=True)
class UseBand:
    """The 10-90 % band of one use's P(exposed), z and start-by."""

    exposure_probability: Band
    """P(exposed) band."""
    crqc_year: Band
    """z band: decimal year the algorithm falls at the risk tolerance (inf beyond horizon)."""
    start_by: tuple[dt.date | None, dt.date | None]
    """Earliest and latest start-by date (z band - x - y); None where z is beyond the horizon."""
    samples: int
    """Number of samples behind the band."""


def order_band(values: Sequence[float]) -> Band:
    """10th and 90th percentiles as order statistics (no interpolation across infinities)."""
    ordered = sorted(float(v) for v in values)
    n = len(ordered)
    low = ordered[math.floor(LOW_PERCENTILE / 100 * (n - 1))]
    high = ordered[math.ceil(HIGH_PERCENTILE / 100 * (n - 1))]
    return Band(float(low), float(high))


@dataclass(frozen=True)
class BandSummary:
    """What the band of a run sampled, for the outputs' notes."""

    samples: int
    """Number of samples."""
    seed: int
    """Seed of the sampler."""
    survey: str
    """The survey range sampled, in words ('' when the profile gives no range)."""
    doubling: tuple[float, float, float]
    """(fastest, central, slowest) doubling time of usable qubits, years."""
    methods: tuple[str, ...]
    """Per family: 'family: central (other, other)'."""

    def describe(self) -> str:
        """One sentence for notes and legends."""
        low, central, high = self.doubling
        parts = [
            f"10-90 % band from {self.samples} seeded samples (seed {self.seed}, stratified so the "
            "central value always lies inside)",
            self.survey or "no survey range in this profile",
            f"usable-qubit doubling time {low:g} to {high:g} years (central {central:g})",
        ]
        if self.methods:
            parts.append("constructions " + "; ".join(self.methods))
        return "; ".join(parts) + ". The ranking and the verdicts use the central value."
