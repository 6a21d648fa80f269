"""End to end through the CLI: CBOM in, CBOM/SARIF/CSV out, --fail-on gating, schema and diff."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest
import yaml

from pqtriage.cli import main
from pqtriage.cli.common import ResultFormatChoice, result_formats
from pqtriage.sources.schema import json_schema
from tests.sources.cbom_example import cbom_text

AS_OF = ["--as-of", "2026-12-01"]

OLD = """\
version: 1
organization: Fennick Valley Orchards
systems:
  - {id: a, shelf_life_years: 10, migration_years: 3, uses: [{purpose: key-establishment, algorithm: RSA-2048}]}
  - {id: b, shelf_life_years: 10, migration_years: 3, uses: [{purpose: key-establishment, algorithm: ECDH, curve: P-256}]}
  - {id: c, shelf_life_years: 10, migration_years: 3, uses: [{purpose: encryption, algorithm: AES-256-GCM}]}
  - {id: d, shelf_life_years: 10, migration_years: 3, uses: [{purpose: key-establishment, algorithm: DH, key_size: 1024}]}
  - {id: e, shelf_life_years: 10, migration_years: 3, uses: [{purpose: key-establishment, algorithm: RSA-1024}]}
  - {id: g, shelf_life_years: 0, migration_years: 0.25, uses: [{purpose: key-establishment, algorithm: X25519}]}
"""
NEW = """\
version: 1
organization: Fennick Valley Orchards
systems:
  - {id: a, shelf_life_years: 10, migration_years: 3, uses: [{purpose: key-establishment, algorithm: RSA-2048}]}
  - {id: b, shelf_life_years: 10, migration_years: 3, uses: [{purpose: key-establishment, algorithm: ML-KEM-768}]}
  - {id: c, shelf_life_years: 10, migration_years: 3, uses: [{purpose: encryption, algorithm: AES-256-GCM}]}
  - {id: d, shelf_life_years: 0, migration_years: 0.25, uses: [{purpose: key-establishment, algorithm: X25519}]}
  - {id: f, shelf_life_years: 10, migration_years: 3, uses: [{purpose: encryption, algorithm: Kuznyechik}]}
  - {id: g, shelf_life_years: 10, migration_years: 3, uses: [{purpose: key-establishment, algorithm: X25519}]}
"""


def _file(tmp_path: Path, name: str, text: str) -> str:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_every_format_choice_is_mapped() -> None:
    mapping = result_formats()
    assert set(mapping) == {choice.value for choice in ResultFormatChoice}
    for name, formatter in mapping.items():
        assert formatter is None or formatter.name == name


def test_a_cbom_triages_directly(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bom = _file(tmp_path, "scan.json", cbom_text())
    assert main(["triage", bom, *AS_OF, "--format", "json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert [i["id"] for i in data["items"]] == ["app-booking", "app-ticket-api", "lib-cryptokit"]
    assert data["summary"]["use_counts"]["unassessed"] == 2  # Kuznyechik, RSA signature without a size


def test_fail_on_gates_a_pipeline_and_sarif_is_written(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # The pipeline step of docs/interop.md.
    inventory = _file(tmp_path, "inventory.yaml", NEW)
    sarif = tmp_path / "pqtriage.sarif"
    code = main(["triage", inventory, *AS_OF, "--fail-on", "exposed", "--format", "sarif", "-o", str(sarif)])
    assert code == 1  # a and g are exposed
    log = json.loads(sarif.read_text(encoding="utf-8"))
    assert {r["ruleId"] for r in log["runs"][0]["results"]} == {"exposed", "unassessed"}
    assert "exposed" in capsys.readouterr().err  # the summary goes to stderr
    assert main(["triage", inventory, *AS_OF, "--fail-on", "classically-broken", "--format", "csv"]) == 0
    rows = list(csv.reader(io.StringIO(capsys.readouterr().out, newline="")))
    assert len(rows) == 7 and rows[0][0] == "rank"


def test_cbom_output(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    inventory = _file(tmp_path, "inventory.yaml", NEW)
    assert main(["triage", inventory, *AS_OF, "--format", "cbom"]) == 0
    bom = json.loads(capsys.readouterr().out)
    assert (bom["bomFormat"], bom["specVersion"]) == ("CycloneDX", "1.6")


def test_schema_is_the_generated_one_and_validates_inventories(capsys: pytest.CaptureFixture[str]) -> None:
    jsonschema = pytest.importorskip("jsonschema")
    assert main(["schema"]) == 0
    printed = json.loads(capsys.readouterr().out)
    assert printed == json_schema()
    demo = yaml.safe_load(Path("inventories/demo.yaml").read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator(printed).validate(demo)
    demo["systems"][0]["shelf_life_yeras"] = 3
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.Draft202012Validator(printed).validate(demo)


def test_diff_of_two_inventories(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    old, new = _file(tmp_path, "old.yaml", OLD), _file(tmp_path, "new.yaml", NEW)
    assert main(["diff", old, new, *AS_OF, "--format", "json"]) == 0
    diff = json.loads(capsys.readouterr().out)
    # Worked out by hand from the two files: b moved to ML-KEM-768 (FIPS 203); d from DH-1024
    # (below 112 bits, NIST SP 800-131A Rev. 2) to X25519 with no shelf-life; g's shelf-life grew
    # from 0 to 10 years; f is new with an algorithm the catalog does not know; e was removed.
    # X25519 with x + y = 0.25 is within margin: it falls about 2.1 years before RSA-2048
    # (docs/threat-model.md section 5), so P = F(2026.92 + 0.25 + 2.07) on the 2025 survey's
    # pessimistic end (15 % at 5 years after 2026.18): 0.15 x 3.06 / 5 = 0.092, under the 10 %
    # tolerance; with x + y = 13 years it is far above it.
    assert [c["id"] for c in diff["migrated"]] == ["b"]
    assert [(c["id"], c["old"], c["new"]) for c in diff["improved"]] == [("d", "classically-broken", "within-margin")]
    assert [(c["id"], c["old"], c["new"]) for c in diff["worsened"]] == [("g", "within-margin", "exposed")]
    assert [c["id"] for c in diff["added"]] == ["f"]
    assert [c["id"] for c in diff["removed"]] == ["e"]
    assert [c["id"] for c in diff["unchanged"]] == ["a", "c"]
    assert {k: v["change"] for k, v in diff["counts"].items()} == {
        "classically-broken": -2, "exposed": 0, "unassessed": 1, "within-margin": 0, "quantum-resistant": 1}


def test_diff_of_two_json_results_as_markdown(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    old, new = _file(tmp_path, "old.yaml", OLD), _file(tmp_path, "new.yaml", NEW)
    for source, target in ((old, "old.json"), (new, "new.json")):
        assert main(["triage", source, *AS_OF, "--format", "json", "-o", str(tmp_path / target)]) == 0
    capsys.readouterr()
    out = tmp_path / "changes.md"
    assert main(["diff", str(tmp_path / "old.json"), str(tmp_path / "new.json"), "--format", "markdown",
                 "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    assert text.startswith("## Changes since the previous review")
    assert "1 worsened, 1 new, 1 removed, 1 improved, 1 migrated, 2 unchanged" in text
    assert "| classically-broken | 2 | 0 | -2 |" in text
    assert main(["diff", str(tmp_path / "old.json"), str(tmp_path / "new.json")]) == 0
    assert "Migrated" in capsys.readouterr().out


def test_bad_cbom_is_a_one_line_error_with_exit_2(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bom = _file(tmp_path, "scan.json", '{"bomFormat": "CycloneDX", "specVersion": "1.6", "components": [}')
    assert main(["triage", bom]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "scan.json:1:" in err and "invalid JSON" in err
