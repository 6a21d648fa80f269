"""Sensitivity table: terminal and Markdown."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text

from pqtriage.formats.table import VERDICT_LABEL, VERDICT_STYLE
from pqtriage.formats.text import markdown_code, visible
from pqtriage.model.sensitivity import Sensitivity


def _title(s: Sensitivity) -> str:
    return (f"Systems whose verdict changes if the CRQC arrives earlier or later "
            f"({len(s.rows)} change, {s.unchanged} hold under every shift)")


def sensitivity_table(s: Sensitivity) -> Table:
    """Rich table: one row per system that changes verdict."""
    table = Table(title=Text(_title(s)), header_style="bold", pad_edge=False)
    table.add_column("System", overflow="fold")
    table.add_column("Now", no_wrap=True)
    for shift in s.shifts:
        table.add_column(f"{shift:+d} y", no_wrap=True)
    for row in s.rows:
        cells = [Text(visible(row.system_id)), Text(VERDICT_LABEL[row.baseline], style=VERDICT_STYLE[row.baseline])]
        for _, verdict in row.by_shift:
            cells.append(Text(VERDICT_LABEL[verdict], style=VERDICT_STYLE[verdict]))
        table.add_row(*cells)
    return table


def sensitivity_markdown(s: Sensitivity) -> str:
    """Markdown section with the same table."""
    lines = ["## Sensitivity to the CRQC arrival", ""]
    lines.append(
        _title(s) + ". Negative shifts mean the CRQC arrives earlier than the profile says, "
        "positive later; every algorithm's arrival moves by the same number of years."
    )
    lines.append("")
    if not s.rows:
        lines.append("No system changes verdict within the shifts tried.")
        return "\n".join(lines) + "\n"
    header = ["System", "Now"] + [f"{shift:+d} years" for shift in s.shifts]
    lines.append("| " + " | ".join(header) + " |")
    lines.append("|" + "|".join("---" for _ in header) + "|")
    for row in s.rows:
        cells = [markdown_code(row.system_id), VERDICT_LABEL[row.baseline]]
        cells += [VERDICT_LABEL[v] if v != row.baseline else f"{VERDICT_LABEL[v]}" for _, v in row.by_shift]
        lines.append("| " + " | ".join(cells) + " |")
    return "\n".join(lines) + "\n"
