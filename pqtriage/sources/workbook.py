"""Workbook inventories (``.xlsx``, ``.ods``): one sheet of uses, recognised by content.

Read with python-calamine (a binding of the Rust calamine reader): a 100,000-row sheet is read
in under a second where openpyxl's read-only mode takes over ten (measured for issue 12), and it
reads OpenDocument spreadsheets too. Formulas are never evaluated: a cell's stored value is read.

The sheet read is the column map's ``sheet``, else one named ``Uses`` (as pqtriage writes it),
else the first sheet. A sheet named ``Inventory`` with ``field | value`` rows supplies the
organisation, format version, policies and frameworks, as pqtriage's own workbook does. Places
are written in the spreadsheet's notation: ``file.xlsx:Uses!D14``.
"""

from __future__ import annotations

import io
import zipfile
from collections.abc import Callable
from typing import Any

from pqtriage.errors import InventoryError, Place
from pqtriage.model.inventory import Inventory
from pqtriage.sources.columns import ColumnMap
from pqtriage.sources.interface import UseCheck
from pqtriage.sources.tabular import Sheet, blank, cell_text, read_sheet

USES_SHEET = "Uses"
"""The sheet of uses pqtriage writes and reads first."""
INVENTORY_SHEET = "Inventory"
"""The sheet of inventory-level values (field, value) pqtriage writes and reads."""
MAX_UNPACKED_BYTES = 512 * 1024 * 1024
"""Most bytes a workbook may unpack to (its parts are compressed XML): refuses ZIP bombs
before the reader inflates anything; a 100,000-use sheet unpacks to about 40 MiB."""
MAX_RATIO = 200
"""Largest compression ratio accepted for one part (XML compresses about 10 to 30 times)."""
_ODS_MIME = b"application/vnd.oasis.opendocument.spreadsheet"


def is_workbook(data: bytes) -> bool:
    """Whether the bytes are an OOXML workbook or an OpenDocument spreadsheet (by content)."""
    if not data.startswith(b"PK\x03\x04"):
        return False
    try:
        with zipfile.ZipFile(io.BytesIO(data)) as archive:
            names = set(archive.namelist())
            if "xl/workbook.xml" in names or "xl/workbook.bin" in names:
                return True
            return "mimetype" in names and archive.read("mimetype").strip() == _ODS_MIME
    except (zipfile.BadZipFile, OSError, KeyError, ValueError):
        return False


def _check_archive(data: bytes, path: str) -> None:
    with zipfile.ZipFile(io.BytesIO(data)) as archive:
        total = 0
        for info in archive.infolist():
            total += info.file_size
            if info.file_size > 1024 * 1024 and info.file_size > MAX_RATIO * max(info.compress_size, 1):
                raise InventoryError(f"the workbook part {info.filename[:60]!r} unpacks {info.file_size:,} bytes "
                                     f"from {info.compress_size:,} (a ZIP bomb?)", place=Place(path),
                                     hint="save the workbook again from the spreadsheet program")
        if total > MAX_UNPACKED_BYTES:
            raise InventoryError(f"the workbook unpacks to more than {MAX_UNPACKED_BYTES // (1024 * 1024)} MiB",
                                 place=Place(path), hint="split the inventory into several files")


def sheet_place(path: str, sheet: str) -> Callable[[int | None, int | None], Place]:
    """Places in one sheet: ``file.xlsx:Sheet!D14``."""
    return lambda line, column: Place(path, line, column, sheet=sheet)


def _inventory_values(rows: list[list[Any]]) -> dict[str, object]:
    """field | value rows of the Inventory sheet."""
    values: dict[str, object] = {}
    for row in rows:
        if len(row) < 2 or blank(row[0]) or blank(row[1]):
            continue
        key = cell_text(row[0]).strip().lower()
        if key in ("organization", "organisation"):
            values["organization"] = cell_text(row[1])
        elif key == "version":
            try:
                values["version"] = int(float(cell_text(row[1])))
            except ValueError:
                values["version"] = cell_text(row[1])
        elif key in ("policies", "frameworks"):
            values[key] = [p.strip() for p in cell_text(row[1]).replace(";", ",").split(",") if p.strip()]
    return values


def read_workbook(data: bytes, path: str, sha256: str | None, column_map: ColumnMap,
                  check: UseCheck | None) -> Inventory:
    """Read the sheet of uses (and the Inventory sheet, if any) into an Inventory."""
    from python_calamine import CalamineError, CalamineWorkbook

    _check_archive(data, path)
    try:
        book = CalamineWorkbook.from_filelike(io.BytesIO(data))
        names = list(book.sheet_names)
        if column_map.sheet is not None:
            if column_map.sheet not in names:
                raise InventoryError(f"the workbook has no sheet '{column_map.sheet[:60]}'", place=Place(path),
                                     hint=f"sheets: {', '.join(n[:40] for n in names)}")
            name = column_map.sheet
        elif USES_SHEET in names:
            name = USES_SHEET
        elif names:
            name = next((n for n in names if n != INVENTORY_SHEET), names[0])
        else:
            raise InventoryError("the workbook has no sheet", place=Place(path))
        rows = book.get_sheet_by_name(name).to_python(skip_empty_area=False)
        top: dict[str, object] = {}
        if INVENTORY_SHEET in names and name != INVENTORY_SHEET:
            top = _inventory_values(book.get_sheet_by_name(INVENTORY_SHEET).to_python(skip_empty_area=False))
    except CalamineError as exc:
        raise InventoryError(f"cannot read the workbook: {' '.join(str(exc).split())[:200]}", place=Place(path),
                             hint="save it again as .xlsx or .ods") from exc
    numbered = [(index, row) for index, row in enumerate(rows, start=1)]
    return read_sheet(Sheet(numbered, name, top), path, sha256, column_map, check, sheet_place(path, name))
