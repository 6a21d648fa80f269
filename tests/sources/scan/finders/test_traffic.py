"""Captured traffic: pcaps recorded in the test with tcpdump on loopback around real
handshakes, read back by the traffic finder.

Peers: OpenSSL's s_server and s_client (TLS 1.2 with ECDHE-RSA-AES128-GCM-SHA256, TLS 1.3
with x25519), pyOpenSSL on the cryptography library's OpenSSL (which offers X25519MLKEM768
first from OpenSSL 3.5) probed by pqtriage's own TLS probe, and OpenSSH's ssh to a real sshd.
Check values: what each peer was told to use, and the RFC 4253 section 7.1 rule applied to
the two KEXINIT lists by hand in the test.
"""

from __future__ import annotations

import os
import subprocess
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

import pytest

from pqtriage.sources.probe.targets import parse_target
from pqtriage.sources.probe.tls import probe_tls
from pqtriage.sources.scan.finders.tlsconfig import OPENSSL_DEFAULT_GROUPS
from pqtriage.sources.scan.findings import FindingKind
from pqtriage.sources.scan.scanner import scan_paths
from tests.sources import material as m
from tests.sources.probe import servers
from tests.sources.scan.finders.tools import need

pytestmark = pytest.mark.network


def _free_port() -> int:
    with servers.closed_port() as port:
        return port


@contextmanager
def capture(path: Path, port: int) -> Iterator[None]:
    """tcpdump on loopback for one port, started before and stopped after the block."""
    tcpdump = need("tcpdump", "tcpdump")
    process = subprocess.Popen(
        [tcpdump, "-i", "lo", "-U", "--immediate-mode", "-n", "-Z", "root", "-w", str(path), f"tcp port {port}"],
        stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True,
    )
    assert process.stderr is not None
    line = process.stderr.readline()  # "listening on lo ..." once the capture runs
    assert "listening" in line, line
    try:
        yield
    finally:
        time.sleep(0.3)  # let the last segments reach the file (-U writes per packet)
        process.terminate()
        process.wait(timeout=10)
        process.stderr.close()


@contextmanager
def s_server(folder: Path, port: int) -> Iterator[None]:
    key = m.rsa_key(2048)
    cert = m.write(folder / "server.pem", m.cert_pem(m.certificate(key, "portal.example.test")))
    private = m.write(folder / "server.key", m.private_pem(key))
    process = subprocess.Popen(
        ["openssl", "s_server", "-accept", str(port), "-cert", str(cert), "-key", str(private),
         "-quiet", "-naccept", "2"],
        stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
    )  # fmt: skip
    deadline = time.monotonic() + 10
    import socket

    while time.monotonic() < deadline:
        try:
            socket.create_connection(("127.0.0.1", port), timeout=0.2).close()
            break
        except OSError:
            time.sleep(0.05)
    try:
        yield
    finally:
        process.terminate()
        process.wait(timeout=10)


def _client(port: int, *args: str) -> None:
    subprocess.run(["openssl", "s_client", "-connect", f"127.0.0.1:{port}", *args],
                   input="", capture_output=True, timeout=20, check=False)  # fmt: skip


def test_tls12_and_tls13_handshakes(tmp_path: Path) -> None:
    need("openssl", "openssl")
    port = _free_port()
    pcap = tmp_path / "captures/tls.pcap"
    pcap.parent.mkdir()
    with capture(pcap, port):
        with s_server(tmp_path, port):
            # the readiness check above consumed one accept; -naccept counts it
            _client(port, "-tls1_2", "-cipher", "ECDHE-RSA-AES128-GCM-SHA256")
    pcap13 = tmp_path / "captures/tls13.pcap"
    port = _free_port()
    with capture(pcap13, port):
        with s_server(tmp_path, port):
            _client(port, "-tls1_3", "-groups", "X25519")
    result = scan_paths([str(pcap.parent)])
    traffic = [f for f in result.findings if f.kind is FindingKind.TRAFFIC]
    tls12 = [f for f in traffic if f.source.file == str(pcap)]
    suite = next(f for f in tls12 if f.source.detail.endswith(":suite"))  # type: ignore[union-attr]
    assert (suite.algorithm, suite.protocol, suite.key_size) == (
        "ECDHE-RSA-AES128-GCM-SHA256", "TLS 1.2", 2048,
    )  # fmt: skip
    assert suite.curve == "x25519"  # OpenSSL 3.0's first default group, from ServerKeyExchange
    # The default groups the configuration finders assume are the ones OpenSSL offers.
    offered = next(n for n in suite.notes if n.startswith("client offered groups: "))
    assert offered.split(": ", 1)[1].split(", ") == list(OPENSSL_DEFAULT_GROUPS)
    leaf = [f for f in result.findings if f.kind is FindingKind.CERTIFICATE_KEY]
    assert [(f.algorithm, f.key_size, f.host) for f in leaf] == [("RSA", 2048, f"127.0.0.1:{suite.host.split(':')[1]}")]  # type: ignore[union-attr]
    tls13 = [f for f in traffic if f.source.file == str(pcap13)]
    assert [(f.algorithm, f.protocol) for f in tls13] == [
        ("TLS_AES_256_GCM_SHA384", "TLS 1.3"), ("x25519", "TLS 1.3"),
    ]  # fmt: skip
    assert "client key shares: x25519" in tls13[0].notes
    # One system per server address and port, whatever the grouping rule.
    from pqtriage.sources.scan.grouping import GroupBy, group_findings

    groups = group_findings(list(result.findings), GroupBy.FOLDER)
    servers = {g.key for g in groups if g.label == "target"}
    assert servers == {f.host for f in traffic}
    # The same packets written as pcapng (dpkt's pcapng writer) give the same uses.
    import dpkt

    as_ng = tmp_path / "captures/tls13.pcapng"
    with open(pcap13, "rb") as source, open(as_ng, "wb") as target:
        writer = dpkt.pcapng.Writer(target)
        for stamp, frame in dpkt.pcap.Reader(source):
            writer.writepkt(frame, ts=stamp)
    again = [f for f in scan_paths([str(as_ng)]).findings if f.kind is FindingKind.TRAFFIC]
    assert [(f.algorithm, f.protocol) for f in again] == [(f.algorithm, f.protocol) for f in tls13]


def test_hybrid_ml_kem_group_is_seen(tmp_path: Path) -> None:
    with servers.pyopenssl_server(tmp_path) as port:
        pcap = tmp_path / "mlkem.pcap"
        with capture(pcap, port):
            outcome = probe_tls(parse_target(f"127.0.0.1:{port}"), 5)
    probed = {f.algorithm for f in outcome.findings}
    if "X25519MLKEM768" not in probed:
        pytest.fail(f"the cryptography library's OpenSSL did not agree on ML-KEM: {probed}")
    traffic = [f for f in scan_paths([str(pcap)]).findings if f.kind is FindingKind.TRAFFIC]
    group = next(f for f in traffic if f.source.detail.endswith(":group"))  # type: ignore[union-attr]
    assert group.algorithm == "X25519MLKEM768"
    assert "client key shares: X25519MLKEM768" in " ".join(group.notes)


@pytest.mark.sshd
def test_ssh_kexinit_of_both_sides_and_the_agreed_algorithms(tmp_path: Path) -> None:
    reason = servers.sshd_missing_reason()
    if reason:
        pytest.skip(reason)
    need("ssh", "openssh-client")
    with servers.sshd_server(tmp_path) as port:
        pcap = tmp_path / "ssh.pcap"
        with capture(pcap, port):
            subprocess.run(
                ["ssh", "-F", "/dev/null", "-o", "BatchMode=yes", "-o", "StrictHostKeyChecking=no",
                 "-o", f"UserKnownHostsFile={os.devnull}", "-o", "Ciphers=aes256-ctr",
                 "-o", "MACs=hmac-sha2-256", "-p", str(port), "nobody@127.0.0.1", "true"],
                capture_output=True, timeout=30, check=False,
            )  # fmt: skip
    traffic = [f for f in scan_paths([str(pcap)]).findings if f.kind is FindingKind.TRAFFIC]
    agreed = {f.source.detail.rsplit(":", 1)[1]: f for f in traffic}  # type: ignore[union-attr]
    assert agreed["cipher-c2s"].algorithm == "aes256-ctr"
    assert agreed["mac-c2s"].algorithm == "hmac-sha2-256"
    assert agreed["host-key"].algorithm == "ssh-ed25519"  # the fixture's only host key
    kex = agreed["kex"]
    client_list = kex.notes[1].split(": ", 1)[1].split(",")
    server_list = kex.notes[2].split(": ", 1)[1].split(",")
    # RFC 4253 section 7.1, applied by hand.
    expected = [name for name in client_list if name in server_list][0]
    assert kex.algorithm == expected
    assert all(f.host == f"127.0.0.1:{port}" for f in traffic)


def test_truncated_capture_is_not_understood(tmp_path: Path) -> None:
    pcap = tmp_path / "cut.pcap"
    # A pcap header (libpcap format, LINKTYPE_ETHERNET) and a record header that promises
    # more bytes than follow.
    header = bytes.fromhex("d4c3b2a1020004000000000000000000ffff000001000000")
    record = bytes.fromhex("00000000000000004000000040000000") + bytes(10)
    pcap.write_bytes(header + record)
    result = scan_paths([str(pcap)])
    assert result.summary is not None
    assert result.summary.finders["captured traffic"].not_understood
