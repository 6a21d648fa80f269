"""Fuzzing the finders: mutated configurations, keystores, archives, captures and source files.

Documented outcome (pqtriage/sources/scan/finders/interface.py): ``read`` returns a
FinderResult (findings, problems, not understood with why) and never raises, whatever the
bytes. The starting files are real files of each kind: configurations like the ones the real programs
accept in tests/sources/scan/finders, a JKS written by pyjks, a zip and a tar.gz written by
Python's zipfile and tarfile, a pcap written by dpkt (libpcap format), and the source samples.
"""

from __future__ import annotations

import functools
import io
import tarfile
import zipfile
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from pqtriage.sources.scan.finders import default_finders
from pqtriage.sources.scan.finders.interface import ArchiveLimits, FinderContext, FinderResult
from tests.fuzz.common import fuzz

pytestmark = pytest.mark.fuzz
SAMPLES = Path(__file__).resolve().parents[1] / "sources/scan/finders/samples"
CONTEXT = FinderContext(passwords=(b"fuzz-pass",), limits=ArchiveLimits(max_total_bytes=1 << 20))


@functools.cache
def real_files() -> dict[str, bytes]:
    """One real file per finder, keyed by the name it is scanned under."""
    import dpkt
    import jks

    from tests.sources import material as m

    cert = m.cert_pem(m.certificate(m.rsa_key(2048), "fuzz.example.test"))
    store = jks.KeyStore.new("jks", [jks.TrustedCertEntry.new(
        "ca", m.certificate(m.rsa_key(2048), "Fuzz CA", ca=True).public_bytes(m.serialization.Encoding.DER))])
    zipped = io.BytesIO()
    with zipfile.ZipFile(zipped, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("conf/server.pem", cert)
        archive.writestr("conf/sshd_config", "KexAlgorithms +diffie-hellman-group1-sha1\n")
    tarred = io.BytesIO()
    with tarfile.open(fileobj=tarred, mode="w:gz") as archive:
        info = tarfile.TarInfo("etc/server.pem")
        info.size = len(cert)
        archive.addfile(info, io.BytesIO(cert))
    capture = io.BytesIO()
    writer = dpkt.pcap.Writer(capture)
    hello = bytes.fromhex("16030100") + b"\x2e" + b"\x01\x00\x00\x2a\x03\x03" + bytes(32) + b"\x00\x00\x02\x13\x01\x01\x00\x00\x00"
    for number, (src, dst, sport, dport, flags, payload) in enumerate([
        (1, 2, 50000, 443, dpkt.tcp.TH_SYN, b""), (1, 2, 50000, 443, dpkt.tcp.TH_ACK, hello),
        (2, 1, 443, 50000, dpkt.tcp.TH_ACK, b"SSH-2.0-x\r\n" + bytes(20)),
    ]):
        tcp = dpkt.tcp.TCP(sport=sport, dport=dport, seq=1000 + number, flags=flags, data=payload)
        ip = dpkt.ip.IP(src=bytes([127, 0, 0, src]), dst=bytes([127, 0, 0, dst]), p=6, data=tcp)
        writer.writepkt(bytes(dpkt.ethernet.Ethernet(type=0x0800, data=ip)), ts=number)
    found = {
        "nginx.conf": b"http {\n ssl_protocols TLSv1.2;\n ssl_ciphers HIGH:!aNULL:RC4-SHA;\n"
                      b" include extra.conf;\n server {\n  ssl_certificate c.pem;\n  ssl_ecdh_curve X25519;\n }\n}\n",
        "httpd.conf": b"SSLProtocol all -SSLv3\n<VirtualHost *:443>\nSSLCipherSuite HIGH:\\\n:MD5\n"
                      b"SSLOpenSSLConfCmd Curves X25519\nSSLCertificateFile c.pem\n</VirtualHost>\n",
        "haproxy.cfg": b"global\n ssl-default-bind-ciphers AES128-SHA\n ssl-default-bind-options ssl-min-ver TLSv1.2\n"
                       b"frontend f\n bind :443 ssl crt x.pem curves X25519\n",
        "sshd_config": b"# OpenSSH 9.2\nHostKey k\nKexAlgorithms +diffie-hellman-group1-sha1\nCiphers -aes*\n"
                       b"Match User x\n MACs ^hmac-md5\nInclude other\n",
        "openssl.cnf": b"[s]\nMinProtocol = TLSv1.2\nCipherString = DEFAULT@SECLEVEL=2\nGroups = X25519\n.include x.cnf\n",
        "swanctl.conf": b"connections {\n a {\n  proposals = aes256-sha256-modp2048,aes128-ke1_mlkem768\n"
                        b"  children {\n   c {\n    esp_proposals = 3des-md5\n   }\n  }\n }\n}\n",
        "ipsec.conf": b"conn x\n  ike=3des-sha1-modp1024!\n  esp=aes128-sha1\n  authby=secret\n  leftcert=a.pem\n",
        "client.ovpn": b"client\ndev tun\ntls-cipher TLS-ECDHE-RSA-WITH-AES-256-GCM-SHA384\ndata-ciphers AES-256-GCM:BF-CBC\n"
                       b"auth SHA1\n<ca>\n" + cert + b"</ca>\n",
        "wg0.conf": b"[Interface]\nPrivateKey = x\n[Peer]\nPublicKey = y\nPresharedKey = z\n",
        "java.security": b"jdk.tls.disabledAlgorithms=SSLv3, TLSv1, RC4, \\\n    DH keySize < 1024\njdk.tls.legacyAlgorithms=NULL, 3DES_EDE_CBC\n",
        "trust.jks": store.saves("fuzz-pass"),
        "app.zip": zipped.getvalue(),
        "app.tar.gz": tarred.getvalue(),
        "capture.pcap": capture.getvalue(),
    }
    for sample in sorted(SAMPLES.iterdir()):
        found[sample.name] = sample.read_bytes()
    return found


def _mutate(data: bytes, cuts: list[tuple[int, int, bytes]]) -> bytes:
    out = bytearray(data)
    for position, length, insert in cuts:
        at = position % (len(out) + 1)
        out[at : at + length % 8] = insert
    return bytes(out)


def _check(result: FinderResult) -> None:
    assert isinstance(result, FinderResult)
    for finding in result.findings:
        assert isinstance(finding.algorithm, str) and finding.source.file
    for problem in result.problems:
        assert "\n" not in problem.line()


@given(
    st.sampled_from(sorted(real_files())),
    st.lists(st.tuples(st.integers(0, 10_000), st.integers(0, 16), st.binary(max_size=12)), max_size=6),
)
@fuzz(400)
def test_mutated_files_never_raise(name: str, cuts: list[tuple[int, int, bytes]]) -> None:
    data = _mutate(real_files()[name], cuts)
    for finder in default_finders():
        if finder.wants(name, data[:4096]):
            _check(finder.read(data, name, CONTEXT))


@given(st.sampled_from(sorted(real_files())), st.binary(max_size=2048))
@fuzz(200)
def test_random_bytes_under_every_name_never_raise(name: str, data: bytes) -> None:
    for finder in default_finders():
        if finder.wants(name, data[:4096]):
            _check(finder.read(data, name, CONTEXT))


@given(st.binary(max_size=600), st.binary(max_size=600), st.booleans())
@fuzz(400)
def test_handshake_readers_never_raise(client: bytes, server: bytes, as_records: bool) -> None:
    """The TLS record and SSH KEXINIT readers of the traffic finder (RFC 8446 section 5.1,
    RFC 4253 sections 4.2 and 7.1) on arbitrary bytes, bare or inside a handshake record."""
    from pqtriage.sources.scan.finders import traffic

    def record(body: bytes, kind: int) -> bytes:
        message = bytes([kind]) + len(body).to_bytes(3, "big") + body
        return b"\x16\x03\x03" + len(message).to_bytes(2, "big") + message

    if as_records:
        client, server = record(client, 1), record(server, 2)
    streams = []
    for data in (client, server, b"SSH-2.0-fuzz\r\n" + client, b"SSH-2.0-fuzz\r\n" + server):
        stream = traffic.Stream(1)
        stream.add(0, data)
        streams.append(stream)
    for finding in traffic._tls("c.pcap", "127.0.0.1:443", streams[0], streams[1]):
        assert finding.algorithm
    for finding in traffic._ssh("c.pcap", "127.0.0.1:22", streams[2], streams[3]):
        assert finding.algorithm
