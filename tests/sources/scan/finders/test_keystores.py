"""Keystores made by the JDK's keytool (and pyjks where keytool cannot), read by the
keystore finder (JKS, JCEKS) and the PKCS#12 reader.

Check values: what keytool was told to generate (-keyalg RSA -keysize 2048, -groupname
secp384r1, -genseckey AES 128) and keytool's own listing of the store (``keytool -list``).
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from pqtriage.sources.scan.findings import FindingKind
from pqtriage.sources.scan.scanner import ScanResult, plan, scan_entries
from tests.sources.scan.finders.tools import need, run

SECRETS = ("changeit-portal", "s3cret-signing")


@pytest.fixture(scope="module")
def stores(tmp_path_factory: pytest.TempPathFactory) -> Path:
    keytool = need("keytool", "default-jdk-headless")
    folder = tmp_path_factory.mktemp("stores")
    common = ["-validity", "30", "-noprompt"]
    run(keytool, "-genkeypair", "-alias", "portal", "-keyalg", "RSA", "-keysize", "2048",
        "-dname", "CN=portal.example.test", "-storetype", "JKS", "-keystore",
        str(folder / "portal.jks"), "-storepass", SECRETS[0], "-keypass", SECRETS[0], *common)
    run(keytool, "-genkeypair", "-alias", "signing", "-keyalg", "EC", "-groupname", "secp384r1",
        "-dname", "CN=sign.example.test", "-storetype", "JCEKS", "-keystore",
        str(folder / "signing.jceks"), "-storepass", SECRETS[1], "-keypass", SECRETS[1], *common)
    run(keytool, "-genseckey", "-alias", "wrap", "-keyalg", "AES", "-keysize", "128",
        "-storetype", "JCEKS", "-keystore", str(folder / "signing.jceks"),
        "-storepass", SECRETS[1], "-keypass", SECRETS[1])
    run(keytool, "-genkeypair", "-alias", "api", "-keyalg", "RSA", "-keysize", "3072",
        "-dname", "CN=api.example.test", "-storetype", "PKCS12", "-keystore",
        str(folder / "api.p12"), "-storepass", SECRETS[0], *common)
    listing = run(keytool, "-list", "-keystore", str(folder / "signing.jceks"), "-storepass",
                  SECRETS[1], "-storetype", "JCEKS")  # fmt: skip
    assert "signing" in listing and "wrap" in listing
    return folder


def _scan(folder: Path, *passwords: bytes) -> ScanResult:
    from pqtriage.sources.scan.finders.interface import FinderContext

    entries, problems = plan([str(folder)])
    return scan_entries(entries, problems, context=FinderContext(passwords=passwords))


def _facts(result: ScanResult) -> dict[str, tuple[str, str, int | None, str | None]]:
    return {
        f.locator().rsplit("/", 1)[-1]: (f.kind.value, f.algorithm, f.key_size, f.curve)
        for f in result.findings
    }


def test_with_the_passwords_every_entry_is_read(stores: Path) -> None:
    result = _scan(stores, *(s.encode() for s in SECRETS))
    facts = _facts(result)
    assert facts["portal.jks#portal.key"] == ("private-key", "RSA", 2048, None)
    assert facts["portal.jks#portal.chain1"] == ("certificate-key", "RSA", 2048, None)
    assert facts["signing.jceks#signing.key"] == ("private-key", "ECDSA", 384, "P-384")
    assert facts["signing.jceks#wrap"] == ("private-key", "AES", 128, None)
    assert facts["api.p12#key"][1:3] == ("RSA", 3072)
    assert result.summary is not None
    tally = result.summary.finders["keystore"]
    assert (tally.seen, tally.understood, tally.not_understood) == (2, 2, [])


def test_without_password_protected_entries_are_present_and_unread(stores: Path) -> None:
    result = _scan(stores)
    facts = _facts(result)
    # Trusted material stays readable; protected entries are listed, type unknown.
    assert facts["portal.jks#portal.key"] == ("keystore-encrypted", "unknown", None, None)
    assert facts["portal.jks#portal.chain1"] == ("certificate-key", "RSA", 2048, None)
    assert facts["signing.jceks#wrap"] == ("keystore-encrypted", "unknown", None, None)
    assert result.summary is not None
    not_read = dict(result.summary.finders["keystore"].not_understood)
    assert "no password given" in not_read[str(stores / "portal.jks")]
    assert any(f.kind is FindingKind.PKCS12_ENCRYPTED for f in result.findings)


def test_a_wrong_password_is_said_and_nothing_secret_is_shown(stores: Path) -> None:
    result = _scan(stores, b"not-the-password")
    assert result.summary is not None
    not_read = dict(result.summary.finders["keystore"].not_understood)
    assert "did not open it" in not_read[str(stores / "signing.jceks")]
    text = repr(result)
    assert not any(secret in text for secret in SECRETS)


def test_pyjks_store_round_trip(tmp_path: Path) -> None:
    """A JKS written by pyjks (the other producer) with a trusted certificate entry."""
    import jks

    from tests.sources import material as m

    cert = m.certificate(m.rsa_key(2048), "Fictional Root CA", ca=True)
    from cryptography.hazmat.primitives.serialization import Encoding

    entry = jks.TrustedCertEntry.new("root", cert.public_bytes(Encoding.DER))
    store = jks.KeyStore.new("jks", [entry])
    (tmp_path / "trust.jks").write_bytes(store.saves("trust-pass"))
    facts = _facts(_scan(tmp_path))
    assert facts["trust.jks#root"] == ("certificate-key", "RSA", 2048, None)


def test_bks_made_by_keytool_with_bouncy_castle(tmp_path: Path) -> None:
    """A BKS store written by keytool through the Bouncy Castle provider (libbcprov-java)."""
    keytool = need("keytool", "default-jdk-headless")
    # Debian's libbcprov-java installs /usr/share/java/bcprov.jar (a link to bcprov-<version>.jar);
    # BCPROV_JAR names another copy of the same jar.
    provider = Path(os.environ.get("BCPROV_JAR", "/usr/share/java/bcprov.jar"))
    if not provider.exists():
        pytest.skip("Bouncy Castle is absent (apt-get install libbcprov-java)")
    store = tmp_path / "app.bks"
    run(keytool, "-genkeypair", "-alias", "droid", "-keyalg", "RSA", "-keysize", "2048",
        "-dname", "CN=app.example.test", "-storetype", "BKS", "-providerpath", str(provider),
        "-providerclass", "org.bouncycastle.jce.provider.BouncyCastleProvider",
        "-keystore", str(store), "-storepass", SECRETS[0], "-keypass", SECRETS[0], "-noprompt")
    facts = _facts(_scan(tmp_path, SECRETS[0].encode()))
    assert facts == {
        "app.bks#droid.key": ("private-key", "RSA", 2048, None),
        "app.bks#droid.chain1": ("certificate-key", "RSA", 2048, None),
        "app.bks#droid.chain1.signature": ("certificate-signature", "RSA", 2048, None),
    }
    locked = _scan(tmp_path)
    assert _facts(locked) == {"app.bks#store": ("keystore-encrypted", "unknown", None, None)}


def test_bks_without_password_is_reported_present(tmp_path: Path) -> None:
    (tmp_path / "android.bks").write_bytes(b"\x00\x00\x00\x02" + b"\x00\x00\x00\x14" + bytes(40))
    result = _scan(tmp_path)
    assert _facts(result)["android.bks#store"][:2] == ("keystore-encrypted", "unknown")
