"""The command line: exit codes, one-line errors, formats, reproducible reports."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from pqtriage.cli import main
from pqtriage.cli.common import ResultFormatChoice, result_formats

ROOT = Path(__file__).resolve().parents[1]
DEMO = str(ROOT / "inventories" / "demo.yaml")
AS_OF = ["--as-of", "2026-12-01"]


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def test_every_format_choice_is_mapped() -> None:
    mapping = result_formats()
    assert set(mapping) == {c.value for c in ResultFormatChoice}


def test_triage_demo_json_structure(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "triage", DEMO, *AS_OF, "--format", "json")
    assert code == 0
    data = json.loads(out)
    assert {"items", "summary"} <= set(data)
    item = data["items"][0]
    assert {"id", "name", "rank", "verdict", "exposure_probability", "margin_years", "start_by", "reason", "uses"} <= set(item)
    assert {"algorithm", "purpose", "classical_bits", "quantum_attack", "replacement", "verdict"} <= set(item["uses"][0])
    assert [i["rank"] for i in data["items"]] == list(range(1, len(data["items"]) + 1))
    verdicts = {i["verdict"] for i in data["items"]}
    # The demo covers every verdict.
    assert verdicts == {"classically-broken", "exposed", "unassessed", "within-margin", "quantum-resistant"}
    assert data["summary"]["systems"] == len(data["items"]) == 31


@pytest.mark.parametrize("fail_on, expected", [("exposed", 1), ("classically-broken", 1), (None, 0)])
def test_fail_on_gates(capsys: pytest.CaptureFixture[str], fail_on: str | None, expected: int) -> None:
    args = ["triage", DEMO, *AS_OF, "--format", "json"]
    if fail_on:
        args += ["--fail-on", fail_on]
    assert run(capsys, *args)[0] == expected


def test_fail_on_not_reached(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    inv = tmp_path / "ok.yaml"
    inv.write_text("version: 1\norganization: O\nsystems:\n  - id: a\n    shelf_life_years: 1\n"
                   "    migration_years: 1\n    uses: [{purpose: key-establishment, algorithm: ML-KEM-768}]\n")
    assert run(capsys, "triage", str(inv), *AS_OF, "--fail-on", "within-margin")[0] == 0


def test_bad_input_is_one_line_exit_2(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    inv = tmp_path / "bad.yaml"
    # One mistake, one line (a file with several lists each, then a count: tests/sources/test_every_error.py).
    inv.write_text("version: 1\norganization: O\nsystems:\n  - id: a\n    shelf_life_years: -3\n"
                   "    migration_years: 1\n    uses: []\n")
    code, out, err = run(capsys, "triage", str(inv))
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and f"{inv}:5:23:" in err and "Traceback" not in err


@pytest.mark.parametrize(
    "args, needle",
    [
        (["triage", "/nonexistent/inv.yaml"], "file not found"),
        (["triage", DEMO, "--as-of", "yesterday"], "is not a date"),
        (["triage", DEMO, "--format", "pdf"], "pdf"),
        (["triage", DEMO, "--profile", "survey-2025-uper"], "did you mean 'survey-2025-upper'"),
        (["nonsense-command"], "No such command"),
    ],
)
def test_usage_errors_exit_2(capsys: pytest.CaptureFixture[str], args: list[str], needle: str) -> None:
    code, _, err = run(capsys, *args)
    assert code == 2 and needle in err and err.count("\n") == 1


def test_report_is_byte_identical_and_writes_chart(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    first, second = tmp_path / "a.md", tmp_path / "b.md"
    assert run(capsys, "report", DEMO, *AS_OF, "-o", str(first))[0] == 0
    assert run(capsys, "report", DEMO, *AS_OF, "-o", str(second))[0] == 0
    a = first.read_text(encoding="utf-8")
    b = second.read_text(encoding="utf-8").replace("b-timeline.svg", "a-timeline.svg")
    assert a == b
    assert (tmp_path / "a-timeline.svg").read_text().startswith("<?xml") or "<svg" in (tmp_path / "a-timeline.svg").read_text()
    assert "](a-timeline.svg)" in a
    for section in ("## Executive summary", "## Ranked systems", "## System detail", "## Method",
                    "## Assumptions", "## Cautions", "## Sources", "## Sensitivity to the CRQC arrival"):
        assert section in a
    # Every system of the demo appears in the ranked table exactly once.
    table = a.split("## Ranked systems")[1].split("## System detail")[0]
    assert sum(1 for line in table.splitlines() if line.startswith("| ") and line[2].isdigit()) == 31


def test_check_and_init(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    target = tmp_path / "inventory.yaml"
    assert run(capsys, "init", str(target))[0] == 0
    code, _, err = run(capsys, "check", str(target))
    assert code == 0 and "valid inventory of 2 systems" in err
    assert run(capsys, "init", str(target))[0] == 2  # refuses to overwrite


def test_check_strict_turns_warnings_into_errors(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    inv = tmp_path / "inv.yaml"
    inv.write_text("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 1, migration_years: 1,"
                   " depends_on: [external-pki], uses: []}\n")
    assert run(capsys, "check", str(inv))[0] == 0
    assert run(capsys, "check", str(inv), "--strict")[0] == 2


def test_estimate_json_fields(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "estimate", "RSA-2048", "--format", "json")
    assert code == 0
    data = json.loads(out)
    for key in ("algorithm", "attack", "method", "classical_security_bits", "logical_qubits", "toffoli_count",
                "code_distance", "physical_qubits", "runtime_hours", "arrival"):
        assert key in data
    assert data["attack"] == "shor" and data["classical_security_bits"] == 112  # SP 800-57 Table 2
    assert data["grover_iterations_log2"] is None  # not applicable: null, not zero


def test_plan_json_fields(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "plan", DEMO, *AS_OF, "--format", "json", "--capacity", "4")
    assert code == 0
    item = json.loads(out)["items"][0]
    for key in ("id", "planned_start", "planned_finish", "deadlines", "meets_deadlines", "meets_start_by"):
        assert key in item


def test_installed_command_runs_without_traceback(tmp_path: Path) -> None:
    bad = tmp_path / "bad.yaml"
    bad.write_bytes(b"version: 1\norganization: \xff\n")
    proc = subprocess.run([sys.executable, "-m", "pqtriage.cli", "triage", str(bad)],
                          capture_output=True, text=True, timeout=60, cwd=ROOT)
    assert proc.returncode == 2 and "Traceback" not in proc.stderr and "not valid UTF-8" in proc.stderr
