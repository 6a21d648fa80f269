"""Triage: evaluate every use, let each system's weakest in-use use decide, rank the systems.

The orchestrator receives its catalog, profile and arrival model as arguments,
so tests can hand it fakes. Pure: no file, console or network access.

A system's verdict rests on its in-use uses (all of them when none is marked in use); an
offered use that is classically broken makes the system classically-broken (old clients will
negotiate it), and an offered use weaker than what is in use is a downgrade flag. Systems are
ranked by verdict, then by priority points (pqtriage.model.priority).
"""

from __future__ import annotations

import datetime as dt
import math
from collections.abc import Sequence
from dataclasses import replace
from typing import Protocol

from pqtriage.catalog.spec import AlgorithmSpec, Resolution
from pqtriage.catalog.transitions import Standing
from pqtriage.catalog.trust import TrustDefault
from pqtriage.model.arrival_model import ArrivalModel
from pqtriage.model.inventory import CRITICALITY_ORDER, EXPOSURE_ORDER, CryptoUse, Inventory, System
from pqtriage.model.mosca import evaluate_use, evaluation_parts
from pqtriage.model.priority import PriorityWeights, priority_of, shown_margin, shown_percent
from pqtriage.model.profile import ThreatProfile, decimal_year
from pqtriage.model.verdict import (
    SEVERITY,
    ArrivalUsed,
    Flag,
    Summary,
    SystemAssessment,
    TriageResult,
    UseAssessment,
    Verdict,
)


class Resolver(Protocol):
    """What triage needs of the catalog: names, classical status by date, trust defaults."""

    def classical_standing(self, spec: AlgorithmSpec, purpose: str, as_of: dt.date) -> Standing:
        """Classical status of an algorithm for a purpose on a date."""
        ...

    def trust_default(self, role: str | None) -> TrustDefault:
        """Default trust period of a signature role (None: not known)."""
        ...

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
        base = item.x_years  # a suite's own x; its parts take theirs from the purpose
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


def _shown_key(item: UseAssessment) -> tuple:
    """use_sort_key on the values as displayed (whole percent, margin to one decimal)."""
    margin = shown_margin(item.margin_years)
    return (-SEVERITY[item.verdict], -(shown_percent(item.exposure_probability) or 0),
            margin if margin is not None else math.inf)


def deciding_pool(uses: Sequence[UseAssessment]) -> list[UseAssessment]:
    """The uses a system's quantum verdict rests on: the in-use ones, or all when none is in use."""
    in_use = [u for u in uses if not u.offered]
    return in_use or list(uses)


def system_verdict(uses: Sequence[tuple[str, Verdict]]) -> Verdict:
    """A system's verdict from (role, verdict) of its uses: the worst in-use verdict (all uses when
    none is in use), classically-broken when any offered use is. Unassessed for no use."""
    if not uses:
        return Verdict.UNASSESSED
    in_use = [v for role, v in uses if role != "offered"] or [v for _, v in uses]
    worst = max(in_use, key=lambda v: SEVERITY[v])
    if any(role == "offered" and v is Verdict.CLASSICALLY_BROKEN for role, v in uses):
        return Verdict.CLASSICALLY_BROKEN
    return worst


def _algorithm(use: UseAssessment) -> str:
    spec = use.deciding or use.spec
    return spec.name if spec else use.use.algorithm


def _downgrades(uses: tuple[UseAssessment, ...]) -> tuple[UseAssessment, ...]:
    """Uses with a downgrade flag added to every offered use weaker than what is in use."""
    in_use = [u for u in uses if not u.offered]
    if not in_use:
        return uses
    marked = []
    for use in uses:
        if not use.offered:
            marked.append(use)
            continue
        same = [u for u in in_use if u.use.purpose is use.use.purpose] or in_use
        reference = min(same, key=_shown_key)  # the weakest in-use use of that purpose
        if _shown_key(use) < _shown_key(reference):
            shown = "" if use.exposure_probability is None else f", P {shown_percent(use.exposure_probability)}%"
            text = (f"downgrade: {_algorithm(use)} is offered for {use.use.purpose.value} ({use.verdict.value}{shown}) "
                    f"beside {_algorithm(reference)} in use ({reference.verdict.value})")
            flag = Flag(kind="downgrade", algorithm=_algorithm(use), text=text)
            use = replace(use, flags=use.flags + (flag,))
        marked.append(use)
    return tuple(marked)


def _assess_system(system: System, uses: tuple[UseAssessment, ...], weights: PriorityWeights) -> SystemAssessment:
    if not uses:
        return SystemAssessment(
            system=system, uses=(), verdict=Verdict.UNASSESSED, weakest=None,
            exposure_probability=None, margin_years=None, start_by=None, rank=0,
            reason="no cryptographic use listed: add its uses to assess it",
            priority=priority_of(weights, None, None, system.criticality.value, system.exposure.value),
        )
    uses = _downgrades(uses)
    pool = deciding_pool(uses)
    weakest = min(pool, key=use_sort_key)
    reason = weakest.reason
    if len(pool) < len(uses) and weakest.verdict is not Verdict.CLASSICALLY_BROKEN:
        broken = [u for u in uses if u.offered and u.verdict is Verdict.CLASSICALLY_BROKEN]
        if broken:
            weakest = min(broken, key=use_sort_key)
            reason = (f"offered {_algorithm(weakest)} is classically-broken and old clients will negotiate it: "
                      f"{weakest.reason}")
    elif len(pool) == len(uses) and any(u.offered for u in uses):
        reason = f"no use is marked in use, so the offered ones decide: {reason}"
    flags = tuple(flag for use in uses for flag in use.flags)
    if weakest.verdict is Verdict.UNASSESSED:
        # Nothing computed from the other uses stands for the system: its weakest link is unknown.
        return SystemAssessment(
            system=system, uses=uses, verdict=Verdict.UNASSESSED, weakest=weakest,
            exposure_probability=None, margin_years=None, start_by=None, rank=0,
            reason=f"{unassessed_label(weakest)}: {weakest.reason}",
            priority=priority_of(weights, None, None, system.criticality.value, system.exposure.value),
            flags=flags,
        )
    dates = [u.start_by for u in pool if u.start_by is not None]
    if weakest.offered and weakest.start_by is not None:
        dates.append(weakest.start_by)
    return SystemAssessment(
        system=system, uses=uses, verdict=weakest.verdict, weakest=weakest,
        exposure_probability=weakest.exposure_probability, margin_years=weakest.margin_years,
        start_by=min(dates) if dates else None, rank=0, reason=reason,
        priority=priority_of(weights, weakest.exposure_probability, weakest.margin_years,
                             system.criticality.value, system.exposure.value),
        flags=flags,
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
    """The ranking: verdict first (classical breakage first), then more priority points, then the
    probability and margin as displayed, criticality and exposure to interception; the id breaks
    remaining ties so the order is total and deterministic."""
    priority = item.priority
    points = priority.points if priority is not None else 0.0
    percent = shown_percent(item.exposure_probability)
    margin = shown_margin(item.margin_years)
    return (
        -SEVERITY[item.verdict],
        -points,
        -(percent if percent is not None else -1),
        margin if margin is not None else math.inf,
        CRITICALITY_ORDER[item.system.criticality],
        EXPOSURE_ORDER[item.system.exposure],
        item.system.id,
    )


_FACTOR_WORDS = {
    "probability": "exposure probability",
    "time": "time left",
    "criticality": "criticality",
    "interception": "exposure to interception",
}


def place_reason(item: SystemAssessment, previous: SystemAssessment | None) -> str:
    """The factor that put ``item`` right below ``previous`` (the row above), in one line."""
    if previous is None:
        return f"first: the most urgent verdict ({item.verdict.value}) with the most priority points"
    if previous.verdict is not item.verdict:
        return f"first {item.verdict.value} system: {item.verdict.value} ranks below {previous.verdict.value}"
    mine, theirs = item.priority, previous.priority
    assert mine is not None and theirs is not None
    if mine.points != theirs.points:
        gaps = [(theirs.part(p.factor).points - p.points, p.factor) for p in mine.parts]
        gap, factor = max(gaps, key=lambda g: g[0])
        return (f"{mine.points:g} priority points against {theirs.points:g} for {previous.system.id}, "
                f"mostly {_FACTOR_WORDS[factor]} ({mine.part(factor).shown} against "
                f"{theirs.part(factor).shown}, {gap:g} points)")
    same = f"same priority points as {previous.system.id} ({mine.points:g}); "
    if mine.probability_shown != theirs.probability_shown:
        return same + (f"lower exposure probability shown ({mine.probability_shown}% against "
                       f"{theirs.probability_shown}%)")
    if mine.margin_shown != theirs.margin_shown:
        ours = "none" if mine.margin_shown is None else f"{mine.margin_shown:+.1f}"
        other = "none" if theirs.margin_shown is None else f"{theirs.margin_shown:+.1f}"
        return same + f"more margin shown ({ours} years against {other})"
    if item.system.criticality is not previous.system.criticality:
        return same + (f"lower criticality ({item.system.criticality.value} against "
                       f"{previous.system.criticality.value})")
    if item.system.exposure is not previous.system.exposure:
        return same + (f"less exposed to interception ({item.system.exposure.value} against "
                       f"{previous.system.exposure.value})")
    return same + f"every factor equal: ordered by id ({item.system.id} after {previous.system.id})"


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
            evaluate_use(use, system, _resolve(catalog, use, cache), profile, remembered, as_of, catalog)
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
        assessed.append(_assess_system(system, uses, profile.priority))
    ordered = sorted(assessed, key=rank_key)
    ranked: list[SystemAssessment] = []
    previous: SystemAssessment | None = None
    for index, item in enumerate(ordered, start=1):
        ranked.append(replace(item, rank=index, rank_reason=place_reason(item, previous)))
        previous = item
    items = tuple(ranked)
    return TriageResult(
        inventory=inventory, items=items, summary=summarize(items, as_of), as_of=as_of,
        profile=profile, arrival_model=arrival.name,
        arrivals=tuple(sorted(arrivals.values(), key=lambda a: (a.crqc_year, a.algorithm))),
        band=getattr(band, "summary", None),  # type: ignore[arg-type]
    )
