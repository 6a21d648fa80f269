"""One vocabulary: the same verdict words in every output, option and document; --fail-on takes
them and the short forms people type, and names the systems when it triggers."""

from __future__ import annotations

import csv
import io
import json
import re
from pathlib import Path

import pytest

from pqtriage.cli import main
from pqtriage.model.verdict import Verdict

ROOT = Path(__file__).resolve().parents[1]
DEMO = str(ROOT / "inventories" / "demo.yaml")
AS_OF = ["--as-of", "2026-12-01"]
WORDS = [v.value for v in Verdict]
OLD_WORDS = (re.compile(r"broken now"), re.compile(r"(?<!with)in margin"), re.compile(r"\| resistant \|"))


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize(("word", "verdict"), [
    ("broken", "classically-broken"), ("classically-broken", "classically-broken"), ("Broken", "classically-broken"),
    ("exposed", "exposed"), ("unassessed", "unassessed"), ("margin", "within-margin"),
    ("within_margin", "within-margin"), ("resistant", "quantum-resistant"), ("quantum-resistant", "quantum-resistant"),
])
def test_fail_on_takes_the_words_and_short_forms(capsys: pytest.CaptureFixture[str], word: str, verdict: str) -> None:
    code, _, err = run(capsys, "triage", DEMO, *AS_OF, "--format", "json", "--fail-on", word)
    assert code == 1  # the demo has systems of every verdict
    assert err.startswith(f"--fail-on {verdict}: ")


def test_fail_on_names_the_systems_bounded(capsys: pytest.CaptureFixture[str]) -> None:
    code, _, err = run(capsys, "triage", DEMO, *AS_OF, "--format", "csv", "--fail-on", "broken")
    assert code == 1
    # The demo's five classically broken systems, in rank order, each with its verdict.
    assert err == ("--fail-on classically-broken: 5 of 31 systems at or above it: site-vpn (classically-broken), "
                   "mainframe-link (classically-broken), contract-signing (classically-broken), "
                   "ftp-gateway (classically-broken), ssh-build (classically-broken)\n")
    code, _, err = run(capsys, "triage", DEMO, *AS_OF, "--format", "csv", "--fail-on", "exposed")
    # 5 broken + 18 exposed = 23 systems: the first 10 named, then the count of the rest.
    assert code == 1 and err.startswith("--fail-on exposed: 23 of 31 systems at or above it: site-vpn")
    assert err.rstrip().endswith("and 13 more") and err.count("(") == 10


def test_fail_on_refuses_other_words(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, err = run(capsys, "triage", DEMO, *AS_OF, "--fail-on", "dangerous")
    assert code == 2 and out == ""
    assert "'dangerous' is not a verdict" in err and "classically-broken" in err and len(err.strip().splitlines()) == 1


def test_fail_on_not_triggered_says_nothing(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    inv = tmp_path / "ok.yaml"
    inv.write_text("version: 1\norganization: O\nsystems:\n  - id: a\n    shelf_life_years: 1\n"
                   "    migration_years: 1\n    uses: [{purpose: key-establishment, algorithm: ML-KEM-768}]\n")
    code, _, err = run(capsys, "triage", str(inv), *AS_OF, "--format", "json", "--fail-on", "margin")
    assert code == 0 and "--fail-on" not in err


def test_the_same_words_in_every_output(capsys: pytest.CaptureFixture[str]) -> None:
    outputs = {}
    for fmt in ("table", "markdown", "json", "csv", "sarif", "cbom"):
        code, out, _ = run(capsys, "triage", DEMO, *AS_OF, "--format", fmt)
        assert code == 0
        outputs[fmt] = out
    for fmt, text in outputs.items():
        for old in OLD_WORDS:
            assert not old.search(text), (fmt, old.pattern)
    data = json.loads(outputs["json"])
    expected = [item["verdict"] for item in data["items"]]
    assert set(expected) == set(WORDS)
    assert [row["verdict"] for row in csv.DictReader(io.StringIO(outputs["csv"], newline=""))] == expected
    ranked = outputs["markdown"].split("## Ranked systems", 1)[1].split("## System detail", 1)[0]
    assert [re.split(r"(?<!\\)\|", line)[10].strip() for line in ranked.splitlines()
            if re.match(r"^\| \d+ \|", line)] == expected
    rows = outputs["table"].split("as of 2026-12-01, profile")[0]  # the table, without the summary under it
    table = [m.group(1) for m in re.finditer(r"^\s*\d+ \S+\s.*?\s(" + "|".join(WORDS) + r")\s", rows,
                                             flags=re.MULTILINE)]
    assert table == expected
    rules = [r["id"] for r in json.loads(outputs["sarif"])["runs"][0]["tool"]["driver"]["rules"]]
    assert rules[:5] == WORDS
    cbom = [p["value"] for c in json.loads(outputs["cbom"])["components"] if c["type"] == "application"
            for p in c["properties"] if p["name"] == "pqtriage:verdict"]
    assert cbom == expected


def test_the_documents_use_the_words() -> None:
    for name in ("README.md", "docs/method.md", "docs/cli.md", "docs/interop.md"):
        text = (ROOT / name).read_text(encoding="utf-8")
        for old in OLD_WORDS[:2]:
            assert not old.search(text), (name, old.pattern)
    method = (ROOT / "docs" / "method.md").read_text(encoding="utf-8")
    assert all(f"`{word}`" in method for word in WORDS)
