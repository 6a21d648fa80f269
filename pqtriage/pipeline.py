"""Wire sources, catalog, profile and arrival model into one triage run.

The CLI calls these; tests call them too. Reading files happens here and in
the sources; the model stays pure.
"""

from __future__ import annotations

import datetime as dt

from pqtriage.errors import UsageError
from pqtriage.model.arrival import ArrivalModel, SharedArrival
from pqtriage.model.profile import ThreatProfile
from pqtriage.model.triage import triage
from pqtriage.model.verdict import TriageResult


AS_OF_RANGE = (dt.date(1970, 1, 1), dt.date(2199, 12, 31))
"""Dates --as-of accepts: beyond them arrival years and start dates leave the calendar."""


def parse_as_of(text: str | None) -> dt.date:
    """The --as-of date, or today."""
    if text is None:
        return dt.date.today()
    try:
        date = dt.date.fromisoformat(text)
    except ValueError as exc:
        raise UsageError(f"--as-of {text!r} is not a date", hint="write YYYY-MM-DD") from exc
    if not AS_OF_RANGE[0] <= date <= AS_OF_RANGE[1]:
        raise UsageError(f"--as-of {text} is outside {AS_OF_RANGE[0].year}-{AS_OF_RANGE[1].year}",
                         hint="give a date within the planning range")
    return date


def arrival_model_for(profile: ThreatProfile) -> ArrivalModel:
    """Per-algorithm arrivals from resource estimates when the profile asks for them."""
    if not profile.per_algorithm_arrival:
        return SharedArrival()
    from pqtriage.threat.arrival import ResourceArrivalModel

    return ResourceArrivalModel(doubling_years=profile.qubit_doubling_years)


def run_triage(inventory_path: str, profile_name: str | None, as_of: dt.date) -> TriageResult:
    """Load the inventory and profile, then triage."""
    from pqtriage.catalog import load_catalog
    from pqtriage.sources.loading import load_inventory
    from pqtriage.sources.profile_file import load_profile

    inventory = load_inventory(inventory_path)
    profile = load_profile(profile_name)
    return triage(inventory, load_catalog(), profile, arrival_model_for(profile), as_of)
