"""sshd_config and ssh_config read by the OpenSSH finder, checked against OpenSSH itself.

Check values: ``sshd -T`` and ``ssh -G`` print the lists OpenSSH derives from a file
(sshd(8), ssh(1)); the defaults shipped for OpenSSH 9.2 must be what OpenSSH 9.2 prints with
no settings, and every ``+``/``-``/``^`` list must come out as OpenSSH computes it.
"""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

import pytest

from pqtriage.sources.scan.finders.openssh_config import apply_operator, defaults_for
from pqtriage.sources.scan.findings import FindingKind
from tests.sources.scan.finders.tools import need, run, scan

KEYWORDS = {
    "kexalgorithms": "KexAlgorithms",
    "ciphers": "Ciphers",
    "macs": "MACs",
    "hostkeyalgorithms": "HostKeyAlgorithms",
    "pubkeyacceptedalgorithms": "PubkeyAcceptedAlgorithms",
    "casignaturealgorithms": "CASignatureAlgorithms",
}


def _lists(output: str) -> dict[str, list[str]]:
    found = {}
    for line in output.splitlines():
        key, _, value = line.partition(" ")
        if key in KEYWORDS:
            found[KEYWORDS[key]] = value.split(",")
    return found


def _installed_version(sshd: str) -> str:
    banner = subprocess.run([sshd, "-V"], capture_output=True, text=True, check=False).stderr
    match = re.search(r"OpenSSH_(\d+\.\d+)", banner)
    assert match, banner
    return match.group(1)


@pytest.fixture()
def host_key(tmp_path: Path) -> Path:
    need("ssh-keygen", "openssh-client")
    key = tmp_path / "ssh_host_rsa_key"
    run("ssh-keygen", "-q", "-t", "rsa", "-b", "3072", "-N", "", "-f", str(key))
    return key


VALUES = [
    ("KexAlgorithms", "+diffie-hellman-group1-sha1"),
    ("KexAlgorithms", "-*sha1,ecdh-sha2-*"),
    ("KexAlgorithms", "^diffie-hellman-group14-sha1,curve25519-sha256"),
    ("KexAlgorithms", "curve25519-sha256,diffie-hellman-group1-sha1"),
    ("HostKeyAlgorithms", "+ssh-dss,ssh-rsa"),
    ("Ciphers", "-aes*-ctr"),
    ("Ciphers", "+3des-cbc"),
    ("MACs", "^hmac-md5"),
]


@pytest.mark.parametrize(("keyword", "value"), VALUES)
def test_lists_are_what_sshd_computes(tmp_path: Path, host_key: Path, keyword: str, value: str) -> None:
    sshd = need("sshd", "openssh-server")
    version = _installed_version(sshd)
    config = tmp_path / "sshd_config"
    config.write_text(f"# OpenSSH {version}\nHostKey {host_key}\n{keyword} {value}\n")
    expected = _lists(run(sshd, "-T", "-f", str(config)))
    result = scan(config)
    # The name as written is in the source detail (the algorithm is its catalog spelling).
    found = [
        f.source.detail.split(":", 2)[2]  # type: ignore[union-attr]
        for f in result.findings
        if f.kind is FindingKind.CONFIG_SETTING and f.source.detail.startswith(f"line3:{keyword}:")  # type: ignore[union-attr]
    ]
    assert found == expected[keyword]


def test_shipped_defaults_are_what_the_installed_openssh_prints(tmp_path: Path, host_key: Path) -> None:
    sshd = need("sshd", "openssh-server")
    version = _installed_version(sshd)
    defaults = defaults_for(version, "sshd")
    if defaults is None:
        pytest.fail(f"OpenSSH {version} is installed but its defaults are not shipped")
    config = tmp_path / "sshd_config"
    config.write_text(f"HostKey {host_key}\n")
    for keyword, names in _lists(run(sshd, "-T", "-f", str(config))).items():
        assert list(defaults.lists[keyword]) == names, keyword
    client = _lists(run("ssh", "-G", "-F", "/dev/null", "host.example.test"))
    client_defaults = defaults_for(version, "ssh")
    assert client_defaults is not None
    for keyword, names in client.items():
        assert list(client_defaults.lists[keyword]) == names, keyword


def test_weak_methods_and_host_key_size(tmp_path: Path, host_key: Path) -> None:
    sshd = need("sshd", "openssh-server")
    config = tmp_path / "sshd_config"
    config.write_text(
        f"# OpenSSH {_installed_version(sshd)}\nHostKey {host_key}\n"
        "KexAlgorithms +diffie-hellman-group1-sha1\nHostKeyAlgorithms +ssh-dss\n"
    )
    run(sshd, "-t", "-f", str(config))
    result = scan(tmp_path)
    uses = {f.source.detail: f for f in result.findings if f.source.file == str(config)}
    assert "line3:KexAlgorithms:diffie-hellman-group1-sha1" in uses
    assert "line4:HostKeyAlgorithms:ssh-dss" in uses
    # The host key is followed: RSA host-key algorithms take its size (ssh-keygen -b 3072).
    assert uses["line4:HostKeyAlgorithms:rsa-sha2-512"].key_size == 3072
    assert uses["default:PubkeyAcceptedAlgorithms:rsa-sha2-512"].key_size is None
    assert any(f.kind is FindingKind.PRIVATE_KEY and f.key_size == 3072 for f in result.findings)


def test_without_a_version_only_the_added_names_are_reported(tmp_path: Path) -> None:
    config = tmp_path / "sshd_config"
    config.write_text("KexAlgorithms +diffie-hellman-group1-sha1\nCiphers -aes128-ctr\n")
    result = scan(config)
    uses = [f for f in result.findings if f.kind is FindingKind.CONFIG_SETTING]
    assert [f.algorithm for f in uses] == ["diffie-hellman-group1-sha1"]
    assert "defaults are not listed" in uses[0].notes[1]


def test_first_value_wins_and_match_blocks_are_named(tmp_path: Path) -> None:
    config = tmp_path / "sshd_config"
    config.write_text(
        "Ciphers aes256-gcm@openssh.com\nCiphers 3des-cbc\nMatch User backup\n  Ciphers aes128-cbc\n"
    )
    uses = [f for f in scan(config).findings if f.kind is FindingKind.CONFIG_SETTING]
    assert [(f.algorithm, f.source.line) for f in uses] == [
        ("aes256-gcm@openssh.com", 1), ("aes128-cbc", 4),
    ]  # fmt: skip
    assert "in Match User backup (line 3)" in uses[1].notes


def test_operator_without_defaults() -> None:
    assert apply_operator("-ssh-rsa", None) == ([], "removed from")
    assert apply_operator("^a,b", ("b", "c")) == (["a", "b", "c"], "put before")


def test_default_lists_of_unused_methods_are_not_uses(tmp_path: Path) -> None:
    """sshd_config(5): HostbasedAuthentication defaults to no; CASignatureAlgorithms only
    verifies certificates (TrustedUserCAKeys on a server)."""
    config = tmp_path / "sshd_config"
    config.write_text("# OpenSSH 9.2\n")
    keywords = {f.source.detail.split(":")[1] for f in scan(config).findings}  # type: ignore[union-attr]
    assert keywords == {"KexAlgorithms", "Ciphers", "MACs", "HostKeyAlgorithms",
                        "PubkeyAcceptedAlgorithms"}  # fmt: skip
    config.write_text("# OpenSSH 9.2\nHostbasedAuthentication yes\nTrustedUserCAKeys /etc/ssh/ca.pub\n")
    keywords = {f.source.detail.split(":")[1] for f in scan(config).findings}  # type: ignore[union-attr]
    assert {"HostbasedAcceptedAlgorithms", "CASignatureAlgorithms"} <= keywords


def test_certificate_and_security_key_variants_take_their_key_type(tmp_path: Path) -> None:
    """OpenSSH PROTOCOL.certkeys and PROTOCOL.u2f: a -cert-v01 or sk- name signs with its key
    type, so the catalog can assess it; the name as written stays in the note and source."""
    config = tmp_path / "sshd_config"
    config.write_text("HostKeyAlgorithms ssh-ed25519-cert-v01@openssh.com,sk-ecdsa-sha2-nistp256@openssh.com\n")
    uses = [f for f in scan(config).findings if f.kind is FindingKind.CONFIG_SETTING]
    assert [(f.algorithm, f.source.detail) for f in uses] == [
        ("ssh-ed25519", "line1:HostKeyAlgorithms:ssh-ed25519-cert-v01@openssh.com"),
        ("ecdsa-sha2-nistp256", "line1:HostKeyAlgorithms:sk-ecdsa-sha2-nistp256@openssh.com"),
    ]
    assert "FIDO security key" in uses[1].notes[-1]


def test_unstated_version_is_said(tmp_path: Path) -> None:
    config = tmp_path / "sshd_config"
    config.write_text("Port 22\n")
    result = scan(config)
    (note,) = [p for p in result.problems if p.place == str(config)]
    assert note.kind.value == "skipped" and "--openssh-version" in note.reason
    assert result.complete  # a note, not a failure
