"""--top, --where and --group-by from the command line: every format or refused, never ignored;
report --by owner; --format xlsx written to a file."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import openpyxl
import pytest

from pqtriage.cli import main

DEMO = str(Path(__file__).resolve().parents[1] / "inventories" / "demo.yaml")
AS_OF = ("--as-of", "2026-12-01")


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def test_top_works_for_every_format(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    code, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "json")
    full = json.loads(out)
    top_two = [item["id"] for item in full["items"][:2]]
    code, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "json", "--top", "2")
    data = json.loads(out)
    assert code == 0 and [i["id"] for i in data["items"]] == top_two
    assert data["summary"] == full["summary"] and data["selection"]["total_systems"] == len(full["items"])
    _, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "csv", "--top", "2")
    assert [r["system_id"] for r in csv.DictReader(io.StringIO(out, newline=""))] == top_two
    _, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "markdown", "--top", "2")
    assert out.count("\n### ") == 2 and "> **View.** Showing 2 of 31 systems \\(the top 2\\)." in out
    _, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "sarif", "--top", "2")
    sarif = json.loads(out)["runs"][0]
    assert {r["properties"]["system"] for r in sarif["results"]} <= set(top_two)
    assert sarif["properties"]["view"].startswith("Showing 2 of 31 systems")
    _, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "cbom", "--top", "2")
    assert [c["bom-ref"] for c in json.loads(out)["components"] if c["type"] == "application"] == top_two
    _, out, _ = run(capsys, "triage", DEMO, *AS_OF, "--top", "2")
    assert "Showing the top 2 of 31 systems." in out
    book = tmp_path / "top.xlsx"
    code, _, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "xlsx", "--top", "2", "-o", str(book))
    rows = list(openpyxl.load_workbook(book)["Results"].iter_rows(values_only=True))
    assert code == 0 and [r[1] for r in rows[1:]] == top_two


def test_where_and_group_by(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "json", "--where", "criticality = critical",
                       "--group-by", "exposure")
    data = json.loads(out)
    assert code == 0 and data["selection"]["where"] == "criticality = critical"
    assert {i["criticality"] for i in data["items"]} == {"critical"}
    grouped = [s for g in data["selection"]["groups"] for s in g["systems"]]
    assert sorted(grouped) == sorted(i["id"] for i in data["items"])


@pytest.mark.parametrize("args, words", [
    (("-f", "sarif", "--group-by", "owner"), "--group-by does not apply to --format sarif"),
    (("-f", "cbom", "--group-by", "owner"), "--group-by does not apply to --format cbom"),
    (("--where", "criticality >= hgh"), "--where, column 16: 'hgh' is not a value of criticality"),
    (("--group-by", "ower"), "did you mean 'owner'?"),
])
def test_refused_with_one_line(capsys: pytest.CaptureFixture[str], args: tuple[str, ...], words: str) -> None:
    code, out, err = run(capsys, "triage", DEMO, *AS_OF, *args)
    assert code == 2 and out == "" and len(err.splitlines()) == 1 and words in err


def test_fail_on_looks_at_the_systems_shown(capsys: pytest.CaptureFixture[str]) -> None:
    code, _, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "json", "--fail-on", "exposed")
    assert code == 1
    code, _, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "json", "--fail-on", "exposed",
                     "--where", "verdict = quantum-resistant")
    assert code == 0


def test_xlsx_is_not_printed_on_a_terminal(capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr("sys.stdout.isatty", lambda: True)
    code, out, err = run(capsys, "triage", DEMO, *AS_OF, "-f", "xlsx")
    assert code == 2 and out == "" and "give -o FILE" in err


def test_report_by_owner_writes_one_list_per_owner(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    folder = tmp_path / "lists"
    code, _, err = run(capsys, "report", DEMO, *AS_OF, "--by", "owner", "-o", str(folder))
    assert code == 0, err
    _, out, _ = run(capsys, "triage", DEMO, *AS_OF, "-f", "json")
    items = json.loads(out)["items"]
    owners = {i["owner"] or "(none)" for i in items}
    files = sorted(p.name for p in folder.iterdir())
    assert "index.md" in files and len(files) == len(owners) + 1
    listed: list[str] = []
    for path in folder.iterdir():
        if path.name == "index.md":
            continue
        text = path.read_text(encoding="utf-8")
        assert text.startswith("# Post-quantum action list: ") and "## Cautions" in text
        table = text.split("## Systems")[1].split("## Uses")[0]
        listed += [line.split(" | ")[1] for line in table.splitlines() if line.startswith("| ") and
                   not line.startswith("| Rank")]
    assert sorted(listed) == sorted(i["id"] for i in items)  # every system in exactly one list
    index = (folder / "index.md").read_text(encoding="utf-8")
    assert all(f"]({name})" in index for name in files if name != "index.md")
