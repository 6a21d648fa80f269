"""Pick the right inventory source by content and read an inventory file.

Recognised by content, never by the file name alone: a ZIP container holding a workbook
(``.xlsx``, ``.ods``), a CycloneDX JSON BOM, a CSV whose header row names inventory columns,
else pqtriage's YAML format (the fallback, whose errors then explain what is wrong).
"""

from __future__ import annotations

from pqtriage.errors import InventoryError, Place, UsageError
from pqtriage.model.inventory import Inventory
from pqtriage.sources.interface import InventorySource, UseCheck, read_input, read_inventory_text
from pqtriage.sources.yaml_inventory import YamlInventorySource
from pqtriage.yamlio import MAX_FILE_BYTES, decode_text


def registered_sources() -> list[InventorySource]:
    """Text sources in the order they are tried; the YAML format is the fallback."""
    sources: list[InventorySource] = []
    try:
        from pqtriage.sources.cbom import CycloneDxSource
    except ImportError:
        pass
    else:
        sources.append(CycloneDxSource())
    from pqtriage.sources.csv_inventory import CsvInventorySource

    sources.append(CsvInventorySource())
    sources.append(YamlInventorySource())
    return sources


def load_inventory(path: str, check: UseCheck | None = None, columns: str | None = None) -> Inventory:
    """Read an inventory file in any supported format (recognised by content, not name).

    Args:
        path: the file.
        check: run on every use as it is read (the catalog's name check); its errors are
            reported together with the file's own problems.
        columns: a column map file (``--columns``) for a CSV or a workbook.
    """
    from pqtriage.sources.columns import ColumnMap, load_column_map

    column_map = load_column_map(columns) if columns else ColumnMap()
    data, sha256 = read_input(path, MAX_FILE_BYTES)
    if len(data) > MAX_FILE_BYTES:
        raise InventoryError(
            f"the file is larger than {MAX_FILE_BYTES // (1024 * 1024)} MiB",
            place=Place(path),
            hint="split the inventory into several files",
        )
    from pqtriage.sources import workbook

    if workbook.is_workbook(data):
        return workbook.read_workbook(data, path, sha256, column_map, check)
    text = decode_text(data, path, InventoryError)
    for source in registered_sources():
        if source.accepts(text):
            if columns and not getattr(source, "takes_columns", False):
                raise UsageError(f"{path} is a {source.name}, so a column map does not apply to it",
                                 hint="--columns is for CSV files and workbooks")
            if getattr(source, "takes_columns", False):
                return source.read_with_columns(text, path, sha256, column_map, check)  # type: ignore[attr-defined]
            return source.read(text, path, sha256, check)
    raise InventoryError("no reader accepts this file", hint="give a pqtriage YAML inventory or a CycloneDX JSON file")  # pragma: no cover


def load_inventory_with_side_file(path: str, side_file: str | None, check: UseCheck | None = None) -> Inventory:
    """Read an inventory; a CycloneDX one gets the side file's values (``--cbom-defaults FILE``)."""
    if side_file is None:
        return load_inventory(path, check)
    from pqtriage.sources.cbom import CycloneDxSource
    from pqtriage.sources.cbom_side import load_side_file

    side = load_side_file(side_file)
    text, sha256 = read_inventory_text(path)
    source = CycloneDxSource(side)
    if not source.accepts(text):
        raise UsageError(f"{path} is not a CycloneDX BOM, so a CBOM side file does not apply to it",
                         hint="drop --cbom-defaults, or give the CycloneDX JSON file")
    return source.read(text, path, sha256, check)
