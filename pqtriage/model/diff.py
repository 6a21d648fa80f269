"""Compare two reviews: which systems migrated, improved, worsened, appeared or went away.

Pure: takes two TriageResults, or two JSON results as ``--format json`` writes them
(schema_version 1 or 2), and returns a :class:`Diff`. Systems are matched by id.

- migrated: the system was not quantum-resistant and now is;
- improved: its verdict is less urgent (SEVERITY), but not yet quantum-resistant;
- worsened: its verdict is more urgent;
- unchanged: same verdict (its probability or rank may have moved);
- new / removed: the id is only in the new / only in the old review.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from pqtriage.model.verdict import SEVERITY, TriageResult, Verdict


@dataclass(frozen=True)
class ReviewSystem:
    """What a diff needs of one system in one review."""

    id: str
    """System id."""
    name: str
    """Human-readable name."""
    verdict: Verdict
    """Verdict in that review."""
    rank: int
    """Rank in that review."""
    exposure_probability: float | None
    """Exposure probability in that review."""


@dataclass(frozen=True)
class Review:
    """One side of a diff: a triage result reduced to what is compared."""

    label: str
    """File name or other label shown in the diff."""
    as_of: str
    """The review's as-of date (ISO)."""
    profile: str
    """Threat profile name."""
    systems: tuple[ReviewSystem, ...]
    """Systems in ranked order."""


@dataclass(frozen=True)
class SystemChange:
    """One system's change between the reviews."""

    id: str
    """System id."""
    name: str
    """Name in the new review (the old one for a removed system)."""
    old: Verdict | None
    """Verdict before (None: new system)."""
    new: Verdict | None
    """Verdict now (None: removed system)."""
    old_rank: int | None
    """Rank before."""
    new_rank: int | None
    """Rank now."""


@dataclass(frozen=True)
class Diff:
    """The changes between an old and a new review."""

    old: Review
    """The earlier review."""
    new: Review
    """The later review."""
    migrated: tuple[SystemChange, ...]
    """Now quantum-resistant, before not."""
    improved: tuple[SystemChange, ...]
    """Less urgent verdict, not yet quantum-resistant."""
    worsened: tuple[SystemChange, ...]
    """More urgent verdict."""
    added: tuple[SystemChange, ...]
    """Only in the new review."""
    removed: tuple[SystemChange, ...]
    """Only in the old review."""
    unchanged: tuple[SystemChange, ...]
    """Same verdict."""
    counts: tuple[tuple[Verdict, int, int], ...]
    """(verdict, systems before, systems now) for every verdict, most urgent first."""
    notes: tuple[str, ...] = ()
    """Caveats: different as-of dates or profiles mix the passing of time into the changes."""


def review_of_result(result: TriageResult, label: str) -> Review:
    """A Review from a TriageResult."""
    return Review(
        label=label, as_of=result.as_of.isoformat(), profile=result.profile.name,
        systems=tuple(ReviewSystem(i.system.id, i.system.name, i.verdict, i.rank, i.exposure_probability)
                      for i in result.items),
    )


def review_of_json(data: dict[str, Any], label: str) -> Review:
    """A Review from a JSON result (``--format json``, schema_version 1 or 2); ValueError if it is not one."""
    if not isinstance(data, dict) or data.get("schema_version") not in (1, 2) or not isinstance(data.get("items"), list):
        raise ValueError("not a pqtriage JSON result (schema_version 1 or 2 with items)")
    systems = []
    for index, item in enumerate(data["items"], start=1):
        if not isinstance(item, dict) or not isinstance(item.get("id"), str):
            raise ValueError(f"item {index} has no id")  # noqa: TRY004 - bad input, not a bug
        try:
            verdict = Verdict(item.get("verdict"))
        except ValueError as exc:
            raise ValueError(f"item {index} has an unknown verdict {str(item.get('verdict'))[:40]!r}") from exc
        probability = item.get("exposure_probability")
        systems.append(ReviewSystem(
            item["id"], str(item.get("name", item["id"])), verdict,
            int(item["rank"]) if isinstance(item.get("rank"), int) else index,
            float(probability) if isinstance(probability, (int, float)) else None,
        ))
    profile = data["profile"] if isinstance(data.get("profile"), dict) else {}
    return Review(label=label, as_of=str(data.get("as_of", "")), profile=str(profile.get("name", "")),
                  systems=tuple(systems))


def compare(old: Review, new: Review) -> Diff:
    """Match systems by id and sort each change into its group (new-review order, then old)."""
    before = {s.id: s for s in old.systems}
    after = {s.id: s for s in new.systems}
    groups: dict[str, list[SystemChange]] = {k: [] for k in ("migrated", "improved", "worsened", "unchanged")}
    added, removed = [], []
    for system in new.systems:
        prior = before.get(system.id)
        if prior is None:
            added.append(SystemChange(system.id, system.name, None, system.verdict, None, system.rank))
            continue
        change = SystemChange(system.id, system.name, prior.verdict, system.verdict, prior.rank, system.rank)
        if system.verdict is Verdict.QUANTUM_RESISTANT and prior.verdict is not Verdict.QUANTUM_RESISTANT:
            groups["migrated"].append(change)
        elif SEVERITY[system.verdict] < SEVERITY[prior.verdict]:
            groups["improved"].append(change)
        elif SEVERITY[system.verdict] > SEVERITY[prior.verdict]:
            groups["worsened"].append(change)
        else:
            groups["unchanged"].append(change)
    for system in old.systems:
        if system.id not in after:
            removed.append(SystemChange(system.id, system.name, system.verdict, None, system.rank, None))
    counts = tuple(
        (verdict, sum(1 for s in old.systems if s.verdict is verdict),
         sum(1 for s in new.systems if s.verdict is verdict))
        for verdict in Verdict
    )
    notes = []
    if old.as_of != new.as_of:
        notes.append(f"The reviews are as of different dates ({old.as_of} and {new.as_of}): "
                     "some changes come from the passing of time, not from migration work.")
    if old.profile != new.profile:
        notes.append(f"The reviews use different threat profiles ({old.profile} and {new.profile}).")
    return Diff(old=old, new=new, migrated=tuple(groups["migrated"]), improved=tuple(groups["improved"]),
                worsened=tuple(groups["worsened"]), added=tuple(added), removed=tuple(removed),
                unchanged=tuple(groups["unchanged"]), counts=counts, notes=tuple(notes))
