"""A name and an explicit attribute that disagree make the use unassessed, naming both values.

Sizes the names fix: FIPS 203 (2024) Table 2 (ML-KEM-512/768/1024), NIST SP 800-186 (2023) and
SEC 2 v2 (P-256: a 256-bit curve), RFC 8017 (RSA-2048: a 2048-bit modulus), FIPS 197 (AES-128:
a 128-bit key), NIST SP 800-67 Rev. 2 (three-key TDEA: 168 key bits, 192 with parity), RFC 7748
(X25519: 255-bit field, 32-byte keys). Curve sizes are cross-checked with the cryptography library.
"""

from __future__ import annotations

import pytest
from cryptography.hazmat.primitives.asymmetric import ec

from pqtriage.catalog import Catalog


@pytest.mark.parametrize(("name", "attributes", "named", "given"), [
    ("ML-KEM-768", {"parameter_set": "512"}, "768", "512"),
    ("P-256", {"curve": "P-9999"}, "P-256", "P-9999"),
    ("RSA-2048", {"key_size": 512}, "2048", "512"),
    ("AES-128-GCM", {"key_size": 256}, "128", "256"),
    ("ecdsa-sha2-nistp256", {"curve": "P-384"}, "P-256", "P-384"),
    ("ssh-dss", {"key_size": 2048}, "1024", "2048"),  # RFC 4253 §6.6: ssh-dss keys are 1024-bit DSA
    ("ML-KEM", {"parameter_set": "768", "key_size": 512}, "768", "512"),  # two attributes disagree
])
def test_conflicts_are_unassessed_with_both_values(catalog: Catalog, name: str, attributes: dict,
                                                   named: str, given: str) -> None:
    found = catalog.resolve(name, purpose="signature", **attributes)
    assert found.spec is None
    assert found.reason is not None and found.reason.startswith("conflicting facts: ")
    assert named in found.reason and given in found.reason
    assert any(c.given == given for c in found.conflicts)
    assert found.quantum_attack is not None  # the attack class is still known


def test_an_attribute_that_does_not_apply_is_a_conflict(catalog: Catalog) -> None:
    found = catalog.resolve("RSA", key_size=2048, curve="P-256")
    assert found.spec is None and "RSA-2048 takes no curve" in str(found.reason)
    assert found.conflicts[0].named is None


@pytest.mark.parametrize(("name", "attributes"), [
    ("RSA-2048", {"key_size": 2048}),
    ("RSA", {"key_size": 2048}),
    ("ECDSA", {"curve": "secp256r1", "key_size": 256}),
    ("ECDSA", {"key_size": 256}),  # the curve of that size is assumed, with a note
    ("X25519", {"key_size": 256}),  # RFC 7748: 32-byte keys
    ("Ed25519", {"key_size": 255}),
    ("3DES", {"key_size": 168}),
    ("3DES", {"key_size": 192}),
    ("AES-GCM", {"key_size": 256}),
    ("Kyber768", {"parameter_set": "768"}),
    ("Dilithium3", {"parameter_set": "3"}),
    ("ML-DSA-65", {"parameter_set": "65"}),
    ("SLH-DSA-SHA2-128s", {"parameter_set": "SHA2-128s"}),
    ("DH-2048", {"curve": "ffdhe2048"}),
    ("X25519MLKEM768", {"parameter_set": "768"}),
    ("TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256", {"key_size": 2048, "curve": "P-256"}),
    ("AES128-CCM", {"key_size": 2048, "curve": "P-256"}),  # the OpenSSL suite, not the cipher
    ("HMAC-SHA256", {"key_size": 128}),  # HMAC keys may have any length (RFC 2104 §3)
])
def test_consistent_attributes_are_no_conflict(catalog: Catalog, name: str, attributes: dict) -> None:
    found = catalog.resolve(name, purpose="signature", **attributes)
    assert found.spec is not None, found.reason
    assert found.conflicts == ()


@pytest.mark.parametrize("curve", [ec.SECP256R1(), ec.SECP384R1(), ec.SECP521R1()])
def test_curve_key_sizes_agree_with_the_cryptography_library(catalog: Catalog, curve: ec.EllipticCurve) -> None:
    # Reference library: cryptography's curve key_size (the order size in bits).
    found = catalog.resolve("ECDSA", curve=curve.name, key_size=curve.key_size, purpose="signature")
    assert found.spec is not None and found.spec.problem_bits == curve.key_size
    other = catalog.resolve("ECDSA", curve=curve.name, key_size=curve.key_size + 64, purpose="signature")
    assert other.spec is None and other.conflicts
