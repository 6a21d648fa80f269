"""SSH probe: exchange identification strings and read the server's KEXINIT, no login.

RFC 4253 section 4.2: after connecting, each side sends ``SSH-2.0-softwareversion``; a server
may send other lines first. Lines are at most 255 bytes. Section 6: binary packets are
``uint32 packet_length, byte padding_length, payload, padding`` (no MAC before the first key
exchange); implementations must accept packets of 35000 bytes. Section 7.1: the KEXINIT
payload is byte 20, a 16-byte cookie, then ten name-lists (key exchange, host key, ciphers
both ways, MACs both ways, compression both ways, languages both ways).
"""

from __future__ import annotations

import socket
import time

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.probe.connect import connect
from pqtriage.sources.probe.outcome import ProbeFailure, ProbeOutcome
from pqtriage.sources.probe.targets import Target
from pqtriage.sources.scan.findings import Finding, FindingKind
from pqtriage.sources.scan.identifiers import identifiers
from pqtriage.sources.scan.sshwire import WireError, WireReader

CLIENT_IDENTIFICATION = b"SSH-2.0-pqtriage_probe\r\n"
MAX_LINE = 255  # RFC 4253 section 4.2, CR LF included
MAX_PRE_BANNER_LINES = 32
MAX_PACKET = 35000  # RFC 4253 section 6.1
SSH_MSG_KEXINIT = 20  # RFC 4253 section 12


class _Reader:
    """Buffered reads from a socket against one deadline."""

    def __init__(self, sock: socket.socket, deadline: float) -> None:
        self.sock = sock
        self.deadline = deadline
        self.buffer = b""
        self.received = 0

    def _fill(self) -> None:
        remaining = self.deadline - time.monotonic()
        if remaining <= 0:
            raise ProbeFailure("timed out waiting for the SSH server")
        self.sock.settimeout(remaining)
        try:
            chunk = self.sock.recv(4096)
        except TimeoutError:
            raise ProbeFailure("timed out waiting for the SSH server") from None
        except OSError as error:
            if self.received:
                raise ProbeFailure("not SSH (the server sent no SSH identification)") from None
            raise ProbeFailure(f"connection failed ({error.strerror or 'reset'})") from None
        if not chunk:
            raise ProbeFailure("not SSH (connection closed before a KEXINIT)")
        self.received += len(chunk)
        self.buffer += chunk

    def line(self) -> bytes:
        while b"\n" not in self.buffer:
            if len(self.buffer) > MAX_LINE:
                raise ProbeFailure("not SSH (no identification line within 255 bytes)")
            self._fill()
        line, _, self.buffer = self.buffer.partition(b"\n")
        if len(line) + 1 > MAX_LINE:
            raise ProbeFailure("not SSH (identification line longer than 255 bytes)")
        return line.rstrip(b"\r")

    def exactly(self, count: int) -> bytes:
        while len(self.buffer) < count:
            self._fill()
        data, self.buffer = self.buffer[:count], self.buffer[count:]
        return data


def read_identification(reader: _Reader) -> str:
    """Return the server's identification string, skipping up to 32 lines before it."""
    for _ in range(MAX_PRE_BANNER_LINES + 1):
        line = reader.line()
        if line.startswith(b"SSH-"):
            text = line.decode("ascii", "replace")
            if not text.startswith(("SSH-2.0-", "SSH-1.99-")):
                raise ProbeFailure(f"SSH server speaks an unsupported version ({text[:40]})")
            return text
    raise ProbeFailure("not SSH (no identification line)")


def read_kexinit(reader: _Reader) -> list[list[str]]:
    """Read one binary packet and parse it as KEXINIT; return its ten name-lists."""
    header = reader.exactly(5)
    packet_length = int.from_bytes(header[:4], "big")
    padding_length = header[4]
    if packet_length < 1 + 17 or packet_length > MAX_PACKET:
        raise ProbeFailure(f"not SSH (implausible packet length {packet_length})")
    body = reader.exactly(packet_length - 1)
    payload_length = packet_length - 1 - padding_length
    if payload_length < 17:
        raise ProbeFailure("not SSH (packet padding longer than the packet)")
    payload = body[:payload_length]
    if payload[0] != SSH_MSG_KEXINIT:
        raise ProbeFailure(f"SSH server sent message {payload[0]} instead of KEXINIT")
    wire = WireReader(payload[17:])  # message number and 16-byte cookie
    try:
        return [wire.name_list() for _ in range(10)]
    except WireError as error:
        raise ProbeFailure(f"SSH KEXINIT does not parse ({error})") from None


def probe_ssh(target: Target, timeout: float) -> ProbeOutcome:
    """Probe one SSH endpoint; failures come back as data with one clear line."""
    deadline = time.monotonic() + timeout
    try:
        sock = connect(target.host, target.port, timeout)
    except ProbeFailure as failure:
        return ProbeOutcome(target.text, failure=str(failure))
    try:
        try:
            sock.sendall(CLIENT_IDENTIFICATION)
        except OSError:
            pass  # the server may speak first and close; reading tells what it is
        reader = _Reader(sock, deadline)
        banner = read_identification(reader)
        lists = read_kexinit(reader)
    except ProbeFailure as failure:
        return ProbeOutcome(target.text, failure=str(failure))
    finally:
        sock.close()
    return describe_kexinit(target.text, banner, lists)


def describe_kexinit(target: str, banner: str, lists: list[list[str]]) -> ProbeOutcome:
    """Turn KEXINIT name-lists into findings (pseudo-algorithm names ignored)."""
    table = identifiers()
    pseudo = table.ssh_pseudo_algorithms
    kex, host_keys = lists[0], lists[1]
    ciphers = _union(lists[2], lists[3])
    macs = _union(lists[4], lists[5])
    protocol = "SSH-2.0"
    findings: list[Finding] = []
    groups = (
        ("kex", kex, FindingKind.SSH_KEX, Purpose.KEY_ESTABLISHMENT, "offered key exchange"),
        ("hostkey", host_keys, FindingKind.SSH_HOST_KEY, Purpose.AUTHENTICATION,
         "offered host key algorithm"),
        ("cipher", ciphers, FindingKind.SSH_CIPHER, Purpose.ENCRYPTION, "offered cipher"),
        ("mac", macs, FindingKind.SSH_MAC, Purpose.INTEGRITY, "offered MAC"),
    )  # fmt: skip
    for role, names, kind, purpose, note in groups:
        for name in names:
            if name in pseudo:
                continue
            notes = [note]
            if kind is FindingKind.SSH_KEX and name in table.ssh_hybrid_kex:
                notes.append("hybrid post-quantum")
            findings.append(
                Finding(
                    source=SourceRef(target, detail=f"{role}.{name}"),
                    kind=kind,
                    algorithm=name,
                    purpose=purpose,
                    host=target,
                    protocol=protocol,
                    notes=tuple(notes),
                )
            )
    hybrid = [name for name in kex if name in table.ssh_hybrid_kex]
    verdict = (
        f"hybrid post-quantum key exchange offered ({', '.join(hybrid)})"
        if hybrid
        else "no post-quantum key exchange offered"
    )
    return ProbeOutcome(target, tuple(findings), protocol, f"{target}: {banner}: {verdict}")


def _union(first: list[str], second: list[str]) -> list[str]:
    return first + [name for name in second if name not in first]
