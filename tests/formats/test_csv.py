"""CSV output read back with Python's csv module; formula injection neutralised (OWASP "CSV Injection")."""

from __future__ import annotations

import csv
import io
from pathlib import Path

from pqtriage.formats.csv.triage import COLUMNS, CsvFormat
from tests.formats.interop_helpers import triaged


def _rows(tmp_path: Path) -> list[dict[str, str]]:
    text = CsvFormat().render(triaged(tmp_path))
    # RFC 4180 section 2: records end with CRLF; header + 3 systems, no bare LF.
    assert text.count("\r\n") == 4 and text.replace("\r\n", "").count("\n") == 0
    return list(csv.DictReader(io.StringIO(text, newline="")))


def test_header_and_one_row_per_system_in_rank_order(tmp_path: Path) -> None:
    text = CsvFormat().render(triaged(tmp_path))
    header = next(csv.reader(io.StringIO(text, newline="")))
    assert tuple(header) == COLUMNS
    rows = _rows(tmp_path)
    assert [r["rank"] for r in rows] == ["1", "2", "3"]
    assert {r["system_id"] for r in rows} == {"telemetry", "'+scada-link", "billing"}


def test_formula_cells_are_neutralised(tmp_path: Path) -> None:
    rows = {r["system_id"]: r for r in _rows(tmp_path)}
    telemetry = rows["telemetry"]
    # A cell starting with =, +, - or @ would run as a formula in a spreadsheet: it gets a leading '.
    assert telemetry["system_name"] == "'=HYPERLINK(\"http://attacker.invalid\",\"click\")"
    assert telemetry["owner"] == "'@SUM(A1:A9)"
    scada = rows["'+scada-link"]
    assert scada["system_name"] == "'-2+3 SCADA link"
    for row in rows.values():
        for cell in row.values():
            assert not cell or cell[0] not in "=+-@\t\r" or _is_number(cell)


def _is_number(cell: str) -> bool:
    try:
        float(cell)
    except ValueError:
        return False
    return True


def test_quotes_and_commas_survive_and_numbers_stay_numbers(tmp_path: Path) -> None:
    rows = {r["system_id"]: r for r in _rows(tmp_path)}
    billing = rows["billing"]
    assert billing["system_name"] == 'Billing, "quoted" and comma'
    assert billing["verdict"] == "quantum-resistant"
    telemetry = rows["telemetry"]
    assert telemetry["verdict"] == "exposed"
    assert telemetry["weakest_algorithm"] == "RSA-2048"
    assert (telemetry["x_years"], telemetry["y_years"]) == ("10", "3")
    assert 0 <= float(telemetry["exposure_probability"]) <= 1
    assert telemetry["replacement"].startswith("ML-KEM")
