"""NIST security categories, hash strengths and identifiers against published values."""

from __future__ import annotations

import hashlib

import pytest

from pqtriage.catalog import Catalog
from tests.catalog.catalog_vectors import vectors

CATEGORIES = vectors("nist_categories.yaml")
IDS = vectors("identifiers.yaml")
PQ = {
    **CATEGORIES["fips203"],
    **CATEGORIES["fips204"],
    **CATEGORIES["fips205"],
    **CATEGORIES["sp800_208"],
}


@pytest.mark.parametrize(("name", "category"), sorted(PQ.items()))
def test_post_quantum_categories(catalog: Catalog, name: str, category: int) -> None:
    # FIPS 203 / 204 / 205 (2024), NIST SP 800-208 (2020): every parameter set.
    spec = catalog.resolve(name).spec
    assert spec is not None and spec.name == name
    assert spec.nist_category == category
    assert spec.quantum_attack == "none"
    assert (
        spec.replacement_for("signature") is None
        and spec.replacement_for("key-establishment") is None
    )


@pytest.mark.parametrize(("name", "category"), sorted(PQ.items()))
def test_pq_classical_bits_follow_the_category_reference(
    catalog: Catalog, name: str, category: int
) -> None:
    # Rule: the classical cost of the category's reference attack (NIST PQC CfP 2016 §4.A.5):
    # 1 AES-128 -> 128, 2 SHA-256 collision -> 128, 3 AES-192 -> 192, 5 AES-256 -> 256.
    assert (
        catalog.resolve(name).spec.classical_bits
        == {1: 128, 2: 128, 3: 192, 4: 192, 5: 256}[category]
    )


def test_stateful_schemes_say_firmware_only(catalog: Catalog) -> None:
    for name in CATEGORIES["sp800_208"]:
        assert "firmware and code signing only" in catalog.resolve(name).spec.notes


@pytest.mark.parametrize(("name", "category"), sorted(CATEGORIES["fips197"].items()))
def test_aes_categories(catalog: Catalog, name: str, category: int) -> None:
    spec = catalog.resolve(name).spec
    assert spec.nist_category == category and spec.grover_target == "key-search"
    assert spec.problem_bits == int(name.split("-")[1])


@pytest.mark.parametrize(("name", "cats"), sorted(CATEGORIES["ir8547_table7"].items()))
def test_hash_categories_ir8547_table7(catalog: Catalog, name: str, cats: dict) -> None:
    spec = catalog.resolve(name).spec
    assert spec.nist_category == cats["collision"]
    if "preimage" in cats:
        assert spec.preimage_category == cats["preimage"]
    assert spec.grover_target == "collision"


@pytest.mark.parametrize(
    "name",
    ["SHA-224", "SHA-256", "SHA-384", "SHA-512", "SHA3-224", "SHA3-256", "SHA3-384", "SHA3-512"],
)
def test_hash_strength_is_half_the_output(catalog: Catalog, name: str) -> None:
    # Output length from hashlib (a reference implementation); collision = half of it,
    # preimage = all of it (NIST SP 800-107 Rev. 1; M: a value from memory).
    hashlib_name = name.lower().replace("sha3-", "sha3_").replace("sha-", "sha")
    output_bits = hashlib.new(hashlib_name).digest_size * 8
    spec = catalog.resolve(name).spec
    assert spec.problem_bits == output_bits
    assert spec.classical_bits == output_bits // 2
    assert spec.preimage_bits == output_bits


def test_pq_names_of_other_rounds_are_aliases(catalog: Catalog) -> None:
    assert catalog.resolve("Kyber768").spec.name == "ML-KEM-768"
    assert catalog.resolve("Dilithium3").spec.name == "ML-DSA-65"
    assert catalog.resolve("SPHINCS+-SHA2-128s").spec.name == "SLH-DSA-SHA2-128s"
    assert "draft" in catalog.resolve("HQC-128").spec.notes
    assert "not yet published" in catalog.resolve("FN-DSA-512").spec.notes


@pytest.mark.parametrize(("name", "oid"), sorted(IDS["oid"].items()))
def test_oids(catalog: Catalog, name: str, oid: str) -> None:
    # RFC 9881 (ML-DSA), RFC 9909 (SLH-DSA), RFC 9935 (ML-KEM).
    assert catalog.resolve(name).spec.identifiers["oid"] == oid


@pytest.mark.parametrize(("name", "code"), sorted(IDS["tls_group"].items()))
def test_tls_groups(catalog: Catalog, name: str, code: str) -> None:
    # draft-ietf-tls-ecdhe-mlkem, draft-ietf-tls-mlkem.
    spec = catalog.resolve(name).spec
    assert spec.identifiers["tls-group"] == code
    assert spec.quantum_attack == "none"


@pytest.mark.parametrize(("name", "code"), sorted(IDS["tls_signature_scheme"].items()))
def test_tls_signature_schemes(catalog: Catalog, name: str, code: str) -> None:
    assert catalog.resolve(name).spec.identifiers["tls-signature-scheme"] == code


@pytest.mark.parametrize(
    ("name", "parts"),
    [
        ("X25519MLKEM768", ["X25519", "ML-KEM-768"]),
        ("SecP256r1MLKEM768", ["ECDH P-256", "ML-KEM-768"]),
        ("SecP384r1MLKEM1024", ["ECDH P-384", "ML-KEM-1024"]),
        ("X25519Kyber768Draft00", ["X25519", "ML-KEM-768"]),
        ("sntrup761x25519-sha512", ["X25519", "sntrup761"]),
        ("sntrup761x25519-sha512@openssh.com", ["X25519", "sntrup761"]),
        ("mlkem768x25519-sha256", ["X25519", "ML-KEM-768"]),
    ],
)
def test_hybrids(catalog: Catalog, name: str, parts: list[str]) -> None:
    # RFC 9941, draft-ietf-tls-ecdhe-mlkem (a draft), draft-ietf-sshm-mlkem-hybrid-kex (a draft), V.
    spec = catalog.resolve(name).spec
    assert spec.hybrid and spec.quantum_attack == "none"
    assert [c.spec.name for c in spec.components] == parts
    assert {c.purpose for c in spec.components} == {"key-establishment"}
    assert {c.spec.quantum_attack for c in spec.components} == {"shor", "none"}
