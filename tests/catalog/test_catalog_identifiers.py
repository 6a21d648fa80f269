"""OIDs and the names other tools write, checked against those tools and the documents that assign them.

Reference tools, each asked directly (no value copied from them into the test):

- the cryptography library's OID constants (``cryptography.x509.oid``, ``ec.EllipticCurveOID``);
- the OpenSSL CLI of the machine (``openssl asn1parse -genconf``): the object names OpenSSL prints
  for each OID (OpenSSL 3.0's crypto/objects/objects.txt);
- the OpenJDK 17 providers, through tests/catalog/tools/NameCheck.java: every Java standard name
  exists, and the provider's OID alias names the same algorithm ("Java Security Standard Algorithm
  Names, JDK 17");
- Go's standard library (go1.19), through tests/catalog/tools/names.go: crypto/x509 and crypto/tls
  String() of each constant.

The resolution checks name the document beside each expected result.
"""

from __future__ import annotations

import os
import shutil
import subprocess
from pathlib import Path

import pytest
from cryptography.hazmat.primitives.asymmetric import ec
from cryptography.x509.oid import PublicKeyAlgorithmOID, SignatureAlgorithmOID

from pqtriage.catalog import load_catalog
from pqtriage.catalog.identifiers import Identifiers, read_identifiers, shipped_identifiers_path
from pqtriage.errors import CatalogError

TOOLS = Path(__file__).resolve().parent / "tools"


@pytest.fixture(scope="module")
def ids() -> Identifiers:
    return read_identifiers(shipped_identifiers_path())


def resolve(name: str, **kwargs: object) -> tuple[str | None, str | None]:
    found = load_catalog().resolve(name, **kwargs)  # type: ignore[arg-type]
    return (found.spec.name, found.spec.classical_status) if found.spec else (None, found.reason)


# -- the OID table against the cryptography library ------------------------------------------------
CRYPTOGRAPHY_SIGNATURES = {
    "RSA_WITH_MD5": "md5WithRSAEncryption", "RSA_WITH_SHA1": "sha1WithRSAEncryption",
    "RSA_WITH_SHA224": "sha224WithRSAEncryption", "RSA_WITH_SHA256": "sha256WithRSAEncryption",
    "RSA_WITH_SHA384": "sha384WithRSAEncryption", "RSA_WITH_SHA512": "sha512WithRSAEncryption",
    "RSA_WITH_SHA3_224": "id-rsassa-pkcs1-v1_5-with-sha3-224", "RSA_WITH_SHA3_256": "id-rsassa-pkcs1-v1_5-with-sha3-256",
    "RSA_WITH_SHA3_384": "id-rsassa-pkcs1-v1_5-with-sha3-384", "RSA_WITH_SHA3_512": "id-rsassa-pkcs1-v1_5-with-sha3-512",
    "RSASSA_PSS": "id-RSASSA-PSS", "ECDSA_WITH_SHA1": "ecdsa-with-SHA1", "ECDSA_WITH_SHA224": "ecdsa-with-SHA224",
    "ECDSA_WITH_SHA256": "ecdsa-with-SHA256", "ECDSA_WITH_SHA384": "ecdsa-with-SHA384",
    "ECDSA_WITH_SHA512": "ecdsa-with-SHA512", "ECDSA_WITH_SHA3_224": "id-ecdsa-with-sha3-224",
    "ECDSA_WITH_SHA3_256": "id-ecdsa-with-sha3-256", "ECDSA_WITH_SHA3_384": "id-ecdsa-with-sha3-384",
    "ECDSA_WITH_SHA3_512": "id-ecdsa-with-sha3-512", "DSA_WITH_SHA1": "id-dsa-with-sha1",
    "DSA_WITH_SHA224": "id-dsa-with-sha224", "DSA_WITH_SHA256": "id-dsa-with-sha256",
    "DSA_WITH_SHA384": "id-dsa-with-sha384", "DSA_WITH_SHA512": "id-dsa-with-sha512",
    "ED25519": "id-Ed25519", "ED448": "id-Ed448", "ML_DSA_44": "id-ml-dsa-44", "ML_DSA_65": "id-ml-dsa-65",
    "ML_DSA_87": "id-ml-dsa-87",
}
CRYPTOGRAPHY_KEYS = {
    "RSAES_PKCS1_v1_5": "rsaEncryption", "RSASSA_PSS": "id-RSASSA-PSS", "EC_PUBLIC_KEY": "id-ecPublicKey",
    "DSA": "id-dsa", "X25519": "id-X25519", "X448": "id-X448", "ED25519": "id-Ed25519", "ED448": "id-Ed448",
    "ML_KEM_768": "id-alg-ml-kem-768", "ML_KEM_1024": "id-alg-ml-kem-1024",
}
CRYPTOGRAPHY_CURVES = {
    "SECP192R1": "secp192r1", "SECP224R1": "secp224r1", "SECP256R1": "secp256r1", "SECP384R1": "secp384r1",
    "SECP521R1": "secp521r1", "SECP256K1": "secp256k1", "BRAINPOOLP256R1": "brainpoolP256r1",
    "BRAINPOOLP384R1": "brainpoolP384r1", "BRAINPOOLP512R1": "brainpoolP512r1",
}


@pytest.mark.parametrize(("holder", "table"), [
    (SignatureAlgorithmOID, CRYPTOGRAPHY_SIGNATURES), (PublicKeyAlgorithmOID, CRYPTOGRAPHY_KEYS),
    (ec.EllipticCurveOID, CRYPTOGRAPHY_CURVES)], ids=["signatures", "keys", "curves"])
def test_oids_agree_with_the_cryptography_library(ids: Identifiers, holder: object, table: dict[str, str]) -> None:
    # The RFCs that assign them: RFC 8017 App. C, RFC 4055, RFC 3279, RFC 5758, RFC 5480, RFC 8410,
    # RFC 9881, RFC 9935, RFC 5639, SEC 2; the library carries the same dotted values.
    for constant, name in table.items():
        dotted = getattr(holder, constant).dotted_string
        row = ids.by_oid(dotted)
        assert row is not None and row.name == name, (constant, dotted)


# -- the OpenSSL names -----------------------------------------------------------------------------
def test_openssl_columns_are_the_names_openssl_prints(ids: Identifiers, tmp_path: Path) -> None:
    openssl = shutil.which("openssl")
    assert openssl, "the openssl CLI is part of every machine image and of .ci/run"
    rows = list(ids.oids.values())
    config = tmp_path / "oids.cnf"
    config.write_text("asn1 = SEQUENCE:oids\n[oids]\n" + "".join(
        f"o{index} = OID:{row.oid}\n" for index, row in enumerate(rows)), encoding="ascii")
    out = subprocess.run([openssl, "asn1parse", "-genconf", str(config)], capture_output=True, text=True,
                         check=True, timeout=60).stdout
    printed = [line.split("OBJECT", 1)[1].strip(" :") for line in out.splitlines() if "OBJECT" in line]
    assert len(printed) == len(rows)
    columns = {row.oid: spellings for row, spellings in zip(rows, _column(ids, "openssl"), strict=True)}
    checked = 0
    for row, name in zip(rows, printed, strict=True):
        if name == row.oid:  # OpenSSL 3.0 does not know it (ML-DSA, ML-KEM, id-ecDH ...): no column
            assert columns[row.oid] == [], row.oid
            continue
        assert name in columns[row.oid], (row.oid, name)
        checked += 1
    assert checked >= 80


def _column(ids: Identifiers, family: str) -> list[list[str]]:
    """The spellings of one naming family per OID row, in file order."""
    return [list(row.spellings.get(family, ())) for row in ids.oids.values()]


# -- the Java standard names, asked of the JDK -------------------------------------------------------
_JAVA_TYPE = {"signature": "Signature", "hash": "MessageDigest", "mac": "Mac", "cipher": "Cipher",
              "public-key": "KeyFactory", "key-agreement": "KeyAgreement", "curve": "Curve"}
_JAVA_EXTRA = [("KeyAgreement", "ECDH"), ("KeyAgreement", "XDH"), ("Signature", "EdDSA"), ("Cipher", "DESede"),
               ("Cipher", "TripleDES"), ("Cipher", "DES"), ("Cipher", "Blowfish"), ("Cipher", "ChaCha20"),
               ("Mac", "HmacSHA256"), ("Mac", "HmacSHA384"), ("Mac", "HmacSHA512"), ("Mac", "HmacSHA1"),
               ("Mac", "HmacMD5"), ("Cipher", "AES/GCM/NoPadding"), ("Cipher", "RSA"), ("KeyPairGenerator", "EC"),
               ("KeyFactory", "DiffieHellman")]


def test_java_names_are_the_jdk_names_and_its_oid_aliases_agree(ids: Identifiers) -> None:
    java = shutil.which("java")
    assert java, "OpenJDK 17 is part of the machine image (and installed by .ci/run)"
    lines: list[tuple[str, str, str]] = []
    for row, spellings in zip(ids.oids.values(), _column(ids, "java"), strict=True):
        for spelling in spellings:
            kind = "KeyFactory" if row.kind == "key-agreement" and spelling == "DiffieHellman" else _JAVA_TYPE[row.kind]
            lines.append((kind, spelling, row.oid))
    lines += [(kind, name, "") for kind, name in _JAVA_EXTRA]
    request = "".join(f"{k}\t{n}\t{o}\n" for k, n, o in lines)
    env = {**os.environ, "JAVA_TOOL_OPTIONS": "-Xshare:auto"}
    out = subprocess.run([java, str(TOOLS / "NameCheck.java")], input=request, capture_output=True, text=True,
                         check=True, timeout=120, env=env).stdout.splitlines()
    answers = {(f[0], f[1]): (f[3], f[4]) for f in (line.split("\t") for line in out)}
    aliases = 0
    for kind, name, oid in lines:
        by_name, by_oid = answers[(kind, name)]
        if kind == "Curve":  # the JDK reports a named curve by its OID
            assert by_name == oid, (name, by_name)
            continue
        assert by_name not in ("-", "") and not by_name.startswith("!"), (kind, name)  # the JDK knows the name
        if oid and by_oid != "-":
            assert by_oid.casefold() == name.casefold() or by_oid.casefold() == by_name.casefold(), (name, oid, by_oid)
            aliases += 1
    assert aliases >= 40  # signatures, digests, MACs and ciphers carry OID aliases in the JDK


def test_java_names_resolve_to_the_expected_algorithms() -> None:
    # Java Security Standard Algorithm Names, JDK 17: Signature "<digest>with<encryption>",
    # Cipher "algorithm/mode/padding", KeyAgreement ECDH / X25519 / XDH.
    assert resolve("SHA256withECDSA", curve="secp256r1", purpose="signature") == ("ECDSA P-256", "acceptable")
    assert resolve("SHA512withRSA", key_size=3072, purpose="signature") == ("RSA-3072", "acceptable")
    # SHA-1 and MD5 signatures: NIST SP 800-131A Rev. 2 §9 disallows SHA-1 for signature generation;
    # MD5 collisions gave forged certificates (RFC 6151 §2).
    assert resolve("SHA1withRSA", key_size=2048, purpose="signature") == ("RSA-2048 (sha1WithRSAEncryption)", "weak")
    assert resolve("MD5withRSA", key_size=2048, purpose="signature") == ("RSA-2048 (md5WithRSAEncryption)", "broken")
    assert resolve("RSASSA-PSS", key_size=4096, purpose="signature") == ("RSA-4096", "acceptable")
    assert resolve("AES/GCM/NoPadding", key_size=256) == ("AES-256-GCM", "acceptable")  # FIPS 197, SP 800-38D
    assert resolve("AES_128/CBC/PKCS5Padding") == ("AES-128-CBC", "acceptable")
    assert resolve("AES/CFB/NoPadding", key_size=192) == ("AES-192", "acceptable")  # mode rated with the cipher
    assert resolve("RSA/ECB/OAEPWithSHA-256AndMGF1Padding", key_size=2048, purpose="encryption") == (
        "RSA-2048", "acceptable")  # RFC 8017 §7.1 RSAES-OAEP
    assert resolve("DESede/CBC/PKCS5Padding", purpose="encryption") == ("3TDEA-CBC", "legacy")  # SP 800-67 Rev. 2
    assert resolve("ECDH", curve="secp384r1", purpose="key-establishment") == ("ECDH P-384", "acceptable")
    assert resolve("X25519") == ("X25519", "acceptable")  # RFC 7748
    assert resolve("XDH", curve="X448") == ("X448", "acceptable")
    name, reason = resolve("XDH")
    assert name is None and "needs a curve" in str(reason)


def test_openssl_go_and_dotnet_names_resolve() -> None:
    # OpenSSL object names (RFC 5480 §2.1.1 id-ecPublicKey and prime256v1; RFC 8017 rsaEncryption).
    assert resolve("id-ecPublicKey", curve="prime256v1", purpose="signature") == ("ECDSA P-256", "acceptable")
    assert resolve("rsaEncryption", key_size=2048) == ("RSA-2048", "acceptable")
    assert resolve("RSA-SHA256", key_size=2048, purpose="signature") == ("RSA-2048", "acceptable")
    assert resolve("ecdsa_with_SHA3-256", curve="P-521", purpose="signature") == ("ECDSA P-521", "acceptable")
    # Go crypto/x509 SignatureAlgorithm strings.
    assert resolve("SHA384-RSA", key_size=3072, purpose="signature") == ("RSA-3072", "acceptable")
    assert resolve("ECDSA-SHA1", curve="P-256", purpose="signature") == ("ECDSA P-256 (ecdsa-with-SHA1)", "weak")
    assert resolve("SHA256-RSAPSS", key_size=2048, purpose="signature") == ("RSA-2048", "acceptable")
    assert resolve("CurveP384", purpose="key-establishment") == ("ECDH P-384", "acceptable")
    # .NET names (from memory): Oid friendly names and ECCurve.NamedCurves.
    assert resolve("sha256RSA", key_size=2048, purpose="signature") == ("RSA-2048", "acceptable")
    assert resolve("nistP256", purpose="signature") == ("ECDSA P-256", "acceptable")
    assert resolve("ECDiffieHellman", curve="nistP384") == ("ECDH P-384", "acceptable")
    assert resolve("TripleDES", purpose="encryption") == ("3TDEA", "legacy")


def test_go_names_are_what_the_go_standard_library_prints(ids: Identifiers, tmp_path: Path) -> None:
    go = shutil.which("go")
    if not go:  # CI installs golang-go and turns a skip into a failure (CI_NO_SKIPS=1)
        pytest.skip("Go is absent (apt-get install golang-go)")
    env = {**os.environ, "GOCACHE": str(tmp_path / "cache"), "GOPATH": str(tmp_path / "gopath"),
           "GOFLAGS": "-mod=mod", "GO111MODULE": "off", "GOTOOLCHAIN": "local"}
    out = subprocess.run([go, "run", str(TOOLS / "names.go")], capture_output=True, text=True, check=True,
                         timeout=300, env=env, cwd=tmp_path).stdout
    printed = dict(line.split("\t") for line in out.splitlines())
    # Go's constants and the OIDs its crypto/x509 gives them (RFC 8017, RFC 3279, RFC 5758, RFC 8410).
    constants = {
        "MD2WithRSA": "1.2.840.113549.1.1.2", "MD5WithRSA": "1.2.840.113549.1.1.4",
        "SHA1WithRSA": "1.2.840.113549.1.1.5", "SHA256WithRSA": "1.2.840.113549.1.1.11",
        "SHA384WithRSA": "1.2.840.113549.1.1.12", "SHA512WithRSA": "1.2.840.113549.1.1.13",
        "DSAWithSHA1": "1.2.840.10040.4.3", "DSAWithSHA256": "2.16.840.1.101.3.4.3.2",
        "ECDSAWithSHA1": "1.2.840.10045.4.1", "ECDSAWithSHA256": "1.2.840.10045.4.3.2",
        "ECDSAWithSHA384": "1.2.840.10045.4.3.3", "ECDSAWithSHA512": "1.2.840.10045.4.3.4",
        "PureEd25519": "1.3.101.112", "key.RSA": "1.2.840.113549.1.1.1", "key.DSA": "1.2.840.10040.4.1",
        "curve.CurveP256": "1.2.840.10045.3.1.7", "curve.CurveP384": "1.3.132.0.34",
        "curve.CurveP521": "1.3.132.0.35", "curve.X25519": "1.3.101.110",
    }
    columns = dict(zip(ids.oids, _column(ids, "go"), strict=True))
    for constant, oid in constants.items():
        assert printed[constant] in columns[oid], (constant, printed[constant], columns[oid])
    for constant in ("SHA256WithRSAPSS", "SHA384WithRSAPSS", "SHA512WithRSAPSS"):
        translation = ids.translate(printed[constant])
        assert translation is not None and translation.written_as.startswith("Go name"), constant


# -- resolution by OID ---------------------------------------------------------------------------
def test_oid_first_and_contradictions_are_unassessed() -> None:
    # RFC 8017 Appendix C: 1.2.840.113549.1.1.13 is sha512WithRSAEncryption.
    assert resolve("VendorSigner-7", oid="1.2.840.113549.1.1.13", key_size=2048, purpose="signature") == (
        "RSA-2048", "acceptable")
    name, reason = resolve("SHA256withRSA", oid="1.2.840.113549.1.1.13", key_size=2048, purpose="signature")
    assert name is None and "SHA256withRSA" in str(reason) and "sha512WithRSAEncryption" in str(reason)
    # RFC 5480 §2.1.1.1: 1.3.132.0.34 is secp384r1, not P-256.
    name, reason = resolve("P-256", oid="1.3.132.0.34", purpose="key-establishment")
    assert name is None and "secp384r1" in str(reason)
    # RFC 9935: 2.16.840.1.101.3.4.4.1 is ML-KEM-512 (category 1, FIPS 203), not ML-KEM-768.
    name, reason = resolve("ML-KEM-768", oid="2.16.840.1.101.3.4.4.1")
    assert name is None and "id-alg-ml-kem-512" in str(reason)
    # A signature name with the OID of its key type is not a contradiction: the name is more precise.
    assert resolve("SHA1withRSA", oid="1.2.840.113549.1.1.1", key_size=2048, purpose="signature") == (
        "RSA-2048 (sha1WithRSAEncryption)", "weak")
    # The OID's hash caps a plain name: RSA-2048 signed with sha1WithRSAEncryption (RFC 8017; SP 800-131A).
    assert resolve("RSA-2048", oid="1.2.840.113549.1.1.5", purpose="signature") == (
        "RSA-2048 (sha1WithRSAEncryption)", "weak")
    # An OID pqtriage does not know leaves the name to decide, and is said when the name is unknown too.
    assert resolve("AES-128-GCM", oid="1.2.3.4") == ("AES-128-GCM", "acceptable")
    name, reason = resolve("Frobnicate", oid="1.2.3.4")
    assert name is None and "1.2.3.4 is not one pqtriage knows" in str(reason)


def test_fixed_entries_carry_their_oid() -> None:
    catalog = load_catalog()
    # RFC 5084 §3.2 / NIST CSOR: id-aes256-GCM; RFC 5754 §2: id-sha384; RFC 9881: id-ml-dsa-87.
    for name, oid in (("AES-256-GCM", "2.16.840.1.101.3.4.1.46"), ("SHA-384", "2.16.840.1.101.3.4.2.2"),
                      ("ML-DSA-87", "2.16.840.1.101.3.4.3.19"), ("X25519", "1.3.101.110")):
        spec = catalog.resolve(name).spec
        assert spec is not None and spec.identifiers.get("oid") == oid, name


# -- the file is validated at load ------------------------------------------------------------------
GOOD_SOURCES = "naming_sources: {java: j, openssl: o, go: g, dotnet: d}\n"
TRANSFORMS = "transformations: {source: s, ciphers: {}, plain_modes: [], rsa_paddings: {}}\n"


@pytest.mark.parametrize(("text", "message"), [
    (GOOD_SOURCES + "oids: [{oid: 1.2.x, name: a, algorithm: RSA, kind: public-key, source: s}]\nnames: []\n"
     + TRANSFORMS, "is not a dotted object identifier"),
    (GOOD_SOURCES + "oids: [{oid: 1.2.3, name: a, algorithm: RSA, kind: public-key}]\nnames: []\n" + TRANSFORMS,
     "missing 'source'"),
    (GOOD_SOURCES + "oids: [{oid: 1.2.3, name: a, algorithm: RSA, kind: spell, source: s}]\nnames: []\n"
     + TRANSFORMS, "kind 'spell'"),
    (GOOD_SOURCES + "oids: [{oid: 1.2.3, name: a, algorithm: RSA, kind: public-key, source: s, colour: red}]\n"
     "names: []\n" + TRANSFORMS, "unknown key 'colour'"),
    ("naming_sources: {java: j}\noids: []\nnames: []\n" + TRANSFORMS, "must give a source for each"),
    (GOOD_SOURCES + "oids: [{oid: 1.2.3, name: a, algorithm: RSA, kind: public-key, source: s},"
     " {oid: 1.2.3, name: b, algorithm: DSA, kind: public-key, source: s}]\nnames: []\n" + TRANSFORMS,
     "listed twice"),
], ids=["bad-oid", "no-source", "bad-kind", "unknown-key", "family-sources", "duplicate"])
def test_identifier_file_mistakes_are_refused(tmp_path: Path, text: str, message: str) -> None:
    path = tmp_path / "ids.yaml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(CatalogError) as caught:
        read_identifiers(path)
    assert message in caught.value.diagnostics()


def test_a_row_pointing_nowhere_is_refused(tmp_path: Path) -> None:
    from pqtriage.catalog import shipped_path
    from pqtriage.catalog.loader import read_catalog
    from pqtriage.catalog.resolve import Catalog

    path = tmp_path / "ids.yaml"
    path.write_text(GOOD_SOURCES + "oids: [{oid: 1.2.3, name: a, algorithm: Frobnicate-9, kind: cipher,"
                    " source: s}]\nnames: []\n" + TRANSFORMS, encoding="utf-8")
    with pytest.raises(CatalogError) as caught:
        Catalog(read_catalog(shipped_path()), read_identifiers(path))
    assert "'Frobnicate-9' is not a catalog spelling" in caught.value.diagnostics()
