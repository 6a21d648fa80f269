"""Rows of a spreadsheet (CSV or a workbook's sheet) to an inventory.

One row per use. The system columns are repeated on each row of a system, or left blank under
its first row: a row whose ``id`` is blank continues the system above it. A row with system
columns and no use columns is a system with no use yet (unassessed). Rows of one id need not
be next to each other (a filtered or sorted sheet); their system values must agree.

The rows become the same positioned tree the YAML reader builds, with each value at its cell,
and are validated by that reader: the same rules and messages, every problem collected.
"""

from __future__ import annotations

import datetime as dt
import difflib
import math
import re
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pqtriage.errors import InventoryError, Place, Problem
from pqtriage.model.inventory import Inventory
from pqtriage.sources.columns import (
    EXTRA_PREFIX,
    FALSE_WORDS,
    ORGANIZATION,
    RESULT_COLUMNS,
    TRUE_WORDS,
    Column,
    ColumnMap,
    header_key,
    known_column_names,
)
from pqtriage.sources.interface import UseCheck
from pqtriage.sources.yaml_inventory import PlaceOf, read_tree
from pqtriage.yamlio import Node

Cell = Any
"""A cell's value: text (CSV), or text, a number, a boolean, a date or None (workbook)."""
_LIST_SPLIT = re.compile(r"\s*[,;\n]\s*")
_NUMBER = re.compile(r"^[+-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?$")


@dataclass(frozen=True)
class Sheet:
    """The rows of one table with their positions."""

    rows: Sequence[tuple[int, Sequence[Cell]]]
    """(1-based row or line number, cells) for every row, the header included."""
    name: str | None = None
    """Worksheet name (None for CSV)."""
    top: dict[str, Any] = field(default_factory=dict)
    """Inventory-level values found beside the table (a workbook's Inventory sheet)."""


def blank(cell: Cell) -> bool:
    """Whether a cell holds nothing."""
    return cell is None or (isinstance(cell, str) and not cell.strip())


def cell_text(cell: Cell) -> str:
    """A cell as text: whole numbers without '.0', dates as ISO 8601."""
    if isinstance(cell, bool):
        return "true" if cell else "false"
    if isinstance(cell, float) and math.isfinite(cell) and cell.is_integer():
        return str(int(cell))
    if isinstance(cell, (dt.date, dt.datetime)):
        return cell.isoformat()
    return str(cell)


class _Table:
    """Maps headers to columns and turns rows into the positioned tree."""

    def __init__(self, sheet: Sheet, column_map: ColumnMap, place_of: PlaceOf):
        self.sheet = sheet
        self.map = column_map
        self.place_of = place_of
        self.problems: list[Problem] = []
        self.warnings: list[str] = []

    def problem(self, line: int, column: int, message: str, hint: str | None = None) -> None:
        self.problems.append(Problem(self.place_of(line, column), message, hint))

    def header(self) -> tuple[int, dict[int, Column | str]]:
        """The header row and what each column index means (extra fields as 'extra.name')."""
        rows = self.sheet.rows
        wanted = self.map.header_row
        found = next(((n, cells) for n, cells in rows if (n == wanted if wanted else any(
            not blank(c) for c in cells))), None)
        if found is None:
            raise InventoryError("the sheet has no header row" if wanted is None else
                                 f"the sheet has no row {wanted}", place=self.place_of(wanted or 1, 1),
                                 hint="put the column names (id, purpose, algorithm ...) in the first row")
        number, cells = found
        meaning: dict[int, Column | str] = {}
        seen: dict[str, int] = {}
        for index, cell in enumerate(cells, start=1):
            if blank(cell):
                continue
            text = cell_text(cell).strip()
            column = self.map.column_for(text)
            key = header_key(text)
            if column is None:
                if key in self.map.ignore or key in RESULT_COLUMNS:
                    continue
                close = difflib.get_close_matches(key, known_column_names(), n=1, cutoff=0.8)
                if close:
                    self.problem(number, index, f"column '{text[:60]}' is not a known column",
                                 f"did you mean '{close[0]}'? (rename it, or map it with --columns)")
                else:
                    self.warnings.append(f"{self.place_of(number, index)}: column '{text[:60]}' is not read "
                                         "(map it with --columns, or list it under 'ignore:' there)")
                continue
            name = column if isinstance(column, str) else column.name
            if name in seen:
                self.problem(number, index, f"column '{text[:60]}' is the same column as column {seen[name]}",
                             "keep one of them, or map one to another column with --columns")
                continue
            seen[name] = index
            meaning[index] = column
        names = {c if isinstance(c, str) else c.name for c in meaning.values()}
        for needed in ("purpose", "algorithm"):
            if needed not in names and "use." + needed not in names:
                self.problem(number, 1, f"the header row has no '{needed}' column",
                             "name the column as in docs/inventory-format.md or map it with --columns")
        if "id" not in names and "system.id" not in names:
            self.problem(number, 1, "the header row has no 'id' column (the system of each row)",
                         "add one, or map your system column to 'id' with --columns")
        return number, meaning

    # -- cells to nodes -------------------------------------------------------------------
    def node(self, column: Column, cell: Cell, line: int, index: int) -> Node:
        """A cell as the value the YAML reader expects for this column's kind."""
        spec = column.spec
        kind = spec.kind
        if kind in ("string-list", "identifier-list", "field-list"):
            parts = [p for p in _LIST_SPLIT.split(cell_text(cell).strip()) if p]
            if kind == "identifier-list":
                parts = [p.lower() for p in parts]
                if parts in (["none"], ["-"]):  # written for an explicitly empty list
                    parts = []
            return Node([Node(p, line, index) for p in parts], line, index)
        if kind in ("number", "integer"):
            if isinstance(cell, (int, float)) and not isinstance(cell, bool):
                value: Any = int(cell) if isinstance(cell, float) and cell.is_integer() and kind == "integer" \
                    else cell
                return Node(value, line, index)
            text = cell_text(cell).strip()
            if _NUMBER.match(text):
                number = float(text.replace(",", ".")) if ("," in text and "." not in text) else float(text)
                if number.is_integer() and re.match(r"^[+-]?\d+$", text):
                    return Node(int(text), line, index)
                return Node(number, line, index)
            return Node(text, line, index)
        if kind == "bool":
            if isinstance(cell, bool):
                return Node(cell, line, index)
            text = self.map.value_for(column, cell_text(cell)).strip().lower()
            if text in TRUE_WORDS:
                return Node(True, line, index)
            if text in FALSE_WORDS:
                return Node(False, line, index)
            return Node(cell_text(cell), line, index)
        if kind == "enum":
            return Node(self.map.value_for(column, cell_text(cell)), line, index)
        if kind == "date" and isinstance(cell, (dt.date, dt.datetime)):
            day = cell.date() if isinstance(cell, dt.datetime) else cell
            return Node(day.isoformat(), line, index)
        return Node(cell_text(cell), line, index)

    def extra_node(self, cell: Cell, line: int, index: int) -> Node:
        if isinstance(cell, (dt.date, dt.datetime)):
            return Node(cell.isoformat(), line, index)
        if isinstance(cell, float) and cell.is_integer():
            return Node(int(cell), line, index)
        return Node(cell, line, index)

    # -- rows -----------------------------------------------------------------------------
    def tree(self) -> Node:
        header_line, meaning = self.header()
        systems: dict[str, dict[str, Any]] = {}  # id -> {"node": fields, "first": line, "uses": [...]}
        order: list[str] = []
        organization: tuple[str, int, int] | None = None
        current: str | None = None
        for line, cells in self.sheet.rows:
            if line <= header_line or all(blank(c) for c in cells):
                continue
            system_part: dict[str, tuple[Column | str, Cell, int]] = {}
            use_part: dict[str, tuple[Column, Cell, int]] = {}
            for index, column in meaning.items():
                cell = cells[index - 1] if index - 1 < len(cells) else None
                if blank(cell):
                    continue
                if isinstance(column, str):
                    system_part[column] = (column, cell, index)
                elif column.level == "use":
                    use_part[column.name] = (column, cell, index)
                elif column.level == "top":
                    text = cell_text(cell).strip()
                    if organization is None:
                        organization = (text, line, index)
                    elif text != organization[0]:
                        self.problem(line, index, f"organization '{text[:60]}' differs from "
                                     f"'{organization[0][:60]}' on line {organization[1]}",
                                     "one sheet describes one organisation: use one spelling")
                else:
                    system_part[column.name] = (column, cell, index)
            ident_entry = system_part.pop("id", None) or system_part.pop("system.id", None)
            if ident_entry is not None:
                current = cell_text(ident_entry[1])  # as typed, like any text field
                if current not in systems:
                    systems[current] = {"fields": {"id": Node(current, line, ident_entry[2])},
                                        "line": line, "first": {}, "uses": []}
                    order.append(current)
            elif current is None:
                self.problem(line, 1, "this row has no system id and no row above it names one",
                             "fill in the 'id' column of the system's first row")
                continue
            entry = systems[current]
            for name, (column, cell, index) in system_part.items():
                self.put_system(entry, name, column, cell, line, index)
            if use_part:
                use = {column.path[0]: self.node(column, cell, line, index)
                       for column, cell, index in use_part.values()}
                entry["uses"].append(Node(use, line, min(i for _, _, i in use_part.values())))
        top: dict[str, Node] = {}
        version = self.sheet.top.get("version", 1)
        top["version"] = Node(version, 1, 1)
        org = organization[0] if organization else (self.sheet.top.get(ORGANIZATION) or self.map.organization)
        if org is None:
            org = Path(self.sheet_path).stem if hasattr(self, "sheet_path") else "unnamed"
            self.warnings.append(f"{self.place_of(header_line, 1)}: no organization column; the inventory is named"
                                 f" '{org}' after the file (add an 'organization' column, or 'organization:' in"
                                 " the column map)")
        top[ORGANIZATION] = Node(org, organization[1] if organization else 1,
                                 organization[2] if organization else 1)
        for key in ("policies", "frameworks"):
            values = self.sheet.top.get(key) or getattr(self.map, key)
            if values:
                top[key] = Node([Node(v, 1, 1) for v in values], 1, 1)
        systems_nodes = []
        for ident in order:
            entry = systems[ident]
            fields: dict[str, Node] = dict(entry["fields"])
            fields["uses"] = Node(entry["uses"], entry["line"], 1)
            systems_nodes.append(Node(fields, entry["line"], 1))
        top["systems"] = Node(systems_nodes, header_line + 1, 1)
        return Node(top, 1, 1)

    def put_system(self, entry: dict[str, Any], name: str, column: Column | str, cell: Cell,
                   line: int, index: int) -> None:
        """Set one system value, or record a conflict with the value an earlier row gave."""
        first: dict[str, tuple[str, int]] = entry["first"]
        shown = cell_text(cell).strip()
        if name in first:
            if first[name][0] != shown:
                self.problem(line, index, f"{name} of system '{entry['fields']['id'].value[:60]}' is "
                             f"'{shown[:60]}' here but '{first[name][0][:60]}' on row {first[name][1]}",
                             "a system's values must agree on all its rows (or be left blank)")
            return
        first[name] = (shown, line)
        fields: dict[str, Node] = entry["fields"]
        if isinstance(column, str):  # extra.NAME
            key = column[len(EXTRA_PREFIX):]
            extra = fields.setdefault("extra", Node({}, line, index))
            assert isinstance(extra.value, dict)
            extra.value[key] = self.extra_node(cell, line, index)
            return
        if len(column.path) == 2:
            outer, inner = column.path
            nested = fields.setdefault(outer, Node({}, line, index))
            assert isinstance(nested.value, dict)
            nested.value[inner] = self.node(column, cell, line, index)
            return
        fields[column.path[0]] = self.node(column, cell, line, index)


def read_sheet(sheet: Sheet, path: str, sha256: str | None, column_map: ColumnMap,
               check: UseCheck | None, place_of: PlaceOf) -> Inventory:
    """Validate one sheet into an Inventory; every problem is reported together."""
    from dataclasses import replace

    from pqtriage.errors import InventoryProblems

    table = _Table(sheet, column_map, place_of)
    table.sheet_path = path  # type: ignore[attr-defined]
    root = table.tree()
    if isinstance(sheet.rows, list):
        sheet.rows.clear()  # the cells now live in the tree: free the rows before validating
    try:
        inventory = read_tree(root, path, sha256, check, place_of, defaults=column_map.defaults)
    except InventoryProblems as problems:
        raise InventoryProblems(table.problems + problems.problems) from None
    if table.problems:
        raise InventoryProblems(table.problems)
    return replace(inventory, warnings=tuple(table.warnings) + inventory.warnings,
                   extra={"format": "workbook" if sheet.name else "CSV", "sheet": sheet.name})


def csv_place(path: str) -> Callable[[int | None, int | None], Place]:
    """Places in a CSV file: line and column number."""
    return lambda line, column: Place(path, line, column)


def rows_of(records: Iterable[tuple[int, Sequence[Cell]]]) -> list[tuple[int, Sequence[Cell]]]:
    """Materialise rows (kept small: one tuple per row)."""
    return list(records)
