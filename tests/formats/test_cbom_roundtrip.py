"""CBOM round trip without loss: triage, export to CycloneDX, import, triage again: the same verdicts.

Every fact that decides a verdict must survive (the SHA-1 inside ``ssh-rsa``, hybrids, sizes,
validity dates, offered versus in use, OIDs), bom-refs must be unique whatever the ids, and the
export must stay valid CycloneDX 1.6 (checked with the official JSON Schema and strict validator
of cyclonedx-python-lib). Routes tried: the demo inventory, a scan of generated certificates and
keys (tests/sources/material.py), TLS probe output from real servers on loopback, and
hypothesis-generated inventories.
"""

from __future__ import annotations

import datetime as dt
import json
from collections import Counter
from pathlib import Path
from typing import Any

import pytest
from cryptography.hazmat.primitives.asymmetric import ec
from hypothesis import HealthCheck, given, reject, settings

from pqtriage.errors import InventoryError
from pqtriage.formats.cbom.triage import CbomFormat
from pqtriage.model.inventory import Inventory
from pqtriage.model.verdict import TriageResult
from pqtriage.pipeline import run_triage
from pqtriage.sources.yaml_writer import inventory_to_yaml
from tests.properties.strategies import inventories
from tests.sources import material

AS_OF = dt.date(2026, 12, 2)
ROOT = Path(__file__).resolve().parent.parent.parent


def _validator() -> Any:
    from cyclonedx.schema import SchemaVersion
    from cyclonedx.validation.json import JsonStrictValidator

    return JsonStrictValidator(SchemaVersion.V1_6)


def verdicts(result: TriageResult) -> list[tuple[Any, ...]]:
    """What triage decided, system by system and use by use (in input order)."""
    return sorted(
        (item.system.id, item.verdict.value, item.start_by, item.exposure_probability,
         tuple((u.use.purpose.value, u.use.algorithm, u.verdict.value, u.spec.name if u.spec else None,
                u.x_years, u.start_by) for u in item.uses))
        for item in result.items
    )


def round_trip(result: TriageResult, folder: Path) -> tuple[TriageResult, str]:
    """Export to CBOM, import it and triage it again on the same date and profile."""
    text = CbomFormat().render(result)
    path = folder / "exported.cdx.json"
    path.write_text(text, encoding="utf-8")
    return run_triage(str(path), None, AS_OF), text


def _triage_text(folder: Path, text: str, name: str = "inventory.yaml") -> TriageResult:
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return run_triage(str(path), None, AS_OF)


def test_demo_inventory_round_trip(tmp_path: Path) -> None:
    source = run_triage(str(ROOT / "inventories" / "demo.yaml"), None, AS_OF)
    again, text = round_trip(source, tmp_path)
    assert verdicts(again) == verdicts(source)
    assert [i.system.id for i in again.items] == [i.system.id for i in source.items]  # same ranking
    assert _validator().validate_str(text) is None


def test_hash_inside_a_composite_name_survives(tmp_path: Path) -> None:
    # ssh-rsa signs with SHA-1 (RFC 4253 §6.6), disallowed for signature generation by NIST
    # SP 800-131A Rev. 2: classically broken before and after the round trip.
    source = _triage_text(tmp_path, (
        "version: 1\norganization: Tarnwick Ferry Cooperative\nsystems:\n"
        "  - id: jump\n    name: Jump host\n    shelf_life_years: 5\n    migration_years: 1\n    uses:\n"
        "      - {purpose: authentication, algorithm: ssh-rsa, key_size: 3072}\n"
        "      - {purpose: key-establishment, algorithm: X25519MLKEM768}\n"
        "      - {purpose: key-establishment, algorithm: mlkem768x25519-sha256, role: offered}\n"
        "      - {purpose: signature, algorithm: ECDSA, curve: P-384, not_before: 2025-01-01,"
        " not_after: 2045-01-01}\n"
        "      - {purpose: signature, algorithm: Frobnicate, oid: 1.2.840.113549.1.1.5, key_size: 2048}\n"
    ))
    again, _ = round_trip(source, tmp_path)
    assert verdicts(again) == verdicts(source)
    uses = again.items[0].uses
    assert uses[0].verdict.value == "classically-broken" and uses[0].use.algorithm == "ssh-rsa"
    assert uses[1].spec is not None and uses[1].spec.hybrid  # draft-ietf-tls-ecdhe-mlkem hybrid
    assert uses[2].use.role == "offered"
    # A 20-year certificate signature: x = remaining validity at 2026-12-02 (18.08 years).
    assert (uses[3].use.not_after, uses[3].x_years) == (dt.date(2045, 1, 1), 18.08)
    # sha1WithRSAEncryption by OID (RFC 8017 Appendix C), whatever the product called it.
    assert uses[4].use.oid == "1.2.840.113549.1.1.5" and uses[4].verdict.value == "classically-broken"


def test_bom_refs_are_unique_whatever_the_ids(tmp_path: Path) -> None:
    source = _triage_text(tmp_path, (
        "version: 1\norganization: Tarnwick Ferry Cooperative\nsystems:\n"
        "  - {id: a, name: A, shelf_life_years: 5, migration_years: 1, uses: [{purpose: encryption,"
        " algorithm: AES-256-GCM}, {purpose: key-establishment, algorithm: TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256,"
        " curve: P-256, key_size: 2048}]}\n"
        "  - {id: 'a#use-1', name: B, shelf_life_years: 5, migration_years: 1, uses: [{purpose: encryption,"
        " algorithm: AES-128-GCM}]}\n"
        "  - {id: 'a#use-2.1', name: C, shelf_life_years: 5, migration_years: 1, uses: [{purpose: encryption,"
        " algorithm: ChaCha20-Poly1305}]}\n"
    ))
    again, text = round_trip(source, tmp_path)
    refs = Counter(c["bom-ref"] for c in json.loads(text)["components"])
    assert refs and max(refs.values()) == 1
    assert _validator().validate_str(text) is None
    assert verdicts(again) == verdicts(source)


def test_scan_of_generated_material_round_trip(tmp_path: Path) -> None:
    from pqtriage.sources.scan.run import scan_inventory

    folder = tmp_path / "material"
    ca_key = material.ec_key(ec.SECP384R1())
    ca = material.certificate(ca_key, "Tarnwick Issuing CA", ca=True)
    leaf_key = material.rsa_key(2048)
    leaf = material.certificate(leaf_key, "ferry.tarnwick.example", issuer_key=ca_key, issuer=ca,
                                dns=("ferry.tarnwick.example",))
    material.write(folder / "ca.pem", material.cert_pem(ca))
    material.write(folder / "leaf.pem", material.cert_pem(leaf))
    material.write(folder / "old.key", material.private_pem(material.rsa_key(1024)))
    material.write(folder / "sign.pub", material.public_pem(material.ec_key(ec.SECP256R1())))
    scanned = scan_inventory([str(folder)])
    source = _triage_text(tmp_path, scanned.text)
    assert sum(len(i.uses) for i in source.items) >= 4
    again, text = round_trip(source, tmp_path)
    assert verdicts(again) == verdicts(source)
    assert _validator().validate_str(text) is None


@pytest.mark.network
def test_probe_output_round_trip(tmp_path: Path) -> None:
    from pqtriage.sources.probe.run import probe_inventory
    from tests.sources.probe import servers

    with (
        servers.python_ssl_server(tmp_path / "a") as classical,
        servers.pyopenssl_server(tmp_path / "b") as default,
    ):
        probed = probe_inventory([f"127.0.0.1:{classical}", f"127.0.0.1:{default}"], timeout=5)
    source = _triage_text(tmp_path, probed.text)
    assert len(source.items) == 2 and all(item.uses for item in source.items)
    again, text = round_trip(source, tmp_path)
    assert verdicts(again) == verdicts(source)
    assert _validator().validate_str(text) is None


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(inventories(max_systems=5))
def test_export_then_import_gives_identical_verdicts(tmp_path: Path, inventory: Inventory) -> None:
    if not any(system.uses for system in inventory.systems):
        return  # a BOM without cryptographic assets is refused by design ("lists no cryptographic assets")
    # Through YAML first, as a user would have it (the reader fills in what the file says).
    path = tmp_path / "inv.yaml"
    path.write_text(inventory_to_yaml(inventory), encoding="utf-8")
    try:
        source = run_triage(str(path), None, AS_OF)
    except InventoryError as error:
        # A generated name one letter from a catalog spelling ('0Dß' for 'DSS') is refused by the
        # reader as a typing mistake: no inventory, nothing to round-trip.
        if "unknown algorithm" not in error.diagnostics():
            raise
        reject()
    again, _ = round_trip(source, tmp_path)
    assert verdicts(again) == verdicts(source)


@pytest.mark.network
@pytest.mark.sshd
def test_ssh_probe_output_round_trip(tmp_path: Path) -> None:
    from pqtriage.sources.probe.run import probe_inventory
    from tests.sources.probe import servers

    reason = servers.sshd_missing_reason()
    if reason is not None:
        pytest.skip(reason)
    with servers.sshd_server(tmp_path, host_keys=("ed25519", "rsa:3072")) as port:
        probed = probe_inventory([f"ssh://127.0.0.1:{port}"], timeout=10)
    source = _triage_text(tmp_path, probed.text)
    roles = {u.use.role for item in source.items for u in item.uses}
    assert roles == {"in-use", "offered"}  # what a current client negotiates, and what else is offered
    again, text = round_trip(source, tmp_path)
    assert verdicts(again) == verdicts(source)
    assert [u.use.role for i in again.items for u in i.uses] == [u.use.role for i in source.items for u in i.uses]
    assert _validator().validate_str(text) is None
