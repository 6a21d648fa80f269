"""SSH probe against Debian's OpenSSH server started on a loopback port by the test.

OpenSSH 9.x offers sntrup761x25519-sha512 (RFC 9941) first by default; restricted to
classical algorithms it offers none. The pseudo-names ext-info-s and
kex-strict-s-v00@openssh.com (RFC 8308; OpenSSH strict key exchange) must not be listed as
algorithms. KEXINIT layout: RFC 4253 section 7.1.
"""

from __future__ import annotations

from pathlib import Path

import pytest
import yaml

from pqtriage.cli.probe import probe_command
from pqtriage.sources.probe.ssh import describe_kexinit
from tests.sources.probe import servers

pytestmark = [pytest.mark.network]
REASON = servers.sshd_missing_reason()
needs_sshd = pytest.mark.skipif(REASON is not None, reason=REASON or "")


def _uses(text: str) -> list[dict[str, str]]:
    (system,) = yaml.safe_load(text)["systems"]
    return system["uses"]


@pytest.mark.sshd
@needs_sshd
def test_default_openssh_offers_hybrid_post_quantum_kex(tmp_path: Path) -> None:
    with servers.sshd_server(tmp_path) as port:
        result = probe_command([f"ssh://127.0.0.1:{port}"], timeout=5)
    assert result.exit_code == 0
    uses = _uses(result.text)
    kex = [u["algorithm"] for u in uses if u["purpose"] == "key-establishment"]
    assert "sntrup761x25519-sha512@openssh.com" in kex
    assert not {"ext-info-s", "kex-strict-s-v00@openssh.com"} & set(kex)
    assert "ssh-ed25519" in [u["algorithm"] for u in uses if u["purpose"] == "authentication"]
    assert any(u["purpose"] == "encryption" for u in uses)
    assert any(u["purpose"] == "integrity" for u in uses)
    assert any("hybrid post-quantum key exchange offered" in line for line in result.summary)
    assert any("OpenSSH" in line for line in result.summary)


@pytest.mark.sshd
@needs_sshd
def test_classical_only_openssh(tmp_path: Path) -> None:
    config = (
        "KexAlgorithms curve25519-sha256,ecdh-sha2-nistp256\n"
        "Ciphers aes128-ctr\nMACs hmac-sha2-256\n"
    )
    with servers.sshd_server(tmp_path, config) as port:
        result = probe_command([f"ssh://127.0.0.1:{port}"], timeout=5)
    uses = _uses(result.text)
    kex = [u["algorithm"] for u in uses if u["purpose"] == "key-establishment"]
    assert kex == ["curve25519-sha256", "ecdh-sha2-nistp256"]
    assert [u["algorithm"] for u in uses if u["purpose"] == "encryption"] == ["aes128-ctr"]
    assert [u["algorithm"] for u in uses if u["purpose"] == "integrity"] == ["hmac-sha2-256"]
    assert any("no post-quantum key exchange offered" in line for line in result.summary)


def test_closed_port_and_non_ssh_server() -> None:
    overlap = servers.Overlap()
    with (
        servers.closed_port() as closed,
        servers.banner_server(b"HTTP/1.1 400 Bad Request\r\n\r\n") as http,
        servers.banner_server(b"", linger=30.0, overlap=overlap) as silent,
        servers.banner_server(b"", linger=30.0, overlap=overlap) as quiet,
    ):
        result = probe_command(
            [f"ssh://127.0.0.1:{closed}", f"ssh://127.0.0.1:{http}", f"ssh://127.0.0.1:{silent}",
             f"ssh://127.0.0.1:{quiet}"],
            timeout=1.0,
        )
    # Bounded: the silent servers would hold their connections for 30 s; the probe gave up on
    # its own timeout (the "timed out" lines). Concurrent: both silent connections were open at
    # once, which one-after-another probing cannot produce (servers.Overlap).
    assert overlap.most == 2
    assert result.exit_code == 1
    lines = "\n".join(result.summary)
    assert f"ssh://127.0.0.1:{closed}: unreachable: refused" in lines
    assert f"ssh://127.0.0.1:{http}: unreachable: not SSH" in lines
    assert f"ssh://127.0.0.1:{silent}: unreachable: timed out" in lines
    assert f"ssh://127.0.0.1:{quiet}: unreachable: timed out" in lines


def test_pseudo_algorithms_are_ignored() -> None:
    lists = [
        ["mlkem768x25519-sha256", "ext-info-s", "kex-strict-s-v00@openssh.com"],
        ["rsa-sha2-512"], ["aes256-gcm@openssh.com"], ["aes256-gcm@openssh.com"],
        ["hmac-sha2-512"], ["hmac-sha2-512"], ["none"], ["none"], [], [],
    ]  # fmt: skip
    outcome = describe_kexinit("ssh://h:22", "SSH-2.0-Fictional", lists)
    assert [f.algorithm for f in outcome.findings] == [
        "mlkem768x25519-sha256", "rsa-sha2-512", "aes256-gcm@openssh.com", "hmac-sha2-512",
    ]  # fmt: skip
    assert "hybrid post-quantum" in outcome.findings[0].notes
