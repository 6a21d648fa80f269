"""The uncertainty band as text, the same in every medium (plain strings, no rich).

A band is the 10-90 % range of P(exposed), z or start-by over the threat model's seeded
samples (pqtriage.model.band); the central value beside it is what verdicts and the ranking use.
"""

from __future__ import annotations

import datetime as dt
import math

from pqtriage.model.band import UseBand
from pqtriage.model.verdict import SystemAssessment, TriageResult, UseAssessment

BAND_NOTE = ("Ranges are 10-90 % bands over the threat model's seeded samples (survey range, "
             "doubling time of usable qubits, construction); the central value is what the "
             "verdict and the ranking use.")


def system_band(item: SystemAssessment) -> UseBand | None:
    """A system's band: its weakest use's."""
    return item.weakest.band if item.weakest is not None else None


def probability_range(band: UseBand | None) -> str:
    """'35-62%', or '' without a band (or one without width)."""
    if band is None or band.exposure_probability.low == band.exposure_probability.high:
        return ""
    p = band.exposure_probability
    return f"{p.low:.0%}-{p.high:.0%}".replace("%-", "-")


def year_range(band: UseBand | None) -> str:
    """'2029.5-2031.7' (z), 'beyond horizon' at an infinite end, or '' without a band (or width)."""
    if band is None or band.crqc_year.low == band.crqc_year.high:
        return ""
    z = band.crqc_year

    def one(v: float) -> str:
        return "beyond horizon" if math.isinf(v) else f"{v:.1f}"

    return f"{one(z.low)}-{one(z.high)}"


def start_range(band: UseBand | None, as_of: dt.date | None = None) -> str:
    """'2027-03-01 to 2029-06-01', ends already passed shown as 'overdue'; '' without a band,
    or when it has no width (both ends the same, both passed or both beyond the horizon)."""
    if band is None:
        return ""
    earliest, latest = band.start_by
    if earliest == latest or (as_of is not None and latest is not None and latest <= as_of):
        return ""

    def one(day: dt.date | None) -> str:
        if day is None:
            return "none"
        if as_of is not None and day <= as_of:
            return "overdue"
        return day.isoformat()

    return f"{one(earliest)} to {one(latest)}"


def band_dict(band: UseBand | None) -> dict[str, object] | None:
    """The band as a JSON-ready dict (infinite years as null with a flag)."""
    if band is None:
        return None
    z = band.crqc_year

    def year(v: float) -> float | None:
        return None if math.isinf(v) else round(v, 2)

    return {
        "exposure_probability": {"low": round(band.exposure_probability.low, 4),
                                 "high": round(band.exposure_probability.high, 4)},
        "crqc_year": {"low": year(z.low), "high": year(z.high),
                      "beyond_horizon": math.isinf(z.high)},
        "start_by": {"earliest": band.start_by[0].isoformat() if band.start_by[0] else None,
                     "latest": band.start_by[1].isoformat() if band.start_by[1] else None},
        "percentiles": [10, 90],
        "samples": band.samples,
    }


def band_assumption(result: TriageResult) -> str | None:
    """What the band sampled, for the assumptions of every output."""
    if result.band is None:
        return None
    return str(result.band.describe())  # type: ignore[attr-defined]


def use_band_text(use: UseAssessment) -> str:
    """'P 35-62%, z 2029.5-2031.7, start by 2027-03-01 to 2029-06-01' for one use."""
    if use.band is None:
        return ""
    return (f"P {probability_range(use.band)}, z {year_range(use.band)}, "
            f"start by {start_range(use.band)}")
