"""Sensitivity: which systems change verdict if the CRQC arrives N years earlier or later."""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.model.arrival_model import ArrivalModel
from pqtriage.model.inventory import Inventory
from pqtriage.model.mosca import use_verdict
from pqtriage.model.profile import ThreatProfile
from pqtriage.model.triage import Resolver, system_verdict
from pqtriage.model.verdict import TriageResult, UseAssessment, Verdict

DEFAULT_SHIFTS: tuple[int, ...] = (-5, -3, -1, 1, 3, 5)
"""Years earlier (negative) or later (positive) the CRQC is assumed to arrive."""


class ShiftedArrival:
    """Another arrival model moved by a fixed number of years."""

    def __init__(self, base: ArrivalModel, delta_years: float):
        self.base = base
        self.delta_years = delta_years
        self.name = f"{base.name}, moved {delta_years:+g} years"

    def shift_years(self, spec: AlgorithmSpec) -> float:
        return self.base.shift_years(spec) + self.delta_years


@dataclass(frozen=True)
class SensitivityRow:
    """One system whose verdict depends on when the CRQC arrives."""

    system_id: str
    """The system."""
    baseline: Verdict
    """Its verdict under the profile as given."""
    by_shift: tuple[tuple[int, Verdict], ...]
    """(years moved, verdict) for each shift tried."""


@dataclass(frozen=True)
class BandFlip:
    """A system whose verdict differs at one end of the uncertainty band."""

    system_id: str
    """The system."""
    central: Verdict
    """Its verdict at the central values (the one reported and ranked)."""
    optimistic: Verdict
    """Its verdict with every use at the low end of its P(exposed) band."""
    pessimistic: Verdict
    """Its verdict with every use at the high end of its P(exposed) band."""


@dataclass(frozen=True)
class Sensitivity:
    """The systems that change verdict within the shifts tried, and inside the band."""

    shifts: tuple[int, ...]
    """Shifts tried, in years."""
    rows: tuple[SensitivityRow, ...]
    """Only systems whose verdict changes under some shift, in baseline rank order."""
    unchanged: int
    """Number of systems whose verdict holds under every shift."""
    band_flips: tuple[BandFlip, ...] = ()
    """Systems whose verdict flips inside the 10-90 % band, in baseline rank order."""
    band_checked: bool = False
    """Whether the result carried bands (False: no band flip could be looked for)."""


def _verdict_at(use: UseAssessment, probability: float, tolerance: float) -> Verdict:
    """A use's verdict if its P(exposed) were ``probability`` (same rule as triage: P > tolerance)."""
    if use.band is None:
        return use.verdict
    if probability > tolerance:
        return Verdict.EXPOSED
    if use.verdict == Verdict.QUANTUM_RESISTANT and probability == 0.0:
        return Verdict.QUANTUM_RESISTANT
    return Verdict.WITHIN_MARGIN


def band_flips(result: TriageResult) -> tuple[BandFlip, ...]:
    """Systems whose verdict at either end of their uses' P bands differs from the central one.

    A system's verdict follows triage's rule (its weakest in-use use; an offered classically-broken
    use breaks it), at each end alike: all uses at their optimistic
    end, or all at their pessimistic end (the band's samples move every algorithm together).
    """
    tolerance = result.profile.risk_tolerance
    flips = []
    for item in result.items:
        if not item.uses or not any(u.band is not None for u in item.uses):
            continue
        ends = []
        for pick in (0, 1):
            verdicts = [
                _verdict_at(u, (u.band.exposure_probability.low, u.band.exposure_probability.high)[pick]
                            if u.band is not None else 0.0, tolerance)
                for u in item.uses
            ]
            ends.append(system_verdict([(u.use.role, v) for u, v in zip(item.uses, verdicts, strict=True)]))
        if ends[0] != item.verdict or ends[1] != item.verdict:
            flips.append(BandFlip(item.system.id, item.verdict, ends[0], ends[1]))
    return tuple(flips)


def sensitivity(
    baseline: TriageResult,
    inventory: Inventory,
    catalog: Resolver,
    profile: ThreatProfile,
    arrival: ArrivalModel,
    as_of: dt.date,
    shifts: tuple[int, ...] = DEFAULT_SHIFTS,
) -> Sensitivity:
    """Re-evaluate every use with the arrival moved by each shift and collect verdict changes.

    Uses the baseline's catalog resolutions and classical statuses; only verdicts are
    recomputed (same rules as triage: the weakest in-use use decides, an offered
    classically-broken use breaks the system).
    """
    del inventory, catalog  # the baseline already holds both, resolved
    runs: dict[int, dict[str, Verdict]] = {}
    for shift in shifts:
        moved = ShiftedArrival(arrival, shift)
        verdicts: dict[str, Verdict] = {}
        for item in baseline.items:
            if not item.uses:
                verdicts[item.system.id] = Verdict.UNASSESSED
                continue
            verdicts[item.system.id] = system_verdict([
                (u.use.role, use_verdict(u, item.system, profile, moved, as_of)) for u in item.uses
            ])
        runs[shift] = verdicts
    rows = []
    unchanged = 0
    for item in baseline.items:
        moved_verdicts = tuple((shift, runs[shift][item.system.id]) for shift in shifts)
        if any(v != item.verdict for _, v in moved_verdicts):
            rows.append(SensitivityRow(item.system.id, item.verdict, moved_verdicts))
        else:
            unchanged += 1
    checked = baseline.band is not None
    return Sensitivity(shifts=shifts, rows=tuple(rows), unchanged=unchanged,
                       band_flips=band_flips(baseline) if checked else (), band_checked=checked)
