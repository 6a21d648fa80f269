"""Terminal view of the diff between two reviews: counts by verdict, then each changed system."""

from __future__ import annotations

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.formats.labels import DIFF_GROUPS, diff_headline, verdict_text
from pqtriage.formats.table.styles import VERDICT_STYLE
from pqtriage.formats.text import MAX_CELL_CHARACTERS, cell
from pqtriage.model.diff import Diff


def terminal_view(diff: Diff) -> RenderableType:
    """Counts by verdict, then one table row per changed system."""
    title = Text(f"Changes from {cell(diff.old.label, MAX_CELL_CHARACTERS)} ({diff.old.as_of}) to "
                 f"{cell(diff.new.label, MAX_CELL_CHARACTERS)} ({diff.new.as_of})", style="bold")
    counts = Table(box=box.SIMPLE_HEAD, header_style="bold", pad_edge=False)
    for name, justify in (("Verdict", "left"), ("Before", "right"), ("Now", "right"), ("Change", "right")):
        counts.add_column(name, justify=justify)  # type: ignore[arg-type]
    for verdict, before, now in diff.counts:
        counts.add_row(Text(verdict.value, style=VERDICT_STYLE[verdict]), str(before), str(now),
                       f"{now - before:+d}")
    changes = Table(box=box.SIMPLE_HEAD, header_style="bold", pad_edge=False)
    for name in ("Change", "System", "Before", "Now", "Rank"):
        changes.add_column(name, overflow="fold")
    for key, label in DIFF_GROUPS:
        for change in getattr(diff, key):
            changes.add_row(label, Text(cell(change.id, MAX_CELL_CHARACTERS)), verdict_text(change.old), verdict_text(change.new),
                            f"{change.old_rank or '-'} -> {change.new_rank or '-'}")
    parts: list[RenderableType] = [title, Text(diff_headline(diff)), counts]
    if changes.row_count:
        parts.append(changes)
    parts += [Text(f"note: {cell(n, 4 * MAX_CELL_CHARACTERS)}", style="yellow") for n in diff.notes]
    return Group(*parts)
