"""CBOMs written by another producer (cyclonedx-python-lib's model classes): every asset type, OIDs,
Java standard names, cipher suites and certificates with references, each resolved to the expected
algorithm, with the source of the expected value beside the check.

Organisation and systems are fictional (the Harrowgate Tidal Observatory).
"""

from __future__ import annotations

import datetime as dt
import json
from pathlib import Path

import pytest
from cyclonedx.model.crypto import ProtocolPropertiesType, RelatedCryptoMaterialType

from pqtriage.formats.json.triage import JsonFormat
from pqtriage.model.verdict import TriageResult, Verdict
from pqtriage.pipeline import run_triage
from pqtriage.sources.loading import load_inventory
from tests.sources.cbom_library import (
    CryptoMode,
    CryptoPadding,
    CryptoPrimitive,
    Writer,
    uses_by_ref,
)

AS_OF = dt.date(2026, 12, 2)


def _observatory() -> Writer:
    w = Writer()
    # Algorithms, as a source-code scanner would name them (Java standard names, OIDs).
    w.algorithm("alg-x25519", "X25519", primitive=CryptoPrimitive.KEY_AGREE, oid="1.3.101.110")
    w.algorithm("alg-rsa", "RSA", primitive=CryptoPrimitive.PKE, oid="1.2.840.113549.1.1.1")
    w.algorithm("alg-aes128gcm", "AES", primitive=CryptoPrimitive.AE, mode=CryptoMode.GCM, parameter_set="128")
    w.algorithm("alg-sha256", "SHA-256", primitive=CryptoPrimitive.HASH, oid="2.16.840.1.101.3.4.2.1")
    w.algorithm("alg-sha256rsa", "SHA256withRSA", primitive=CryptoPrimitive.SIGNATURE, oid="1.2.840.113549.1.1.11")
    w.algorithm("alg-sha384ecdsa", "SHA384withECDSA", primitive=CryptoPrimitive.SIGNATURE,
                oid="1.2.840.10045.4.3.3")
    # Keys (related crypto material) and certificates.
    w.key("key-portal", "portal public key", "alg-rsa", 2048)
    w.key("key-ca", "issuing CA public key", "alg-rsa", 3072)
    w.certificate("cert-portal", "CN=portal.harrowgate-tidal.example", "CN=Harrowgate Issuing CA",
                  ("2026-06-01T00:00:00", "2028-06-01T00:00:00"), "alg-sha256rsa", "key-portal")
    w.certificate("cert-ca", "CN=Harrowgate Issuing CA", "CN=Harrowgate Root CA",
                  ("2021-01-01T00:00:00", "2041-01-01T00:00:00"), "alg-sha384ecdsa", "key-ca")
    # TLS 1.2: the suite names its parts; the protocol names the server's certificate.
    w.protocol("proto-portal", ProtocolPropertiesType.TLS, "1.2",
               suites=[("TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256",
                        ["alg-x25519", "key-portal", "alg-aes128gcm", "alg-sha256"])],
               certificates=["cert-portal"])
    # A suite that names no authentication key: the protocol's certificate gives it.
    w.protocol("proto-feed", ProtocolPropertiesType.TLS, "1.2",
               suites=[("TLS_DHE_RSA_WITH_AES_256_GCM_SHA384", [])], certificates=["cert-portal"])
    w.algorithm("alg-mlkem", "ML-KEM", primitive=CryptoPrimitive.KEM, parameter_set="768")
    w.algorithm("alg-aes256gcm", "AES-256-GCM", primitive=CryptoPrimitive.AE)
    w.protocol("proto-ike", ProtocolPropertiesType.IKE, "2",
               ike={"ke": ["alg-mlkem"], "encr": ["alg-aes256gcm"]})
    w.application("app-portal", "tide-portal", ["proto-portal", "proto-feed", "cert-ca", "proto-ike"])
    # Data at rest: names from Java code, combined with algorithmProperties.
    w.algorithm("alg-archive", "AES/GCM/NoPadding", primitive=CryptoPrimitive.AE, parameter_set="256")
    w.algorithm("alg-wrap", "RSA/ECB/OAEPWithSHA-256AndMGF1Padding", primitive=CryptoPrimitive.PKE,
                parameter_set="3072")
    w.algorithm("alg-legacy", "DESede/CBC/PKCS5Padding", primitive=CryptoPrimitive.BLOCK_CIPHER)
    w.algorithm("alg-oaep", "RSA", primitive=CryptoPrimitive.PKE, padding=CryptoPadding.OAEP)
    w.key("key-oaep", "escrow key", "alg-oaep", 4096)
    w.algorithm("alg-session", "AES", primitive=CryptoPrimitive.BLOCK_CIPHER)
    w.key("key-session", "session key", "alg-session", 128, RelatedCryptoMaterialType.SECRET_KEY)
    w.algorithm("alg-vendor", "HTO-Seal-2", primitive=CryptoPrimitive.KEM, oid="2.16.840.1.101.3.4.4.3")
    w.application("app-archive", "tide-archive", ["alg-archive", "alg-wrap", "alg-legacy", "alg-oaep",
                                                  "key-session", "alg-vendor"])
    return w


@pytest.fixture(scope="module")
def written(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, str]:
    text = _observatory().json()
    path = tmp_path_factory.mktemp("library") / "observatory.cdx.json"
    path.write_text(text, encoding="utf-8")
    return path, text


@pytest.fixture(scope="module")
def result(written: tuple[Path, str]) -> TriageResult:
    return run_triage(str(written[0]), None, AS_OF)


def _use(result: TriageResult, ref: str):  # type: ignore[no-untyped-def]
    for item in result.items:
        for use in item.uses:
            if use.use.source is not None and (use.use.source.detail or "").endswith(ref):
                return use
    raise AssertionError(ref)


def test_the_library_writes_valid_cyclonedx_16(written: tuple[Path, str]) -> None:
    from cyclonedx.schema import SchemaVersion
    from cyclonedx.validation.json import JsonStrictValidator

    assert JsonStrictValidator(SchemaVersion.V1_6).validate_str(written[1]) is None


def test_systems_and_every_asset_type(written: tuple[Path, str]) -> None:
    inventory = load_inventory(str(written[0]))
    assert {s.id for s in inventory.systems} >= {"app-portal", "app-archive"}
    portal = inventory.system("app-portal")
    carriers = {u.source.detail.split(" > ")[0].removeprefix("bom-ref ") for u in portal.uses}  # type: ignore[union-attr]
    assert carriers == {"proto-portal", "proto-feed", "cert-ca", "proto-ike"}  # protocol, certificate
    archive = uses_by_ref(inventory)
    assert "alg-session" in archive  # related-crypto-material carrier: its algorithm with the key's size
    assert archive["alg-session"].key_size == 128


def test_cipher_suite_takes_its_parts_from_the_refs(result: TriageResult) -> None:
    use = _use(result, "proto-portal")
    assert (use.use.algorithm, use.use.key_size, use.use.curve) == ("TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256",
                                                                     2048, "X25519")
    assert use.spec is not None
    parts = {c.purpose: c.spec.name for c in use.spec.components}
    # RFC 8446 §4.2.7 / RFC 7748: X25519 key exchange; NIST SP 800-57 Part 1 Rev. 5 Table 2: RSA-2048.
    assert parts == {"key-establishment": "X25519", "authentication": "RSA-2048", "encryption": "AES-128-GCM",
                     "integrity": "HMAC-SHA256"}
    assert "key exchange from alg-x25519" in (use.use.notes or "")


def test_protocol_certificate_gives_the_server_key(result: TriageResult) -> None:
    use = _use(result, "proto-feed")
    # The suite lists no parts; the protocol's certificate (cryptoRefArray) has an RSA-2048 key, which
    # sizes the RSA authentication and, with no group named, the DHE group (the grammar's one size).
    assert (use.use.key_size, use.verdict) == (2048, Verdict.EXPOSED)
    assert "from certificate 'cert-portal'" in (use.use.notes or "")


def test_certificates_take_signature_and_key_from_their_refs(result: TriageResult) -> None:
    portal_signature = _use(result, "cert-portal > alg-sha256rsa")
    # Signed by the Issuing CA, whose certificate is in the BOM with an RSA-3072 key; the OID is
    # sha256WithRSAEncryption (RFC 8017 Appendix C); its trust period is the remaining validity at
    # the as-of date (2028-06-01 - 2026-12-02 = 547 days = 1.5 years of 365.25 days).
    assert portal_signature.spec is not None and portal_signature.spec.name == "RSA-3072"
    assert portal_signature.use.purpose.value == "signature" and portal_signature.x_years == 1.5
    assert "signed by the key of certificate 'cert-ca'" in (portal_signature.use.notes or "")
    portal_key = _use(result, "cert-portal > key-portal > alg-rsa")
    assert portal_key.spec is not None and portal_key.spec.name == "RSA-2048"  # key-portal size 2048
    # The CA's own signature: issued by a root that is not in the BOM, so the signing key is unknown.
    ca_signature = _use(result, "cert-ca > alg-sha384ecdsa")
    assert ca_signature.verdict is Verdict.UNASSESSED
    assert "Harrowgate Root CA, whose certificate is not in the BOM" in ca_signature.reason
    assert ca_signature.use.not_after == dt.date(2041, 1, 1)


def test_names_and_oids_from_other_tools(result: TriageResult) -> None:
    expected = {
        # Java Security Standard Algorithm Names, JDK 17 (Cipher transformations) with FIPS 197 /
        # SP 800-38D: AES-256-GCM; RFC 8017 §7.1 RSAES-OAEP; NIST SP 800-67 Rev. 2: 3TDEA, legacy.
        "alg-archive": ("AES-256-GCM", Verdict.QUANTUM_RESISTANT),
        "alg-wrap": ("RSA-3072", Verdict.EXPOSED),
        "alg-legacy": ("3TDEA-CBC", None),
        # CycloneDX padding oaep with the escrow key's size (related material refers to alg-oaep).
        "alg-oaep": ("RSA-4096", Verdict.EXPOSED),
        # An AES key of 128 bits: FIPS 197, category 1 (NIST PQC Call for Proposals 2016 §4.A.5).
        "key-session > alg-session": ("AES-128", None),
        # A product label with the OID of ML-KEM-1024 (RFC 9935): FIPS 203 category 5.
        "alg-vendor": ("ML-KEM-1024", Verdict.QUANTUM_RESISTANT),
        # IKEv2 transform types (RFC 7296 §3.3.2): ke ML-KEM-768 (FIPS 203), encr AES-256-GCM.
        "proto-ike > alg-mlkem": ("ML-KEM-768", Verdict.QUANTUM_RESISTANT),
    }
    for ref, (name, verdict) in expected.items():
        use = _use(result, ref)
        assert use.spec is not None and use.spec.name == name, (ref, use.reason)
        if verdict is not None:
            assert use.verdict is verdict, (ref, use.reason)
    vendor = _use(result, "alg-vendor")
    assert vendor.spec is not None and vendor.spec.identifiers.get("oid") == "2.16.840.1.101.3.4.4.3"


def test_an_oid_that_contradicts_the_name_is_unassessed_naming_both(tmp_path: Path) -> None:
    w = Writer()
    # RFC 8017 Appendix C: 1.2.840.113549.1.1.13 is sha512WithRSAEncryption, not SHA-256.
    w.algorithm("alg-mixed", "SHA256withRSA", primitive=CryptoPrimitive.SIGNATURE, oid="1.2.840.113549.1.1.13",
                parameter_set="2048")
    w.application("app-gauge", "tide-gauge", ["alg-mixed"])
    path = tmp_path / "mixed.cdx.json"
    path.write_text(w.json(), encoding="utf-8")
    item = run_triage(str(path), None, AS_OF).items[0]
    assert item.verdict is Verdict.UNASSESSED and item.start_by is None
    assert "SHA256withRSA" in item.reason and "1.2.840.113549.1.1.13 (sha512WithRSAEncryption" in item.reason


def test_missing_and_dangling_references_are_said(tmp_path: Path) -> None:
    w = Writer()
    w.algorithm("alg-sha256rsa", "sha256WithRSAEncryption", primitive=CryptoPrimitive.SIGNATURE)
    w.certificate("cert-buoy", "CN=buoy.harrowgate-tidal.example", "CN=buoy.harrowgate-tidal.example",
                  ("2026-01-01T00:00:00", "2027-01-01T00:00:00"), "alg-sha256rsa", "key-gone")
    w.protocol("proto-buoy", ProtocolPropertiesType.TLS, "1.2",
               suites=[("TLS_ECDHE_ECDSA_WITH_AES_128_GCM_SHA256", ["alg-gone"])])
    w.application("app-buoy", "buoy-telemetry", ["cert-buoy", "proto-buoy"])
    path = tmp_path / "buoy.cdx.json"
    path.write_text(w.json(), encoding="utf-8")
    result = run_triage(str(path), None, AS_OF)
    item = result.items[0]
    reasons = [u.reason for u in item.uses]
    assert any("subjectPublicKeyRef refers to bom-ref 'key-gone', which is not in the BOM" in r for r in reasons)
    assert any("bom-ref 'alg-gone' is not in the BOM" in r for r in reasons)
    # Consistent rows: the system is unassessed, with no start-by date and no probability in JSON.
    data = json.loads(JsonFormat().render(result))
    (system,) = data["items"]
    assert (system["verdict"], system["start_by"], system["exposure_probability"]) == ("unassessed", None, None)
    assert item.reason.startswith("use ")  # the verdict reason; the place is in rank_reason


@pytest.mark.parametrize(("name", "props", "expected"), [
    # Java Security Standard Algorithm Names, JDK 17 (Signature, Cipher, KeyAgreement sections).
    ("SHA256withECDSA", {"primitive": CryptoPrimitive.SIGNATURE, "curve": "secp256r1"}, "ECDSA P-256"),
    ("SHA512withRSA", {"primitive": CryptoPrimitive.SIGNATURE, "parameter_set": "4096"}, "RSA-4096"),
    ("RSASSA-PSS", {"primitive": CryptoPrimitive.SIGNATURE, "parameter_set": "3072"}, "RSA-3072"),
    ("AES/GCM/NoPadding", {"primitive": CryptoPrimitive.AE, "parameter_set": "192"}, "AES-192-GCM"),
    ("DESede/CBC/PKCS5Padding", {"primitive": CryptoPrimitive.BLOCK_CIPHER}, "3TDEA-CBC"),
    ("ECDH", {"primitive": CryptoPrimitive.KEY_AGREE, "curve": "secp384r1"}, "ECDH P-384"),
    ("X25519", {"primitive": CryptoPrimitive.KEY_AGREE}, "X25519"),
    # OpenSSL object names (RFC 5480 §2.1.1: id-ecPublicKey with the curve prime256v1).
    ("id-ecPublicKey", {"primitive": CryptoPrimitive.SIGNATURE, "curve": "prime256v1"}, "ECDSA P-256"),
    ("rsaEncryption", {"primitive": CryptoPrimitive.PKE, "parameter_set": "2048"}, "RSA-2048"),
    # CycloneDX algorithmProperties combined: name + mode + parameterSetIdentifier (FIPS 197, SP 800-38A).
    ("AES", {"primitive": CryptoPrimitive.BLOCK_CIPHER, "mode": CryptoMode.CBC, "parameter_set": "256"}, "AES-256-CBC"),
    ("AES", {"primitive": CryptoPrimitive.BLOCK_CIPHER, "mode": CryptoMode.ECB, "parameter_set": "128"}, "AES-128-ECB"),
])
def test_each_name_resolves(tmp_path: Path, name: str, props: dict[str, object], expected: str) -> None:
    w = Writer()
    w.algorithm("alg", name, **props)  # type: ignore[arg-type]
    w.application("app", "tide-model", ["alg"])
    path = tmp_path / "one.cdx.json"
    path.write_text(w.json(), encoding="utf-8")
    use = run_triage(str(path), None, AS_OF).items[0].uses[0]
    assert use.spec is not None and use.spec.name == expected, use.reason


def test_key_exchange_and_certificate_on_two_curves(tmp_path: Path) -> None:
    w = Writer()
    w.algorithm("alg-x25519", "X25519", primitive=CryptoPrimitive.KEY_AGREE)
    w.algorithm("alg-ecdsa", "ECDSA", primitive=CryptoPrimitive.SIGNATURE, curve="secp384r1")
    w.protocol("proto-radar", ProtocolPropertiesType.TLS, "1.2",
               suites=[("TLS_ECDHE_ECDSA_WITH_AES_256_GCM_SHA384", ["alg-x25519", "alg-ecdsa"])])
    w.application("app-radar", "wave-radar", ["proto-radar"])
    path = tmp_path / "radar.cdx.json"
    path.write_text(w.json(), encoding="utf-8")
    suite, key = run_triage(str(path), None, AS_OF).items[0].uses
    # The suite name gives one curve: the key exchange's (X25519, RFC 8446 §4.2.7); the ECDSA key on
    # P-384 (SP 800-186) is rated as a use of its own.
    assert suite.use.curve == "X25519" and suite.spec is not None
    assert {c.purpose: c.spec.name for c in suite.spec.components}["key-establishment"] == "X25519"
    assert (key.use.purpose.value, key.spec.name if key.spec else None) == ("authentication", "ECDSA P-384")
