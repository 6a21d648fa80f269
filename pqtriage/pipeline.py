"""Wire sources, catalog, profile and arrival model into one triage run.

The CLI calls these; tests call them too. Reading files happens here and in
the sources; the model stays pure.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from typing import Any

from pqtriage.errors import UsageError
from pqtriage.model.arrival_model import ArrivalModel, SharedArrival
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


def arrival_model_for(
    profile: ThreatProfile, as_of: dt.date | None = None, hardware: Any = None, design: Any = None
) -> ArrivalModel:
    """Per-algorithm arrivals from resource estimates when the profile asks for them.

    With ``as_of`` the model also carries the profile, so each arrival explanation has the
    years the algorithm falls (median and at the profile's risk tolerance). ``hardware`` is a
    pqtriage.threat.hardware.Hardware (the shipped file when None); a profile's own
    ``qubit_doubling_years`` overrides the file's.
    """
    if not profile.per_algorithm_arrival:
        return SharedArrival()
    from pqtriage.model.profile import decimal_year
    from pqtriage.threat.resource_arrival import ResourceArrivalModel

    if hardware is None:
        from pqtriage.sources.hardware_file import shipped_hardware

        hardware = shipped_hardware()
    params = hardware.parameters(doubling_years=profile.qubit_doubling_years)
    if as_of is None:
        return ResourceArrivalModel(params=params)
    return ResourceArrivalModel(params=params, profile=profile, as_of_year=decimal_year(as_of),
                                design=design)


def band_for(profile: ThreatProfile, arrival: ArrivalModel, hardware: Any) -> Any:
    """The uncertainty band of a run: the sample design, its evaluator and what it sampled."""
    from pqtriage.model.band import BandSummary, make_design
    from pqtriage.model.band_evaluation import band_evaluator

    settings = hardware.band_settings(profile.qubit_doubling_years)
    design = make_design(settings, profile.central_position, profile.has_band)
    survey = ""
    if profile.has_band:
        survey = (f"survey position between the optimistic and pessimistic ends of "
                  f"'{profile.name}' (central at {profile.central_position:g})")
    methods: list[str] = []
    candidates = getattr(arrival, "candidates", None)
    if candidates is not None:
        for family in ("factoring", "finite-field-dlog", "elliptic-curve-dlog"):
            chosen = [m.id for m in candidates(family)]
            others = f" (band also: {', '.join(chosen[1:])})" if len(chosen) > 1 else ""
            methods.append(f"{family} {chosen[0]}{others}")
    summary = BandSummary(settings.samples, settings.seed, survey,
                          (settings.doubling_low, settings.doubling_years, settings.doubling_high),
                          tuple(methods))
    return design, band_evaluator(profile, arrival, design, summary)


def run_triage(
    inventory_path: str, profile_name: str | None, as_of: dt.date, cbom_defaults: str | None = None,
    hardware_path: str | None = None,
    columns: str | None = None,
) -> TriageResult:
    """Load the inventory, profile and hardware file, then triage."""
    return prepare(inventory_path, profile_name, as_of, cbom_defaults, hardware_path, columns).result


@dataclass(frozen=True)
class TriageRun:
    """A triage result with the parts that produced it (for sensitivity and planning)."""

    result: TriageResult
    """The ranked result."""
    catalog: Any
    """The catalog used."""
    arrival: ArrivalModel
    """The arrival model used."""

    def sensitivity(self, shifts: tuple[int, ...] | None = None) -> Any:
        """Which systems change verdict if the CRQC arrives earlier or later."""
        from pqtriage.model.sensitivity import DEFAULT_SHIFTS, sensitivity

        r = self.result
        return sensitivity(r, r.inventory, self.catalog, r.profile, self.arrival, r.as_of,
                           shifts or DEFAULT_SHIFTS)  # band flips come from the result's bands

    def plan(self, policy_ids: tuple[str, ...] = (), capacity: str | None = None) -> Any:
        """Build the migration plan for this result."""
        from pqtriage.plan.candidates import candidates_from_triage
        from pqtriage.plan.planner import DEFAULT_SETTINGS, build_plan
        from pqtriage.plan.policies import select_policies
        from pqtriage.plan.scheduler import parse_capacity

        policies = select_policies(policy_ids, self.result.inventory.policies)
        return build_plan(candidates_from_triage(self.result), self.result.as_of, policies,
                          parse_capacity(capacity), DEFAULT_SETTINGS)


def use_check(catalog: Any) -> Any:
    """The check every inventory read for triage goes through: algorithm and curve names
    one or two keystrokes from a known one are errors; unknown names far from any are warnings."""
    from pqtriage.catalog.typos import name_problem
    from pqtriage.sources.interface import FieldProblem

    found: dict[tuple[Any, ...], list[FieldProblem]] = {}

    def check(use: Any) -> list[FieldProblem]:
        key = (use.algorithm, use.key_size, use.curve, use.parameter_set, use.purpose.value)
        known = found.get(key)
        if known is None:
            resolution = catalog.resolve(use.algorithm, key_size=use.key_size, curve=use.curve,
                                         parameter_set=use.parameter_set, purpose=use.purpose.value)
            problem = name_problem(resolution, use.algorithm, use.curve)
            known = [] if problem is None else [
                FieldProblem(problem.field, problem.message, problem.hint, problem.error)]
            found[key] = known
        return known

    return check


def load_any(inventory_path: str, cbom_defaults: str | None = None, columns: str | None = None,
             catalog: Any = None) -> Any:
    """Read an inventory in any format: YAML, CSV, a workbook (with ``--columns``), or a
    CycloneDX CBOM (with its side file of shelf-life and migration time).

    With a catalog, algorithm and curve names are checked too (see :func:`use_check`), and
    every problem is reported together.
    """
    from pqtriage.sources.loading import load_inventory, load_inventory_with_side_file

    check = use_check(catalog) if catalog is not None else None
    if cbom_defaults is None:
        return load_inventory(inventory_path, check=check, columns=columns)
    return load_inventory_with_side_file(inventory_path, cbom_defaults, check=check)


def prepare(
    inventory_path: str, profile_name: str | None, as_of: dt.date, cbom_defaults: str | None = None,
    hardware_path: str | None = None,
    columns: str | None = None,
) -> TriageRun:
    """Load the inventory (with a CBOM side file, if any), profile and hardware file, triage
    with the uncertainty band, keep the parts."""
    from pqtriage.catalog import load_catalog
    from pqtriage.sources.hardware_file import load_hardware
    from pqtriage.sources.profile_file import load_profile

    catalog = load_catalog()
    inventory = load_any(inventory_path, cbom_defaults, columns, catalog)
    profile = load_profile(profile_name)
    hardware = load_hardware(hardware_path)
    arrival, band = arrival_and_band(profile, as_of, hardware)
    return TriageRun(triage(inventory, catalog, profile, arrival, as_of, band), catalog, arrival)


def arrival_and_band(profile: ThreatProfile, as_of: dt.date, hardware: Any) -> tuple[ArrivalModel, Any]:
    """The arrival model and the uncertainty band of one run (they share one sample design)."""
    from pqtriage.model.band import make_design

    settings = hardware.band_settings(profile.qubit_doubling_years)
    design = make_design(settings, profile.central_position, profile.has_band)
    arrival = arrival_model_for(profile, as_of, hardware, design)
    _, band = band_for(profile, arrival, hardware)
    return arrival, band


def load_review(path: str, profile: str | None, as_of: Any, cbom_defaults: str | None,
                hardware_path: str | None = None, columns: str | None = None) -> Any:
    """A Review from a JSON result file, or from an inventory (YAML or CycloneDX) triaged now."""
    from pqtriage.errors import InventoryError, Place
    from pqtriage.model.diff import review_of_json, review_of_result
    from pqtriage.sources.interface import read_input
    from pqtriage.yamlio import MAX_FILE_BYTES, decode_text

    data, _ = read_input(path)
    if len(data) <= MAX_FILE_BYTES:
        text = decode_text(data, path, InventoryError)
        if text.lstrip().startswith("{") and '"schema_version"' in text and '"bomFormat"' not in text:
            from pqtriage.sources.cbom import load_json

            try:
                return review_of_json(load_json(text, path), path)
            except ValueError as exc:
                raise InventoryError(str(exc), place=Place(path),
                                     hint="give a file written by 'pqtriage triage --format json'") from exc
    from pqtriage.catalog import load_catalog
    from pqtriage.sources.hardware_file import load_hardware
    from pqtriage.sources.profile_file import load_profile

    catalog = load_catalog()
    inventory = load_any(path, cbom_defaults, columns, catalog)
    threat = load_profile(profile)
    arrival, band = arrival_and_band(threat, as_of, load_hardware(hardware_path))
    result = triage(inventory, catalog, threat, arrival, as_of, band)
    return review_of_result(result, path)
