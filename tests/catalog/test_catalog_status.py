"""Classical status against NIST SP 800-131A Rev. 2 (2019) and the break record."""

from __future__ import annotations

import pytest

from pqtriage.catalog import Catalog

NOT_ACCEPTABLE = ("broken", "weak")


@pytest.mark.parametrize(
    ("name", "status"),
    [
        ("MD5", "broken"),  # RFC 6151: collisions are practical
        (
            "SHA-1",
            "broken",
        ),  # practical collisions; SP 800-131A Rev. 2 §9: disallowed for signatures
        ("RC4", "broken"),  # RFC 7465 prohibits RC4 in TLS
        ("DES", "broken"),  # 56-bit key, FIPS 46-3 withdrawn
        ("2TDEA", "weak"),  # 80 bits, disallowed (SP 800-131A Rev. 2 §2)
        ("NULL", "broken"),
    ],
)
def test_not_acceptable_algorithms(catalog: Catalog, name: str, status: str) -> None:
    assert catalog.resolve(name).spec.classical_status == status


@pytest.mark.parametrize("size", [1024, 1536, 2047])
def test_rsa_below_2048_is_not_acceptable(catalog: Catalog, size: int) -> None:
    # SP 800-131A Rev. 2: at least 112 bits of strength to apply protection.
    spec = catalog.resolve("RSA", key_size=size).spec
    assert spec.classical_status == "weak"
    assert "not acceptable today" in spec.notes and "SP 800-131A Rev. 2" in spec.notes


def test_rsa_2048_is_acceptable_with_the_2030_note(catalog: Catalog) -> None:
    spec = catalog.resolve("RSA", key_size=2048).spec
    assert spec.classical_status == "acceptable"
    assert "deprecated after 2030" in spec.notes  # NIST IR 8547 ipd, Table 2


def test_3tdea_is_legacy_not_for_new_protection(catalog: Catalog) -> None:
    # SP 800-131A Rev. 2: TDEA encryption disallowed after 31 Dec 2023, decryption legacy use.
    spec = catalog.resolve("3DES").spec
    assert (spec.classical_bits, spec.classical_status) == (112, "legacy")
    assert "2023" in spec.notes


def test_sha1_in_signatures_is_not_acceptable_but_hmac_sha1_is(catalog: Catalog) -> None:
    assert catalog.resolve("ssh-rsa", key_size=3072).spec.classical_status in NOT_ACCEPTABLE
    assert (
        catalog.resolve("sha1WithRSAEncryption", key_size=3072).spec.classical_status
        in NOT_ACCEPTABLE
    )
    assert (
        catalog.resolve("HMAC-SHA1").spec.classical_status == "acceptable"
    )  # SP 800-131A Rev. 2 §10


def test_small_groups_and_curves(catalog: Catalog) -> None:
    assert catalog.resolve("diffie-hellman-group1-sha1").spec.classical_status == "weak"
    assert catalog.resolve("ssh-dss").spec.classical_status == "weak"  # 1024-bit DSA: 80 bits
    assert catalog.resolve("ECDSA", curve="P-192").spec.classical_status == "weak"


def test_ecb_is_a_weak_mode(catalog: Catalog) -> None:
    assert catalog.resolve("AES-256-ECB").spec.classical_status == "weak"
    assert catalog.resolve("AES-256-ECB").spec.replacement_for("encryption")
    assert catalog.resolve("AES-256-GCM").spec.classical_status == "acceptable"


def test_every_spec_status_quantum_and_source(catalog: Catalog) -> None:
    for spec in catalog.specs():
        assert spec.source.strip(), spec.name
        if spec.quantum_attack == "shor":
            assert spec.shor_problem and spec.problem_bits, spec.name
            assert spec.replacement_for("signature") and spec.replacement_for(
                "key-establishment"
            ), spec.name
        if spec.quantum_attack == "grover":
            assert spec.grover_target, spec.name


def test_replacement_texts_per_purpose(catalog: Catalog) -> None:
    rsa = catalog.resolve("RSA", key_size=2048).spec
    assert (
        rsa.replacement_for("key-establishment") == "ML-KEM-768 (FIPS 203) or hybrid X25519MLKEM768"
    )
    assert rsa.replacement_for("signature").startswith("ML-DSA-65 (FIPS 204) or SLH-DSA (FIPS 205)")
    assert "SHA-384" in catalog.resolve("SHA-256").spec.replacement_for("integrity")
    assert "AES-256" in catalog.resolve("AES-128-GCM").spec.replacement_for("encryption")
    assert catalog.resolve("AES-256-GCM").spec.replacement_for("encryption") is None
    assert catalog.resolve("ML-KEM-768").spec.replacement_for("key-establishment") is None
