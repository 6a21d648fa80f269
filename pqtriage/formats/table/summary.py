"""Terminal summary of a triage result: counts by verdict, what is overdue, a caution.

The CLI prints it under the table, or alone on stderr when the report goes to a file.
"""

from __future__ import annotations

from rich.text import Text

from pqtriage.formats.labels import VERDICT_LABEL
from pqtriage.formats.notes import CAUTIONS
from pqtriage.formats.table.styles import VERDICT_STYLE
from pqtriage.formats.text import MAX_CELL_CHARACTERS, cell, visible
from pqtriage.model.verdict import TriageResult, Verdict

_FLAGS_SHOWN = 10
"""Flags listed under the table; the rest are counted."""


def summary_block(result: TriageResult, top: int | None = None) -> Text:
    """Counts by verdict, what is overdue, the earliest start date and a caution."""
    summary = result.summary
    text = Text()
    text.append(f"{summary.systems} systems, {summary.uses} uses: ")
    parts = []
    for verdict in Verdict:
        parts.append((f"{summary.counts[verdict]} {VERDICT_LABEL[verdict]}", VERDICT_STYLE[verdict]))
    for index, (label, style) in enumerate(parts):
        if index:
            text.append(", ")
        text.append(label, style=style)
    text.append("\n")
    selection = result.selection
    if selection is not None and (selection.where or selection.group_by):
        text.append(cell(selection.describe(), 4 * MAX_CELL_CHARACTERS) + "\n", style="yellow" if selection.hidden_unassessed else "")
    else:
        top = selection.top if selection is not None else top
        if top is not None and top < summary.systems:
            text.append(f"Showing the top {top} of {summary.systems} systems.\n")
    if summary.overdue:
        shown = ", ".join(cell(s, 60) for s in summary.overdue[:8])
        more = f" and {len(summary.overdue) - 8} more" if len(summary.overdue) > 8 else ""
        text.append(f"Overdue (start-by date passed or classically-broken): {shown}{more}\n", style="red")
    flagged = [(item, flag) for item in (result.items if top is None else result.items[:top]) for flag in item.flags]
    for item, flag in flagged[:_FLAGS_SHOWN]:
        text.append(f"+ {visible(item.system.id)}: {visible(flag.text)}\n", style="yellow")
    if len(flagged) > _FLAGS_SHOWN:
        text.append(f"+ and {len(flagged) - _FLAGS_SHOWN} more flags (see --format markdown or json)\n",
                    style="yellow")
    upcoming = sorted(i.start_by for i in result.items if i.start_by and i.start_by > result.as_of)
    if upcoming:
        text.append(f"Next start-by date still ahead: {upcoming[0].isoformat()}\n")
    if any(item.system.assumed for item in result.items):
        text.append("* some x or y values are assumed defaults, not inventory facts\n")
    for warning in result.inventory.warnings[:5]:
        text.append(f"warning: {cell(warning, 4 * MAX_CELL_CHARACTERS)}\n", style="yellow")
    text.append(
        "x+y: x = years data or signatures must stay secure, y = migration years; "
        "P = probability the CRQC arrives before x + y. Order: verdict, then priority points "
        "(Pts = P + years overdue + criticality + interception; docs/method.md).\n",
        style="dim",
    )
    text.append(f"Caution: {CAUTIONS[0].split(':')[0]}; {CAUTIONS[2].split('.')[0].lower()}. "
                "Follow NIST, your national agency and your regulator.", style="dim")
    return text
