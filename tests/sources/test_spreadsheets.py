"""Spreadsheet inventories written by independent libraries (the csv module, openpyxl, and an
OpenDocument file built from its XML), with headers and value spellings of their own mapped by
a column map. CSV as RFC 4180 describes it; OpenDocument 1.2 (OASIS), part 1, table:table-cell.
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import json
import zipfile
from pathlib import Path

import openpyxl
import pytest

from pqtriage.cli import main
from pqtriage.errors import InventoryError
from pqtriage.model.inventory import Criticality, HostingModel, Purpose
from pqtriage.sources.loading import load_inventory

COLUMN_MAP = """\
# How Larchmont's register names things (a fictional cooperative bank)
organization: Larchmont Cooperative Bank
columns:
  Application ID: id
  Accountable: owner
  Data retention (years): shelf_life_years
  Time to migrate: migration_years
  Crypto usage: purpose
  Cipher / algorithm: algorithm
  Tier: criticality
  Sensitivity label: data_classification.label
  Runs in: hosting.model
  Region: hosting.country
  Cost centre: extra.cost_centre
values:
  purpose:
    Key Exchange: key-establishment
    Digital signing: signature
  criticality:
    Tier 1: critical
    Tier 2: high
  hosting.model:
    Own DC: on-premises
ignore: [Reviewer comments]
"""

HEADER = ["Application ID", "Application", "Accountable", "Data retention (years)", "Time to migrate",
          "Crypto usage", "Cipher / algorithm", "Key bits", "Curve", "Tier", "Sensitivity label", "Runs in",
          "Region", "HVA", "Cost centre", "Reviewer comments"]
ROWS = [
    ["core-ledger", "Core ledger", "Ledger team (Wen Ashby)", "10", "3", "Key Exchange", "RSA", "2048", "",
     "Tier 1", "Confidential", "Own DC", "NL", "yes", "CC-7", "checked in May"],
    ["", "", "", "", "", "Digital signing", "ECDSA", "", "P-384", "", "", "", "", "", "", ""],
    ["", "", "", "", "", "encryption", "AES-256-GCM", "", "", "", "", "", "", "", "", ""],
    ["card-api", "Card API", "Cards team", "5", "1.5", "key exchange", "X25519MLKEM768", "", "", "Tier 2",
     "Internal", "Cloud", "IE", "no", "CC-9", ""],
    ["core-ledger", "Core ledger", "", "", "", "signing", "ML-DSA-65", "", "", "", "", "", "", "", "", ""],
]
"""Rows of the fictional register: system columns blank under a system's first row, and a later
row of core-ledger that is not next to the others (a sorted or filtered sheet)."""


def _write_map(tmp_path: Path) -> str:
    path = tmp_path / "columns.yaml"
    path.write_text(COLUMN_MAP, encoding="utf-8")
    return str(path)


def _write_csv(tmp_path: Path, name: str = "register.csv", delimiter: str = ",",
               rows: list[list[str]] | None = None) -> Path:
    path = tmp_path / name
    with path.open("w", encoding="utf-8", newline="") as stream:
        writer = csv.writer(stream, delimiter=delimiter)
        writer.writerow(HEADER)
        writer.writerows(ROWS if rows is None else rows)
    return path


def _check_register(inventory: object) -> None:
    assert inventory.organization == "Larchmont Cooperative Bank"
    ledger, card = inventory.systems
    assert (ledger.id, ledger.name, ledger.owner) == ("core-ledger", "Core ledger", "Ledger team (Wen Ashby)")
    assert (ledger.shelf_life_years, ledger.migration_years, ledger.criticality) == (10, 3, Criticality.CRITICAL)
    assert ledger.data_classification.label == "Confidential" and ledger.hosting.model is HostingModel.ON_PREMISES
    assert ledger.hosting.country == "NL" and ledger.high_value_asset is True and ledger.extra == (("cost_centre", "CC-7"),)
    assert [(u.purpose, u.algorithm, u.key_size, u.curve) for u in ledger.uses] == [
        (Purpose.KEY_ESTABLISHMENT, "RSA", 2048, None), (Purpose.SIGNATURE, "ECDSA", None, "P-384"),
        (Purpose.ENCRYPTION, "AES-256-GCM", None, None), (Purpose.SIGNATURE, "ML-DSA-65", None, None)]
    assert (card.migration_years, card.criticality, card.hosting.model, card.high_value_asset) == (
        1.5, Criticality.HIGH, HostingModel.CLOUD, False)
    assert [u.purpose for u in card.uses] == [Purpose.KEY_ESTABLISHMENT]


def test_csv_from_the_csv_module_with_a_column_map(tmp_path: Path) -> None:
    inventory = load_inventory(str(_write_csv(tmp_path)), columns=_write_map(tmp_path))
    _check_register(inventory)
    assert inventory.systems[0].uses[1].source.line == 3 and inventory.warnings == ()


def test_semicolons_and_a_name_without_the_extension(tmp_path: Path) -> None:
    path = _write_csv(tmp_path, "register.export", delimiter=";")
    _check_register(load_inventory(str(path), columns=_write_map(tmp_path)))


def test_triage_reads_it_from_the_command_line(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = _write_csv(tmp_path)
    code = main(["triage", str(path), "--columns", _write_map(tmp_path), "--as-of", "2026-12-01", "-f", "json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    data = json.loads(out)
    assert sorted(i["id"] for i in data["items"]) == ["card-api", "core-ledger"]
    assert sum(len(i["uses"]) for i in data["items"]) == 5


def test_csv_errors_name_line_and_column(tmp_path: Path) -> None:
    rows = [list(r) for r in ROWS]
    rows[0][3] = "ten"       # line 2, column 4
    rows[3][9] = "Tier 9"    # line 5, column 10
    rows[4][1] = "Ledger"    # line 6, column 2: disagrees with line 2
    path = _write_csv(tmp_path, rows=rows)
    with pytest.raises(InventoryError) as caught:
        load_inventory(str(path), columns=_write_map(tmp_path))
    lines = [line.replace(str(path), "FILE") for line in caught.value.diagnostic_lines()]
    assert lines == [
        "FILE:2:4: 'shelf_life_years' in system 'core-ledger' must be a number, got text; write digits without quotes",
        "FILE:5:10: 'criticality' in system 'card-api' is 'Tier 9', not a known value; use one of: critical, high, "
        "medium, low",
        "FILE:6:2: name of system 'core-ledger' is 'Ledger' here but 'Core ledger' on row 2; a system's values must "
        "agree on all its rows (or be left blank)",
        "3 problems in FILE; nothing was triaged",
    ]


def test_headers_without_a_map(tmp_path: Path) -> None:
    path = tmp_path / "plain.csv"
    path.write_text("system id,Owner,Shelf life,Migration years,Purpose,Algoritm,Cost\n"
                    "a,Team A,1,1,signature,RSA-3072,12\n", encoding="utf-8")
    with pytest.raises(InventoryError) as caught:
        load_inventory(str(path))
    lines = [line.replace(str(path), "FILE") for line in caught.value.diagnostic_lines()]
    assert ("FILE:1:6: column 'Algoritm' is not a known column; did you mean 'algorithm'? (rename it, or map it "
            "with --columns)") in lines
    assert ("FILE:1:1: the header row has no 'algorithm' column; name the column as in docs/inventory-format.md or "
            "map it with --columns") in lines
    path.write_text("system id,Owner,Shelf life,Migration years,Purpose,Algorithm,Cost\n"
                    "a,Team A,1,1,signature,RSA-3072,12\n", encoding="utf-8")
    inventory = load_inventory(str(path))
    assert inventory.systems[0].owner == "Team A" and inventory.organization == "plain"
    assert any("column 'Cost' is not read" in w for w in inventory.warnings)
    assert any("no organization column" in w for w in inventory.warnings)


def _workbook(tmp_path: Path, bad: bool = False) -> Path:
    book = openpyxl.Workbook()
    notes = book.active
    notes.title = "Read me"
    notes["A1"] = "Crypto register of Larchmont Cooperative Bank"
    sheet = book.create_sheet("Systems")
    sheet["A1"] = "Exported 2026-11-30"
    sheet.append([])
    sheet.append(HEADER)  # the header is on row 3
    for row in ROWS:
        cells: list[object] = []
        for index, value in enumerate(row):
            if HEADER[index] in ("Data retention (years)", "Time to migrate", "Key bits") and value:
                cells.append(float(value))  # numbers typed as numbers
            elif HEADER[index] == "HVA" and value:
                cells.append(value == "yes")  # a real boolean cell
            else:
                cells.append(value or None)
        sheet.append(cells)
    for _ in range(5):  # blank rows 9 to 13, then a bad row 14
        sheet.append([])
    if bad:
        sheet.append(["print-room", "Print room", "", "seven", 1, "signing", "ECDSA", None, "P-256"])
    path = tmp_path / "register.xlsx"
    book.save(path)
    return path


def test_xlsx_from_openpyxl_with_a_sheet_and_header_row(tmp_path: Path) -> None:
    mapping = Path(_write_map(tmp_path))
    mapping.write_text(COLUMN_MAP + "sheet: Systems\nheader_row: 3\n", encoding="utf-8")
    path = _workbook(tmp_path)
    copy = tmp_path / "register.dat"  # recognised by content, not by name
    copy.write_bytes(path.read_bytes())
    for name in (path, copy):
        _check_register(load_inventory(str(name), columns=str(mapping)))


def test_xlsx_errors_name_sheet_and_cell(tmp_path: Path) -> None:
    mapping = Path(_write_map(tmp_path))
    mapping.write_text(COLUMN_MAP + "sheet: Systems\nheader_row: 3\n", encoding="utf-8")
    path = _workbook(tmp_path, bad=True)
    with pytest.raises(InventoryError) as caught:
        load_inventory(str(path), columns=str(mapping))
    assert [line.replace(str(path), "FILE") for line in caught.value.diagnostic_lines()] == [
        "FILE:Systems!D14: 'shelf_life_years' in system 'print-room' must be a number, got text; write digits without "
        "quotes"]


def _ods(path: Path, rows: list[list[str]]) -> None:
    """A minimal OpenDocument spreadsheet, written from its XML (OpenDocument 1.2, OASIS)."""
    cells = "".join(
        "<table:table-row>" + "".join(
            f'<table:table-cell office:value-type="string"><text:p>{value}</text:p></table:table-cell>'
            if value else "<table:table-cell/>" for value in row) + "</table:table-row>"
        for row in rows)
    content = (
        '<?xml version="1.0" encoding="UTF-8"?>'
        '<office:document-content xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" '
        'xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" '
        'xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0" office:version="1.2">'
        f'<office:body><office:spreadsheet><table:table table:name="Uses">{cells}</table:table>'
        "</office:spreadsheet></office:body></office:document-content>")
    manifest = (
        '<?xml version="1.0" encoding="UTF-8"?>'
        '<manifest:manifest xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0" manifest:version="1.2">'
        '<manifest:file-entry manifest:full-path="/" manifest:media-type="application/vnd.oasis.opendocument.spreadsheet"/>'
        '<manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/>'
        "</manifest:manifest>")
    with zipfile.ZipFile(path, "w") as archive:
        archive.writestr(zipfile.ZipInfo("mimetype"), "application/vnd.oasis.opendocument.spreadsheet")
        archive.writestr("META-INF/manifest.xml", manifest, zipfile.ZIP_DEFLATED)
        archive.writestr("content.xml", content, zipfile.ZIP_DEFLATED)


def test_ods(tmp_path: Path) -> None:
    path = tmp_path / "register.ods"
    _ods(path, [HEADER, *ROWS])
    _check_register(load_inventory(str(path), columns=_write_map(tmp_path)))


def test_a_zip_bomb_is_refused_before_it_is_unpacked(tmp_path: Path) -> None:
    path = tmp_path / "bomb.xlsx"
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("xl/workbook.xml", "<workbook/>")
        archive.writestr("xl/worksheets/sheet1.xml", b"\0" * (20 * 1024 * 1024))
    with pytest.raises(InventoryError) as caught:
        load_inventory(str(path))
    assert "a ZIP bomb?" in caught.value.diagnostics() and str(path) in caught.value.diagnostics()


def test_a_yaml_file_named_csv_is_read_as_yaml(tmp_path: Path) -> None:
    path = tmp_path / "actually.csv"
    path.write_text("version: 1\norganization: O\nsystems: []\n", encoding="utf-8")
    assert load_inventory(str(path)).organization == "O"


def test_column_map_errors_name_their_place(tmp_path: Path) -> None:
    path = tmp_path / "columns.yaml"
    path.write_text("columns:\n  Cipher: algoritm\nvalues:\n  purpose:\n    Key Exchange: key-exchange\n  owner:\n"
                    "    A: b\n", encoding="utf-8")
    with pytest.raises(InventoryError) as caught:
        load_inventory(str(_write_csv(tmp_path)), columns=str(path))
    assert [line.replace(str(path), "MAP") for line in caught.value.diagnostic_lines()] == [
        "MAP:2:11: 'algoritm' is not a pqtriage column; did you mean 'algorithm'?",
        "MAP:5:19: 'purpose' in the column map's values of 'purpose' is 'key-exchange', not a known value; use one "
        "of: key-establishment, encryption, signature, authentication, integrity",
        "MAP:6:3: 'values' names 'owner', which is not a column with a fixed set of values; use purpose, "
        "criticality, exposure, impact, hosting.model, key_storage ...",
        "3 problems in MAP; nothing was triaged",
    ]


def test_dates_and_numbers_in_workbook_cells(tmp_path: Path) -> None:
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Uses"
    sheet.append(["id", "shelf_life_years", "migration_years", "version", "purpose", "algorithm", "extra.reviewed",
                  "extra.racks"])
    sheet.append(["42", 7, 2, 3.5, "signature", "ML-DSA-65", dt.date(2026, 11, 30), 4])
    buffer = io.BytesIO()
    book.save(buffer)
    path = tmp_path / "cells.xlsx"
    path.write_bytes(buffer.getvalue())
    (system,) = load_inventory(str(path)).systems
    assert (system.id, system.version, system.extra) == ("42", "3.5", (("reviewed", "2026-11-30"), ("racks", 4)))
