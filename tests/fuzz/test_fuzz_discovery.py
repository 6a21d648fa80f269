"""Fuzzing the discovery parsers: PEM, DER and PKCS#12 recognisers, OpenSSH key lines and key
blobs, and the SSH identification + KEXINIT reader.

Documented outcomes (pqtriage/sources/scan/findings.py, pqtriage/sources/probe/outcome.py):
a scan gives Findings and ScanProblems (one line each, never key material) and never raises;
an SSH key blob parses or raises WireError; the SSH reader returns ten name-lists or raises
ProbeFailure (the failure as data). Formats: RFC 7468 (PEM), ITU-T X.690 (DER), RFC 7292
(PKCS#12), sshd(8) AUTHORIZED_KEYS FILE FORMAT and SSH_KNOWN_HOSTS FILE FORMAT, RFC 4253
sections 4.2, 6 and 7.1 (identification, binary packet, KEXINIT), RFC 4251 section 5.

TLS: the probe hands every peer byte to OpenSSL through pyOpenSSL (tests/hostile/
test_discovery_hostile.py sends garbage, stalls and resets to the real probe instead); the
capture reader's own TLS record parser is fuzzed in tests/fuzz/test_fuzz_finders.py.
"""

from __future__ import annotations

import base64
import functools
import random
import struct
from pathlib import Path

import pytest
from cryptography.hazmat.primitives import serialization
from cryptography.hazmat.primitives.asymmetric import ec, ed25519
from hypothesis import given
from hypothesis import strategies as st

from pqtriage.sources.probe.outcome import ProbeFailure
from pqtriage.sources.probe.ssh import _Reader, describe_kexinit, read_identification, read_kexinit
from pqtriage.sources.scan.findings import Finding, ParseOutcome, ScanProblem
from pqtriage.sources.scan.openssh import parse_openssh_text
from pqtriage.sources.scan.scanner import classify
from pqtriage.sources.scan.sshwire import SshKeyFacts, WireError, parse_key_blob
from tests.fuzz.common import PARSER_REGRESSIONS, fuzz, save_crash
from tests.sources import material as m

pytestmark = pytest.mark.fuzz

NAMES = ["x.pem", "x.crt", "x.der", "x.key", "x.p12", "x.pfx", "authorized_keys", "known_hosts",
         "id_ed25519.pub", "notes.txt", "x.jwk"]


@functools.cache
def keys() -> tuple[ec.EllipticCurvePrivateKey, ed25519.Ed25519PrivateKey]:
    """The private keys inside the material (made for this run, never checked in)."""
    return m.ec_key(ec.SECP256R1()), ed25519.Ed25519PrivateKey.generate()


@functools.cache
def material() -> dict[str, bytes]:
    """Real key material made with the cryptography library."""
    key, ssh_key = keys()
    ca_key = ssh_key
    ca = m.certificate(ca_key, "Fuzz Issuing CA", ca=True)
    cert = m.certificate(key, "web.example.test", issuer_key=ca_key, issuer=ca, dns=("web.example.test",))
    return {
        "cert.pem": m.cert_pem(cert) + m.cert_pem(ca),
        "cert.der": cert.public_bytes(serialization.Encoding.DER),
        "key.pem": m.private_pem(key),
        "key-legacy.pem": m.private_pem(key, private_format=serialization.PrivateFormat.TraditionalOpenSSL),
        "key.der": m.private_der(key),
        "public.pem": m.public_pem(key),
        "csr.pem": m.csr(key, "web.example.test").public_bytes(serialization.Encoding.PEM),
        "bundle.p7b": m.pkcs7_pem([cert, ca]),
        "bundle.p12": m.pkcs12_bundle(key, cert, [ca], None),
        "locked.p12": m.pkcs12_bundle(key, cert, [ca], b"fuzz-password"),
        "id_ed25519": m.private_pem(ssh_key, private_format=serialization.PrivateFormat.OpenSSH),
        "authorized_keys": (m.ssh_public_line(ssh_key, "alice@example.test") + "\n"
                            + 'restrict,from="10.0.0.1" ' + m.ssh_public_line(key) + "\n"
                            + m.ssh_certificate_line(key, ssh_key, "web-host") + "\n").encode(),
        "known_hosts": ("web.example.test,10.0.0.2 " + m.ssh_public_line(key) + "\n@cert-authority *.example.test "
                        + m.ssh_public_line(ssh_key) + "\n").encode(),
    }


@functools.cache
def secrets() -> tuple[str, ...]:
    """Text that would betray the private keys above (see tests/sources/material.py)."""
    return tuple(fragment for key in keys() for fragment in m.secret_fragments(key))


def check_scan(data: bytes, path: str) -> ParseOutcome:
    """Classify bytes as a scanned file; only findings and problems may come out."""
    try:
        outcome = classify(data, path)
    except Exception:
        save_crash("scan", path.encode() + b"\0" + data, ".bin")
        raise
    assert all(isinstance(f, Finding) for f in outcome.findings)
    for problem in outcome.problems:
        assert isinstance(problem, ScanProblem)
        assert "\n" not in problem.line() and problem.line().startswith(path)
    said = " ".join([p.reason for p in outcome.problems] + [n for f in outcome.findings for n in f.notes])
    assert "PRIVATE KEY-----" not in said
    assert not any(fragment in said for fragment in secrets())
    return outcome


def _mutate(data: bytes, rng: random.Random) -> bytes:
    out = bytearray(data)
    for _ in range(rng.randint(1, 4)):
        action = rng.choice(["flip", "cut", "insert", "repeat", "length"])
        at = rng.randrange(len(out) + 1)
        if action == "flip" and out:
            out[min(at, len(out) - 1)] ^= 1 << rng.randrange(8)
        elif action == "cut":
            del out[at : at + rng.randint(1, 64)]
        elif action == "insert":
            out[at:at] = rng.randbytes(rng.randint(1, 8))
        elif action == "repeat":
            out[at:at] = out[at : at + rng.randint(1, 64)]
        elif out:  # a DER length byte or an SSH uint32 set to something absurd
            out[min(at, len(out) - 1)] = rng.choice([0x00, 0x7F, 0x80, 0x81, 0x84, 0xFF])
    return bytes(out)


def _rewrap_pem(data: bytes, rng: random.Random) -> bytes:
    """Mutate the DER inside each PEM block and re-encode it, so the DER parsers are reached."""
    lines = data.split(b"\n")
    out, body = [], []
    for line in lines:
        if line.startswith(b"-----END"):
            der = _mutate(base64.b64decode(b"".join(body)), rng)
            encoded = base64.encodebytes(der).replace(b"\n", b"")
            out += [encoded[i : i + 64] for i in range(0, len(encoded), 64)] + [line]
            body = []
        elif out and out[-1].startswith(b"-----BEGIN") or body:
            body.append(line)
        else:
            out.append(line)
    return b"\n".join(out)


@fuzz(300)
@given(st.binary(max_size=3000), st.sampled_from(NAMES))
def test_arbitrary_bytes_as_a_scanned_file(data: bytes, name: str) -> None:
    check_scan(data, name)


@fuzz(300)
@given(st.sampled_from(sorted(material())), st.randoms(use_true_random=False), st.booleans())
def test_mutated_real_material(name: str, rng: random.Random, rewrap: bool) -> None:
    data = material()[name]
    mutated = _rewrap_pem(data, rng) if rewrap and b"-----BEGIN" in data else _mutate(data, rng)
    check_scan(mutated, name)


def test_unmutated_material_is_found() -> None:
    # The seeds must be read, or the mutations test only the refusals.
    for name, data in material().items():
        outcome = check_scan(data, name)
        assert outcome.findings and not outcome.problems, name


KEY_TYPES = ["ssh-rsa", "ssh-dss", "ssh-ed25519", "ssh-ed448", "ecdsa-sha2-nistp256", "ecdsa-sha2-nistp384",
             "sk-ssh-ed25519@openssh.com", "sk-ecdsa-sha2-nistp256@openssh.com",
             "ssh-ed25519-cert-v01@openssh.com", "ecdsa-sha2-nistp256-cert-v01@openssh.com",
             "ssh-rsa-cert-v01@openssh.com"]


def _string(data: bytes) -> bytes:
    return struct.pack(">I", len(data)) + data  # RFC 4251 section 5: string


@st.composite
def key_blobs(draw: st.DrawFn) -> bytes:
    """Blobs made of RFC 4251 strings: a known key type, then arbitrary fields and lengths."""
    key_type = draw(st.sampled_from(KEY_TYPES)).encode()
    fields = draw(st.lists(st.binary(max_size=40) | st.sampled_from(
        [b"nistp256", b"nistp384", b"P-256", b"P-x", b"\xff", b"\x00" * 8]), max_size=14))
    blob = _string(key_type) + b"".join(_string(f) if draw(st.booleans()) else f for f in fields)
    return blob


@fuzz(300)
@given(st.binary(max_size=600) | key_blobs())
def test_ssh_key_blobs_parse_or_raise_wire_error(blob: bytes) -> None:
    try:
        facts = parse_key_blob(blob)
    except WireError:
        return
    except Exception:
        save_crash("sshblob", blob, ".bin")
        raise
    assert isinstance(facts, SshKeyFacts)


@fuzz(300)
@given(st.sampled_from(["authorized_keys", "known_hosts"]), st.randoms(use_true_random=False),
       st.lists(st.text(max_size=30) | st.sampled_from(['"', "@revoked", "@cert-authority", "|1|", ",", "#",
                                                        "command=\"x y\"", "ssh-rsa", "\\"]), max_size=4),
       key_blobs())
def test_openssh_lines(name: str, rng: random.Random, noise: list[str], blob: bytes) -> None:
    lines = material()[name].decode().splitlines()
    line = rng.choice(lines).split(" ")
    index = next(i for i, field in enumerate(line) if field.startswith("AAAA"))
    choice = rng.randrange(3)
    if choice == 0:  # a mutated blob, re-encoded (reaches the blob parser)
        line[index] = base64.b64encode(_mutate(base64.b64decode(line[index]), rng)).decode()
    elif choice == 1:  # a made-up blob under a key type name
        line[index - 1] = blob[4 : 4 + int.from_bytes(blob[:4], "big")].decode("ascii", "replace")
        line[index] = base64.b64encode(blob).decode()
    for word in noise:
        line.insert(rng.randrange(len(line) + 1), word)
    text = "\n".join(lines + [" ".join(line)])
    try:
        outcome = parse_openssh_text(text, name)
    except Exception:
        save_crash("openssh", f"{name}\0{text}".encode("utf-8", "surrogatepass"), ".txt")
        raise
    assert all("\n" not in p.line() for p in outcome.problems)


@fuzz(150)
@given(st.text(max_size=400), st.sampled_from(["authorized_keys", "known_hosts", "x.pub"]))
def test_arbitrary_text_as_openssh_lines(text: str, name: str) -> None:
    parse_openssh_text(text, name)


class FeedSocket:
    """Stands in for the socket: hands out the peer's bytes in chunks, then end of stream."""

    def __init__(self, data: bytes, chunk: int) -> None:
        self.data, self.chunk = data, max(1, chunk)

    def settimeout(self, value: float) -> None:
        """The deadline is not needed: every byte is already here."""

    def recv(self, size: int) -> bytes:
        piece, self.data = self.data[: min(size, self.chunk)], self.data[min(size, self.chunk) :]
        return piece


def _name_list(names: list[str]) -> bytes:
    return _string(",".join(names).encode())


KEXINIT_LISTS = [
    ["mlkem768x25519-sha256", "sntrup761x25519-sha512", "curve25519-sha256", "ecdh-sha2-nistp256",
     "diffie-hellman-group14-sha256", "ext-info-s", "kex-strict-s-v00@openssh.com"],
    ["rsa-sha2-512", "rsa-sha2-256", "ecdsa-sha2-nistp256", "ssh-ed25519"],
    ["chacha20-poly1305@openssh.com", "aes128-ctr", "aes256-gcm@openssh.com"],
    ["chacha20-poly1305@openssh.com", "aes128-ctr", "aes256-gcm@openssh.com"],
    ["umac-64-etm@openssh.com", "hmac-sha2-256-etm@openssh.com", "hmac-sha2-256"],
    ["umac-64-etm@openssh.com", "hmac-sha2-256-etm@openssh.com", "hmac-sha2-256"],
    ["none", "zlib@openssh.com"], ["none", "zlib@openssh.com"], [], [],
]
"""Ten name-lists (RFC 4253 section 7.1); names as OpenSSH 9.9 offers them by default (from memory)."""


def kexinit_exchange(lists: list[list[str]] = KEXINIT_LISTS, padding: int = 8) -> bytes:
    """What a server sends: identification line, then one binary packet holding KEXINIT."""
    payload = bytes([20]) + b"\x11" * 16 + b"".join(_name_list(n) for n in lists) + b"\x00" + b"\0\0\0\0"
    body = bytes([padding]) + payload + b"\0" * padding
    return b"SSH-2.0-OpenSSH_9.9 Debian\r\n" + struct.pack(">I", len(body)) + body


def read_server(data: bytes, chunk: int) -> list[list[str]] | None:
    """Run the probe's reader over the bytes: ten name-lists, or None after a ProbeFailure."""
    reader = _Reader(FeedSocket(data, chunk), deadline=float("inf"))  # type: ignore[arg-type]
    try:
        banner = read_identification(reader)
        lists = read_kexinit(reader)
    except ProbeFailure as failure:
        assert str(failure) and "\n" not in str(failure)
        return None
    except Exception:
        save_crash("kexinit", data, ".bin")
        raise
    assert len(lists) == 10
    describe_kexinit("ssh://fuzz.example.test:22", banner, lists)
    return lists


def test_real_shaped_kexinit_is_read() -> None:
    assert read_server(kexinit_exchange(), 7) == KEXINIT_LISTS


@fuzz(300)
@given(st.binary(max_size=1200), st.integers(1, 300))
def test_arbitrary_peer_bytes(data: bytes, chunk: int) -> None:
    read_server(data, chunk)
    read_server(b"SSH-2.0-x\r\n" + data, chunk)


@fuzz(300)
@given(st.randoms(use_true_random=False), st.integers(1, 300), st.integers(0, 255),
       st.lists(st.lists(st.text(max_size=12), max_size=3), min_size=0, max_size=12))
def test_mutated_kexinit(rng: random.Random, chunk: int, padding: int, lists: list[list[str]]) -> None:
    exchange = kexinit_exchange(lists if rng.random() < 0.3 else KEXINIT_LISTS, padding)
    read_server(_mutate(exchange, rng) if rng.random() < 0.8 else exchange, chunk)


def _replay(path: Path) -> None:
    data = path.read_bytes()
    target = path.name.split("-", 1)[0]
    if target == "scan":
        name, _, body = data.partition(b"\0")
        check_scan(body, name.decode())
    elif target == "sshblob":
        try:
            parse_key_blob(data)
        except WireError:
            pass
    elif target == "openssh":
        name, _, text = data.decode("utf-8", "surrogatepass").partition("\0")
        parse_openssh_text(text, name)
    elif target == "kexinit":
        read_server(data, 64)
    elif target == "cbom":
        from tests.fuzz.test_fuzz_cbom import check

        check(data.decode("utf-8", "surrogatepass"))
    else:
        raise AssertionError(f"{path.name}: unknown target {target!r} (see regressions/README.md)")


@pytest.mark.parametrize("path", sorted(PARSER_REGRESSIONS.glob("*")), ids=lambda p: p.name)
def test_parser_regressions_replay(path: Path) -> None:
    _replay(path)
