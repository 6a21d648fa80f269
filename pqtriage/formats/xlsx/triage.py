"""The triage result as a workbook an analyst can filter (``--format xlsx``).

Sheets:

- ``Results``: one row per ranked system (the CSV output's columns; with ``--group-by`` the
  group's value first, rows by group then rank);
- ``Uses``: one row per use, the inventory's own columns (as the spreadsheet readers read
  them) then the use's verdict, resolved algorithm, start-by date, replacement and reason, and
  its system's rank and verdict; reading this workbook back as an inventory gives the
  inventory again (result columns are read past);
- ``Inventory``: organisation, format version, policies and frameworks (read back), then the
  file, its SHA-256, the date, the profile and the tool;
- ``Cautions``: the cautions, the assumptions of this run, input warnings and sources.

Every sheet has a frozen header row and an autofilter. Text that a spreadsheet would run as a
formula (starting with = + - @, a tab or a carriage return) is stored as text with the
quote-prefix style: shown as typed, never evaluated, and still text when edited.
"""

from __future__ import annotations

import math
from typing import Any

from pqtriage import __version__
from pqtriage.formats.csv.triage import COLUMNS, group_header
from pqtriage.formats.interface import ResultFormat
from pqtriage.formats.labels import short_replacement
from pqtriage.formats.notes import CAUTIONS, SOURCES, assumptions
from pqtriage.formats.xlsx.inventory import (
    INVENTORY_SHEET,
    USES_SHEET,
    WorkbookWriter,
    header,
    inventory_values,
    rows,
)
from pqtriage.model.verdict import SystemAssessment, TriageResult, UseAssessment

RESULTS_SHEET = "Results"
CAUTIONS_SHEET = "Cautions"
USE_RESULT_COLUMNS = ("system_rank", "system_verdict", "use_verdict", "resolved", "use_start_by",
                      "use_replacement", "use_reason")
"""Columns the Uses sheet adds after the inventory's (the readers read past them)."""


def _number(value: float | None, digits: int) -> float | None:
    if value is None or not math.isfinite(value):
        return None
    return round(value, digits)


def result_row(item: SystemAssessment) -> list[Any]:
    """One system's cells in the CSV output's column order, numbers and dates typed."""
    weakest = item.weakest
    spec = (weakest.deciding or weakest.spec) if weakest else None
    system = item.system
    return [
        item.rank, system.id, system.name, item.verdict.value,
        spec.name if spec else (weakest.use.algorithm if weakest else None),
        weakest.use.purpose.value if weakest else None,
        _number(weakest.x_years if weakest else system.shelf_life_years, 4),
        _number(system.migration_years, 4), item.start_by,
        _number(item.exposure_probability, 4), _number(item.margin_years, 2),
        short_replacement(weakest.replacement) if weakest and weakest.replacement else None,
        system.criticality.value, system.exposure.value, system.owner,
        " ".join(system.assumed) or None, item.reason,
    ]


def _use_result(item: SystemAssessment, use: UseAssessment | None) -> list[Any]:
    if use is None:
        return [item.rank, item.verdict.value, None, None, None, None, item.reason]
    return [item.rank, item.verdict.value, use.verdict.value, use.spec.name if use.spec else None,
            use.start_by, use.replacement, use.reason]


def workbook(result: TriageResult) -> bytes:
    """The whole workbook."""
    writer = WorkbookWriter()
    selection = result.selection
    if selection is not None and selection.group_by:
        from pqtriage.model.view import groups

        grouped = [[label, *result_row(item)] for label, items in groups(result, selection.group_by)
                   for item in items]
        writer.sheet(RESULTS_SHEET, [group_header(selection.group_by), *COLUMNS], grouped)
    else:
        writer.sheet(RESULTS_SHEET, COLUMNS, (result_row(item) for item in result.items))
    shown = {item.system.id: item for item in result.items}
    assessed = {id(u.use): u for item in result.items for u in item.uses}
    inventory = result.inventory
    if selection is not None:  # the Uses sheet holds the systems shown, in inventory order
        from dataclasses import replace

        inventory = replace(inventory, systems=tuple(s for s in inventory.systems if s.id in shown))
    writer.sheet(USES_SHEET, header(inventory) + list(USE_RESULT_COLUMNS),
                 (cells + _use_result(shown[system.id], assessed.get(id(use)) if use is not None else None)
                  for system, use, cells in rows(inventory)))
    values = inventory_values(result.inventory)
    values += [["file", result.inventory.source_path], ["sha256", result.inventory.source_sha256],
               ["as_of", result.as_of.isoformat()], ["profile", result.profile.name],
               ["profile_source", result.profile.source], ["tool", f"pqtriage {__version__}"]]
    writer.sheet(INVENTORY_SHEET, values[0], values[1:], widths={1: 16, 2: 60}, filters=False)
    notes: list[list[Any]] = [["caution", c] for c in CAUTIONS]
    notes += [["assumption", a] for a in assumptions(result)]
    notes += [["warning", w] for w in result.inventory.warnings]
    notes += [["source", s] for s in SOURCES]
    writer.sheet(CAUTIONS_SHEET, ["kind", "text"], notes, widths={1: 12, 2: 120})
    return writer.bytes()


class XlsxFormat(ResultFormat):
    """A workbook (Office Open XML) of results, uses, the inventory and the cautions."""

    name = "xlsx"
    binary = True

    def render(self, result: TriageResult) -> str:
        raise TypeError("--format xlsx is binary: call render_bytes")

    def render_bytes(self, result: TriageResult) -> bytes:
        return workbook(result)
