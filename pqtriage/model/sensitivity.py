"""Sensitivity: which systems change verdict if the CRQC arrives N years earlier or later."""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.model.arrival_model import ArrivalModel
from pqtriage.model.inventory import Inventory
from pqtriage.model.mosca import use_verdict
from pqtriage.model.profile import ThreatProfile
from pqtriage.model.triage import Resolver
from pqtriage.model.verdict import SEVERITY, TriageResult, Verdict

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
class Sensitivity:
    """The systems that change verdict within the shifts tried."""

    shifts: tuple[int, ...]
    """Shifts tried, in years."""
    rows: tuple[SensitivityRow, ...]
    """Only systems whose verdict changes under some shift, in baseline rank order."""
    unchanged: int
    """Number of systems whose verdict holds under every shift."""


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

    Uses the baseline's catalog resolutions; only verdicts are recomputed (same rules as
    triage: a system's verdict is its weakest use's).
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
            verdicts[item.system.id] = max(
                (use_verdict(u.use, item.system, u.spec, profile, moved, as_of) for u in item.uses),
                key=lambda v: SEVERITY[v],
            )
        runs[shift] = verdicts
    rows = []
    unchanged = 0
    for item in baseline.items:
        moved_verdicts = tuple((shift, runs[shift][item.system.id]) for shift in shifts)
        if any(v != item.verdict for _, v in moved_verdicts):
            rows.append(SensitivityRow(item.system.id, item.verdict, moved_verdicts))
        else:
            unchanged += 1
    return Sensitivity(shifts=shifts, rows=tuple(rows), unchanged=unchanged)
