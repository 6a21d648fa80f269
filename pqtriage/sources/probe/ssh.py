"""SSH probe: what a current OpenSSH client would use, what else the server offers, and the
server's host key. No login.

RFC 4253 section 4.2: after connecting, each side sends ``SSH-2.0-softwareversion``; a server
may send other lines first. Lines are at most 255 bytes. Section 6: binary packets are
``uint32 packet_length, byte padding_length, payload, padding`` (no MAC before the first key
exchange); implementations must accept packets of 35000 bytes. Section 7.1: the KEXINIT
payload is byte 20, a 16-byte cookie, then ten name-lists (key exchange, host key, ciphers
both ways, MACs both ways, compression both ways, languages both ways).

What is in use is computed, not guessed: the server's lists are negotiated (RFC 4253,
section 7.1) against the default lists of a stated OpenSSH client
(``pqtriage/data/ssh_client_preferences.yaml``); that method is ``in-use``, every other
method the server lists is ``offered``. The host key is read from the server's reply to a key
exchange the probe runs itself (``ssh_kex``), or with ``ssh-keyscan`` when the server offers
no exchange the probe implements and that tool is installed.
"""

from __future__ import annotations

import base64
import binascii
import dataclasses
import shutil
import socket
import subprocess
import time
from dataclasses import dataclass

from pqtriage.model.inventory import IN_USE, OFFERED, Purpose, SourceRef
from pqtriage.sources.probe.connect import connect
from pqtriage.sources.probe.outcome import ProbeFailure, ProbeOutcome
from pqtriage.sources.probe.ssh_kex import (
    GROUP_EXCHANGE,
    IMPLEMENTED,
    HostKeyReply,
    KexFailure,
    kexinit,
    packet,
    run_exchange,
)
from pqtriage.sources.probe.ssh_negotiation import Negotiated, ServerOffer, negotiate
from pqtriage.sources.probe.ssh_preferences import ClientPreferences, ssh_preferences
from pqtriage.sources.probe.targets import Target
from pqtriage.sources.scan.findings import Finding, FindingKind
from pqtriage.sources.scan.identifiers import identifiers
from pqtriage.sources.scan.sshwire import WireError, WireReader, parse_key_blob

CLIENT_IDENTIFICATION = b"SSH-2.0-pqtriage_probe\r\n"
MAX_LINE = 255  # RFC 4253 section 4.2, CR LF included
MAX_PRE_BANNER_LINES = 32
MAX_PACKET = 35000  # RFC 4253 section 6.1
SSH_MSG_KEXINIT = 20  # RFC 4253 section 12
_RSA_HOST_KEYS = ("rsa-sha2-512", "rsa-sha2-256", "ssh-rsa")


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


def read_payload(reader: _Reader, minimum: int = 1) -> bytes:
    """Read one unencrypted binary packet (RFC 4253, section 6) and return its payload
    (at least ``minimum`` bytes)."""
    header = reader.exactly(5)
    packet_length = int.from_bytes(header[:4], "big")
    padding_length = header[4]
    if packet_length < 1 + minimum or packet_length > MAX_PACKET:
        raise ProbeFailure(f"not SSH (implausible packet length {packet_length})")
    body = reader.exactly(packet_length - 1)
    payload_length = packet_length - 1 - padding_length
    if payload_length < minimum:
        raise ProbeFailure("not SSH (packet padding longer than the packet)")
    return body[:payload_length]


def read_kexinit(reader: _Reader) -> list[list[str]]:
    """Read one binary packet and parse it as KEXINIT; return its ten name-lists."""
    payload = read_payload(reader, 17)  # message number and cookie at least
    if payload[0] != SSH_MSG_KEXINIT:
        raise ProbeFailure(f"SSH server sent message {payload[0]} instead of KEXINIT")
    wire = WireReader(payload[17:])  # message number and 16-byte cookie
    try:
        return [wire.name_list() for _ in range(10)]
    except WireError as error:
        raise ProbeFailure(f"SSH KEXINIT does not parse ({error})") from None


@dataclass(frozen=True)
class HostKeys:
    """What the probe learned about the host keys (and the group exchange), for the findings."""

    replies: tuple[HostKeyReply, ...] = ()
    """Each key read, with the host key algorithm it was read for."""
    notes: tuple[str, ...] = ()
    """Why a key could not be read, one line each."""
    read_with: str = "the key exchange reply"
    """How the keys were read."""


def _client_lists(
    host_key: str, method: str, lists: list[list[str]]
) -> list[list[str]]:
    """The probe's own KEXINIT: one exchange it runs, one host key algorithm it wants, and
    the server's own ciphers, MACs and compression (never used: it stops at the reply)."""
    return [[method], [host_key], lists[2], lists[3], lists[4], lists[5],
            lists[6] or ["none"], lists[7] or ["none"], [], []]  # fmt: skip


def _exchange_on(sock: socket.socket, reader: _Reader, host_key: str, method: str,
                 lists: list[list[str]]) -> HostKeyReply:
    preferences = ssh_preferences().group_exchange
    sock.sendall(packet(kexinit(_client_lists(host_key, method, lists))))
    request = (preferences.min, preferences.preferred, preferences.max)
    return run_exchange(method, lambda payload: sock.sendall(packet(payload)),
                        lambda: read_payload(reader), request)


def _exchange_method(negotiated: Negotiated, offer: ServerOffer, client: ClientPreferences) -> str | None:
    """The exchange the probe runs: the one in use if it can, else another the server lists."""
    if negotiated.kex in IMPLEMENTED:
        return negotiated.kex
    for name in (*client.kex, *offer.kex):
        if name in IMPLEMENTED and name in offer.kex:
            return name
    return None


def _keyscan(target: Target, host_key: str, deadline: float) -> HostKeyReply | str:
    """Read one host key with ssh-keyscan (only when installed); a reason when it cannot."""
    tool = shutil.which("ssh-keyscan")
    if tool is None:
        return "host key not read: the server offers no key exchange the probe runs, and ssh-keyscan is not installed"
    kind = ("rsa" if host_key in _RSA_HOST_KEYS else "ecdsa" if host_key.startswith("ecdsa")
            else "ed25519" if "ed25519" in host_key else "dsa" if host_key == "ssh-dss" else None)
    if kind is None:
        return f"host key not read: ssh-keyscan cannot ask for {host_key}"
    seconds = max(1, int(deadline - time.monotonic()))
    try:
        done = subprocess.run(
            [tool, "-T", str(seconds), "-p", str(target.port), "-t", kind, target.host],
            capture_output=True, timeout=seconds + 2, check=False,
        )
    except (OSError, subprocess.TimeoutExpired):
        return "host key not read: ssh-keyscan did not answer in time"
    for line in done.stdout.decode("ascii", "replace").splitlines():
        fields = line.split()
        if len(fields) >= 3 and not line.startswith("#"):
            try:
                facts = parse_key_blob(base64.b64decode(fields[2], validate=True))
            except (WireError, binascii.Error, ValueError):
                continue
            return HostKeyReply(facts, host_key, "ssh-keyscan")
    return "host key not read: ssh-keyscan returned no key"


def _more_reads(offer: ServerOffer, replies: list[HostKeyReply], wanted: str | None,
                method: str | None) -> list[tuple[str, str]]:
    """(host key algorithm, exchange) pairs still to run, at most one."""
    if method is None or wanted is None:
        return []
    rsa = [name for name in offer.host_key if name in _RSA_HOST_KEYS]
    need_rsa = bool(rsa) and not any(r.key.algorithm == "RSA" for r in replies)
    exchanges = [name for name in offer.kex if name in GROUP_EXCHANGE]
    need_group = bool(exchanges) and not any(r.group_bits for r in replies)
    if not need_rsa and not need_group:
        return []
    return [(rsa[0] if need_rsa else wanted, exchanges[0] if need_group else method)]


def _read_more_host_keys(target: Target, deadline: float,
                         wanted: list[tuple[str, str]]) -> tuple[list[HostKeyReply], list[str]]:
    """One more connection per (host key algorithm, exchange), each read like the first."""
    replies, notes = [], []
    for host_key, method in wanted:
        try:
            sock = connect(target.host, target.port, max(0.1, deadline - time.monotonic()))
        except ProbeFailure as failure:
            notes.append(f"{host_key} host key not read: {failure}")
            continue
        try:
            sock.sendall(CLIENT_IDENTIFICATION)
            reader = _Reader(sock, deadline)
            read_identification(reader)
            again = read_kexinit(reader)
            replies.append(_exchange_on(sock, reader, host_key, method, again))
        except (ProbeFailure, KexFailure, OSError) as error:
            notes.append(f"{host_key} host key not read: {error}")
        finally:
            sock.close()
    return replies, notes


def probe_ssh(target: Target, timeout: float) -> ProbeOutcome:
    """Probe one SSH endpoint; failures come back as data with one clear line."""
    deadline = time.monotonic() + timeout
    try:
        sock = connect(target.host, target.port, timeout)
    except ProbeFailure as failure:
        return ProbeOutcome(target.text, failure=str(failure))
    preferences = ssh_preferences()
    client = preferences.client
    try:
        try:
            sock.sendall(CLIENT_IDENTIFICATION)
        except OSError:
            pass  # the server may speak first and close; reading tells what it is
        reader = _Reader(sock, deadline)
        banner = read_identification(reader)
        lists = read_kexinit(reader)
        offer = ServerOffer.from_lists(lists, identifiers().ssh_pseudo_algorithms)
        negotiated = negotiate(client.kex, client.host_key, client.ciphers, client.macs, offer,
                               preferences.authenticated_ciphers)
        wanted = negotiated.host_key or (offer.host_key[0] if offer.host_key else None)
        method = _exchange_method(negotiated, offer, client)
        replies: list[HostKeyReply] = []
        notes: list[str] = []
        read_with = "the key exchange reply"
        if wanted is not None and method is not None:
            try:
                replies.append(_exchange_on(sock, reader, wanted, method, lists))
            except (ProbeFailure, KexFailure, OSError) as error:
                notes.append(f"{wanted} host key not read: {error}")
        elif wanted is None:
            notes.append("the server offers no host key algorithm")
    except ProbeFailure as failure:
        return ProbeOutcome(target.text, failure=str(failure))
    finally:
        sock.close()
    # Sizes not in the algorithms' names are read too: an RSA host key offered beside the one
    # read, and the group a group exchange would use (one more exchange covers both).
    more = _more_reads(offer, replies, wanted, method)
    if more:
        found, more_notes = _read_more_host_keys(target, deadline, more)
        replies += found
        notes += more_notes
    elif method is None:  # no exchange the probe runs: ssh-keyscan, when installed
        read_with = "ssh-keyscan"
        rsa_offered = [name for name in offer.host_key if name in _RSA_HOST_KEYS]
        for host_key in dict.fromkeys([n for n in (wanted, *rsa_offered[:1]) if n]):
            scanned = _keyscan(target, host_key, deadline)
            if isinstance(scanned, HostKeyReply):
                replies.append(scanned)
            else:
                notes.append(scanned)
    return describe_kexinit(
        target.text, banner, lists, HostKeys(tuple(replies), tuple(notes), read_with)
    )


_CATEGORIES = (
    ("kex", FindingKind.SSH_KEX, Purpose.KEY_ESTABLISHMENT, "key exchange"),
    ("hostkey", FindingKind.SSH_HOST_KEY, Purpose.AUTHENTICATION, "host key algorithm"),
    ("cipher", FindingKind.SSH_CIPHER, Purpose.ENCRYPTION, "cipher"),
    ("mac", FindingKind.SSH_MAC, Purpose.INTEGRITY, "MAC"),
)


def _host_key_facts(name: str, keys: HostKeys) -> tuple[int | None, list[str]]:
    """Size of the key behind a host key algorithm (RSA, DSA) when that key was read, and a
    note naming the key read (ECDSA curves and Ed25519 are in the algorithm's name)."""
    base = name.removesuffix("-cert-v01@openssh.com")
    family = "RSA" if base in _RSA_HOST_KEYS else None
    for reply in keys.replies:
        same = reply.signature_algorithm == name or (family and reply.key.algorithm == family)
        if same:
            size = reply.key.key_size if reply.key.algorithm in ("RSA", "DSA") else None
            note = f"host key read from {keys.read_with}: {reply.key.key_type}"
            if reply.key.key_size and reply.key.algorithm in ("RSA", "DSA"):
                note += f", {reply.key.key_size} bits"
            return size, [note]
    return None, []


def describe_kexinit(
    target: str, banner: str, lists: list[list[str]], keys: HostKeys | None = None
) -> ProbeOutcome:
    """Turn KEXINIT name-lists into findings: what the default client negotiates is in use,
    the rest is offered (pseudo-algorithm names ignored)."""
    keys = keys or HostKeys()
    table = identifiers()
    preferences = ssh_preferences()
    client = preferences.client
    offer = ServerOffer.from_lists(lists, table.ssh_pseudo_algorithms)
    negotiated = negotiate(client.kex, client.host_key, client.ciphers, client.macs, offer,
                           preferences.authenticated_ciphers)
    in_use = negotiated.in_use()
    names = {
        "kex": offer.kex,
        "hostkey": offer.host_key,
        "cipher": _union(offer.ciphers_client_to_server, offer.ciphers_server_to_client),
        "mac": _union(offer.macs_client_to_server, offer.macs_server_to_client),
    }
    aead = sorted(in_use["cipher"] & preferences.authenticated_ciphers)
    protocol = "SSH-2.0"
    findings: list[Finding] = []
    for category, kind, purpose, label in _CATEGORIES:
        for name in names[category]:
            used = name in in_use[category]
            notes = [
                f"in use: the {label} a client with {client.name} defaults negotiates "
                "(RFC 4253, section 7.1)"
                if used
                else f"offered: a client with {client.name} defaults does not choose it "
                "(older or differently configured clients may)"
            ]
            if category == "mac" and aead:
                notes.append(f"no MAC is used with {', '.join(aead)} (the cipher's own tag)")
            if not negotiated.connects:
                notes.append(f"a client with {client.name} defaults cannot connect: {negotiated.failure}")
            key_size = None
            if category == "kex" and name in table.ssh_hybrid_kex:
                notes.append("hybrid post-quantum")
            if category == "kex" and name in GROUP_EXCHANGE:
                # Both group exchange hashes pick the group the same way (RFC 4419, section 3).
                for reply in keys.replies:
                    if reply.group_bits:
                        key_size = reply.group_bits
                        exchange = preferences.group_exchange
                        notes.append(
                            f"group of {reply.group_bits} bits chosen by the server for a request of "
                            f"min {exchange.min}, preferred {exchange.preferred}, max {exchange.max} "
                            f"bits (read with {reply.method})"
                        )
                        break
            if category == "hostkey":
                key_size, host_notes = _host_key_facts(name, keys)
                notes += host_notes
            findings.append(
                Finding(
                    source=SourceRef(target, detail=f"{category}.{name}"),
                    kind=kind,
                    algorithm=name,
                    purpose=purpose,
                    key_size=key_size,
                    host=target,
                    protocol=protocol,
                    notes=tuple(notes),
                    role=IN_USE if used else OFFERED,
                )
            )
    if keys.notes:  # why a host key was not read: on the host key in use (else on all)
        host = [f for f in findings if f.kind is FindingKind.SSH_HOST_KEY]
        chosen = [f for f in host if f.role == IN_USE] or host
        findings = [_with_notes(f, keys.notes) if f in chosen else f for f in findings]
    return ProbeOutcome(target, tuple(findings), protocol,
                        f"{target}: {banner}: {_summary(negotiated, offer, client.name)}")


def _summary(negotiated: Negotiated, offer: ServerOffer, client: str) -> str:
    hybrid = [name for name in offer.kex if name in identifiers().ssh_hybrid_kex]
    if not negotiated.connects:
        head = f"a client with {client} defaults cannot connect ({negotiated.failure})"
    else:
        cipher = negotiated.cipher_server_to_client
        mac = negotiated.mac_server_to_client or "none needed"
        head = (f"with {client} defaults: {negotiated.kex}, host key {negotiated.host_key}, "
                f"{cipher}, MAC {mac}")
    if negotiated.connects and negotiated.kex in hybrid:
        verdict = f"hybrid post-quantum key exchange in use ({negotiated.kex})"
    elif hybrid:
        verdict = f"hybrid post-quantum key exchange offered but not in use ({', '.join(hybrid)})"
    else:
        verdict = "no post-quantum key exchange offered"
    return f"{head}; {verdict}"


def _with_notes(finding: Finding, notes: tuple[str, ...]) -> Finding:
    return dataclasses.replace(finding, notes=finding.notes + notes)


def _union(first: tuple[str, ...], second: tuple[str, ...]) -> list[str]:
    return list(first) + [name for name in second if name not in first]
