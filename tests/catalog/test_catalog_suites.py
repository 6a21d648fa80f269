"""TLS cipher suites decompose into parts, in IANA and OpenSSL spelling alike."""

from __future__ import annotations

import ssl

import pytest

from pqtriage.catalog import Catalog
from tests.catalog.catalog_vectors import vectors

SUITES = vectors("cipher_suites.yaml")
FAMILY_OF_PART = {"RSA": "RSA", "FFDH": "FFDH", "ECDH": "ECDH", "ECDSA": "ECDSA", "DSA": "DSA"}
SIZES = {"key_size": 2048, "curve": "P-256"}


def _parts(spec) -> dict[str, list[str]]:
    parts: dict[str, list[str]] = {}
    for component in spec.components:
        name = (
            component.spec.family
            if component.purpose in ("key-establishment", "authentication")
            else component.spec.name
        )
        parts.setdefault(component.purpose, []).append(name)
    return parts


@pytest.mark.parametrize("row", SUITES["suites"], ids=lambda row: row["iana"])
def test_tls12_suites_both_spellings(catalog: Catalog, row: dict) -> None:
    iana = catalog.resolve(row["iana"], **SIZES).spec
    assert iana is not None
    if row["openssl"]:
        assert catalog.resolve(row["openssl"], **SIZES).spec == iana  # one suite, two spellings
    assert iana.name == row["iana"] and iana.primitive == "cipher-suite"
    expected = {"encryption": [row["cipher"]], "integrity": [row["hash"]]}
    if row["kx"]:
        expected["key-establishment"] = [row["kx"]]
    if row["auth"]:
        expected["authentication"] = [row["auth"]]
    assert _parts(iana) == expected


@pytest.mark.parametrize("row", SUITES["tls13"], ids=lambda row: row["iana"])
def test_tls13_suites_carry_only_cipher_and_hash(catalog: Catalog, row: dict) -> None:
    # RFC 8446 §B.4: no key exchange in the name; the group decides.
    spec = catalog.resolve(row["iana"]).spec
    assert _parts(spec) == {"encryption": [row["cipher"]], "integrity": [row["hash"]]}
    assert spec.quantum_attack == "grover" and "group decides" in spec.notes


def test_composite_takes_the_worst_part(catalog: Catalog) -> None:
    spec = catalog.resolve("TLS_RSA_WITH_3DES_EDE_CBC_SHA", key_size=2048).spec
    assert spec.quantum_attack == "shor"  # shor > grover > none
    assert spec.classical_status == "legacy"  # 3TDEA
    assert spec.classical_bits == 112  # min(RSA-2048 112, 3TDEA 112, HMAC-SHA1 128)
    rc4 = catalog.resolve("TLS_RSA_WITH_RC4_128_MD5", key_size=2048).spec
    assert rc4.classical_status == "broken"
    assert catalog.resolve("TLS_RSA_WITH_NULL_SHA", key_size=2048).spec.classical_status == "broken"
    assert catalog.resolve("ADH-AES128-SHA", key_size=2048).spec.classical_status == "broken"
    weak = catalog.resolve("DHE-RSA-AES256-SHA", key_size=1024).spec
    assert (weak.classical_status, weak.classical_bits) == ("weak", 80)


def test_suite_without_sizes_is_unassessed_but_shor(catalog: Catalog) -> None:
    resolution = catalog.resolve("TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256")
    assert resolution.spec is None
    assert "key exchange ECDH needs a curve" in resolution.reason
    assert "authentication RSA needs a key size" in resolution.reason
    assert resolution.quantum_attack == "shor"


def test_sizes_go_to_the_right_parts(catalog: Catalog) -> None:
    spec = catalog.resolve("ECDHE-ECDSA-AES256-GCM-SHA384", curve="P-384").spec
    assert [c.spec.name for c in spec.components[:2]] == ["ECDH P-384", "ECDSA P-384"]
    dhe = catalog.resolve("TLS_DHE_RSA_WITH_AES_128_GCM_SHA256", key_size=3072).spec
    assert [c.spec.name for c in dhe.components[:2]] == ["DH-3072", "RSA-3072"]
    x = catalog.resolve("ECDHE-RSA-AES128-GCM-SHA256", key_size=2048, curve="x25519").spec
    assert x.components[0].spec.name == "X25519"


def test_not_a_suite(catalog: Catalog) -> None:
    assert catalog.resolve("TLS_EMPTY_RENEGOTIATION_INFO_SCSV").spec is None
    assert catalog.resolve("TLS_FOO_WITH_AES_128_GCM_SHA256").spec is None
    assert catalog.resolve("AES128-SHA999").spec is None


KEA = {"kx-ecdhe": "ECDH", "kx-dhe": "FFDH", "kx-rsa": "RSA"}
AUTH = {"auth-rsa": "RSA", "auth-ecdsa": "ECDSA", "auth-dss": "DSA", "auth-null": None}


def _local_openssl_ciphers() -> list[dict]:
    context = ssl.SSLContext(ssl.PROTOCOL_TLS_CLIENT)
    try:
        context.set_ciphers("ALL:@SECLEVEL=0")
    except ssl.SSLError:  # pragma: no cover - very old OpenSSL
        context.set_ciphers("ALL")
    return context.get_ciphers()


def test_against_the_local_openssl(catalog: Catalog) -> None:
    # Reference library: OpenSSL (through Python's ssl module) states each suite's key exchange,
    # authentication, cipher and MAC digest; our decomposition of its name must agree.
    checked = 0
    for cipher in _local_openssl_ciphers():
        symmetric = catalog.resolve(cipher["symmetric"] or "").spec
        if (
            cipher["kea"] not in (*KEA, "kx-any")
            or cipher["auth"] not in (*AUTH, "auth-any")
            or symmetric is None
        ):
            continue  # a kind the catalog does not model (ARIA, SEED, PSK/SRP variants)
        spec = catalog.resolve(cipher["name"], **SIZES).spec
        assert spec is not None, cipher["name"]
        if spec.primitive != "cipher-suite":
            assert cipher["name"] in ("AES128-CCM", "AES256-CCM")  # also the cipher's own name
            continue
        parts = _parts(spec)
        assert parts.get("key-establishment") == (
            [KEA[cipher["kea"]]] if cipher["kea"] in KEA else None
        )
        auth = AUTH.get(cipher["auth"])
        assert parts.get("authentication") == ([auth] if auth else None), cipher["name"]
        assert parts["encryption"] == [symmetric.name], cipher["name"]
        if cipher["digest"]:  # record MAC of CBC suites
            assert parts["integrity"] == [catalog.resolve("HMAC-" + cipher["digest"]).spec.name]
        checked += 1
    assert checked >= 20  # the local OpenSSL offers at least this many modelled suites
