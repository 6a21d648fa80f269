"""CBOM export validated against the official CycloneDX 1.6 JSON Schema, deterministic, and re-importable.

The schema and strict validator come from cyclonedx-python-lib (the OWASP CycloneDX project's
Python library), installed with its ``validation`` extra as a test dependency.
"""

from __future__ import annotations

import json
import uuid
from pathlib import Path
from typing import Any

import pytest

from pqtriage.formats.cbom.triage import CbomFormat
from pqtriage.pipeline import run_triage
from tests.formats.interop_helpers import AS_OF, triaged


def _bom(tmp_path: Path) -> dict[str, Any]:
    return json.loads(CbomFormat().render(triaged(tmp_path)))


def _asset(bom: dict[str, Any], name: str) -> dict[str, Any]:
    return next(c for c in bom["components"] if c["name"] == name and c["type"] == "cryptographic-asset")


def test_valid_against_the_official_cyclonedx_16_schema(tmp_path: Path) -> None:
    validation = pytest.importorskip("cyclonedx.validation.json")
    schema = pytest.importorskip("cyclonedx.schema")
    validator = validation.JsonStrictValidator(schema.SchemaVersion.V1_6)
    text = CbomFormat().render(triaged(tmp_path))
    assert validator.validate_str(text) is None
    # The validator does reject a broken BOM (so the check above can fail).
    broken = json.loads(text)
    broken["components"][1]["cryptoProperties"]["assetType"] = "spell"
    assert validator.validate_str(json.dumps(broken)) is not None


def test_security_levels_come_from_the_catalog(tmp_path: Path) -> None:
    bom = _bom(tmp_path)
    rsa = _asset(bom, "RSA-2048")["cryptoProperties"]["algorithmProperties"]
    # NIST SP 800-57 Part 1 Rev. 5, Table 2: RSA with a 2048-bit modulus gives 112 bits.
    # Shor's algorithm breaks it: CycloneDX 1.6 nistQuantumSecurityLevel 0 = "none of the categories".
    assert (rsa["classicalSecurityLevel"], rsa["nistQuantumSecurityLevel"], rsa["primitive"]) == (112, 0, "pke")
    mlkem = _asset(bom, "ML-KEM-768")["cryptoProperties"]
    # FIPS 203 (ML-KEM), section 8: ML-KEM-768 is NIST security category 3.
    assert mlkem["algorithmProperties"]["nistQuantumSecurityLevel"] == 3
    assert mlkem["oid"] == "2.16.840.1.101.3.4.4.2"  # NIST CSOR, id-alg-ml-kem-768
    aes = _asset(bom, "AES-128-GCM")["cryptoProperties"]["algorithmProperties"]
    # NIST PQC call for proposals (2016), security category 1 = key search on AES-128.
    assert (aes["classicalSecurityLevel"], aes["nistQuantumSecurityLevel"], aes["primitive"]) == (128, 1, "ae")
    unknown = _asset(bom, "Kuznyechik")["cryptoProperties"]["algorithmProperties"]
    assert unknown == {"primitive": "unknown"}


def test_verdicts_are_properties_and_suites_are_protocols(tmp_path: Path) -> None:
    bom = _bom(tmp_path)
    systems = {c["bom-ref"]: c for c in bom["components"] if c["type"] == "application"}
    assert set(systems) == {"telemetry", "+scada-link", "billing"}
    props = {p["name"]: p["value"] for p in systems["telemetry"]["properties"]}
    assert props["pqtriage:verdict"] == "exposed" and props["pqtriage:shelf_life_years"] == "10"
    suite = next(c for c in bom["components"] if c["bom-ref"] == "+scada-link#use-1")
    protocol = suite["cryptoProperties"]["protocolProperties"]
    assert (protocol["type"], protocol["version"]) == ("tls", "1.2")
    (cipher_suite,) = protocol["cipherSuites"]
    assert cipher_suite["name"] == "TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256"
    parts = [next(c for c in bom["components"] if c["bom-ref"] == r)["name"] for r in cipher_suite["algorithms"]]
    assert "ECDH P-256" in parts and "RSA-2048" in parts
    edges = {d["ref"]: d.get("dependsOn", []) for d in bom["dependencies"]}
    assert edges["telemetry"] == ["telemetry#use-1", "telemetry#use-2"]
    assert edges["+scada-link#use-1"] == cipher_suite["algorithms"]


def test_same_inputs_give_the_same_bytes(tmp_path: Path) -> None:
    first = CbomFormat().render(triaged(tmp_path))
    second = CbomFormat().render(triaged(tmp_path))
    assert first == second
    bom = json.loads(first)
    serial = uuid.UUID(bom["serialNumber"].removeprefix("urn:uuid:"))
    assert serial.version == 5  # RFC 9562 (formerly RFC 4122) name-based, SHA-1
    assert bom["metadata"]["timestamp"] == f"{AS_OF.isoformat()}T00:00:00Z"


def test_export_then_import_gives_the_same_triage(tmp_path: Path) -> None:
    result = triaged(tmp_path)
    exported = tmp_path / "exported.cdx.json"
    exported.write_text(CbomFormat().render(result), encoding="utf-8")
    again = run_triage(str(exported), None, AS_OF)

    def summary(r: Any) -> list[tuple[Any, ...]]:
        return [(i.system.id, i.system.name, i.verdict, i.system.shelf_life_years, i.system.migration_years,
                 i.system.owner, [(u.use.purpose, u.verdict, u.spec.name if u.spec else u.use.algorithm)
                                  for u in i.uses]) for i in r.items]

    assert summary(again) == summary(result)
    assert again.inventory.organization == "Brackenfold Water Board"
