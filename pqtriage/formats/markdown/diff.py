"""Markdown section of the diff between two reviews, for the compliance file."""

from __future__ import annotations

from pqtriage.formats.labels import DIFF_GROUPS, diff_headline, verdict_text
from pqtriage.formats.text import markdown_text
from pqtriage.model.diff import Diff, SystemChange


def _md_row(cells: list[str]) -> str:
    return "| " + " | ".join(cells) + " |"


def markdown_section(diff: Diff, heading: str = "## Changes since the previous review") -> str:
    """A Markdown section: summary line, counts table, then each change group."""
    summary = (f"From {markdown_text(diff.old.label)} (as of {diff.old.as_of}, profile "
               f"{markdown_text(diff.old.profile)}) to {markdown_text(diff.new.label)} (as of {diff.new.as_of}, "
               f"profile {markdown_text(diff.new.profile)}): {diff_headline(diff)}.")
    lines = [heading, "", summary, ""]
    lines += [_md_row(["Verdict", "Before", "Now", "Change"]), "| --- | ---: | ---: | ---: |"]
    lines += [_md_row([v.value, str(b), str(n), f"{n - b:+d}"]) for v, b, n in diff.counts]
    lines.append("")
    for key, title in DIFF_GROUPS:
        changes: tuple[SystemChange, ...] = getattr(diff, key)
        if not changes:
            continue
        lines += [f"### {title} ({len(changes)})", ""]
        lines += [_md_row(["System", "Name", "Before", "Now", "Rank"]), "| --- | --- | --- | --- | --- |"]
        for change in changes:
            lines.append(_md_row([markdown_text(change.id), markdown_text(change.name), verdict_text(change.old),
                                  verdict_text(change.new), f"{change.old_rank or '-'} → {change.new_rank or '-'}"]))
        lines.append("")
    for note in diff.notes:
        lines += [f"Note: {markdown_text(note)}", ""]
    return "\n".join(lines)
