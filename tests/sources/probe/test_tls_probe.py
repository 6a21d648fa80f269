"""TLS probe against real servers on 127.0.0.1 started by the test.

Python's ssl server is limited to P-256 (secp256r1), so it accepts no post-quantum group;
pyOpenSSL on the cryptography library's bundled OpenSSL (3.5 or later) negotiates the hybrid
X25519MLKEM768 (draft-ietf-tls-ecdhe-mlkem, codepoint 0x11EC).

TLS 1.2 references: RFC 5246 (2008), section 7.4.7.1 (RSA key transport: the client encrypts
the premaster secret to the server certificate's RSA key) and Appendix A.5 (suite names);
openssl-ciphers(1) (OpenSSL's spellings: no key exchange prefix means RSA); RSA-1024 gives 80
bits, below the 112 bits of NIST SP 800-131A Rev. 2 (NIST SP 800-57 Part 1 Rev. 5, Table 2).
"""

from __future__ import annotations

import re
from pathlib import Path
from typing import Any

import pytest
import yaml
from cryptography.hazmat.backends.openssl import backend
from cryptography.hazmat.primitives.asymmetric import ec

from pqtriage.cli.probe import probe_command
from pqtriage.errors import UsageError
from pqtriage.model.verdict import Verdict
from pqtriage.sources.probe.targets import parse_target
from pqtriage.sources.probe.tls import suite_key_exchange
from tests.sources import material as m
from tests.sources.probe import servers
from tests.sources.routes import AS_OF, one_use_inventory, triage_text, uses_by_source


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


def _uses_of(text: str) -> dict[str, dict[str, Any]]:
    (system,) = yaml.safe_load(text)["systems"]
    return {u["source"].split("#", 1)[1]: u for u in system["uses"]}


@pytest.mark.parametrize(
    ("cipher", "protocol", "expected"),
    [
        ("AES128-SHA", "TLS 1.2", "RSA"),  # openssl-ciphers(1): no prefix is RSA key transport
        ("DES-CBC3-SHA", "TLS 1.2", "RSA"),
        ("ECDHE-RSA-AES128-GCM-SHA256", "TLS 1.2", "ECDH"),
        ("DHE-RSA-AES256-GCM-SHA384", "TLS 1.2", "FFDH"),
        ("RSA-PSK-AES128-CBC-SHA256", "TLS 1.2", "RSA"),
        ("TLS_AES_128_GCM_SHA256", "TLS 1.3", None),  # RFC 8446 B.4: the group decides
    ],
)
def test_suite_key_exchange_from_openssl_names(cipher: str, protocol: str, expected: str | None) -> None:
    assert suite_key_exchange(cipher, protocol) == expected


def test_tls12_rsa_key_transport_takes_its_size_from_the_certificate(tmp_path: Path) -> None:
    key = m.rsa_key(1024)
    cert = m.certificate(key, "localhost", dns=("localhost",))
    with servers.tls_server(tmp_path / "s", [cert], key, "AES128-SHA", tls12_only=True) as port:
        result = probe_command([f"127.0.0.1:{port}"], timeout=5, as_of=AS_OF)
    assert result.exit_code == 0, result.summary
    uses = _uses_of(result.text)
    exchange = uses["key-exchange"]
    assert (exchange["purpose"], exchange["algorithm"], exchange["key_size"]) == (
        "key-establishment", "RSA", 1024,
    )  # fmt: skip
    assert (uses["cipher"]["algorithm"], uses["cipher"]["key_size"]) == ("AES128-SHA", 1024)
    assert "group" not in uses  # no "unknown" key exchange left behind
    assessed = uses_by_source(triage_text(result.text, tmp_path))
    by_source = {key.split("#", 1)[1]: value for key, value in assessed.items()}
    suite = by_source["cipher"]
    assert suite.spec is not None and suite.spec.name == "TLS_RSA_WITH_AES_128_CBC_SHA"
    assert [(c.purpose, c.spec.name) for c in suite.spec.components][:2] == [
        ("key-establishment", "RSA-1024"), ("authentication", "RSA-1024"),
    ]  # fmt: skip
    # One fact, one answer: the probed key transport and a hand-written RSA-1024 key
    # establishment agree (80 bits: broken today).
    hand = uses_by_source(triage_text(one_use_inventory(
        "{purpose: key-establishment, algorithm: RSA, key_size: 1024, source: hand}"
    ), tmp_path, "hand.yaml"))["hand"]  # fmt: skip
    assert by_source["key-exchange"].verdict == hand.verdict == Verdict.CLASSICALLY_BROKEN
    assert suite.verdict == Verdict.CLASSICALLY_BROKEN


def test_tls12_ecdhe_suite_and_the_chains_signatures(tmp_path: Path) -> None:
    root_key = m.ec_key(ec.SECP521R1())
    root = m.certificate(root_key, "Fictional Harbour Root", ca=True)
    issuing_key = m.ec_key(ec.SECP384R1())
    issuing = m.certificate(issuing_key, "Fictional Harbour Issuing CA", root_key, root, ca=True)
    leaf_key = m.rsa_key(2048)
    leaf = m.certificate(leaf_key, "localhost", issuing_key, issuing, dns=("localhost",))
    with servers.tls_server(tmp_path / "s", [leaf, issuing], leaf_key,
                            "ECDHE-RSA-AES128-GCM-SHA256", tls12_only=True, pyopenssl=True) as port:
        result = probe_command([f"127.0.0.1:{port}"], timeout=5, as_of=AS_OF)
    assert result.exit_code == 0, result.summary
    uses = _uses_of(result.text)
    group = uses["group"]["algorithm"]
    cipher = uses["cipher"]
    assert (cipher["algorithm"], cipher["key_size"], cipher["curve"]) == (
        "ECDHE-RSA-AES128-GCM-SHA256", 2048, group,
    )  # fmt: skip
    # The leaf's signature is the issuing CA's (sent as chain1, found by key identifier and
    # verified): ECDSA P-384 with SHA-256, each a use.
    signature = uses["chain0.signature"]
    assert (signature["algorithm"], signature["curve"]) == ("ECDSA", "P-384")
    assert "chain1: found by authority key identifier, signature verified" in signature["notes"]
    assert uses["chain0.signature-hash"]["algorithm"] == "SHA-256"
    # The root was not sent: its P-521 signature on chain1 still tells the order size.
    assert uses["chain1.signature"]["key_size"] == 521
    assessed = uses_by_source(triage_text(result.text, tmp_path))
    suite = next(u for k, u in assessed.items() if k.endswith("#cipher"))
    assert suite.spec is not None
    assert [c.purpose for c in suite.spec.components][:2] == ["key-establishment", "authentication"]
    assert suite.spec.components[1].spec.name == "RSA-2048"
    assert suite.verdict != Verdict.UNASSESSED
