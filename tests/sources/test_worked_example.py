"""The worked example of docs/inventory-format.md runs as the document says (fictional data).

The workbook is written with openpyxl from the table in the document; the column map is the
document's own YAML block.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import openpyxl
import pytest

from pqtriage.cli import main
from pqtriage.formats.notes import CAUTIONS

DOC = Path(__file__).resolve().parents[2] / "docs" / "inventory-format.md"


def _example() -> tuple[list[list[str]], str]:
    text = DOC.read_text(encoding="utf-8").split("## A worked example", 1)[1]
    table = [line for line in text.splitlines() if line.startswith("| ")]
    rows = [[cell.strip() for cell in line.strip("|").split("|")] for line in table]
    mapping = re.search(r"Its column map, `wrenmouth-columns.yaml`:\n\n```yaml\n(.*?)```", text, re.S)
    assert mapping is not None
    return rows, mapping.group(1)


def _files(tmp_path: Path, bits: str = "2048") -> tuple[str, str]:
    rows, mapping = _example()
    book = openpyxl.Workbook()
    book.active.title = "About"
    sheet = book.create_sheet("Register")
    sheet.append(["Crypto register, security office"])
    for row in rows:
        sheet.append([(bits if value == "2048" else value) or None for value in row])
    path = tmp_path / "register.xlsx"
    book.save(path)
    columns = tmp_path / "wrenmouth-columns.yaml"
    columns.write_text(mapping, encoding="utf-8")
    return str(path), str(columns)


def test_check_names_the_cell(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path, columns = _files(tmp_path, bits="2k")
    assert main(["check", path, "--columns", columns]) == 2
    _, err = capsys.readouterr()
    assert err.startswith(f"pqtriage: error: {path}:Register!H5: 'key_size' in use #1 of system 'crew-roster' "
                          "must be a whole number")
    path, columns = _files(tmp_path)
    assert main(["check", path, "--columns", columns]) == 0
    _, err = capsys.readouterr()
    assert "valid inventory of 3 systems and 4 uses" in err


def test_filter_group_report_and_workbook(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path, columns = _files(tmp_path)
    base = [path, "--columns", columns, "--as-of", "2026-12-01"]
    assert main(["triage", *base, "-f", "json", "--where", "criticality >= high and hosting.model = on-premises",
                 "--group-by", "business_unit"]) == 0
    data = json.loads(capsys.readouterr()[0])
    assert [i["id"] for i in data["items"]] == ["crew-roster"]
    assert data["selection"]["groups"] == [{"value": "People", "systems": ["crew-roster"]}]
    folder = tmp_path / "action-lists"
    assert main(["report", *base, "--by", "owner", "-o", str(folder)]) == 0
    capsys.readouterr()
    assert sorted(p.name for p in folder.iterdir()) == [
        "hr-systems-idris-moen.md", "index.md", "marine-ops-hal-brekke.md", "web-team-oona-pell.md"]
    crew = (folder / "hr-systems-idris-moen.md").read_text(encoding="utf-8")
    assert "| crew-roster | RSA-2048 | key-establishment |" in crew
    assert "ML-KEM-768 \\(FIPS 203\\) or hybrid X25519MLKEM768" in crew
    cautions = crew.split("## Cautions", 1)[1]
    assert cautions.count("\n- ") == len(CAUTIONS) and "This report is not a certification" in cautions
    out = tmp_path / "triage.xlsx"
    assert main(["triage", *base, "--format", "xlsx", "-o", str(out)]) == 0
    capsys.readouterr()
    assert main(["check", str(out)]) == 0
    assert "valid inventory of 3 systems and 4 uses" in capsys.readouterr()[1]
