"""Each kind of key material, generated with the cryptography library, is classified right.

Check values come from outside pqtriage: the cryptography library's own key_size and curve
objects, the NIST curve names of FIPS 186-5 (P-256 = secp256r1 ...), the ML-DSA OIDs of
RFC 9881 and the SLH-DSA OIDs of RFC 9909 (V).
"""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path
from typing import Any

import pytest
from cryptography.hazmat.primitives import serialization
from cryptography.hazmat.primitives.asymmetric import ec, ed448, ed25519
from cryptography.x509 import load_der_x509_certificate

from pqtriage.model.inventory import Purpose
from pqtriage.sources.scan.findings import FindingKind, ProblemKind
from pqtriage.sources.scan.scanner import classify
from tests.sources import material as m

# (factory, expected algorithm, key_size, curve, parameter_set). Sizes are the library's.
KEYS: list[tuple[str, Any, str, int | None, str | None, str | None]] = [
    ("rsa2048", lambda: m.rsa_key(2048), "RSA", 2048, None, None),
    ("rsa3072", lambda: m.rsa_key(3072), "RSA", 3072, None, None),
    ("rsa4096", lambda: m.rsa_key(4096), "RSA", 4096, None, None),
    ("p256", lambda: m.ec_key(ec.SECP256R1()), "ECDSA", 256, "P-256", None),
    ("p384", lambda: m.ec_key(ec.SECP384R1()), "ECDSA", 384, "P-384", None),
    ("p521", lambda: m.ec_key(ec.SECP521R1()), "ECDSA", 521, "P-521", None),
    ("ed25519", ed25519.Ed25519PrivateKey.generate, "Ed25519", None, None, None),
    ("ed448", ed448.Ed448PrivateKey.generate, "Ed448", None, None, None),
    ("dsa", lambda: m.dsa_key(2048), "DSA", 2048, None, None),
    ("mldsa44", lambda: m.mldsa_key(44), "ML-DSA-44", None, None, "44"),
    ("mldsa65", lambda: m.mldsa_key(65), "ML-DSA-65", None, None, "65"),
    ("mldsa87", lambda: m.mldsa_key(87), "ML-DSA-87", None, None, "87"),
]


@pytest.mark.parametrize(
    ("factory", "algorithm", "size", "curve", "parameter_set"),
    [k[1:] for k in KEYS],
    ids=[k[0] for k in KEYS],
)
def test_certificate_and_private_key(
    factory: Any, algorithm: str, size: int | None, curve: str | None, parameter_set: str | None
) -> None:
    key = factory()
    cert = m.certificate(key, "Fictional Signing CA", ca=True)
    outcome = classify(m.cert_pem(cert), "ca.pem")
    key_finding, signature, *hashes = outcome.findings
    # The hash inside the signature is its own use; EdDSA and ML-DSA hash internally.
    hashed = algorithm in ("RSA", "ECDSA", "DSA")
    assert [(h.kind, h.algorithm, h.purpose) for h in hashes] == (
        [(FindingKind.CERTIFICATE_SIGNATURE_HASH, "SHA-256", Purpose.SIGNATURE)] if hashed else []
    )
    assert key_finding.kind is FindingKind.CERTIFICATE_KEY
    assert (key_finding.algorithm, key_finding.key_size, key_finding.curve) == (
        algorithm, size, curve,
    )  # fmt: skip
    assert key_finding.parameter_set == parameter_set
    assert key_finding.purpose is Purpose.SIGNATURE  # a CA key signs
    assert key_finding.ca is True and "key_cert_sign" in key_finding.key_usage
    assert key_finding.subject == "CN=Fictional Signing CA"
    assert key_finding.not_after == "2026-01-01"
    # Self-signed: the signature algorithm is the key's own.
    assert signature.kind is FindingKind.CERTIFICATE_SIGNATURE
    assert signature.algorithm == algorithm and signature.purpose is Purpose.SIGNATURE
    if algorithm == "RSA":  # RFC 8017 section 8.2.1: signature length = modulus length
        assert signature.key_size == size
    private = classify(m.private_pem(key), "ca.key").findings
    assert [(f.kind, f.algorithm, f.key_size) for f in private] == [
        (FindingKind.PRIVATE_KEY, algorithm, size)
    ]


def test_ml_dsa_signature_oid_matches_rfc_9881() -> None:
    # RFC 9881: id-ml-dsa-65 = 2.16.840.1.101.3.4.3.18, read from the library-built certificate.
    cert = m.certificate(m.mldsa_key(65), "Fictional PQ CA", ca=True)
    assert cert.signature_algorithm_oid.dotted_string == "2.16.840.1.101.3.4.3.18"
    assert classify(m.cert_pem(cert), "x.pem").findings[1].algorithm == "ML-DSA-65"


def test_slh_dsa_certificate_is_named_from_its_oid() -> None:
    # The library cannot sign with SLH-DSA, so the ML-DSA-65 OID (RFC 9881, .3.18) of a
    # library-built certificate is rewritten to id-slh-dsa-sha2-128s (RFC 9909, .3.20): same
    # encoded length. The signature no longer verifies; a scan does not verify, it reads.
    der = m.certificate(m.mldsa_key(65), "Fictional Hash CA", ca=True).public_bytes(
        serialization.Encoding.DER
    )
    ml_dsa_65 = bytes.fromhex("0609608648016503040312")
    slh_sha2_128s = bytes.fromhex("0609608648016503040314")
    patched = der.replace(ml_dsa_65, slh_sha2_128s)
    assert load_der_x509_certificate(patched).signature_algorithm_oid.dotted_string.endswith(
        ".3.20"
    )
    key_finding, signature = classify(patched, "slh.der").findings
    assert key_finding.algorithm == signature.algorithm == "SLH-DSA-SHA2-128s"
    assert key_finding.parameter_set == "SHA2-128s"


def test_leaf_certificate_purpose_and_issuer_size() -> None:
    ca_key = m.rsa_key(4096)
    ca = m.certificate(ca_key, "Fictional Root", ca=True)
    leaf_key = m.ec_key(ec.SECP384R1())
    leaf = m.certificate(leaf_key, "shop.example.test", ca_key, ca, dns=("shop.example.test",))
    key_finding, signature, digest = classify(m.cert_pem(leaf), "leaf.pem").findings
    assert (digest.algorithm, digest.locator()) == ("SHA-256", "leaf.pem#block1.signature-hash")
    assert key_finding.purpose is Purpose.AUTHENTICATION  # TLS server leaf
    assert key_finding.ca is False and "serverAuth" in key_finding.key_usage
    assert key_finding.host == "shop.example.test"
    assert (signature.algorithm, signature.key_size) == ("RSA", 4096)
    assert signature.issuer == "CN=Fictional Root"
    signing = m.certificate(leaf_key, "Fictional Code Signer", ca_key, ca, code_signing=True)
    assert classify(m.cert_pem(signing), "s.pem").findings[0].purpose is Purpose.SIGNATURE


def test_multi_block_pem_bundle_numbers_every_block() -> None:
    ca_key = m.ec_key(ec.SECP521R1())
    ca = m.certificate(ca_key, "Fictional Root", ca=True)
    leaf_key = m.ec_key(ec.SECP256R1())
    leaf = m.certificate(leaf_key, "api.example.test", ca_key, ca)
    request = m.csr(m.rsa_key(2048), "next.example.test")
    bundle = (
        b"leading text is allowed\n"
        + m.cert_pem(leaf)
        + m.cert_pem(ca)
        + request.public_bytes(serialization.Encoding.PEM)
        + m.public_pem(leaf_key)
        + m.private_pem(leaf_key)
        + m.pkcs7_pem([leaf, ca])
    )
    outcome = classify(bundle, "bundle.pem")
    assert not outcome.problems
    kinds = [(f.locator(), f.kind) for f in outcome.findings]
    assert kinds == [
        ("bundle.pem#block1", FindingKind.CERTIFICATE_KEY),
        ("bundle.pem#block1.signature", FindingKind.CERTIFICATE_SIGNATURE),
        ("bundle.pem#block1.signature-hash", FindingKind.CERTIFICATE_SIGNATURE_HASH),
        ("bundle.pem#block2", FindingKind.CERTIFICATE_KEY),
        ("bundle.pem#block2.signature", FindingKind.CERTIFICATE_SIGNATURE),
        ("bundle.pem#block2.signature-hash", FindingKind.CERTIFICATE_SIGNATURE_HASH),
        ("bundle.pem#block3", FindingKind.CSR_KEY),
        ("bundle.pem#block4", FindingKind.PUBLIC_KEY),
        ("bundle.pem#block5", FindingKind.PRIVATE_KEY),
        ("bundle.pem#block6.cert1", FindingKind.CERTIFICATE_KEY),
        ("bundle.pem#block6.cert1.signature", FindingKind.CERTIFICATE_SIGNATURE),
        ("bundle.pem#block6.cert1.signature-hash", FindingKind.CERTIFICATE_SIGNATURE_HASH),
        ("bundle.pem#block6.cert2", FindingKind.CERTIFICATE_KEY),
        ("bundle.pem#block6.cert2.signature", FindingKind.CERTIFICATE_SIGNATURE),
        ("bundle.pem#block6.cert2.signature-hash", FindingKind.CERTIFICATE_SIGNATURE_HASH),
    ]
    # The leaf's ECDSA signature takes the issuer's curve from the CA found beside it.
    signature = scan_bundle_signature(bundle)
    assert (signature.curve, signature.key_size) == ("P-521", 521)


def scan_bundle_signature(bundle: bytes) -> Any:
    from pqtriage.sources.scan.issuers import link_issuers

    return link_issuers(list(classify(bundle, "b.pem").findings))[1]


def test_der_certificate_public_and_private_keys() -> None:
    key = m.rsa_key(3072)
    cert = m.certificate(key, "Fictional DER")
    der_cert = classify(cert.public_bytes(serialization.Encoding.DER), "c.der").findings
    assert der_cert[0].algorithm == "RSA" and der_cert[0].key_size == 3072
    public = key.public_key().public_bytes(
        serialization.Encoding.DER, serialization.PublicFormat.SubjectPublicKeyInfo
    )
    assert classify(public, "p.der").findings[0].kind is FindingKind.PUBLIC_KEY
    private = classify(m.private_der(key), "k.der").findings
    assert [(f.kind, f.key_size) for f in private] == [(FindingKind.PRIVATE_KEY, 3072)]
    encrypted = classify(m.private_der(key, b"fictional-pw"), "k.der").findings[0]
    assert encrypted.kind is FindingKind.PRIVATE_KEY and encrypted.algorithm == "unknown"
    opened = classify(m.private_der(key, b"fictional-pw"), "k.der", b"fictional-pw").findings
    assert opened[0].key_size == 3072


def test_pkcs12_plain_encrypted_and_with_password() -> None:
    ca_key = m.rsa_key(2048)
    ca = m.certificate(ca_key, "Fictional Root", ca=True)
    key = m.ec_key(ec.SECP384R1())
    leaf = m.certificate(key, "vpn.example.test", ca_key, ca)
    plain = classify(m.pkcs12_bundle(key, leaf, [ca], None), "b.p12").findings
    assert [f.locator() for f in plain] == [
        "b.p12#key", "b.p12#cert", "b.p12#cert.signature", "b.p12#cert.signature-hash",
        "b.p12#ca1", "b.p12#ca1.signature", "b.p12#ca1.signature-hash",
    ]  # fmt: skip
    assert plain[0].curve == "P-384" and plain[0].kind is FindingKind.PRIVATE_KEY
    locked = m.pkcs12_bundle(key, leaf, [ca], b"fictional-pw")
    (found,) = classify(locked, "b.pfx").findings
    assert found.kind is FindingKind.PKCS12_ENCRYPTED and found.algorithm == "unknown"
    opened = classify(locked, "b.pfx", b"fictional-pw").findings
    assert opened[0].curve == "P-384" and len(opened) == 7
    wrong = classify(locked, "b.pfx", b"not-it").findings
    assert wrong[0].kind is FindingKind.PKCS12_ENCRYPTED


def test_encrypted_pem_keys() -> None:
    key = m.rsa_key(2048)
    pkcs8 = classify(m.private_pem(key, b"pw"), "k.pem").findings[0]
    assert pkcs8.algorithm == "unknown" and "encrypted" in " ".join(pkcs8.notes)
    legacy = m.private_pem(key, b"pw", serialization.PrivateFormat.TraditionalOpenSSL)
    assert b"Proc-Type: 4,ENCRYPTED" in legacy
    found = classify(legacy, "k.pem").findings[0]
    assert found.algorithm == "RSA" and found.key_size is None  # type from the label only
    assert classify(legacy, "k.pem", b"pw").findings[0].key_size == 2048


@pytest.mark.skipif(shutil.which("ssh-keygen") is None, reason="ssh-keygen (openssh-client) absent")
def test_encrypted_openssh_private_key_keeps_its_type(tmp_path: Path) -> None:
    # A passphrase-protected key made by OpenSSH's own ssh-keygen: the format keeps the public
    # half in the clear (OpenSSH PROTOCOL.key), so type and size are known without the password.
    path = tmp_path / "id_ecdsa"
    subprocess.run(
        ["ssh-keygen", "-q", "-t", "ecdsa", "-b", "384", "-N", "fictional-pw", "-f", str(path)],
        check=True,
        timeout=30,
    )
    (found,) = classify(path.read_bytes(), str(path)).findings
    assert (found.kind, found.algorithm, found.curve) == (FindingKind.PRIVATE_KEY, "ECDSA", "P-384")
    assert any(note.startswith("encrypted") for note in found.notes)


def test_corrupt_and_truncated_material(tmp_path: Path) -> None:
    cert = m.certificate(m.ec_key(ec.SECP256R1()), "Fictional")
    pem = m.cert_pem(cert)
    lines = pem.splitlines(keepends=True)
    damaged = b"".join(lines[:3]) + b"!!!not base64!!!\n" + b"".join(lines[3:])
    good_then_bad = pem + damaged + pem[: len(pem) // 2]
    outcome = classify(good_then_bad, "mixed.pem")
    assert [f.locator() for f in outcome.findings] == [
        "mixed.pem#block1",
        "mixed.pem#block1.signature",
        "mixed.pem#block1.signature-hash",
    ]
    assert [(p.place, p.kind) for p in outcome.problems] == [
        ("mixed.pem#block2", ProblemKind.CORRUPT),
        ("mixed.pem#block3", ProblemKind.TRUNCATED),
    ]
    der = cert.public_bytes(serialization.Encoding.DER)
    assert classify(der[:-40], "cut.der").problems[0].kind is ProblemKind.TRUNCATED
    # A body cut short inside valid base64: the DER length says more than is there.
    body = b"".join(lines[1:-1]).replace(b"\n", b"")[:200]
    short = b"-----BEGIN CERTIFICATE-----\n" + body + b"\n-----END CERTIFICATE-----\n"
    assert classify(short, "s.pem").problems[0].kind is ProblemKind.TRUNCATED
    assert classify(b"\x00\x01 random", "x.key").problems[0].kind is ProblemKind.CORRUPT
    assert classify(b"just a text file\n", "notes.txt").findings == ()
    assert not classify(b"just a text file\n", "notes.txt").recognised


def test_private_key_block_errors_withhold_bytes() -> None:
    key = m.ec_key(ec.SECP256R1())
    pem = m.private_pem(key).decode()
    lines = pem.splitlines()
    broken = "\n".join(lines[:2] + ["QUJD" * 8] + lines[2:]) + "\n"
    outcome = classify(broken.encode(), "broken.key")
    text = " ".join(problem.line() for problem in outcome.problems)
    assert outcome.problems and "withheld" in text
    for fragment in m.secret_fragments(key):
        assert fragment not in text


def test_jwk_set() -> None:
    import base64
    import json

    def b64(number: int) -> str:
        raw = number.to_bytes((number.bit_length() + 7) // 8, "big")
        return base64.urlsafe_b64encode(raw).rstrip(b"=").decode()

    key = m.rsa_key(2048).public_key().public_numbers()
    document = {
        "keys": [
            {"kty": "RSA", "kid": "fictional-1", "use": "sig", "n": b64(key.n), "e": b64(key.e)},
            {"kty": "EC", "crv": "P-384", "x": "AA", "y": "AA"},
            {"kty": "OKP", "crv": "X25519", "x": "AA"},
        ]
    }
    findings = classify(json.dumps(document).encode(), "jwks.json").findings
    assert [(f.algorithm, f.key_size, f.purpose) for f in findings] == [
        ("RSA", 2048, Purpose.SIGNATURE),
        ("ECDSA", 384, Purpose.AUTHENTICATION),
        ("X25519", None, Purpose.KEY_ESTABLISHMENT),
    ]
