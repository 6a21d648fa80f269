"""SARIF output checked against the required fields of the OASIS SARIF 2.1.0 standard.

Source: Static Analysis Results Interchange Format (SARIF) Version 2.1.0, OASIS Standard,
27 March 2020 (with Errata 01, 2023). Section numbers beside each check are from memory.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from pqtriage.formats.sarif.triage import SarifFormat
from pqtriage.model.verdict import Verdict
from tests.formats.interop_helpers import INVENTORY, line_of, triaged

LEVELS = {"none", "note", "warning", "error"}  # 3.27.10 level


def _log(tmp_path: Path) -> dict[str, Any]:
    return json.loads(SarifFormat().render(triaged(tmp_path)))


def test_required_fields_of_the_log_run_and_tool(tmp_path: Path) -> None:
    log = _log(tmp_path)
    assert log["version"] == "2.1.0"  # 3.13.2 version: required, "2.1.0"
    assert isinstance(log["runs"], list) and len(log["runs"]) == 1  # 3.13.4 runs: required
    run = log["runs"][0]
    driver = run["tool"]["driver"]  # 3.14.6 tool required; 3.18.2 driver required
    assert isinstance(driver["name"], str) and driver["name"]  # 3.19.8 name required
    rules = driver["rules"]
    ids = [r["id"] for r in rules]  # 3.49.3 reportingDescriptor id required
    assert ids == [v.value for v in Verdict] + ["legacy", "deprecated", "downgrade"]  # per verdict, per flag kind
    for rule in rules:
        for key in ("shortDescription", "fullDescription", "help"):  # 3.49.9, 3.49.10, 3.49.12
            assert isinstance(rule[key]["text"], str) and rule[key]["text"]  # 3.12 multiformatMessageString text
        assert rule["defaultConfiguration"]["level"] in LEVELS  # 3.50.3 reportingConfiguration level


def test_one_result_per_exposed_or_unassessed_use(tmp_path: Path) -> None:
    result = triaged(tmp_path)
    log = json.loads(SarifFormat().render(result))
    run = log["runs"][0]
    rules = run["tool"]["driver"]["rules"]
    urgent = [(i.system.id, u.use.algorithm) for i in result.items for u in i.uses
              if u.verdict in (Verdict.CLASSICALLY_BROKEN, Verdict.EXPOSED, Verdict.UNASSESSED)]
    assert len(run["results"]) == len(urgent) >= 3
    for entry in run["results"]:
        assert isinstance(entry["message"]["text"], str) and entry["message"]["text"]  # 3.27.11, 3.11.8
        assert entry["level"] in LEVELS  # 3.27.10
        assert rules[entry["ruleIndex"]]["id"] == entry["ruleId"]  # 3.27.5 ruleId, 3.27.6 ruleIndex
        (location,) = entry["locations"]  # 3.27.12 locations
        physical = location["physicalLocation"]  # 3.28.3
        assert physical["artifactLocation"]["uri"]  # 3.29.3 artifactLocation, 3.4.3 uri
        assert physical["region"]["startLine"] >= 1  # 3.30.5 startLine >= 1
        assert physical["region"]["startColumn"] >= 1  # 3.30.6 startColumn >= 1
    levels = {e["ruleId"]: e["level"] for e in run["results"]}
    assert levels == {"exposed": "error", "unassessed": "warning"}


def test_location_is_the_inventory_line_of_the_use(tmp_path: Path) -> None:
    log = _log(tmp_path)
    results = log["runs"][0]["results"]
    kuznyechik = next(r for r in results if "Kuznyechik" in r["message"]["text"])
    region = kuznyechik["locations"][0]["physicalLocation"]["region"]
    # The use's mapping starts at its "purpose" key, one line above the algorithm.
    assert region["startLine"] == line_of(INVENTORY, "algorithm: Kuznyechik") - 1
    uri = kuznyechik["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
    assert uri.startswith("file://") and uri.endswith("/inventory.yaml")
    assert kuznyechik["ruleId"] == "unassessed"


def test_same_use_has_the_same_fingerprint_across_runs(tmp_path: Path) -> None:
    first = _log(tmp_path)["runs"][0]["results"]
    second = _log(tmp_path)["runs"][0]["results"]
    assert [r["partialFingerprints"] for r in first] == [r["partialFingerprints"] for r in second]
    assert len({json.dumps(r["partialFingerprints"]) for r in first}) == len(first)
