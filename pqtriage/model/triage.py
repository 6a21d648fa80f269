"""Triage: evaluate every use, let each system's weakest use decide, rank the systems.

The orchestrator receives its catalog, profile and arrival model as arguments,
so tests can hand it fakes. Pure: no file, console or network access.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import replace
from typing import Protocol

from pqtriage.catalog.spec import AlgorithmSpec, Resolution
from pqtriage.model.arrival_model import ArrivalModel
from pqtriage.model.inventory import CRITICALITY_ORDER, EXPOSURE_ORDER, CryptoUse, Inventory, System
from pqtriage.model.mosca import evaluate_use, evaluation_parts, x_years
from pqtriage.model.profile import ThreatProfile, decimal_year
from pqtriage.model.verdict import (
    SEVERITY,
    ArrivalUsed,
    Summary,
    SystemAssessment,
    TriageResult,
    UseAssessment,
    Verdict,
)


class Resolver(Protocol):
    """What triage needs of the catalog."""

    def resolve(
        self,
        algorithm: str,
        *,
        key_size: int | None = None,
        curve: str | None = None,
        parameter_set: str | None = None,
        purpose: str | None = None,
    ) -> Resolution:
        """Look an algorithm up (the shipped catalog also takes ``oid=``, resolved first)."""
        ...


def _resolve(catalog: Resolver, use: CryptoUse, cache: dict[tuple, Resolution]) -> Resolution:
    key = (use.algorithm, use.key_size, use.curve, use.parameter_set, use.purpose.value, use.oid)
    found = cache.get(key)
    if found is None:
        extra = {"oid": use.oid} if use.oid else {}  # a resolver without OIDs is still a Resolver
        found = catalog.resolve(
            use.algorithm,
            key_size=use.key_size,
            curve=use.curve,
            parameter_set=use.parameter_set,
            purpose=use.purpose.value,
            **extra,
        )
        cache[key] = found
    return found


class _RememberedArrival:
    """An arrival model that computes each algorithm's shift once per run (it is pure)."""

    def __init__(self, model: ArrivalModel):
        self.model = model
        self.name = model.name
        self.shifts: dict[int, tuple[AlgorithmSpec, float]] = {}

    def shift_years(self, spec: AlgorithmSpec) -> float:
        known = self.shifts.get(id(spec))
        if known is None or known[0] is not spec:
            known = (spec, self.model.shift_years(spec))  # keeps spec alive, so its id stays unique
            self.shifts[id(spec)] = known
        return known[1]


class BandSource(Protocol):
    """What triage needs of the uncertainty band (pqtriage.model.band_evaluation.BandEvaluator)."""

    summary: object
    """What the band sampled (a pqtriage.model.band.BandSummary)."""

    def use_band(self, spec: object, x: float, y: float, as_of: float) -> object:
        """The band of one use (a pqtriage.model.band.UseBand)."""
        ...


_BANDED = (Verdict.EXPOSED, Verdict.WITHIN_MARGIN, Verdict.QUANTUM_RESISTANT)


def _with_band(item: UseAssessment, system: System, band: BandSource, now: float,
               memo: dict[tuple[object, ...], object]) -> UseAssessment:
    """The use with the band of the part that decides it (quantum-attackable uses only)."""
    spec = item.deciding or item.spec
    if item.spec is None or spec is None or item.verdict not in _BANDED:
        return item
    if spec.quantum_attack not in ("shor", "grover") or spec.grover_target == "collision":
        return item
    x = item.x_years
    if item.deciding is not None:
        base, _ = x_years(item.use, system)
        x = next((part_x for part, _, part_x in evaluation_parts(item.use, system, item.spec, base)
                  if part is item.deciding), x)
    key = (id(spec), x, item.y_years, item.exposure_probability, item.crqc_year)
    found = memo.get(key)
    if found is None:
        found = band.use_band(spec, x, item.y_years, now)
        if item.exposure_probability is not None and item.crqc_year is not None:
            found = replace(  # type: ignore[type-var]
                found,
                exposure_probability=found.exposure_probability.enclosing(item.exposure_probability),  # type: ignore[attr-defined]
                crqc_year=found.crqc_year.enclosing(item.crqc_year),  # type: ignore[attr-defined]
            )
        memo[key] = found
    return replace(item, band=found)  # type: ignore[arg-type]


def use_sort_key(item: UseAssessment) -> tuple:
    """Most urgent first: severity, then exposure probability, then smaller margin."""
    margin = item.margin_years if item.margin_years is not None else math.inf
    return (-SEVERITY[item.verdict], -(item.exposure_probability or 0.0), margin)


def _assess_system(system: System, uses: tuple[UseAssessment, ...]) -> SystemAssessment:
    if not uses:
        return SystemAssessment(
            system=system, uses=(), verdict=Verdict.UNASSESSED, weakest=None,
            exposure_probability=None, margin_years=None, start_by=None, rank=0,
            reason="no cryptographic use listed: add its uses to assess it",
        )
    weakest = min(uses, key=use_sort_key)
    if weakest.verdict is Verdict.UNASSESSED:
        # Nothing computed from the other uses stands for the system: its weakest link is unknown.
        return SystemAssessment(
            system=system, uses=uses, verdict=Verdict.UNASSESSED, weakest=weakest,
            exposure_probability=None, margin_years=None, start_by=None, rank=0,
            reason=f"{unassessed_label(weakest)}: {weakest.reason}",
        )
    dates = [u.start_by for u in uses if u.start_by is not None]
    return SystemAssessment(
        system=system, uses=uses, verdict=weakest.verdict, weakest=weakest,
        exposure_probability=weakest.exposure_probability, margin_years=weakest.margin_years,
        start_by=min(dates) if dates else None, rank=0, reason=weakest.reason,
    )


def unassessed_label(item: UseAssessment) -> str:
    """Which use made a system unassessed: algorithm, purpose and where it was read."""
    source = item.use.source
    where = ""
    if source is not None and source.detail:
        where = f", {source.detail}"
    elif source is not None and source.line is not None:
        where = f", line {source.line}"
    return f"use {item.use.algorithm} ({item.use.purpose.value}{where})"


def rank_key(item: SystemAssessment) -> tuple:
    """The ranking: classical breakage first, then exposure probability, then margin,
    then criticality and exposure to interception; the id breaks remaining ties
    so the order is total and deterministic."""
    margin = item.margin_years if item.margin_years is not None else math.inf
    return (
        -SEVERITY[item.verdict],
        -(item.exposure_probability or 0.0),
        margin,
        CRITICALITY_ORDER[item.system.criticality],
        EXPOSURE_ORDER[item.system.exposure],
        item.system.id,
    )


def _place_reason(item: SystemAssessment, previous: SystemAssessment | None) -> str:
    """Why this row sits where it does, in one line."""
    if previous is None or previous.verdict != item.verdict:
        lead = {
            Verdict.CLASSICALLY_BROKEN: "broken today",
            Verdict.EXPOSED: "exposed",
            Verdict.UNASSESSED: "unassessed",
            Verdict.WITHIN_MARGIN: "within margin",
            Verdict.QUANTUM_RESISTANT: "quantum-resistant",
        }[item.verdict]
    elif (previous.exposure_probability or 0.0) != (item.exposure_probability or 0.0):
        lead = "lower exposure probability"
    elif previous.margin_years != item.margin_years:
        lead = "more margin"
    elif previous.system.criticality != item.system.criticality:
        lead = f"{item.system.criticality.value} criticality"
    else:
        lead = f"{item.system.exposure.value} exposure"
    return f"{lead}: {item.reason}"


def summarize(items: tuple[SystemAssessment, ...], as_of: dt.date) -> Summary:
    """Counts by verdict, overdue systems and the earliest start-by date."""
    counts = {v: 0 for v in Verdict}
    use_counts = {v: 0 for v in Verdict}
    overdue: list[str] = []
    for item in items:
        counts[item.verdict] += 1
        for use in item.uses:
            use_counts[use.verdict] += 1
        if item.verdict == Verdict.CLASSICALLY_BROKEN or (item.start_by is not None and item.start_by <= as_of):
            overdue.append(item.system.id)
    dates = [i.start_by for i in items if i.start_by is not None]
    return Summary(
        counts=counts, use_counts=use_counts, overdue=tuple(overdue),
        earliest_start_by=min(dates) if dates else None, systems=len(items),
        uses=sum(len(i.uses) for i in items),
    )


def triage(
    inventory: Inventory,
    catalog: Resolver,
    profile: ThreatProfile,
    arrival: ArrivalModel,
    as_of: dt.date,
    band: BandSource | None = None,
) -> TriageResult:
    """Evaluate and rank every system of the inventory.

    Args:
        inventory: the systems.
        catalog: resolves algorithm names.
        profile: CRQC arrival distribution and risk tolerance.
        arrival: per-algorithm shift of the arrival.
        as_of: the date treated as today.
        band: the uncertainty band; None computes none (the central values are the same).
    """
    cache: dict[tuple, Resolution] = {}
    assessed: list[SystemAssessment] = []
    arrivals: dict[str, ArrivalUsed] = {}
    explain = getattr(arrival, "explain", None)
    remembered = _RememberedArrival(arrival)
    now = decimal_year(as_of)
    memo: dict[tuple[object, ...], object] = {}  # specs stay alive in the catalog cache
    for system in inventory.systems:
        uses = tuple(
            evaluate_use(use, system, _resolve(catalog, use, cache), profile, remembered, as_of)
            for use in system.uses
        )
        if band is not None:
            uses = tuple(_with_band(u, system, band, now, memo) for u in uses)
        for use in uses:
            spec = use.deciding or use.spec
            if spec is not None and use.crqc_year is not None and spec.name not in arrivals:
                basis = ""
                if explain is not None and spec.quantum_attack != "none":
                    basis = str(getattr(explain(spec), "explanation", ""))
                elif spec.quantum_attack == "none":
                    basis = "no known quantum attack"
                elif math.isinf(use.crqc_year):
                    basis = "Grover only, at least 128 bits of classical strength: beyond the horizon"
                else:
                    basis = "falls with the reference task (shared arrival)"
                arrivals[spec.name] = ArrivalUsed(spec.name, use.crqc_year, use.shift_years
                                                  if use.shift_years is not None else math.inf, basis)
        assessed.append(_assess_system(system, uses))
    ordered = sorted(assessed, key=rank_key)
    ranked: list[SystemAssessment] = []
    previous: SystemAssessment | None = None
    for index, item in enumerate(ordered, start=1):
        new = SystemAssessment(
            system=item.system, uses=item.uses, verdict=item.verdict, weakest=item.weakest,
            exposure_probability=item.exposure_probability, margin_years=item.margin_years,
            start_by=item.start_by, rank=index, reason=_place_reason(item, previous),
        )
        ranked.append(new)
        previous = item
    items = tuple(ranked)
    return TriageResult(
        inventory=inventory, items=items, summary=summarize(items, as_of), as_of=as_of,
        profile=profile, arrival_model=arrival.name,
        arrivals=tuple(sorted(arrivals.values(), key=lambda a: (a.crqc_year, a.algorithm))),
        band=getattr(band, "summary", None),  # type: ignore[arg-type]
    )
