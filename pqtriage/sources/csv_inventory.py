"""CSV inventories: one row per use, recognised by content (a header row of columns).

The delimiter is a comma, a semicolon or a tab, whichever the header row uses (spreadsheets
in locales with a decimal comma write semicolons). Text is UTF-8 (Excel's "CSV UTF-8"; a
byte-order mark is accepted). Places are ``file.csv:LINE:COLUMN``: the line where the row
starts and the column's number, 1 for the first.
"""

from __future__ import annotations

import csv
import io
import re

from pqtriage.errors import InventoryError, Place
from pqtriage.model.inventory import Inventory
from pqtriage.sources.columns import ColumnMap
from pqtriage.sources.interface import InventorySource, UseCheck
from pqtriage.sources.tabular import Sheet, csv_place, read_sheet

DELIMITERS = (",", ";", "\t")
_YAML_START = re.compile(r"^\s*([\w.\"'-]+\s*:(\s|$)|[{\[#%&*!|>]|-(\s|$)|---)")


def first_line(text: str) -> str:
    """The first line with something on it."""
    for line in text.splitlines():
        if line.strip():
            return line
    return ""


def delimiter_of(line: str) -> str | None:
    """The delimiter a header line uses (the most frequent of the three), or None."""
    counts = {d: line.count(d) for d in DELIMITERS}
    best = max(counts, key=lambda d: counts[d])
    return best if counts[best] else None


class CsvInventorySource(InventorySource):
    """A CSV file of uses with a header row."""

    name = "CSV inventory"
    takes_columns = True

    def accepts(self, text: str) -> bool:
        line = first_line(text)
        # A YAML document starts with 'key:', a flow collection, a comment, '- ' or '---'.
        return bool(line) and not _YAML_START.match(line) and delimiter_of(line) is not None

    def parse(self, text: str, path: str, sha256: str | None = None) -> Inventory:
        return self.read_with_columns(text, path, sha256, ColumnMap(), None)

    def read(self, text: str, path: str, sha256: str | None = None, check: UseCheck | None = None) -> Inventory:
        return self.read_with_columns(text, path, sha256, ColumnMap(), check)

    def read_with_columns(self, text: str, path: str, sha256: str | None, column_map: ColumnMap,
                          check: UseCheck | None) -> Inventory:
        """Read the rows, map the columns, validate like a YAML inventory."""
        delimiter = delimiter_of(first_line(text)) or ","
        reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True)
        rows = []
        start = 1
        try:
            for cells in reader:
                rows.append((start, cells))
                start = reader.line_num + 1
        except csv.Error as exc:
            raise InventoryError(f"cannot read the CSV: {exc}", place=Place(path, reader.line_num),
                                 hint="check the quotes on this line") from exc
        return read_sheet(Sheet(rows), path, sha256, column_map, check, csv_place(path))
