"""Terminal view of the sensitivity: which systems change verdict if the CRQC moves."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text

from pqtriage.formats.labels import VERDICT_LABEL, sensitivity_title
from pqtriage.formats.table.styles import VERDICT_STYLE
from pqtriage.formats.text import MAX_CELL_CHARACTERS, cell
from pqtriage.model.sensitivity import Sensitivity


def band_table(s: Sensitivity) -> Table:
    """Rich table: the systems whose verdict flips inside the uncertainty band."""
    title = (f"Verdicts that flip inside the 10-90 % band ({len(s.band_flips)} systems)"
             if s.band_flips else "No verdict flips inside the 10-90 % band")
    table = Table(title=Text(title), header_style="bold", pad_edge=False)
    table.add_column("System", overflow="fold")
    for name in ("Central", "Optimistic end", "Pessimistic end"):
        table.add_column(name, no_wrap=True)
    for flip in s.band_flips:
        table.add_row(Text(cell(flip.system_id, MAX_CELL_CHARACTERS)), *(
            Text(VERDICT_LABEL[v], style=VERDICT_STYLE[v])
            for v in (flip.central, flip.optimistic, flip.pessimistic)))
    return table


def sensitivity_table(s: Sensitivity) -> Table:
    """Rich table: one row per system that changes verdict."""
    table = Table(title=Text(sensitivity_title(s)), header_style="bold", pad_edge=False)
    table.add_column("System", overflow="fold")
    table.add_column("Now", no_wrap=True)
    for shift in s.shifts:
        table.add_column(f"{shift:+d} y", no_wrap=True)
    for row in s.rows:
        cells = [Text(cell(row.system_id, MAX_CELL_CHARACTERS)), Text(VERDICT_LABEL[row.baseline], style=VERDICT_STYLE[row.baseline])]
        for _, verdict in row.by_shift:
            cells.append(Text(VERDICT_LABEL[verdict], style=VERDICT_STYLE[verdict]))
        table.add_row(*cells)
    return table
