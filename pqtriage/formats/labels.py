"""Labels every medium shares: short verdict names, replacement heads, change groups, titles.

Plain strings only (no rich), so text formats can use them without loading the terminal code.
"""

from __future__ import annotations

from collections.abc import Sequence

from pqtriage.model.diff import Diff
from pqtriage.model.sensitivity import Sensitivity
from pqtriage.model.verdict import Flag, SystemAssessment, Verdict

VERDICT_LABEL: dict[Verdict, str] = {verdict: verdict.value for verdict in Verdict}
"""The verdict words: the same in every output, option and document (``--fail-on`` takes them)."""


def flag_short(flag: Flag) -> str:
    """A flag for narrow places: 'legacy Blowfish', 'downgrade DH-2048'."""
    return f"{flag.kind} {flag.algorithm}"


def flags_text(flags: Sequence[Flag]) -> str:
    """Every flag in full (kind, date, document, algorithm), joined with '; '."""
    return "; ".join(dict.fromkeys(flag.text for flag in flags))


def system_replacement(item: SystemAssessment) -> str | None:
    """What to replace first: the deciding use's replacement, else that of the first flagged use."""
    if item.weakest is not None and item.weakest.replacement:
        return item.weakest.replacement
    return next((use.replacement for use in item.uses if use.flags and use.replacement), None)


def short_replacement(text: str | None) -> str:
    """The first recommendation of a replacement text, without its citation."""
    if not text:
        return "-"
    head = text.split(";")[0]
    head = head.split(" or ")[0]
    return head.split(" (")[0].strip()


DIFF_GROUPS: tuple[tuple[str, str], ...] = (
    ("worsened", "Worsened"),
    ("added", "New"),
    ("removed", "Removed"),
    ("improved", "Improved"),
    ("migrated", "Migrated"),
)
"""Change groups of a diff in display order: what needs attention first."""


def verdict_text(value: object) -> str:
    """A verdict of a diff side as text; '-' when the system is absent on that side."""
    return "-" if value is None else str(getattr(value, "value", value))


def diff_headline(diff: Diff) -> str:
    """One line of counts: '1 worsened, 2 new, ... , 25 unchanged'."""
    parts = [f"{len(getattr(diff, key))} {title.lower()}" for key, title in DIFF_GROUPS]
    return ", ".join(parts) + f", {len(diff.unchanged)} unchanged"


def sensitivity_title(s: Sensitivity) -> str:
    """Title of the sensitivity table, with its counts."""
    return (f"Systems whose verdict changes if the CRQC arrives earlier or later "
            f"({len(s.rows)} change, {s.unchanged} hold under every shift)")
