"""CSV output: one row per ranked system, with a header row, safe to open in a spreadsheet.

Every text cell goes through :func:`pqtriage.formats.text.csv_cell`: a cell that begins with
``=``, ``+``, ``-``, ``@``, a tab or a carriage return gets a leading apostrophe, so a
spreadsheet shows it as text instead of running it as a formula (OWASP, "CSV Injection").
Numbers are written by pqtriage itself (digits, a point, a leading minus) and stay numbers.
"""

from __future__ import annotations

import csv
import io
import math

from pqtriage.formats.interface import ResultFormat
from pqtriage.formats.labels import flags_text, short_replacement, system_replacement
from pqtriage.formats.notes import classical_text, fact_text
from pqtriage.formats.text import csv_cell
from pqtriage.model.verdict import SystemAssessment, TriageResult

COLUMNS: tuple[str, ...] = (
    "rank", "system_id", "system_name", "verdict", "weakest_algorithm", "purpose",
    "x_years", "y_years", "start_by", "exposure_probability", "margin_years",
    "exposure_probability_low", "exposure_probability_high", "start_by_earliest", "start_by_latest",
    "crqc_year", "crqc_year_low", "crqc_year_high",
    "replacement", "criticality", "exposure", "owner", "assumed", "reason",
    "classical_status", "flags", "priority_points", "rank_reason", "facts",
)
"""Header row: the ranked table's columns, the 10-90 % band of P, start-by and z (empty where
none applies; infinite years empty), then the facts a spreadsheet user filters on."""


def _number(value: float | None, digits: int) -> str:
    if value is None or not math.isfinite(value):
        return ""
    return f"{round(value, digits):g}"


def _date(day: object) -> str:
    return day.isoformat() if day is not None else ""  # type: ignore[attr-defined]


def row(item: SystemAssessment) -> list[str]:
    """One system's cells, in COLUMNS order."""
    weakest = item.weakest
    band = weakest.band if weakest else None
    spec = (weakest.deciding or weakest.spec) if weakest else None
    algorithm = spec.name if spec else (weakest.use.algorithm if weakest else "")
    system = item.system
    return [
        str(item.rank),
        csv_cell(system.id),
        csv_cell(system.name),
        item.verdict.value,
        csv_cell(algorithm),
        weakest.use.purpose.value if weakest else "",
        _number(weakest.x_years if weakest else system.shelf_life_years, 4),
        _number(system.migration_years, 4),
        item.start_by.isoformat() if item.start_by else "",
        _number(item.exposure_probability, 4),
        _number(item.margin_years, 2),
        _number(band.exposure_probability.low, 4) if band else "",
        _number(band.exposure_probability.high, 4) if band else "",
        _date(band.start_by[0]) if band else "",
        _date(band.start_by[1]) if band else "",
        _number(weakest.crqc_year, 2) if weakest else "",
        _number(band.crqc_year.low, 2) if band else "",
        _number(band.crqc_year.high, 2) if band else "",
        csv_cell(short_replacement(system_replacement(item)) if system_replacement(item) else ""),
        system.criticality.value,
        system.exposure.value,
        csv_cell(system.owner or ""),
        csv_cell(" ".join(system.assumed)),
        csv_cell(item.reason),
        csv_cell(classical_text(weakest.classical) if weakest and weakest.classical else ""),
        csv_cell(flags_text(item.flags)),
        _number(item.priority.points, 4) if item.priority else "",
        csv_cell(item.rank_reason),
        csv_cell("; ".join(fact_text(f) for f in weakest.facts) if weakest else ""),
    ]


def group_header(field: str) -> str:
    """Header of the group column: "group (owner)" (a reader of inventories reads past it)."""
    return f"group ({field})"


class CsvFormat(ResultFormat):
    """Ranked systems as RFC 4180 CSV (CRLF line ends, quoted where needed)."""

    name = "csv"

    def render(self, result: TriageResult) -> str:
        buffer = io.StringIO()
        writer = csv.writer(buffer, lineterminator="\r\n")  # RFC 4180 section 2: CRLF
        selection = result.selection
        if selection is None or selection.group_by is None:
            writer.writerow(COLUMNS)
            for item in result.items:
                writer.writerow(row(item))
            return buffer.getvalue()
        from pqtriage.model.view import groups

        # Grouped: the group's value first, rows by group then rank (a system with several
        # tags or frameworks is on one row per group).
        writer.writerow((group_header(selection.group_by), *COLUMNS))
        for label, items in groups(result, selection.group_by):
            for item in items:
                writer.writerow([csv_cell(label), *row(item)])
        return buffer.getvalue()
