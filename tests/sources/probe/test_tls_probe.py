"""TLS probe against real servers on 127.0.0.1 started by the test.

Python's ssl server is limited to P-256 (secp256r1), so it accepts no post-quantum group;
pyOpenSSL on the cryptography library's bundled OpenSSL (3.5 or later) negotiates the hybrid
X25519MLKEM768 (draft-ietf-tls-ecdhe-mlkem, codepoint 0x11EC, published-figures.md section 7).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
import yaml
from cryptography.hazmat.backends.openssl import backend

from pqtriage.cli.probe import probe_command
from pqtriage.errors import UsageError
from pqtriage.sources.probe.targets import parse_target
from tests.sources.probe import servers


def _bundled_openssl_has_mlkem() -> bool:
    match = re.search(r"OpenSSL (\d+)\.(\d+)", backend.openssl_version_text())
    return bool(match) and (int(match.group(1)), int(match.group(2))) >= (3, 5)


pytestmark = pytest.mark.network


@pytest.mark.skipif(not _bundled_openssl_has_mlkem(), reason="bundled OpenSSL lacks ML-KEM")
def test_probe_tells_classical_and_hybrid_servers_apart(tmp_path: Path) -> None:
    with (
        servers.python_ssl_server(tmp_path / "a") as classical,
        servers.pyopenssl_server(tmp_path / "b") as hybrid,
    ):
        result = probe_command([f"127.0.0.1:{classical}", f"127.0.0.1:{hybrid}"], timeout=5)
    assert result.exit_code == 0, "\n".join(result.summary)
    systems = {s["source"]: s for s in yaml.safe_load(result.text)["systems"]}
    classical_uses = systems[f"127.0.0.1:{classical}"]["uses"]
    hybrid_uses = systems[f"127.0.0.1:{hybrid}"]["uses"]
    assert classical_uses[0]["purpose"] == "key-establishment"
    assert classical_uses[0]["algorithm"] == "secp256r1"
    assert "no post-quantum group accepted" in classical_uses[0]["notes"]
    assert hybrid_uses[0]["algorithm"] == "X25519MLKEM768"
    assert "hybrid post-quantum group accepted" in hybrid_uses[0]["notes"]
    for uses in (classical_uses, hybrid_uses):
        assert uses[0]["protocol"] == "TLS 1.3"
        assert uses[1]["purpose"] == "encryption" and uses[1]["algorithm"].startswith("TLS_")
        chain_key = next(u for u in uses if u["source"].endswith("#chain0"))
        assert (chain_key["algorithm"], chain_key["curve"]) == ("ECDSA", "P-256")
        assert "subject=CN=localhost" in chain_key["notes"]


def test_closed_port_and_wrong_protocol_fail_fast_and_clearly(tmp_path: Path) -> None:
    with servers.closed_port() as closed, servers.banner_server(b"SSH-2.0-Fictional\r\n") as other:
        result = probe_command([f"127.0.0.1:{closed}", f"127.0.0.1:{other}"], timeout=30)
    # Fast and clear: neither target waited for the 30 s timeout (no "timed out" line), each
    # says what it found.
    assert not any("timed out" in line for line in result.summary), result.summary
    assert result.exit_code == 1
    assert (
        f"127.0.0.1:{closed}: unreachable: refused (nothing listens on that port)" in result.summary
    )
    other_line = next(line for line in result.summary if line.startswith(f"127.0.0.1:{other}:"))
    assert "not TLS" in other_line and "\n" not in other_line
    # Failed targets are not dropped: each is a system with no uses (unassessed in triage).
    systems = yaml.safe_load(result.text)["systems"]
    assert sorted(s["source"] for s in systems) == sorted([f"127.0.0.1:{closed}", f"127.0.0.1:{other}"])
    assert all(s["uses"] == [] and s["notes"].startswith("probe failed, not assessed:") for s in systems)


def test_silent_server_times_out_within_the_bound() -> None:
    with servers.banner_server(b"", linger=30.0) as silent:
        result = probe_command([f"127.0.0.1:{silent}"], timeout=0.5)
    # The server would hold the connection for 30 s: the probe ended on its own 0.5 s timeout.
    assert result.exit_code == 1
    assert f"127.0.0.1:{silent}: unreachable: timed out during the TLS handshake" in result.summary


@pytest.mark.parametrize(
    "text",
    ["10.0.0.0/24:443", "*.example.test:443", "host:99999", "ftp://host:21", "::1:443", ""],
)
def test_ranges_and_malformed_targets_are_bad_usage(text: str) -> None:
    with pytest.raises(UsageError):
        parse_target(text)


def test_target_forms() -> None:
    assert parse_target("web.example.test:8443").text == "web.example.test:8443"
    assert parse_target("ssh://127.0.0.1").text == "ssh://127.0.0.1:22"
    assert parse_target("[::1]:443").host == "::1"
    assert parse_target("tls://127.0.0.1:443").protocol == "tls"
