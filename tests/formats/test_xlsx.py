"""--format xlsx read back by openpyxl (an independent reader of Office Open XML, ECMA-376):
every system and every use exactly once, formula starts stored as quote-prefixed text, and the
workbook reads back as the inventory it came from.

Formula injection: OWASP, "CSV Injection" (cells starting with = + - @, tab or carriage return).
The quotePrefix attribute of a cell format is SpreadsheetML's way to keep such text literal
(ECMA-376 Part 1, the xf element's quotePrefix attribute; section number from memory: 18.8.45).
"""

from __future__ import annotations

import io
from collections import Counter
from pathlib import Path

import openpyxl
import pytest

from pqtriage.formats.notes import CAUTIONS
from pqtriage.formats.xlsx.triage import XlsxFormat
from pqtriage.model.view import select
from pqtriage.sources.loading import load_inventory
from tests.formats.interop_helpers import INVENTORY, triaged
from tests.properties.test_inventory_roundtrip import comparable

DEMO = Path(__file__).resolve().parents[2] / "inventories" / "demo.yaml"


def _book(data: bytes) -> openpyxl.Workbook:
    return openpyxl.load_workbook(io.BytesIO(data))


def _records(sheet: openpyxl.worksheet.worksheet.Worksheet) -> list[dict[str, object]]:
    rows = list(sheet.iter_rows(values_only=True))
    return [dict(zip(rows[0], row, strict=True)) for row in rows[1:]]


def test_every_system_and_use_exactly_once(tmp_path: Path) -> None:
    import datetime as dt

    from pqtriage.pipeline import run_triage

    result = run_triage(str(DEMO), None, dt.date(2026, 12, 1))
    book = _book(XlsxFormat().render_bytes(result))
    assert book.sheetnames == ["Results", "Uses", "Inventory", "Cautions"]
    results = _records(book["Results"])
    assert Counter(r["system_id"] for r in results) == Counter(i.system.id for i in result.items)
    assert all(v == 1 for v in Counter(r["system_id"] for r in results).values())
    assert [r["rank"] for r in results] == list(range(1, len(result.items) + 1))
    uses = _records(book["Uses"])
    expected = Counter()
    for item in result.items:
        expected[item.system.id] = max(1, len(item.uses))  # a system with no use has one blank row
    assert Counter(r["id"] for r in uses) == expected
    assert sum(1 for r in uses if r["algorithm"]) == result.summary.uses
    for sheet in ("Results", "Uses"):
        assert book[sheet].freeze_panes == "A2" and book[sheet].auto_filter.ref.startswith("A1:")
    notes = _records(book["Cautions"])
    assert [n["text"] for n in notes if n["kind"] == "caution"] == list(CAUTIONS)


def test_formula_starts_are_quote_prefixed_text(tmp_path: Path) -> None:
    book = _book(XlsxFormat().render_bytes(triaged(tmp_path)))
    seen = 0
    for sheet in book.worksheets:
        for row in sheet.iter_rows():
            for cell in row:
                assert cell.data_type != "f", (sheet.title, cell.coordinate, cell.value)
                if isinstance(cell.value, str) and cell.value[:1] in ("=", "+", "-", "@", "\t", "\r"):
                    assert cell.data_type == "s" and cell.quotePrefix, (sheet.title, cell.coordinate)
                    seen += 1
    assert seen >= 6  # the name, owner and id of the hostile rows, on Results and Uses
    names = {r["system_name"] for r in _records(book["Results"])}
    assert '=HYPERLINK("http://attacker.invalid","click")' in names  # the text itself is kept


def test_control_characters_are_shown_as_escapes(tmp_path: Path) -> None:
    text = INVENTORY.replace('name: Billing, "quoted" and comma', 'name: "Bill\\x01ing \\u202eevil"')
    book = _book(XlsxFormat().render_bytes(triaged(tmp_path, text)))
    names = {r["system_name"] for r in _records(book["Results"])}
    assert "Bill\\x01ing \\u202eevil" in names


def test_the_workbook_reads_back_as_the_inventory(tmp_path: Path) -> None:
    result = triaged(tmp_path)
    path = tmp_path / "result.xlsx"
    path.write_bytes(XlsxFormat().render_bytes(result))
    again = load_inventory(str(path))
    assert comparable(again) == comparable(result.inventory)
    assert again.warnings == ()


def test_group_by_puts_the_group_first(tmp_path: Path) -> None:
    result = select(triaged(tmp_path), group_by="exposure")
    records = _records(_book(XlsxFormat().render_bytes(result))["Results"])
    assert list(records[0])[:2] == ["group (exposure)", "rank"]
    assert [(r["group (exposure)"], r["system_id"]) for r in records] == [
        ("internal", "+scada-link"), ("internal", "billing"), ("internet", "telemetry")]


def test_render_refuses_text() -> None:
    with pytest.raises(TypeError):
        XlsxFormat().render(None)  # type: ignore[arg-type]
