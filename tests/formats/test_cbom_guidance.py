"""The guidance fields in the CBOM export: valid CycloneDX 1.6, and read back by the import.

Schema and strict validator: cyclonedx-python-lib (OWASP CycloneDX), bom-1.6 JSON schema.
Mapping checked against CycloneDX 1.6 (ECMA-424): component.version, component.manufacturer,
component.tags; algorithmProperties.certificationLevel (enum fips140-1-l1 .. fips140-3-l4);
relatedCryptoMaterialProperties.securedBy.mechanism (examples "HSM", "TPM", "Software");
protocolProperties.version.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

from pqtriage.formats.cbom.triage import CbomFormat
from pqtriage.model.inventory import HostingModel, Impact, KeyStorage
from pqtriage.pipeline import run_triage
from tests.formats.interop_helpers import AS_OF, triaged
from tests.sources.guidance_example import GUIDANCE_INVENTORY


def _bom(tmp_path: Path) -> tuple[str, dict[str, Any]]:
    text = CbomFormat().render(triaged(tmp_path, GUIDANCE_INVENTORY))
    return text, json.loads(text)


def test_guidance_fields_validate_against_the_official_schema(tmp_path: Path) -> None:
    validation = pytest.importorskip("cyclonedx.validation.json")
    schema = pytest.importorskip("cyclonedx.schema")
    validator = validation.JsonStrictValidator(schema.SchemaVersion.V1_6)
    text, bom = _bom(tmp_path)
    assert validator.validate_str(text) is None
    # A certification level CycloneDX does not define is rejected (the check above can fail).
    key = next(c for c in bom["components"] if "certificationLevel" in
               c.get("cryptoProperties", {}).get("algorithmProperties", {}))
    key["cryptoProperties"]["algorithmProperties"]["certificationLevel"] = ["fips140-3-l5"]
    assert validator.validate_str(json.dumps(bom)) is not None


def test_the_mapping(tmp_path: Path) -> None:
    _, bom = _bom(tmp_path)
    by_ref = {c["bom-ref"]: c for c in bom["components"]}
    fare = by_ref["010"]
    assert (fare["version"], fare["manufacturer"], fare["tags"]) == ("2.10", {"name": "Tollgate Systems"},
                                                                      ["pci", "public-facing"])
    properties = {p["name"]: p["value"] for p in fare["properties"]}
    assert properties["pqtriage:impact"] == "high" and properties["pqtriage:high_value_asset"] == "true"
    assert properties["pqtriage:hosting.country"] == "DE" and properties["pqtriage:extra.cost_centre"] == "CC-104"
    assert properties["pqtriage:frameworks"] == "eu"
    # The signature's key is kept in an HSM: a key asset with securedBy, its algorithm by reference.
    key = by_ref["010#use-2"]
    material = key["cryptoProperties"]["relatedCryptoMaterialProperties"]
    assert material["securedBy"]["mechanism"] == "HSM" and material["algorithmRef"] == "010#use-2.alg"
    algorithm = by_ref["010#use-2.alg"]["cryptoProperties"]["algorithmProperties"]
    assert algorithm["certificationLevel"] == ["fips140-3-l3"] and algorithm["curve"] == "P-256"
    # The key exchange has no key storage of its own: an algorithm asset, the system's level.
    kex = by_ref["010#use-1"]["cryptoProperties"]
    assert kex["assetType"] == "algorithm" and kex["algorithmProperties"]["certificationLevel"] == ["fips140-3-l3"]


def test_read_back_by_the_import(tmp_path: Path) -> None:
    text, _ = _bom(tmp_path)
    path = tmp_path / "out.cdx.json"
    path.write_text(text, encoding="utf-8")
    result = run_triage(str(path), str(Path(__file__).with_name("what-if-2035.yaml")), AS_OF)
    systems = {item.system.id: item.system for item in result.items}
    fare, depot = systems["010"], systems["depot-scada"]
    assert fare.name == "Fare payment gateway" and fare.version == "2.10" and fare.vendor == "Tollgate Systems"
    assert (fare.impact, fare.high_value_asset, fare.business_unit, fare.tags) == (
        Impact.HIGH, True, "Revenue", ("pci", "public-facing"))
    assert (fare.hosting.model, fare.hosting.provider, fare.hosting.country) == (HostingModel.CLOUD, "Nimbus Cloud", "DE")
    assert (fare.data_classification.label, fare.data_classification.rank) == ("Restricted", 4)
    assert fare.frameworks == ("eu",) and ("cost_centre", "CC-104") in fare.extra
    assert (fare.fips_140_certificate, fare.fips_140_level, fare.key_storage) == ("4282", "fips140-3-l3", KeyStorage.HSM)
    kex, sig = fare.uses
    assert (sig.algorithm, sig.curve, sig.key_storage, sig.fips_140_level) == ("ECDSA", "P-256", KeyStorage.HSM,
                                                                            "fips140-3-l3")
    assert sig.purpose.value == "signature" and len(fare.uses) == 2
    assert depot.uses[0].key_storage is KeyStorage.SOFTWARE and depot.uses[0].crypto_library == "mbed TLS 2.28"
