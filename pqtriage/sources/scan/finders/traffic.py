"""Captured traffic (pcap, pcapng, read with dpkt): TLS and SSH handshakes, passively.

Per TCP connection, the first bytes of each direction are put back in sequence order. TLS
(RFC 8446, RFC 5246): the ClientHello's suites, supported groups and key shares, the
ServerHello's version (supported_versions), suite and key-share group, and the server's
certificates when they travel in the clear (TLS 1.2 and earlier). SSH (RFC 4253): both
KEXINIT messages and the algorithms agreed by the rule of section 7.1 (the first algorithm
of the client's list that the server also lists). Uses are what was agreed, grouped by the
server's address and port; the offers are in the notes. Nothing is sent anywhere.
"""

from __future__ import annotations

import functools
import socket
import struct
from dataclasses import dataclass, field
from typing import Any

from cryptography import x509

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.certificates import describe_certificate
from pqtriage.sources.scan.finders.cipherstring import cipher_table
from pqtriage.sources.scan.finders.data import load_data, require_sources
from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
    not_understood,
)
from pqtriage.sources.scan.finders.openssh_config import key_algorithm
from pqtriage.sources.scan.findings import Finding, FindingKind
from pqtriage.sources.scan.sshwire import WireError, WireReader

PCAP_MAGICS = (b"\xd4\xc3\xb2\xa1", b"\xa1\xb2\xc3\xd4", b"\x4d\x3c\xb2\xa1", b"\xa1\xb2\x3c\x4d")
PCAPNG_MAGIC = b"\x0a\x0d\x0d\x0a"
#: Bytes kept per direction of a connection: handshakes are at the start.
STREAM_BYTES = 256 * 1024
MAX_CONNECTIONS = 10_000
SSH_CATEGORIES = ("kex", "host key", "cipher c2s", "cipher s2c", "mac c2s", "mac s2c")


@functools.lru_cache(maxsize=1)
def codepoints() -> tuple[dict[int, str], dict[int, str], dict[int, str]]:
    """(groups, cipher suites, versions) by code point."""
    raw = load_data("tls_codepoints.yaml", ("groups", "tls13_suites", "versions"))
    for section in ("groups", "tls13_suites", "versions"):
        require_sources(raw[section], "tls_codepoints.yaml", section)
    groups = {int(r["id"]): str(r["name"]) for r in raw["groups"]}
    suites = {int(r["id"]): str(r["name"]) for r in raw["tls13_suites"]}
    for name, row in cipher_table().suites.items():
        high, low = (int(part, 16) for part in str(row["id"]).split(","))
        suites.setdefault(high << 8 | low, name)
    versions = {int(r["id"]): str(r["name"]) for r in raw["versions"]}
    return groups, suites, versions


@dataclass
class Stream:
    """One direction of a TCP connection, put back in order."""

    first_packet: int
    segments: dict[int, bytes] = field(default_factory=dict)
    size: int = 0

    def add(self, seq: int, payload: bytes) -> None:
        if payload and seq not in self.segments and self.size < STREAM_BYTES:
            self.segments[seq] = payload
            self.size += len(payload)

    def data(self) -> bytes:
        out, expected = bytearray(), None
        for seq in sorted(self.segments):
            payload = self.segments[seq]
            if expected is not None and seq < expected:
                payload = payload[expected - seq :]
            elif expected is not None and seq > expected:
                break  # a gap: what follows cannot be read in order
            out += payload
            expected = seq + len(self.segments[seq])
        return bytes(out[:STREAM_BYTES])


def _address(raw: bytes) -> str:
    return socket.inet_ntop(socket.AF_INET6 if len(raw) == 16 else socket.AF_INET, raw)


def read_streams(data: bytes) -> tuple[dict[tuple[str, int, str, int], Stream], set[tuple[str, int]], str | None]:
    """Streams keyed (source, port, destination, port); the endpoints that sent a bare SYN
    (clients); and why the capture ended early, if it did."""
    import dpkt

    reader_class = dpkt.pcapng.Reader if data[:4] == PCAPNG_MAGIC else dpkt.pcap.Reader
    streams: dict[tuple[str, int, str, int], Stream] = {}
    clients: set[tuple[str, int]] = set()
    import io

    stop: str | None = None
    try:
        reader = reader_class(io.BytesIO(data))
        link = reader.datalink()
        for number, (_, frame) in enumerate(reader, 1):
            packet = _ip(frame, link, dpkt)
            if packet is None or not isinstance(packet.data, dpkt.tcp.TCP):
                continue
            tcp = packet.data
            src, dst = _address(packet.src), _address(packet.dst)
            if tcp.flags & dpkt.tcp.TH_SYN and not tcp.flags & dpkt.tcp.TH_ACK:
                clients.add((src, tcp.sport))
            key = (src, tcp.sport, dst, tcp.dport)
            if key not in streams:
                if len(streams) >= MAX_CONNECTIONS:
                    continue
                streams[key] = Stream(number)
            seq = tcp.seq + (1 if tcp.flags & dpkt.tcp.TH_SYN else 0)
            streams[key].add(seq, bytes(tcp.data))
    except (dpkt.NeedData, dpkt.UnpackError, ValueError, struct.error, EOFError) as error:
        stop = f"capture ends early or is damaged ({type(error).__name__})"
    if stop is None and data[:4] in PCAP_MAGICS:
        stop = pcap_truncation(data)
    return streams, clients, stop


def pcap_truncation(data: bytes) -> str | None:
    """Why a classic pcap file is cut short (a record promising more bytes than follow)."""
    order = "<" if data[:4] in (PCAP_MAGICS[0], PCAP_MAGICS[2]) else ">"
    offset, records = 24, 0
    if len(data) < 24:
        return "capture ends inside its file header"
    while offset < len(data):
        if offset + 16 > len(data):
            return f"capture ends inside the header of record {records + 1}"
        included = struct.unpack_from(order + "I", data, offset + 8)[0]
        if offset + 16 + included > len(data):
            return f"capture ends inside record {records + 1} (truncated file)"
        offset += 16 + included
        records += 1
    return None


def _ip(frame: bytes, link: int, dpkt: Any) -> Any:
    try:
        if link == dpkt.pcap.DLT_EN10MB:
            ether = dpkt.ethernet.Ethernet(frame)
            return ether.data if isinstance(ether.data, dpkt.ip.IP | dpkt.ip6.IP6) else None
        if link == dpkt.pcap.DLT_LINUX_SLL:
            sll = dpkt.sll.SLL(frame)
            return sll.data if isinstance(sll.data, dpkt.ip.IP | dpkt.ip6.IP6) else None
        if link in (dpkt.pcap.DLT_RAW, 101, 12):
            return dpkt.ip.IP(frame) if frame[:1] and frame[0] >> 4 == 4 else dpkt.ip6.IP6(frame)
        if link == dpkt.pcap.DLT_NULL or link == 0:
            return dpkt.ip.IP(frame[4:])
    except (dpkt.UnpackError, ValueError, struct.error):
        return None
    return None


def tls_handshakes(stream: bytes) -> list[tuple[int, bytes]]:
    """Handshake messages (type, body) of the plaintext records at the start of a stream."""
    buffer = bytearray()
    position = 0
    while position + 5 <= len(stream):
        content, _, length = stream[position], stream[position + 1 : position + 3], int.from_bytes(
            stream[position + 3 : position + 5], "big"
        )
        if content == 20 or content == 23:  # change_cipher_spec, application data: done
            break
        if content != 22:
            break
        buffer += stream[position + 5 : position + 5 + length]
        position += 5 + length
    messages = []
    index = 0
    while index + 4 <= len(buffer):
        kind, size = buffer[index], int.from_bytes(buffer[index + 1 : index + 4], "big")
        if index + 4 + size > len(buffer):
            break
        messages.append((kind, bytes(buffer[index + 4 : index + 4 + size])))
        index += 4 + size
    return messages


def _extensions(body: bytes, offset: int) -> dict[int, bytes]:
    found: dict[int, bytes] = {}
    if offset + 2 > len(body):
        return found
    end = offset + 2 + int.from_bytes(body[offset : offset + 2], "big")
    offset += 2
    while offset + 4 <= min(end, len(body)):
        kind, size = struct.unpack_from(">HH", body, offset)
        found[kind] = body[offset + 4 : offset + 4 + size]
        offset += 4 + size
    return found


def parse_client_hello(body: bytes) -> dict[str, Any]:
    """Offered suites, groups and key-share groups (code points) of a ClientHello."""
    offset = 2 + 32
    offset += 1 + body[offset]
    count = int.from_bytes(body[offset : offset + 2], "big")
    suites = [int.from_bytes(body[i : i + 2], "big") for i in range(offset + 2, offset + 2 + count, 2)]
    offset += 2 + count
    offset += 1 + body[offset]
    ext = _extensions(body, offset)
    groups = _u16_list(ext.get(10, b""), 2)
    shares, raw = [], ext.get(51, b"")
    position = 2
    while position + 4 <= len(raw):
        group, size = struct.unpack_from(">HH", raw, position)
        shares.append(group)
        position += 4 + size
    versions = list(_u16_list(ext.get(43, b""), 1))
    return {"suites": suites, "groups": groups, "shares": shares, "versions": versions}


def _u16_list(raw: bytes, length_bytes: int) -> list[int]:
    if len(raw) < length_bytes:
        return []
    size = int.from_bytes(raw[:length_bytes], "big")
    return [int.from_bytes(raw[i : i + 2], "big") for i in range(length_bytes, length_bytes + size - 1, 2)]


def parse_server_hello(body: bytes) -> dict[str, Any]:
    """Version, suite and key-share group (code points) of a ServerHello."""
    version = int.from_bytes(body[0:2], "big")
    offset = 2 + 32
    offset += 1 + body[offset]
    suite = int.from_bytes(body[offset : offset + 2], "big")
    ext = _extensions(body, offset + 3)
    if 43 in ext and len(ext[43]) >= 2:
        version = int.from_bytes(ext[43][:2], "big")
    group = int.from_bytes(ext[51][:2], "big") if len(ext.get(51, b"")) >= 2 else None
    return {"version": version, "suite": suite, "group": group}


def parse_certificates(body: bytes) -> list[bytes]:
    """DER certificates of a TLS 1.2 Certificate message."""
    total = int.from_bytes(body[:3], "big")
    certs, offset = [], 3
    while offset + 3 <= min(len(body), 3 + total):
        size = int.from_bytes(body[offset : offset + 3], "big")
        certs.append(body[offset + 3 : offset + 3 + size])
        offset += 3 + size
    return certs


def ssh_kexinit(stream: bytes) -> tuple[str, list[list[str]]] | None:
    """(identification line, the ten name-lists of KEXINIT) at the start of an SSH stream."""
    if not stream.startswith(b"SSH-"):
        return None
    end = stream.find(b"\n")
    if end < 0:
        return None
    banner = stream[:end].decode("ascii", "replace").strip()
    packet = stream[end + 1 :]
    try:
        reader = WireReader(packet)
        length = reader.uint32()
        padding = reader.byte()
        payload = WireReader(reader.take(length - 1 - padding))
        if payload.byte() != 20:
            return None
        payload.take(16)
        return banner, [payload.name_list() for _ in range(10)]
    except WireError:
        return None


def negotiate(client: list[str], server: list[str]) -> str | None:
    """RFC 4253 section 7.1: the first algorithm on the client's list that the server lists."""
    return next((name for name in client if name in server), None)


class TrafficFinder(Finder):
    """Reads pcap and pcapng captures."""

    name = "captured traffic"

    def wants(self, path: str, head: bytes) -> bool:
        return head[:4] in PCAP_MAGICS or head[:4] == PCAPNG_MAGIC

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        if not self.wants(path, data[:4]):
            return NOT_MINE
        try:
            streams, clients, stop = read_streams(data)
        except Exception as error:  # noqa: BLE001 - dpkt raises many kinds on hostile input
            return not_understood(path, f"capture does not parse ({type(error).__name__})")
        findings: list[Finding] = []
        done: set[tuple[str, int, str, int]] = set()
        for key, _ in sorted(streams.items(), key=lambda item: item[1].first_packet):
            if key in done:
                continue
            back = (key[2], key[3], key[0], key[1])
            done.update({key, back})
            client_key, server_key = (key, back) if (key[0], key[1]) in clients or key[3] < key[1] else (back, key)
            if (server_key[0], server_key[1]) in clients:
                client_key, server_key = server_key, client_key
            client = streams.get(client_key)
            server = streams.get(server_key)
            if client is None or server is None:
                continue
            where = f"{server_key[0]}:{server_key[1]}"
            if ":" in server_key[0]:
                where = f"[{server_key[0]}]:{server_key[1]}"
            findings += _tls(path, where, client, server) or _ssh(path, where, client, server)
        if stop and not findings:
            return not_understood(path, stop)
        result = FinderResult(claimed=True, findings=tuple(findings))
        if stop:
            return FinderResult(claimed=True, findings=tuple(findings), not_understood=stop)
        return result


def _use(path: str, where: str, packet: int, tag: str, name: str, purpose: Purpose,
         protocol: str, notes: tuple[str, ...]) -> Finding:  # fmt: skip
    return Finding(
        source=SourceRef(path, detail=f"packet{packet}:{where}:{tag}"),
        kind=FindingKind.TRAFFIC, algorithm=name, purpose=purpose, host=where,
        protocol=protocol, notes=notes,
    )  # fmt: skip


def _tls(path: str, where: str, client: Stream, server: Stream) -> list[Finding]:
    groups, suites, versions = codepoints()
    hello = next((b for k, b in tls_handshakes(client.data()) if k == 1), None)
    messages = tls_handshakes(server.data())
    reply = next((b for k, b in messages if k == 2), None)
    if hello is None or reply is None:
        return []
    try:
        offer, chosen = parse_client_hello(hello), parse_server_hello(reply)
    except (IndexError, struct.error, ValueError):
        return []
    def label(code: int, table: dict[int, str]) -> str:
        return table.get(code, f"0x{code:04x}")
    version = label(chosen["version"], versions)
    offered = (
        "client offered groups: " + ", ".join(label(g, groups) for g in offer["groups"]),
        "client key shares: " + ", ".join(label(g, groups) for g in offer["shares"]),
        f"client offered {len(offer['suites'])} cipher suites",
    )
    found = [_use(path, where, server.first_packet, "suite", label(chosen["suite"], suites),
                  Purpose.ENCRYPTION, version, ("negotiated (ServerHello)", *offered))]  # fmt: skip
    suite_name = label(chosen["suite"], suites)
    kx = str(cipher_table().suites.get(suite_name, {}).get("kx", ""))
    if chosen["group"] is None and kx.startswith("ECDH"):
        # TLS 1.2 ECDHE: the curve is in the ServerKeyExchange (RFC 8422 section 5.4).
        exchange = next((b for k, b in messages if k == 12), b"")
        if len(exchange) >= 3 and exchange[0] == 3:
            chosen["group"] = int.from_bytes(exchange[1:3], "big")
    if chosen["group"] is not None:
        found.append(_use(path, where, server.first_packet, "group", label(chosen["group"], groups),
                          Purpose.KEY_ESTABLISHMENT, version, ("negotiated key share (ServerHello)", *offered)))  # fmt: skip
    for kind, body in messages:
        if kind != 11 or version == "TLS 1.3":
            continue
        for index, der in enumerate(parse_certificates(body), 1):
            try:
                cert = x509.load_der_x509_certificate(der)
                described = describe_certificate(cert, SourceRef(path, detail=f"packet{server.first_packet}:{where}:chain{index}"), version)
            except (ValueError, TypeError, x509.InvalidVersion):
                continue
            found += [_at(f, where) for f in described]
    return _sizes_from_chain(found)


def _sizes_from_chain(found: list[Finding]) -> list[Finding]:
    """The suite takes the group's curve and the leaf certificate's RSA size (same handshake)."""
    import dataclasses

    table = cipher_table()
    leaf = next((f for f in found if f.kind is FindingKind.CERTIFICATE_KEY), None)
    group = next((f for f in found if f.source.detail and f.source.detail.endswith(":group")), None)
    result = []
    for finding in found:
        if finding.source.detail and finding.source.detail.endswith(":suite"):
            facts = table.suites.get(finding.algorithm, {})
            notes = list(finding.notes)
            size, curve = finding.key_size, finding.curve
            if leaf is not None and str(facts.get("au")) == "RSA" and leaf.algorithm == "RSA":
                size = leaf.key_size
                notes.append("RSA size from the certificate of the same handshake")
            if group is not None and str(facts.get("kx", "")).startswith("ECDH"):
                curve = group.algorithm
            finding = dataclasses.replace(finding, key_size=size, curve=curve, notes=tuple(notes))
        result.append(finding)
    return result


def _at(finding: Finding, where: str) -> Finding:
    import dataclasses

    return dataclasses.replace(finding, host=where, notes=finding.notes + ("sent in the clear",))


def _ssh(path: str, where: str, client: Stream, server: Stream) -> list[Finding]:
    mine, theirs = ssh_kexinit(client.data()), ssh_kexinit(server.data())
    if mine is None or theirs is None:
        return []
    (client_banner, c), (server_banner, s) = mine, theirs
    pairs = [(c[0], s[0], "kex", Purpose.KEY_ESTABLISHMENT),
             (c[1], s[1], "host key", Purpose.AUTHENTICATION),
             (c[2], s[2], "cipher c2s", Purpose.ENCRYPTION),
             (c[3], s[3], "cipher s2c", Purpose.ENCRYPTION),
             (c[4], s[4], "mac c2s", Purpose.INTEGRITY),
             (c[5], s[5], "mac s2c", Purpose.INTEGRITY)]  # fmt: skip
    found = []
    aead = set()
    for client_list, server_list, tag, purpose in pairs:
        agreed = negotiate(client_list, server_list)
        if agreed is None:
            continue
        if tag.startswith("cipher") and ("gcm" in agreed or "poly1305" in agreed):
            aead.add(tag[-3:])
        if tag.startswith("mac") and tag[-3:] in aead:
            continue  # an AEAD cipher carries its own integrity: no MAC is used
        variant = None
        if tag == "host key":
            agreed, variant = key_algorithm(agreed)
        notes = (
            "agreed (RFC 4253 section 7.1)",
            f"client {client_banner} offered: " + ",".join(client_list),
            f"server {server_banner} offered: " + ",".join(server_list),
        ) + ((variant,) if variant else ())
        found.append(_use(path, where, server.first_packet, tag.replace(" ", "-"), agreed, purpose,
                          "SSH", notes))  # fmt: skip
    return found
