"""Spellings people write resolve to the right catalog entry; the rest is data, not errors."""

from __future__ import annotations

import pytest

from pqtriage.catalog import Catalog
from pqtriage.model.inventory import Purpose

SPELLINGS = [
    ("RSA-3072", {}, "RSA-3072"),
    ("rsa3072", {}, "RSA-3072"),
    ("RSA 3072", {}, "RSA-3072"),
    ("RSA", {"key_size": 3072}, "RSA-3072"),
    ("RSA", {"key_size": 2048}, "RSA-2048"),
    ("ECDSA", {"curve": "P-256"}, "ECDSA P-256"),
    ("ECDSA", {"curve": "prime256v1"}, "ECDSA P-256"),
    ("ECDSA-P256", {}, "ECDSA P-256"),
    ("secp384r1", {}, "ECDH P-384"),
    ("prime256v1", {}, "ECDH P-256"),
    ("P-384", {}, "ECDH P-384"),
    ("P-384", {"purpose": "signature"}, "ECDSA P-384"),
    ("P-384", {"purpose": "authentication"}, "ECDSA P-384"),
    ("P-384", {"purpose": "key-establishment"}, "ECDH P-384"),
    ("P-384", {"purpose": Purpose.SIGNATURE}, "ECDSA P-384"),
    ("EC", {"curve": "P-521", "purpose": "signature"}, "ECDSA P-521"),
    ("ECDHE", {"curve": "P-256"}, "ECDH P-256"),
    ("ECDH", {"curve": "x25519"}, "X25519"),
    ("Curve25519", {"purpose": "signature"}, "Ed25519"),
    ("Curve25519", {}, "X25519"),
    ("DH-2048", {}, "DH-2048"),
    ("DH", {"key_size": 3072}, "DH-3072"),
    ("DH", {"curve": "ffdhe3072"}, "ffdhe3072"),
    ("ffdhe2048", {}, "ffdhe2048"),
    ("DSA-2048", {}, "DSA-2048"),
    ("AES-128-GCM", {}, "AES-128-GCM"),
    ("aes128-gcm", {}, "AES-128-GCM"),
    ("AES_128_GCM", {}, "AES-128-GCM"),
    ("AES-GCM", {"key_size": 256}, "AES-256-GCM"),
    ("AES", {"key_size": 192}, "AES-192"),
    ("ChaCha20-Poly1305", {}, "ChaCha20-Poly1305"),
    ("3DES", {}, "3TDEA"),
    ("TDEA", {}, "3TDEA"),
    ("DES-EDE3-CBC", {}, "3TDEA-CBC"),
    ("SHA-256", {}, "SHA-256"),
    ("sha256", {}, "SHA-256"),
    ("SHA3-256", {}, "SHA3-256"),
    ("SHA-512/256", {}, "SHA-512/256"),
    ("HMAC-SHA256", {}, "HMAC-SHA256"),
    ("ML-KEM-768", {}, "ML-KEM-768"),
    ("mlkem768", {}, "ML-KEM-768"),
    ("Kyber768", {}, "ML-KEM-768"),
    ("ML-KEM", {"parameter_set": "1024"}, "ML-KEM-1024"),
    ("ML-DSA-65", {}, "ML-DSA-65"),
    ("SLH-DSA-SHA2-128s", {}, "SLH-DSA-SHA2-128s"),
    ("SLH-DSA", {"parameter_set": "SHAKE-256f"}, "SLH-DSA-SHAKE-256f"),
    ("LMS", {}, "LMS"),
    ("HSS", {}, "LMS"),
    ("XMSS", {}, "XMSS"),
    ("XMSS^MT", {}, "XMSS"),
    ("X25519MLKEM768", {}, "X25519MLKEM768"),
    # SSH (RFC 4253, 5656, 8332, 8709, 8731, 8268, 4344; OpenSSH PROTOCOL)
    ("rsa-sha2-256", {"key_size": 3072}, "RSA-3072"),
    ("rsa-sha2-512", {"key_size": 4096}, "RSA-4096"),
    ("ecdsa-sha2-nistp256", {}, "ECDSA P-256"),
    ("ecdsa-sha2-nistp384", {}, "ECDSA P-384"),
    ("ecdsa-sha2-nistp521", {}, "ECDSA P-521"),
    ("ssh-ed25519", {}, "Ed25519"),
    ("ssh-ed448", {}, "Ed448"),
    ("ssh-dss", {}, "DSA-1024"),
    ("curve25519-sha256", {}, "X25519"),
    ("curve25519-sha256@libssh.org", {}, "X25519"),
    ("ecdh-sha2-nistp256", {}, "ECDH P-256"),
    ("ecdh-sha2-nistp384", {}, "ECDH P-384"),
    ("ecdh-sha2-nistp521", {}, "ECDH P-521"),
    ("diffie-hellman-group14-sha256", {}, "modp2048"),
    ("diffie-hellman-group16-sha512", {}, "modp4096"),
    ("diffie-hellman-group18-sha512", {}, "modp8192"),
    ("diffie-hellman-group1-sha1", {}, "modp1024"),
    ("diffie-hellman-group-exchange-sha256", {"key_size": 3072}, "DH-3072"),
    ("aes128-ctr", {}, "AES-128-CTR"),
    ("aes256-gcm@openssh.com", {}, "AES-256-GCM"),
    ("chacha20-poly1305@openssh.com", {}, "ChaCha20-Poly1305"),
    ("hmac-sha2-256", {}, "HMAC-SHA256"),
    ("hmac-sha2-256-etm@openssh.com", {}, "HMAC-SHA256"),
    ("3des-cbc", {}, "3TDEA-CBC"),
    # TLS (RFC 8446 §4.2.3, §4.2.7; draft-ietf-tls-mldsa)
    ("secp256r1", {}, "ECDH P-256"),
    ("x25519", {}, "X25519"),
    ("ffdhe2048", {}, "ffdhe2048"),
    ("rsa_pss_rsae_sha256", {"key_size": 2048}, "RSA-2048"),
    ("ecdsa_secp256r1_sha256", {}, "ECDSA P-256"),
    ("ed25519", {}, "Ed25519"),
    ("mldsa44", {}, "ML-DSA-44"),
    ("mldsa65", {}, "ML-DSA-65"),
    ("mldsa87", {}, "ML-DSA-87"),
    ("MLKEM768", {}, "ML-KEM-768"),
    ("MLKEM1024", {}, "ML-KEM-1024"),
]


@pytest.mark.parametrize(("text", "params", "expected"), SPELLINGS, ids=lambda v: str(v))
def test_spellings(catalog: Catalog, text: str, params: dict, expected: str) -> None:
    resolution = catalog.resolve(text, **params)
    assert resolution.assessed, resolution.reason
    assert resolution.spec.name == expected


def test_purpose_decides_rsa_primitive_not_name(catalog: Catalog) -> None:
    signing = catalog.resolve("RSA", key_size=2048, purpose="signature").spec
    transport = catalog.resolve("RSA", key_size=2048, purpose="key-establishment").spec
    assert signing.name == transport.name == "RSA-2048"
    assert (signing.primitive, transport.primitive) == ("signature", "public-key-encryption")


@pytest.mark.parametrize(
    ("text", "params", "reason"),
    [
        ("RSA", {}, "RSA needs a key size: add key_size: 2048 (or the real size)"),
        ("ECDSA", {}, "ECDSA needs a curve: add curve: P-256 (or the real curve)"),
        ("ssh-rsa", {}, "ssh-rsa needs a key size"),
        ("ML-KEM", {}, "ML-KEM needs a parameter set"),
        ("AES-GCM", {}, "AES needs a key size"),
        (
            "diffie-hellman-group-exchange-sha256",
            {},
            "diffie-hellman-group-exchange-sha256 needs the group size the server picks",
        ),
    ],
)
def test_missing_parameter_is_unassessed_with_a_reason(
    catalog: Catalog,
    text: str,
    params: dict,
    reason: str,
) -> None:
    resolution = catalog.resolve(text, **params)
    assert resolution.spec is None and not resolution.assessed
    assert resolution.reason.startswith(reason)


def test_unassessed_rsa_still_reports_shor(catalog: Catalog) -> None:
    resolution = catalog.resolve("RSA")
    assert (resolution.family, resolution.quantum_attack) == ("RSA", "shor")


def test_unknown_names_get_suggestions(catalog: Catalog) -> None:
    resolution = catalog.resolve("SHA-265")
    assert resolution.spec is None and "not in the algorithm catalog" in resolution.reason
    assert "SHA-256" in resolution.suggestions and len(resolution.suggestions) <= 3
    assert "ML-KEM-768" in catalog.resolve("MK-KEM-768").suggestions
    assert catalog.suggest("ed25519x", limit=1) == ("Ed25519",)


def test_unknown_curve_gets_suggestions(catalog: Catalog) -> None:
    resolution = catalog.resolve("ECDSA", curve="P-265")
    assert resolution.spec is None and "unknown curve" in resolution.reason
    assert "P-256" in resolution.suggestions


def test_implausible_sizes_are_data(catalog: Catalog) -> None:
    assert catalog.resolve("RSA", key_size=0).spec is None
    assert catalog.resolve("RSA", key_size=10**9).spec is None
    assert catalog.resolve("rsa" + "9" * 40).spec is None


def test_curve_from_key_size_is_marked_as_an_assumption(catalog: Catalog) -> None:
    spec = catalog.resolve("ECDSA", key_size=384).spec
    assert spec.name == "ECDSA P-384" and "assumed" in spec.notes


def test_specs_and_spellings_cover_the_catalog(catalog: Catalog) -> None:
    names = {spec.name for spec in catalog.specs()}
    assert {
        "RSA-2048",
        "ECDSA P-256",
        "ECDH P-384",
        "AES-256-GCM",
        "ML-KEM-768",
        "ffdhe2048",
    } <= names
    assert len(names) == len(catalog.specs())
    spellings = set(catalog.spellings())
    assert {"prime256v1", "ssh-ed25519", "Kyber768", "RSA"} <= spellings
    for spec in catalog.specs():  # every fixed spec resolves back to itself by name
        assert catalog.resolve(spec.name).spec.name == spec.name


def test_suggestions_are_computed_once_per_distinct_name(catalog: Catalog, monkeypatch: pytest.MonkeyPatch) -> None:
    """`check` asks for the same misspelling once per use; the comparison runs once per name.

    The answer is checked against Python's own difflib.get_close_matches (standard library
    reference) over the same spellings, so memoising changes nothing but the count of calls.
    """
    import difflib

    from pqtriage.catalog import resolve as resolve_module
    from pqtriage.catalog.resolve import loose_key

    real = difflib.get_close_matches
    calls: list[str] = []

    def counting(word, possibilities, n=3, cutoff=0.6):  # type: ignore[no-untyped-def]
        calls.append(word)
        return real(word, possibilities, n=n, cutoff=cutoff)

    monkeypatch.setattr(resolve_module.difflib, "get_close_matches", counting)
    answers = [catalog.suggest("ML-KEM-7689x") for _ in range(50)]
    answers += [catalog.suggest("SHA-2567x") for _ in range(50)]
    assert len(calls) == 2
    assert answers[0] == answers[49] and answers[50] == answers[99]
    display = catalog._display  # the same spellings the catalog compares with
    expected = tuple(display[key] for key in real(loose_key("ML-KEM-7689x"), display, n=3, cutoff=0.6))
    assert answers[0] == expected and expected  # a real, non-empty suggestion
    for _ in range(5):
        catalog.resolve("SHA-2567x")
    assert len(calls) == 2  # resolve of an unknown name reuses the memoised suggestion
