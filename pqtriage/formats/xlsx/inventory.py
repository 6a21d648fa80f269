"""An inventory as spreadsheet rows and as a workbook: the inverse of the spreadsheet readers.

One row per use, system columns repeated on every row of the system (so a filter on any column
keeps whole facts), columns named as :mod:`pqtriage.sources.columns` names them, only those the
inventory uses (plus the required ones). A system with no use gets one row with blank use cells.
Lists are joined with ", " (the readers split on commas, semicolons and line breaks).
"""

from __future__ import annotations

import io
from collections.abc import Iterator, Sequence
from typing import Any

from pqtriage.formats.text import cell_text, starts_formula
from pqtriage.model.inventory import CryptoUse, Inventory, System
from pqtriage.sources.columns import EXTRA_PREFIX, SYSTEM_COLUMNS, USE_COLUMNS, Column

REQUIRED = ("id", "name", "shelf_life_years", "migration_years", "purpose", "algorithm")
"""Columns written even when empty, so a filled-in sheet reads back."""
USES_SHEET = "Uses"
INVENTORY_SHEET = "Inventory"


def _plain(value: Any) -> Any:
    """A model value as a cell value: enums as their text, tuples joined, None as blank."""
    if value is None:
        return None
    if isinstance(value, tuple):
        return ", ".join(str(v) for v in value) if value else None
    return getattr(value, "value", value)


def system_value(system: System, column: Column) -> Any:
    """One system column's value."""
    if column.name == "id":
        return system.id
    outer = column.path[0]
    if len(column.path) == 2:
        holder = getattr(system, outer)
        return None if holder is None else _plain(getattr(holder, column.path[1]))
    if outer in ("source",):
        return system.source.detail if system.source else None
    if outer == "frameworks":  # blank: the file's; "none": none apply
        return None if system.frameworks is None else (", ".join(system.frameworks) or "none")
    return _plain(getattr(system, outer))


def use_value(use: CryptoUse, column: Column) -> Any:
    """One use column's value."""
    if column.name == "source":
        return use.source.detail if use.source else None
    return _plain(getattr(use, column.path[0]))


def columns_for(inventory: Inventory) -> tuple[list[Column], list[Column], list[str]]:
    """The system columns, use columns and extra keys this inventory needs, in writing order."""
    system_cols = [c for c in SYSTEM_COLUMNS if c.name in REQUIRED or any(
        system_value(s, c) is not None for s in inventory.systems)]
    use_cols = [c for c in USE_COLUMNS if c.name in REQUIRED or any(
        use_value(u, c) is not None for s in inventory.systems for u in s.uses)]
    extra = list(dict.fromkeys(k for s in inventory.systems for k, _ in s.extra))
    return system_cols, use_cols, extra


def header(inventory: Inventory) -> list[str]:
    """The header row."""
    system_cols, use_cols, extra = columns_for(inventory)
    return [c.name for c in system_cols] + [EXTRA_PREFIX + k for k in extra] + [c.name for c in use_cols]


def rows(inventory: Inventory) -> Iterator[tuple[System, CryptoUse | None, list[Any]]]:
    """(system, use or None, cells) per row, in inventory order."""
    system_cols, use_cols, extra = columns_for(inventory)
    for system in inventory.systems:
        own = dict(system.extra)
        head = [system_value(system, c) for c in system_cols] + [own.get(k) for k in extra]
        if not system.uses:
            yield system, None, head + [None] * len(use_cols)
        for use in system.uses:
            yield system, use, head + [use_value(use, c) for c in use_cols]


def inventory_values(inventory: Inventory) -> list[list[Any]]:
    """field | value rows of the Inventory sheet (read back by the workbook reader)."""
    out: list[list[Any]] = [["field", "value"], ["organization", inventory.organization],
                            ["version", inventory.version]]
    if inventory.policies:
        out.append(["policies", ", ".join(inventory.policies)])
    if inventory.frameworks:
        out.append(["frameworks", ", ".join(inventory.frameworks)])
    return out


class WorkbookWriter:
    """Sheets written one row at a time (openpyxl's write-only mode: memory stays flat)."""

    def __init__(self) -> None:
        from openpyxl import Workbook

        self.book = Workbook(write_only=True)

    def sheet(self, name: str, header_row: Sequence[str], body: Iterator[Sequence[Any]] | Sequence[Sequence[Any]],
              widths: dict[int, float] | None = None, filters: bool = True) -> None:
        """Add a sheet: a bold frozen header, an autofilter over the rows, then the rows."""
        from openpyxl.cell import WriteOnlyCell
        from openpyxl.styles import Font
        from openpyxl.utils import get_column_letter

        sheet = self.book.create_sheet(name)
        sheet.freeze_panes = "A2"
        for index, width in (widths or {}).items():
            sheet.column_dimensions[get_column_letter(index)].width = width
        bold = Font(bold=True)
        cells = []
        for text in header_row:
            cell = WriteOnlyCell(sheet, value=cell_text(text))
            cell.font = bold
            cells.append(cell)
        sheet.append(cells)
        count = 1
        for row in body:
            sheet.append([self.cell(sheet, value) for value in row])
            count += 1
        if filters and header_row:
            sheet.auto_filter.ref = f"A1:{get_column_letter(len(header_row))}{count}"

    @staticmethod
    def cell(sheet: Any, value: Any) -> Any:
        """A cell value; text that a spreadsheet would run as a formula is stored as text,
        quote-prefixed (the cell shows the text as typed and stays text when edited)."""
        if value is None or isinstance(value, (bool, int, float)):
            return value
        text = cell_text(value)
        if not starts_formula(text):
            return text
        from openpyxl.cell import WriteOnlyCell

        cell = WriteOnlyCell(sheet, value=text)
        cell.data_type = "s"
        cell.quotePrefix = True
        return cell

    def bytes(self) -> bytes:
        """The workbook file."""
        buffer = io.BytesIO()
        self.book.save(buffer)
        return buffer.getvalue()


def inventory_workbook(inventory: Inventory) -> bytes:
    """The inventory alone as a workbook (Uses and Inventory sheets): what the readers read."""
    writer = WorkbookWriter()
    writer.sheet(USES_SHEET, header(inventory), (cells for _, _, cells in rows(inventory)))
    values = inventory_values(inventory)
    writer.sheet(INVENTORY_SHEET, values[0], values[1:], filters=False)
    return writer.bytes()
