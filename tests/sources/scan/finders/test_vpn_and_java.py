"""WireGuard, strongSwan and java.security finders.

Check values: WireGuard keys made by ``wg genkey``/``wg pubkey`` and the stripped file of
``wg-quick strip`` (wg-quick(8)); the WireGuard whitepaper (Donenfeld, NDSS 2017, section 5)
for Curve25519 and ChaCha20-Poly1305; RFC 3526 for modp2048 and RFC 9370 / FIPS 203 for the
ML-KEM additional key exchange; the JDK's own java.security as shipped by Debian's OpenJDK.
"""

from __future__ import annotations

import glob
from pathlib import Path

import pytest

from pqtriage.model.inventory import Purpose
from pqtriage.sources.scan.findings import FindingKind
from tests.sources.scan.finders.tools import need, run, scan


def _uses(config: Path) -> list:  # type: ignore[type-arg]
    return [
        f for f in scan(config).findings
        if f.kind is FindingKind.CONFIG_SETTING and f.source.file == str(config)
    ]  # fmt: skip


def test_wireguard_with_keys_from_wg(tmp_path: Path) -> None:
    wg = need("wg", "wireguard-tools")
    private = run(wg, "genkey").strip()
    peer = run(wg, "genkey").strip()
    import subprocess

    public = subprocess.run([wg, "pubkey"], input=peer, capture_output=True, text=True,
                            check=True).stdout.strip()  # fmt: skip
    psk = run(wg, "genpsk").strip()
    config = tmp_path / "wg0.conf"
    config.write_text(
        f"[Interface]\nPrivateKey = {private}\nListenPort = 51820\nAddress = 10.9.0.1/24\n\n"
        f"[Peer]\nPublicKey = {public}\nAllowedIPs = 10.9.0.2/32\n\n"
        f"[Peer]\nPublicKey = {public}\nPresharedKey = {psk}\nAllowedIPs = 10.9.0.3/32\n"
    )
    stripped = run("wg-quick", "strip", str(config))
    assert "PrivateKey" in stripped  # wg-quick accepts the file
    uses = _uses(config)
    assert [(f.algorithm, f.purpose, f.source.line) for f in uses] == [
        ("X25519", Purpose.KEY_ESTABLISHMENT, 1),
        ("X25519", Purpose.KEY_ESTABLISHMENT, 6),
        ("X25519", Purpose.KEY_ESTABLISHMENT, 10),
        ("ChaCha20-Poly1305", Purpose.ENCRYPTION, 1),
    ]
    assert "no PresharedKey" in uses[1].notes and "PresharedKey set for this peer" in uses[2].notes
    assert "ML-KEM" in uses[0].notes[0]
    text = " ".join(" ".join(f.notes) for f in uses)
    assert private not in text and psk not in text and public not in text


SWANCTL = """\
connections {
    branch-office {
        version = 2
        proposals = aes256-sha256-modp2048, aes256gcm16-prfsha384-x25519-ke1_mlkem768
        local {
            auth = pubkey
            certs = gateway.pem
        }
        children {
            lan {
                esp_proposals = aes128gcm16-ecp256, 3des-md5
            }
        }
    }
}
"""


def test_swanctl_proposals_split_into_algorithms(tmp_path: Path) -> None:
    config = tmp_path / "swanctl.conf"
    config.write_text(SWANCTL)
    uses = _uses(config)
    line4 = [(f.algorithm, f.purpose.value) for f in uses if f.source.line == 4]
    assert line4 == [
        ("AES-256-CBC", "encryption"), ("HMAC-SHA256", "integrity"),
        ("modp2048", "key-establishment"), ("AES-256-GCM", "encryption"),
        ("HMAC-SHA384", "integrity"), ("X25519", "key-establishment"),
        ("ML-KEM-768", "key-establishment"),
    ]  # fmt: skip
    assert "additional key exchange (RFC 9370)" in uses[6].notes
    esp = [(f.algorithm, f.protocol) for f in uses if f.source.line == 11]
    assert esp == [("AES-128-GCM", "ESP"), ("ECDH P-256", "ESP"), ("3TDEA-CBC", "ESP"),
                   ("HMAC-MD5", "ESP")]  # fmt: skip
    assert "branch-office.children.lan" in uses[-1].notes[0]


def test_ipsec_conf(tmp_path: Path) -> None:
    config = tmp_path / "ipsec.conf"
    config.write_text(
        "conn legacy-partner\n    left=%defaultroute\n    authby=secret\n"
        "    ike=3des-sha1-modp1024!\n    esp=aes128-sha1\n"
    )
    uses = _uses(config)
    assert [(f.algorithm, f.source.line) for f in uses] == [
        ("unknown", 3), ("3TDEA-CBC", 4), ("HMAC-SHA1", 4), ("modp1024", 4),
        ("AES-128-CBC", 5), ("HMAC-SHA1", 5),
    ]  # fmt: skip
    assert "pre-shared key" in uses[0].notes[0]


def test_unknown_strongswan_keyword_is_kept(tmp_path: Path) -> None:
    config = tmp_path / "swanctl.conf"
    config.write_text("connections {\n  a {\n    proposals = serpent256-sha256-modp3072\n  }\n}\n")
    uses = _uses(config)
    assert uses[0].algorithm == "serpent256"
    assert "not in the shipped strongSwan table" in uses[0].notes[1]


def test_the_jdks_own_java_security(tmp_path: Path) -> None:
    files = sorted(glob.glob("/usr/lib/jvm/*/conf/security/java.security"))
    if not files:
        pytest.skip("no JDK installed (apt-get install default-jdk-headless)")
    shipped = Path(files[0])
    config = tmp_path / "java.security"
    config.write_bytes(shipped.read_bytes())
    uses = _uses(config)
    # The JDK disables RC4, DES, 3DES_EDE_CBC, MD5withRSA, SSLv3, TLSv1, TLSv1.1 for TLS:
    # none of them may be reported as allowed.
    assert not [f for f in uses if f.algorithm in ("RC4", "DES", "3TDEA-CBC")]
    # Loosened copy: RC4 and TLSv1 taken out of the list, DH floor lowered to 768 bits.
    text = shipped.read_text()
    loosened = text.replace("RC4, ", "").replace("TLSv1, ", "").replace(
        "DH keySize < 1024", "DH keySize < 768"
    )
    config.write_text(loosened)
    uses = _uses(config)
    assert any(f.algorithm == "RC4" for f in uses)
    assert any(f.protocol == "TLSv1" for f in uses)
    assert any(f.algorithm == "DH" and f.key_size == 768 for f in uses)
