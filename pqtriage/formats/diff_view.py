"""The diff between two reviews: a terminal view and a Markdown section for the compliance file."""

from __future__ import annotations

import json
from typing import Any

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.formats.table import VERDICT_STYLE
from pqtriage.formats.text import markdown_text, visible
from pqtriage.model.diff import Diff, SystemChange

GROUPS: tuple[tuple[str, str], ...] = (
    ("worsened", "Worsened"),
    ("added", "New"),
    ("removed", "Removed"),
    ("improved", "Improved"),
    ("migrated", "Migrated"),
)
"""Change groups in display order: what needs attention first."""


def _verdict(value: object) -> str:
    return "-" if value is None else str(getattr(value, "value", value))


def _headline(diff: Diff) -> str:
    parts = [f"{len(getattr(diff, key))} {title.lower()}" for key, title in GROUPS]
    return ", ".join(parts) + f", {len(diff.unchanged)} unchanged"


def terminal_view(diff: Diff) -> RenderableType:
    """Counts by verdict, then one table row per changed system."""
    title = Text(f"Changes from {visible(diff.old.label)} ({diff.old.as_of}) to "
                 f"{visible(diff.new.label)} ({diff.new.as_of})", style="bold")
    counts = Table(box=box.SIMPLE_HEAD, header_style="bold", pad_edge=False)
    for name, justify in (("Verdict", "left"), ("Before", "right"), ("Now", "right"), ("Change", "right")):
        counts.add_column(name, justify=justify)  # type: ignore[arg-type]
    for verdict, before, now in diff.counts:
        counts.add_row(Text(verdict.value, style=VERDICT_STYLE[verdict]), str(before), str(now),
                       f"{now - before:+d}")
    changes = Table(box=box.SIMPLE_HEAD, header_style="bold", pad_edge=False)
    for name in ("Change", "System", "Before", "Now", "Rank"):
        changes.add_column(name, overflow="fold")
    for key, label in GROUPS:
        for change in getattr(diff, key):
            changes.add_row(label, Text(visible(change.id)), _verdict(change.old), _verdict(change.new),
                            f"{change.old_rank or '-'} -> {change.new_rank or '-'}")
    parts: list[RenderableType] = [title, Text(_headline(diff)), counts]
    if changes.row_count:
        parts.append(changes)
    parts += [Text(f"note: {visible(n)}", style="yellow") for n in diff.notes]
    return Group(*parts)


def _md_row(cells: list[str]) -> str:
    return "| " + " | ".join(cells) + " |"


def markdown_section(diff: Diff, heading: str = "## Changes since the previous review") -> str:
    """A Markdown section: summary line, counts table, then each change group."""
    summary = (f"From {markdown_text(diff.old.label)} (as of {diff.old.as_of}, profile "
               f"{markdown_text(diff.old.profile)}) to {markdown_text(diff.new.label)} (as of {diff.new.as_of}, "
               f"profile {markdown_text(diff.new.profile)}): {_headline(diff)}.")
    lines = [heading, "", summary, ""]
    lines += [_md_row(["Verdict", "Before", "Now", "Change"]), "| --- | ---: | ---: | ---: |"]
    lines += [_md_row([v.value, str(b), str(n), f"{n - b:+d}"]) for v, b, n in diff.counts]
    lines.append("")
    for key, title in GROUPS:
        changes: tuple[SystemChange, ...] = getattr(diff, key)
        if not changes:
            continue
        lines += [f"### {title} ({len(changes)})", ""]
        lines += [_md_row(["System", "Name", "Before", "Now", "Rank"]), "| --- | --- | --- | --- | --- |"]
        for change in changes:
            lines.append(_md_row([markdown_text(change.id), markdown_text(change.name), _verdict(change.old),
                                  _verdict(change.new), f"{change.old_rank or '-'} → {change.new_rank or '-'}"]))
        lines.append("")
    for note in diff.notes:
        lines += [f"Note: {markdown_text(note)}", ""]
    return "\n".join(lines)


def diff_dict(diff: Diff) -> dict[str, Any]:
    """The diff as a JSON-ready dict."""
    def change(c: SystemChange) -> dict[str, Any]:
        return {"id": c.id, "name": c.name, "old": _verdict(c.old) if c.old else None,
                "new": _verdict(c.new) if c.new else None, "old_rank": c.old_rank, "new_rank": c.new_rank}

    out: dict[str, Any] = {
        "old": {"label": diff.old.label, "as_of": diff.old.as_of, "profile": diff.old.profile},
        "new": {"label": diff.new.label, "as_of": diff.new.as_of, "profile": diff.new.profile},
        "counts": {v.value: {"before": b, "now": n, "change": n - b} for v, b, n in diff.counts},
    }
    for key in ("migrated", "improved", "worsened", "added", "removed", "unchanged"):
        out[key] = [change(c) for c in getattr(diff, key)]
    out["notes"] = list(diff.notes)
    return out


def render_json(diff: Diff) -> str:
    """The diff as JSON text."""
    return json.dumps(diff_dict(diff), indent=2, ensure_ascii=False) + "\n"
