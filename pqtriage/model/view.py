"""Views of a triage result: the systems a ``--where`` filter and ``--top`` keep, and groups.

Pure: a TriageResult in, a TriageResult out. The summary stays that of the whole inventory
(counts are never silently shrunk); the ``selection`` says what is shown and what is hidden,
unassessed systems included, and every output states it.
"""

from __future__ import annotations

from dataclasses import replace

from pqtriage.errors import UsageError
from pqtriage.model.filter import FIELDS, Filter, field_info
from pqtriage.model.verdict import Selection, SystemAssessment, TriageResult, Verdict

GROUP_FIELDS: tuple[str, ...] = (
    "owner", "business_unit", "criticality", "exposure", "impact", "high_value_asset", "verdict",
    "data_classification", "hosting.model", "hosting.provider", "hosting.country", "vendor", "product",
    "key_storage", "policy_category", "vendor_readiness", "tags", "frameworks", "purpose",
)
"""Fields ``--group-by`` accepts (plus ``extra.NAME``)."""
NO_VALUE = "(none)"
"""Group of the systems that do not set the field."""


def check_group_field(name: str) -> str:
    """The ``--group-by`` field, checked (UsageError with the accepted names)."""
    lowered = name.strip().lower()
    if lowered in GROUP_FIELDS or (lowered.startswith("extra.") and len(lowered) > 6):
        return lowered if not lowered.startswith("extra.") else "extra." + name.strip()[6:]
    import difflib

    close = difflib.get_close_matches(lowered, GROUP_FIELDS, n=1, cutoff=0.6)
    raise UsageError(f"--group-by {name[:40]!r} is not a field to group by",
                     hint=f"did you mean '{close[0]}'?" if close else f"use one of: {', '.join(GROUP_FIELDS)}, extra.NAME")


def select(result: TriageResult, where: Filter | None = None, top: int | None = None,
           group_by: str | None = None) -> TriageResult:
    """The result with only the systems the filter and --top keep (ranks unchanged)."""
    if where is None and top is None and group_by is None:
        return result
    kept = [item for item in result.items if where is None or where.matches(item, result.inventory)]
    matched = len(kept)
    if top is not None:
        kept = kept[:top]
    shown = {id(item) for item in kept}
    hidden_unassessed = sum(1 for item in result.items
                            if id(item) not in shown and item.verdict == Verdict.UNASSESSED)
    counts = {verdict: 0 for verdict in Verdict}
    for item in kept:
        counts[item.verdict] += 1
    selection = Selection(where.text if where else None, top, group_by, len(result.items), matched,
                          hidden_unassessed, counts)
    return replace(result, items=tuple(kept), selection=selection)


def group_label(value: object) -> str:
    """A group's label as text."""
    if isinstance(value, bool):
        return "yes" if value else "no"
    return str(value)


def groups(result: TriageResult, field: str) -> list[tuple[str, tuple[SystemAssessment, ...]]]:
    """Systems per value of a field, in rank order within each group.

    Ordered fields run from most to least (critical first, the most urgent verdict first);
    others alphabetically; systems without a value last, under "(none)". A system with several
    values (tags, frameworks) is listed under each.
    """
    info = field_info(field)
    assert info is not None, field
    buckets: dict[str, list[SystemAssessment]] = {}
    for item in result.items:
        values = info.getter(item, result.inventory) or [None]
        for value in dict.fromkeys(values):
            buckets.setdefault(NO_VALUE if value is None else group_label(value), []).append(item)
    if info.kind == "ordered":
        order = {c: i for i, c in enumerate(reversed(info.choices))}
        key = lambda label: (label == NO_VALUE, order.get(label, len(order)), label)  # noqa: E731
    elif info.kind == "bool":
        key = lambda label: (label == NO_VALUE, label != "yes", label)  # noqa: E731
    else:
        key = lambda label: (label == NO_VALUE, label.casefold(), label)  # noqa: E731
    return [(label, tuple(buckets[label])) for label in sorted(buckets, key=key)]


__all__ = ["FIELDS", "GROUP_FIELDS", "Selection", "check_group_field", "groups", "select"]
