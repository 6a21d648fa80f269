"""Exact text of the grouped and filtered views (table at width 100 with colours off, Markdown,
CSV) on the small fixed inventory of tests/formats (numbers checked by hand in test_table.py).
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

from pqtriage.formats.csv.triage import CsvFormat
from pqtriage.formats.markdown.triage import ranked_table
from pqtriage.formats.table.triage import terminal_view
from pqtriage.model.filter import parse_filter
from pqtriage.model.view import select
from tests.formats.test_table import render, small_result

HERE = Path(__file__).parent
WHERE = "verdict >= exposed or criticality = high"


def _view() -> object:
    return select(small_result(), parse_filter(WHERE), group_by="criticality")


def test_grouped_table_exact_text() -> None:
    lines = [line.rstrip() for line in render(terminal_view(_view())).splitlines()]
    assert lines == (HERE / "expected_views_table.txt").read_text(encoding="utf-8").splitlines()
    # What the golden text must say: most critical group first, ranks kept, the hidden
    # unassessed system counted (mystery, rank 3, is neither exposed nor high).
    assert lines[0].strip() == "criticality: high (1 system)"
    assert "1 unassessed system is not shown" in " ".join(lines)


def test_grouped_markdown_exact_text() -> None:
    text = "\n".join(ranked_table(_view()))
    assert text == (HERE / "expected_views.md").read_text(encoding="utf-8")
    assert text.count("Verdicts: ") == 1  # the legend once, under the last group


def test_grouped_csv_rows() -> None:
    rows = list(csv.reader(io.StringIO(CsvFormat().render(_view()), newline="")))
    assert rows[0][:3] == ["group (criticality)", "rank", "system_id"]
    assert [(r[0], r[1], r[2]) for r in rows[1:]] == [
        ("high", "4", "ticket-web"), ("medium", "1", "legacy-link"), ("medium", "2", "crew-archive")]
