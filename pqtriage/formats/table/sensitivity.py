"""Terminal view of the sensitivity: which systems change verdict if the CRQC moves."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text

from pqtriage.formats.labels import VERDICT_LABEL, sensitivity_title
from pqtriage.formats.table.styles import VERDICT_STYLE
from pqtriage.formats.text import visible
from pqtriage.model.sensitivity import Sensitivity


def sensitivity_table(s: Sensitivity) -> Table:
    """Rich table: one row per system that changes verdict."""
    table = Table(title=Text(sensitivity_title(s)), header_style="bold", pad_edge=False)
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
