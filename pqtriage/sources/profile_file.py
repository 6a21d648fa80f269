"""Read threat profiles: shipped ones by name, or a user's YAML file."""

from __future__ import annotations

import datetime as dt
import difflib
import math
from importlib import resources
from pathlib import Path

from pqtriage.errors import Place, ProfileError
from pqtriage.model.inventory import Criticality, Exposure
from pqtriage.model.priority import PriorityWeights
from pqtriage.model.profile import ThreatProfile, decimal_year
from pqtriage.yamlio import Node, decode_text, load_yaml

DEFAULT_PROFILE = "survey-2025-upper"
"""The cautious end of the 2025 expert survey: the defender's choice."""
DEFAULT_RISK_TOLERANCE = 0.10
REFERENCE_DATE_RANGE = (dt.date(1970, 1, 1), dt.date(2199, 12, 31))
"""Dates a profile's reference_date may have: the range --as-of accepts, so that the
reference date plus an arrival horizon (at most 200 years) stays within the calendar."""
"""Used when a profile does not set risk_tolerance."""

_FIELDS = {
    "name", "description", "source", "caveat", "reference_task", "reference_date", "arrival",
    "risk_tolerance", "per_algorithm_arrival", "crqc_year", "qubit_doubling_years", "central",
    "tail", "tail_end_years", "priority",
}
_PRIORITY_FIELDS = {"per_percent", "per_year_overdue", "time_cap_years", "criticality", "interception"}
_TAILS = ("last-interval-rate",)
"""Tail rules beyond the survey's last horizon (docs/threat-model.md section 4)."""
_FLAGS = ("V", "V2", "M")


def shipped_profiles() -> list[str]:
    """Names of the profiles shipped with pqtriage."""
    folder = resources.files("pqtriage") / "data" / "profiles"
    return sorted(p.name.removesuffix(".yaml") for p in folder.iterdir() if p.name.endswith(".yaml"))


def load_profile(name_or_path: str | None) -> ThreatProfile:
    """Load a shipped profile by name, or a profile file by path (default profile if None)."""
    name = name_or_path or DEFAULT_PROFILE
    if name in shipped_profiles():
        path = resources.files("pqtriage") / "data" / "profiles" / f"{name}.yaml"
        return parse_profile(path.read_bytes(), f"<shipped profile {name}>")
    file = Path(name)
    if not file.exists():
        close = difflib.get_close_matches(name, shipped_profiles(), n=1)
        hint = f"did you mean '{close[0]}'?" if close else f"shipped profiles: {', '.join(shipped_profiles())}"
        raise ProfileError("no such profile file or shipped profile", place=Place(name), hint=hint)
    try:
        data = file.read_bytes()
    except OSError as exc:
        raise ProfileError(f"cannot read: {exc.strerror}", place=Place(name)) from exc
    return parse_profile(data, name)


def _fail(path: str, node: Node, message: str, hint: str | None = None) -> ProfileError:
    line = node.key_line or node.line
    column = node.key_column or node.column
    return ProfileError(message, place=Place(path, line, column), hint=hint)


def _number(path: str, node: Node, label: str, low: float, high: float) -> float:
    value = node.value
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise _fail(path, node, f"'{label}' must be a number", "write digits without quotes")
    if not low <= value <= high:
        raise _fail(path, node, f"'{label}' is {value}, outside {low:g}..{high:g}")
    return float(value)


def _text(path: str, raw: dict[str, Node], key: str, default: str) -> str:
    if key not in raw:
        return default
    value = raw[key].value
    if not isinstance(value, str):
        raise _fail(path, raw[key], f"'{key}' must be text")
    return " ".join(value.split())


def _points(path: str, node: Node, label: str, names: tuple[str, ...],
            default: tuple[tuple[str, float], ...]) -> tuple[tuple[str, float], ...]:
    if not isinstance(node.value, dict):
        raise _fail(path, node, f"'{label}' must map {', '.join(names)} to points")
    given = dict(default)
    for key, child in node.value.items():
        if key not in names:
            raise _fail(path, child, f"unknown {label} value '{key}'", f"use {', '.join(names)}")
        given[key] = _number(path, child, f"{label}.{key}", -1000, 1000)
    return tuple((name, given[name]) for name in names)


def _priority(path: str, node: Node) -> PriorityWeights:
    """The ``priority:`` section: points per factor (docs/method.md, "Ranking")."""
    if not isinstance(node.value, dict):
        raise _fail(path, node, "'priority' must be a mapping", f"fields: {', '.join(sorted(_PRIORITY_FIELDS))}")
    raw: dict[str, Node] = node.value
    for key, child in raw.items():
        if key not in _PRIORITY_FIELDS:
            close = difflib.get_close_matches(key, sorted(_PRIORITY_FIELDS), n=1)
            raise _fail(path, child, f"unknown field '{key}' in 'priority'",
                        f"did you mean '{close[0]}'?" if close else None)
    base = PriorityWeights()
    return PriorityWeights(
        per_percent=_number(path, raw["per_percent"], "per_percent", 0, 1000)
        if "per_percent" in raw else base.per_percent,
        per_year_overdue=_number(path, raw["per_year_overdue"], "per_year_overdue", 0, 1000)
        if "per_year_overdue" in raw else base.per_year_overdue,
        time_cap_years=_number(path, raw["time_cap_years"], "time_cap_years", 0, 200)
        if "time_cap_years" in raw else base.time_cap_years,
        criticality=_points(path, raw["criticality"], "criticality", tuple(c.value for c in Criticality),
                            base.criticality) if "criticality" in raw else base.criticality,
        interception=_points(path, raw["interception"], "interception", tuple(e.value for e in Exposure),
                             base.interception) if "interception" in raw else base.interception,
    )


def parse_profile(data: bytes, path: str) -> ThreatProfile:
    """Validate a profile document. A file holding only ``crqc_year: 2035`` is valid."""
    root = load_yaml(decode_text(data, path, ProfileError), path, ProfileError)
    if root is None or not isinstance(root.value, dict):
        raise ProfileError("a profile must be a mapping", place=Place(path, 1, 1),
                           hint="for a what-if write 'crqc_year: 2035'")
    raw: dict[str, Node] = root.value
    for key, node in raw.items():
        if key not in _FIELDS:
            close = difflib.get_close_matches(key, sorted(_FIELDS), n=1)
            raise _fail(path, node, f"unknown field '{key}' in the profile",
                        f"did you mean '{close[0]}'?" if close else None)
    tolerance = DEFAULT_RISK_TOLERANCE
    if "risk_tolerance" in raw:
        tolerance = _number(path, raw["risk_tolerance"], "risk_tolerance", 0.0001, 0.9999)
    doubling = None
    if "qubit_doubling_years" in raw:
        doubling = _number(path, raw["qubit_doubling_years"], "qubit_doubling_years", 0.1, 50)
    priority = _priority(path, raw["priority"]) if "priority" in raw else PriorityWeights()
    per_algorithm = False
    if "per_algorithm_arrival" in raw:
        if not isinstance(raw["per_algorithm_arrival"].value, bool):
            raise _fail(path, raw["per_algorithm_arrival"], "'per_algorithm_arrival' must be true or false")
        per_algorithm = bool(raw["per_algorithm_arrival"].value)

    if "crqc_year" in raw:
        if "arrival" in raw:
            raise _fail(path, raw["crqc_year"], "a profile has either 'crqc_year' or 'arrival', not both")
        node = raw["crqc_year"]
        if isinstance(node.value, bool) or not isinstance(node.value, int) or not 2000 <= node.value <= 2200:
            raise _fail(path, node, "'crqc_year' must be a year between 2000 and 2200")
        year = int(node.value)
        return ThreatProfile(
            name=_text(path, raw, "name", f"what-if-crqc-{year}"),
            description=_text(path, raw, "description",
                              f"Deterministic what-if: a CRQC breaks Shor-attackable algorithms on 1 January {year}."),
            source=_text(path, raw, "source", "user what-if (no distribution)"),
            risk_tolerance=tolerance,
            reference_task=_text(path, raw, "reference_task", "RSA-2048 factored within about a day"),
            reference_year=float(year),
            points=((float(year), 1.0),),
            crqc_year=year,
            per_algorithm_arrival=per_algorithm,
            caveat=_text(path, raw, "caveat", ""),
            qubit_doubling_years=doubling,
            priority=priority,
        )

    if "arrival" not in raw or "reference_date" not in raw:
        raise ProfileError("a profile needs 'crqc_year', or 'reference_date' and 'arrival'",
                           place=Place(path, 1, 1), hint="see docs/method.md for the profile format")
    date_node = raw["reference_date"]
    try:
        reference = dt.date.fromisoformat(str(date_node.value))
    except ValueError as exc:
        raise _fail(path, date_node, "'reference_date' must be a date YYYY-MM-DD") from exc
    if not REFERENCE_DATE_RANGE[0] <= reference <= REFERENCE_DATE_RANGE[1]:
        earliest, latest = REFERENCE_DATE_RANGE
        raise _fail(path, date_node, f"'reference_date' {reference} is outside {earliest} to {latest}",
                    "give the date the survey or estimate was published; later dates leave the "
                    "calendar once arrival horizons (up to 200 years) are added")
    arrival = raw["arrival"]
    if not isinstance(arrival.value, list) or not arrival.value:
        raise _fail(path, arrival, "'arrival' must be a non-empty list of {within_years, probability}",
                    "or {within_years, optimistic, pessimistic} for a survey that gives a range")
    start = decimal_year(reference)
    lows: list[tuple[float, float]] = []
    highs: list[tuple[float, float]] = []
    flags: list[str] = []
    banded: bool | None = None
    last_years, last_low, last_high = 0.0, 0.0, 0.0
    for item in arrival.value:
        entry = item.value if isinstance(item.value, dict) else None
        keys = set(entry or ())
        single = {"within_years", "probability"}
        double = {"within_years", "optimistic", "pessimistic"}
        if entry is None or keys - {"flag"} not in (single, double):
            raise _fail(path, item, "each arrival entry needs 'within_years' and either 'probability' "
                        "or both 'optimistic' and 'pessimistic' (and may have 'flag')")
        has_band = "optimistic" in keys
        if banded is not None and has_band != banded:
            raise _fail(path, item, "every arrival entry must have the same form",
                        "give 'probability' everywhere, or 'optimistic' and 'pessimistic' everywhere")
        banded = has_band
        years = _number(path, entry["within_years"], "within_years", 0.01, 200)
        if has_band:
            low = _number(path, entry["optimistic"], "optimistic", 0.0, 1.0)
            high = _number(path, entry["pessimistic"], "pessimistic", 0.0, 1.0)
            if low > high:
                raise _fail(path, item, f"'optimistic' {low:g} is above 'pessimistic' {high:g}",
                            "the optimistic end gives the lower probability")
        else:
            low = high = _number(path, entry["probability"], "probability", 0.0, 1.0)
        if years <= last_years or low < last_low or high < last_high:
            raise _fail(path, item, "arrival entries must increase in years and never decrease in probability")
        if "flag" in entry:
            flag = entry["flag"].value
            if flag not in _FLAGS:
                raise _fail(path, entry["flag"], f"'flag' must be one of {', '.join(_FLAGS)}")
            flags.append(str(flag))
        lows.append((start + years, low))
        highs.append((start + years, high))
        last_years, last_low, last_high = years, low, high
    position = 1.0
    if "central" in raw:
        node = raw["central"]
        if node.value == "pessimistic":
            position = 1.0
        elif node.value == "optimistic":
            position = 0.0
        elif isinstance(node.value, (int, float)) and not isinstance(node.value, bool) and 0 <= node.value <= 1:
            position = float(node.value)
        else:
            raise _fail(path, node, "'central' must be pessimistic, optimistic or a number from 0 to 1",
                        "0 is the optimistic end, 1 the pessimistic end")
        if not banded:
            raise _fail(path, node, "'central' needs arrival entries with 'optimistic' and 'pessimistic'")
    points = [(y, lo + position * (hi - lo)) for (y, lo), (_, hi) in zip(lows, highs, strict=True)]
    if "tail" in raw and raw["tail"].value not in _TAILS:
        raise _fail(path, raw["tail"], f"unknown tail rule {raw['tail'].value!r}",
                    f"use {', '.join(_TAILS)} or give tail_end_years")
    tail_years = None
    if "tail_end_years" in raw:
        tail_years = _number(path, raw["tail_end_years"], "tail_end_years", 0.01, 100)
        if tail_years <= last_years:
            raise _fail(path, raw["tail_end_years"],
                        f"'tail_end_years' must be after the last horizon ({last_years:g} years)")
    return ThreatProfile(
        name=_text(path, raw, "name", Path(path).stem),
        description=_text(path, raw, "description", "user-supplied arrival distribution"),
        source=_text(path, raw, "source", "user-supplied (no source given)"),
        risk_tolerance=tolerance,
        reference_task=_text(path, raw, "reference_task", "RSA-2048 factored within about a day"),
        reference_year=start,
        points=tuple(points),
        crqc_year=None,
        per_algorithm_arrival=per_algorithm,
        caveat=_text(path, raw, "caveat", ""),
        qubit_doubling_years=doubling,
        optimistic=tuple(lows) if banded else (),
        pessimistic=tuple(highs) if banded else (),
        central_position=position,
        row_flags=tuple(flags),
        tail_end_years=tail_years,
        priority=priority,
    )
