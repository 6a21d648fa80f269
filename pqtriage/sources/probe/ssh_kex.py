"""The probe's own SSH key exchange, as far as the server's reply, to read the host key.

The server's reply to a key exchange carries its public host key K_S and a signature made
with it (RFC 4253, section 8: SSH_MSG_KEXDH_REPLY; RFC 5656, section 4:
SSH_MSG_KEX_ECDH_REPLY; RFC 8731, section 3 for Curve25519; RFC 4419, section 3:
SSH_MSG_KEX_DH_GEX_REPLY). The probe runs the exchange only that far: it never sends
NEWKEYS, never authenticates and never verifies or keeps the key, it reads the key's type and
size (and, for a group exchange, the size of the group the server chose).

Packets before the first NEWKEYS are unencrypted and have no MAC: uint32 packet_length,
byte padding_length, payload, random padding of at least 4 bytes, the whole a multiple of
8 bytes (RFC 4253, section 6). Encodings of string, mpint and name-list: RFC 4251, section 5.
"""

from __future__ import annotations

import os
import secrets
from collections.abc import Callable, Sequence
from dataclasses import dataclass

from cryptography.hazmat.primitives import serialization
from cryptography.hazmat.primitives.asymmetric import ec, x25519

from pqtriage.sources.scan.sshwire import SshKeyFacts, WireError, WireReader, parse_key_blob

SSH_MSG_DISCONNECT = 1
SSH_MSG_IGNORE = 2
SSH_MSG_DEBUG = 4
SSH_MSG_KEXINIT = 20
SSH_MSG_KEX_INIT = 30  # KEXDH_INIT (RFC 4253) and KEX_ECDH_INIT (RFC 5656)
SSH_MSG_KEX_REPLY = 31  # KEXDH_REPLY, KEX_ECDH_REPLY; KEX_DH_GEX_GROUP in a group exchange
SSH_MSG_KEX_DH_GEX_INIT = 32  # RFC 4419, section 5
SSH_MSG_KEX_DH_GEX_REPLY = 33
SSH_MSG_KEX_DH_GEX_REQUEST = 34
MAX_GROUP_BITS = 16384  # refuse absurd groups before exponentiating

_ECDH = {
    "curve25519-sha256": None,  # RFC 8731
    "curve25519-sha256@libssh.org": None,
    "ecdh-sha2-nistp256": ec.SECP256R1,  # RFC 5656, section 10.1
    "ecdh-sha2-nistp384": ec.SECP384R1,
    "ecdh-sha2-nistp521": ec.SECP521R1,
}
GROUP_EXCHANGE = ("diffie-hellman-group-exchange-sha256", "diffie-hellman-group-exchange-sha1")
"""Group exchange methods (RFC 4419): the server picks the group's size at connection time."""
IMPLEMENTED = (*_ECDH, *GROUP_EXCHANGE)
"""Key exchange methods the probe can run itself."""


class KexFailure(Exception):
    """The exchange stopped before the reply; the message is one line for the notes."""


@dataclass(frozen=True)
class HostKeyReply:
    """What the server's reply told."""

    key: SshKeyFacts
    """Type and size of the host key (K_S)."""
    signature_algorithm: str
    """The algorithm the server signed the exchange with (rsa-sha2-512 ...)."""
    method: str
    """The key exchange the probe ran."""
    group_bits: int | None = None
    """Size of the prime the server chose, for a group exchange."""


def string(data: bytes) -> bytes:
    """RFC 4251: string."""
    return len(data).to_bytes(4, "big") + data


def mpint(value: int) -> bytes:
    """RFC 4251: mpint of a non-negative integer (a leading zero byte when the top bit is set)."""
    if value == 0:
        return string(b"")
    return string(value.to_bytes(value.bit_length() // 8 + 1, "big"))


def name_list(names: Sequence[str]) -> bytes:
    """RFC 4251: name-list."""
    return string(",".join(names).encode("ascii"))


def packet(payload: bytes) -> bytes:
    """A binary packet before encryption (RFC 4253, section 6), block size 8."""
    padding = 8 - (len(payload) + 5) % 8
    if padding < 4:
        padding += 8
    return (len(payload) + padding + 1).to_bytes(4, "big") + bytes([padding]) + payload + os.urandom(padding)


def kexinit(lists: Sequence[Sequence[str]]) -> bytes:
    """A client KEXINIT payload with these ten name-lists (RFC 4253, section 7.1)."""
    body = b"".join(name_list(names) for names in lists)
    return bytes([SSH_MSG_KEXINIT]) + os.urandom(16) + body + b"\x00" + bytes(4)


Send = Callable[[bytes], None]
Receive = Callable[[], bytes]


def _next(receive: Receive) -> bytes:
    """The next payload that is not IGNORE or DEBUG; DISCONNECT ends the exchange."""
    while True:
        payload = receive()
        if not payload:
            raise KexFailure("empty packet from the server")
        if payload[0] in (SSH_MSG_IGNORE, SSH_MSG_DEBUG):
            continue
        if payload[0] == SSH_MSG_DISCONNECT:
            reader = WireReader(payload[1:])
            try:
                reader.uint32()
                text = reader.string().decode("utf-8", "replace")
            except WireError:
                text = ""
            shown = "".join(c if c.isprintable() else "?" for c in text)[:100]
            raise KexFailure(f"the server ended the key exchange ({shown or 'no reason given'})")
        return payload


def _reply(payload: bytes, expected: int, method: str, group_bits: int | None) -> HostKeyReply:
    if payload[0] != expected:
        raise KexFailure(f"the server sent message {payload[0]} instead of the key exchange reply")
    reader = WireReader(payload[1:])
    try:
        host_key = reader.string()
        if expected == SSH_MSG_KEX_DH_GEX_REPLY:
            reader.mpint()  # f
        else:
            reader.string()  # Q_S, or f encoded as a string-compatible mpint
        signature = WireReader(reader.string())
        algorithm = signature.string().decode("ascii", "replace")
        return HostKeyReply(parse_key_blob(host_key), algorithm, method, group_bits)
    except WireError as error:
        raise KexFailure(f"the key exchange reply does not parse ({error})") from None


def run_exchange(
    method: str,
    send: Send,
    receive: Receive,
    group_request: tuple[int, int, int] = (2048, 8192, 8192),
) -> HostKeyReply:
    """Run ``method`` from the client side up to the server's reply (KEXINITs already sent).

    Raises KexFailure with one line when the server does not get that far.
    """
    if method in _ECDH:
        curve = _ECDH[method]
        if curve is None:
            public = x25519.X25519PrivateKey.generate().public_key().public_bytes(
                serialization.Encoding.Raw, serialization.PublicFormat.Raw
            )
        else:
            public = ec.generate_private_key(curve()).public_key().public_bytes(
                serialization.Encoding.X962, serialization.PublicFormat.UncompressedPoint
            )
        send(bytes([SSH_MSG_KEX_INIT]) + string(public))
        return _reply(_next(receive), SSH_MSG_KEX_REPLY, method, None)
    if method in GROUP_EXCHANGE:
        send(bytes([SSH_MSG_KEX_DH_GEX_REQUEST]) + b"".join(n.to_bytes(4, "big") for n in group_request))
        group = _next(receive)
        if group[0] != SSH_MSG_KEX_REPLY:
            raise KexFailure(f"the server sent message {group[0]} instead of a group")
        try:
            reader = WireReader(group[1:])
            prime, generator = reader.mpint(), reader.mpint()
        except WireError as error:
            raise KexFailure(f"the group does not parse ({error})") from None
        bits = prime.bit_length()
        if not 2 <= bits <= MAX_GROUP_BITS or not 1 < generator < prime - 1:
            raise KexFailure(f"implausible group from the server ({bits} bits)")
        # A fresh 512-bit exponent (the probe never derives keys: any valid e will do).
        exponent = secrets.randbits(512) | (1 << 511)
        send(bytes([SSH_MSG_KEX_DH_GEX_INIT]) + mpint(pow(generator, exponent, prime)))
        return _reply(_next(receive), SSH_MSG_KEX_DH_GEX_REPLY, method, bits)
    raise KexFailure(f"the probe does not run {method}")
