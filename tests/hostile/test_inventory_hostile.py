"""Hostile inventories through the CLI in a child process: bounded time and memory, no traceback.

Every case either ends with exit code 2 and exactly one stderr line naming
file:line:column (or the file, when the problem is the whole file), or is
triaged with anything unknown shown as unassessed in every output. Budgets, in
the child's CPU time so that other load on the machine does not fail them: 4 s
of work beyond the start-up of a run on a tiny valid inventory, and 200 MB of
peak memory; the generated large files get a wider budget, written beside them.
Wall-clock time is never asserted: the runner's hard timeout is a hang guard.
"""

from __future__ import annotations

import csv
import io
import json
import os
import re
from pathlib import Path

import pytest

from pqtriage.formats.text import visible
from tests.hostile.generate_corpus import ACCEPTED, CASES, INJECTION, VALID, write_case
from tests.hostile.runner import Outcome, run_cli

AS_OF = "2026-12-01"
TIME_BUDGET = 4.0
"""CPU seconds of work beyond start-up (ordinary cases measured well under 0.1 s here)."""
MEMORY_BUDGET = 200 * 1024 * 1024
LARGE_TIME_BUDGET = {"flow-flood-12mb": 16.0, "inventory-50mb": 6.0, "alias-bomb": TIME_BUDGET}
"""CPU seconds beyond start-up for the generated large files: the flood is parsed up to the value
limit (measured at about 3.6 s here)."""
LARGE_MEMORY_BUDGET = {"flow-flood-12mb": 300 * 1024 * 1024, "inventory-50mb": 300 * 1024 * 1024}
"""The flood holds up to 1,000,000 parsed values; the 50 MB file is read (once) before the size check."""

EXPECTED: dict[str, str] = {
    "alias-bomb": "alias bomb",
    "deep-nesting-1000": "nesting deeper than",  # our 64-level limit, or libyaml's own in newer wheels
    "flow-flood-12mb": "has more than 1,000,000 values",
    "inventory-50mb": "larger than 16 MiB",
    "nul-byte": "NUL byte",
    "invalid-utf8": "not valid UTF-8",
    "tab-indentation": "invalid YAML",
    "duplicate-key": "duplicate key 'name'",
    "duplicate-top-key": "duplicate key 'version'",
    "merge-key": "merge keys (<<) are not supported",
    "two-documents": "single document",
    "huge-integer": "cannot read value",
    "float-overflow": "finite number",
    "nan": "finite number",
    "infinity": "finite number",
    "minus-infinity": "finite number",
    "negative-years": "below the minimum",
    "absurd-years": "above the maximum",
    "negative-trust-years": "below the minimum",
    "version-absurd": "above the maximum",
    "wrong-type-id-list": "must be text",
    "wrong-type-name-map": "must be text",
    "wrong-type-years-text": "must be a number",
    "wrong-type-years-bool": "must be a number",
    "wrong-type-key-size-float": "whole number",
    "wrong-type-purpose-number": "not a known value",
    "wrong-type-algorithm-null": "must be text",
    "wrong-type-uses-text": "must be a list",
    "wrong-type-systems-map": "must be a list",
    "wrong-type-root-list": "must be a mapping",
    "wrong-type-root-scalar": "must be a mapping",
    "wrong-type-depends-on": "must be a list",
    "wrong-type-organization-null": "must be text",
    "python-tag": "must be text",
    "undefined-alias": "undefined alias",
    "self-alias": "nesting deeper",
    "empty-file": "the file is empty",
    "only-comments": "the file is empty",
    "truncated": "invalid YAML",
}
"""Each error case and the words its one-line message must contain."""

WHOLE_FILE = {"inventory-50mb", "flow-flood-12mb"}
"""Cases whose message may name only the file (the problem is the file as a whole)."""


@pytest.fixture(scope="module")
def startup(tmp_path_factory: pytest.TempPathFactory) -> float:
    """CPU seconds a run on the tiny valid inventory takes here (start-up and imports)."""
    path = tmp_path_factory.mktemp("startup") / "valid.yaml"
    path.write_text(VALID, encoding="utf-8")
    return min(run_cli("triage", str(path), "--as-of", AS_OF, "--format", "json").cpu_seconds
               for _ in range(2))


def assert_one_line_error(outcome: Outcome, path: Path, words: str, whole_file: bool = False) -> None:
    """Exit 2, one stderr line naming the place, no traceback."""
    assert "Traceback" not in outcome.stderr + outcome.stdout
    assert outcome.code == 2, outcome.stderr
    lines = outcome.stderr.splitlines()
    assert len(lines) == 1, outcome.stderr
    place = re.escape(str(path)) + (r"(:\d+:\d+)?: " if whole_file else r":\d+:\d+: ")
    assert re.match(r"pqtriage: error: " + place, lines[0]), lines[0]
    assert words in lines[0], lines[0]


def test_every_case_has_an_expectation() -> None:
    assert set(EXPECTED) == set(CASES)


@pytest.mark.parametrize("name", sorted(CASES))
def test_hostile_inventory_is_refused_with_one_line(name: str, tmp_path: Path, startup: float) -> None:
    path = write_case(tmp_path, name)
    outcome = run_cli("triage", str(path), "--as-of", AS_OF, "--format", "json")
    assert_one_line_error(outcome, path, EXPECTED[name], whole_file=name in WHOLE_FILE)
    assert outcome.cpu_seconds - startup < LARGE_TIME_BUDGET.get(name, TIME_BUDGET), outcome.cpu_seconds
    assert outcome.peak_rss < LARGE_MEMORY_BUDGET.get(name, MEMORY_BUDGET), outcome.peak_rss


def test_symlink_loop_is_refused(tmp_path: Path) -> None:
    (tmp_path / "a.yaml").symlink_to(tmp_path / "b.yaml")
    (tmp_path / "b.yaml").symlink_to(tmp_path / "a.yaml")
    path = tmp_path / "a.yaml"
    outcome = run_cli("triage", str(path))
    assert_one_line_error(outcome, path, "cannot read", whole_file=True)


ROOT_READS_ANYTHING = "root reads files whatever their mode (CI runs this as an unprivileged user)"


@pytest.mark.unprivileged
@pytest.mark.skipif(os.geteuid() == 0, reason=ROOT_READS_ANYTHING)
def test_unreadable_file_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "secret.yaml"
    path.write_text(VALID, encoding="utf-8")
    path.chmod(0)
    outcome = run_cli("triage", str(path))
    assert_one_line_error(outcome, path, "cannot read", whole_file=True)


@pytest.mark.parametrize("target", ["fifo", "/dev/zero", "folder"])
def test_special_files_are_refused_without_blocking(target: str, tmp_path: Path) -> None:
    if target == "fifo":
        path = tmp_path / "pipe.yaml"
        os.mkfifo(path)
    elif target == "folder":
        path = tmp_path
    else:
        path = Path(target)
    outcome = run_cli("triage", str(path))
    assert_one_line_error(outcome, path, "not a", whole_file=True)  # returned: it did not block


@pytest.mark.parametrize("as_of, words", [("9999-12-31", "outside"), ("0001-01-01", "outside"),
                                          ("-2026-01-01", "not a date"), ("2026-02-30", "not a date")])
def test_absurd_as_of_dates_are_refused(as_of: str, words: str, tmp_path: Path) -> None:
    path = tmp_path / "valid.yaml"
    path.write_text(VALID, encoding="utf-8")
    outcome = run_cli("triage", str(path), "--as-of", as_of)
    assert "Traceback" not in outcome.stderr
    assert outcome.code == 2 and len(outcome.stderr.splitlines()) == 1 and words in outcome.stderr


@pytest.mark.parametrize("as_of", ["1970-01-01", "2199-12-31"])
def test_edge_as_of_dates_are_triaged(as_of: str) -> None:
    outcome = run_cli("triage", "inventories/demo.yaml", "--as-of", as_of, "--format", "json")
    assert outcome.code == 0, outcome.stderr
    assert len(json.loads(outcome.stdout)["items"]) > 0


# Output formats every accepted case is checked in: (name, CLI arguments after the inventory path).
OUTPUTS: list[tuple[str, tuple[str, ...]]] = [
    ("table", ("triage",)),
    ("json", ("triage", "--format", "json")),
    ("markdown", ("report",)),
    ("csv", ("triage", "--format", "csv")),
    ("sarif", ("triage", "--format", "sarif")),
    ("cbom", ("triage", "--format", "cbom")),
]


def render_all(path: Path) -> dict[str, Outcome]:
    """Every output format of one inventory."""
    results = {}
    for name, args in OUTPUTS:
        outcome = run_cli(args[0], str(path), "--as-of", AS_OF, *args[1:])
        assert "Traceback" not in outcome.stdout + outcome.stderr
        assert outcome.code == 0, f"{name}: {outcome.stderr}"
        results[name] = outcome
    return results


@pytest.mark.parametrize("name", sorted(ACCEPTED))
def test_accepted_cases_are_triaged_everywhere(name: str, tmp_path: Path) -> None:
    path = write_case(tmp_path, name)
    results = render_all(path)
    data = json.loads(results["json"].stdout)
    uses = [u for item in data["items"] for u in item["uses"]]
    assert uses, "every accepted case has at least one use"
    for output in results.values():
        assert "\x1b" not in output.stdout
    if name == "big-integer":
        assert [u["verdict"] for u in uses] == ["unassessed"]
        assert "key size 9999999999999999999999999999999999999999 is not a plausible number of bits" in uses[0]["reason"]
    if name in ("id-looks-like-a-boolean", "id-with-leading-zero"):
        assert [item["id"] for item in data["items"]] == [{"id-looks-like-a-boolean": "true"}.get(name, "010")]
    if name == "unknown-algorithm":
        assert [u["verdict"] for u in uses] == ["unassessed"]
        assert "unassessed" in results["table"].stdout and "unassessed" in results["markdown"].stdout
        (row,) = csv.DictReader(io.StringIO(results["csv"].stdout))
        assert row["verdict"] == "unassessed"
        (alert,) = json.loads(results["sarif"].stdout)["runs"][0]["results"]
        assert alert["ruleId"] == "unassessed" and alert["level"] == "warning"
        cbom = json.loads(results["cbom"].stdout)
        assert {"name": "pqtriage:verdict", "value": "unassessed"} in cbom["components"][0]["properties"]


def _unescaped_pipes(line: str) -> int:
    return len(re.findall(r"(?<!\\)\|", line))


def test_injection_survives_nowhere_raw(tmp_path: Path) -> None:
    path = write_case(tmp_path, "injection")
    results = render_all(path)
    # JSON keeps the exact original text as data (that is its job), in every text field.
    data = json.loads(results["json"].stdout)
    assert data["inventory"]["organization"] == INJECTION
    (item,) = data["items"]
    assert item["id"] == INJECTION and item["name"] == INJECTION and item["owner"] == INJECTION
    assert item["uses"][0]["source"]["detail"] == INJECTION
    assert item["uses"][1]["algorithm"] == INJECTION and item["uses"][1]["verdict"] == "unassessed"
    assert item["uses"][2]["curve"] == INJECTION
    # Terminal (not a tty): no escape byte; markup printed as text, not interpreted.
    table = results["table"].stdout
    assert "\x1b" not in table and "\\x1b" in table
    assert "[bold" in table
    # Markdown: no raw HTML, no escape byte, pipes inside table cells escaped.
    report = results["markdown"].stdout
    assert "<script>" not in report and "\x1b" not in report and "&lt;script&gt;" in report
    assert "**md**" not in report and "\\*\\*md\\*\\*" in report.replace("&#92;", "\\")
    header_pipes = 0
    rows = 0
    for line in report.splitlines():
        if not line.startswith("|"):
            header_pipes = 0
            continue
        if header_pipes == 0:  # the first line of each table is its header
            header_pipes = _unescaped_pipes(line)
        assert _unescaped_pipes(line) == header_pipes, line
        rows += 1
    assert rows > 4
    # SARIF (plain-text messages, SARIF 2.1.0 section 3.11.8): valid JSON, the text kept as data
    # with only control characters shown as escapes (as in the terminal); no raw escape byte.
    sarif = results["sarif"].stdout
    assert "\x1b" not in sarif
    run = json.loads(sarif)["runs"][0]
    assert run["properties"]["organization"] == visible(INJECTION)
    assert {r["properties"]["system"] for r in run["results"]} == {visible(INJECTION)}
    assert all(r["message"]["text"].startswith(visible(INJECTION) + ": ") for r in run["results"])
    # CBOM: valid JSON keeping the exact text, and reading the CBOM back gives the same text.
    cbom_text = results["cbom"].stdout
    assert "\x1b" not in cbom_text  # JSON escapes control characters (RFC 8259 section 7)
    cbom = json.loads(cbom_text)
    system = cbom["components"][0]
    assert system["bom-ref"] == INJECTION and system["name"] == INJECTION
    assert {"name": "pqtriage:owner", "value": INJECTION} in system["properties"]
    cbom_file = tmp_path / "out.cdx.json"
    cbom_file.write_text(cbom_text, encoding="utf-8")
    again = run_cli("triage", str(cbom_file), "--as-of", AS_OF, "--format", "json")
    assert again.code == 0, again.stderr
    (item,) = json.loads(again.stdout)["items"]
    assert item["id"] == INJECTION and item["name"] == INJECTION and item["owner"] == INJECTION


FORMULAS = ("=HYPERLINK(\"http://example.invalid\")", "+1+2", "-3-4", "@SUM(A1)", "\tcmd", "\r=1")
"""Cell starts that a spreadsheet runs as a formula (OWASP, "CSV Injection")."""
NUMERIC_COLUMNS = {"rank", "x_years", "y_years", "exposure_probability", "margin_years"}


def test_csv_cells_cannot_start_a_formula(tmp_path: Path) -> None:
    systems = "".join(
        f"""  - id: {json.dumps(text + str(index))}
    name: {json.dumps(text)}
    owner: {json.dumps(text)}
    shelf_life_years: 10
    migration_years: 3
    uses:
      - purpose: signature
        algorithm: {json.dumps(text)}
"""
        for index, text in enumerate(FORMULAS)
    )
    path = tmp_path / "formulas.yaml"
    path.write_text(f"version: 1\norganization: Formula Test Guild\nsystems:\n{systems}", encoding="utf-8")
    outcome = run_cli("triage", str(path), "--as-of", AS_OF, "--format", "csv")
    assert outcome.code == 0, outcome.stderr
    rows = list(csv.DictReader(io.StringIO(outcome.stdout, newline="")))
    assert len(rows) == len(FORMULAS)
    names = set()
    for row in rows:
        for column, cell in row.items():
            if column not in NUMERIC_COLUMNS:
                assert not cell or cell[0] not in "=+-@\t\r", (column, cell)
        names.add(row["system_name"])
        assert row["weakest_algorithm"] == row["system_name"]  # the unknown name, kept as text
    # Neutralised by one leading apostrophe, the rest of the text kept (control characters
    # shown as escapes, as in every output).
    assert names == {"'" + visible(text) if visible(text)[0] in "=+-@" else visible(text) for text in FORMULAS}


# Discovery inputs (PEM, DER, PKCS#12, authorized_keys, TLS and SSH peers): DISCOVERY_CASES in
# tests/hostile/test_discovery_hostile.py.


@pytest.mark.parametrize("args", [("triage",), ("triage", "inventories/demo.yaml", "--format", "nope"),
                                  ("triage", "inventories/demo.yaml", "--top", "0"), ("no-such-command",)])
def test_bad_usage_is_one_line_with_exit_2(args: tuple[str, ...]) -> None:
    outcome = run_cli(*args)
    assert "Traceback" not in outcome.stderr
    assert outcome.code == 2 and len(outcome.stderr.splitlines()) == 1, outcome.stderr
