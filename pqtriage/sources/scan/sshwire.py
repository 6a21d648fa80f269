"""SSH wire encoding (RFC 4251, section 5) and public key blobs (RFC 4253 section 6.6,
RFC 5656 section 3.1, RFC 8709 section 4, OpenSSH PROTOCOL.certkeys and PROTOCOL.u2f).

Pure functions over bytes; every length is checked against what is left.
"""

from __future__ import annotations

from dataclasses import dataclass


class WireError(ValueError):
    """The bytes do not follow the SSH wire encoding."""


class WireReader:
    """Reads RFC 4251 section 5 data types from a bytes buffer, bounds-checked."""

    def __init__(self, data: bytes) -> None:
        self.data = data
        self.offset = 0

    def take(self, count: int) -> bytes:
        """Return the next ``count`` bytes."""
        if count < 0 or self.offset + count > len(self.data):
            raise WireError("length runs past the end of the data")
        chunk = self.data[self.offset : self.offset + count]
        self.offset += count
        return chunk

    def uint32(self) -> int:
        """RFC 4251: uint32, big-endian."""
        return int.from_bytes(self.take(4), "big")

    def uint64(self) -> int:
        """RFC 4251: uint64, big-endian."""
        return int.from_bytes(self.take(8), "big")

    def byte(self) -> int:
        """RFC 4251: byte."""
        return self.take(1)[0]

    def string(self) -> bytes:
        """RFC 4251: string, a uint32 length then that many bytes."""
        return self.take(self.uint32())

    def mpint(self) -> int:
        """RFC 4251: mpint, two's complement big-endian in a string."""
        return int.from_bytes(self.string(), "big", signed=True)

    def name_list(self) -> list[str]:
        """RFC 4251: name-list, comma-separated US-ASCII names in a string."""
        raw = self.string()
        try:
            text = raw.decode("ascii")
        except UnicodeDecodeError as error:
            raise WireError("name-list is not US-ASCII") from error
        return [name for name in text.split(",") if name]

    @property
    def remaining(self) -> int:
        """Bytes not read yet."""
        return len(self.data) - self.offset


_CURVES = {"nistp256": "P-256", "nistp384": "P-384", "nistp521": "P-521"}
_CURVE_BITS = {"P-256": 256, "P-384": 384, "P-521": 521}
_CERT_SUFFIX = "-cert-v01@openssh.com"


@dataclass(frozen=True)
class SshKeyFacts:
    """Algorithm facts of an SSH public key blob (never the key itself)."""

    key_type: str
    """Key type name as written in the blob (ssh-ed25519, ecdsa-sha2-nistp256 ...)."""
    algorithm: str
    """Catalog spelling: RSA, DSA, ECDSA, Ed25519, Ed448, or the type name when unknown."""
    key_size: int | None = None
    """Modulus or prime size in bits (RSA, DSA), curve size for ECDSA."""
    curve: str | None = None
    """Curve for ECDSA keys."""
    certificate: bool = False
    """True for an OpenSSH certificate."""
    security_key: bool = False
    """True for a FIDO security key type (sk-...)."""
    key_id: str | None = None
    """Certificate key id."""
    principals: tuple[str, ...] = ()
    """Certificate principals."""
    valid_after: int | None = None
    """Certificate validity start, seconds since the epoch."""
    valid_before: int | None = None
    """Certificate validity end, seconds since the epoch."""
    certificate_type: str | None = None
    """user or host, for a certificate."""
    signer: SshKeyFacts | None = None
    """Facts of the CA key that signed a certificate."""


def _key_fields(reader: WireReader, base: str) -> tuple[str, int | None, str | None]:
    """Read the public key fields of a base type; return (algorithm, size, curve)."""
    if base == "ssh-rsa":
        reader.mpint()  # public exponent
        return "RSA", reader.mpint().bit_length(), None
    if base == "ssh-dss":
        prime = reader.mpint()
        for _ in range(3):
            reader.mpint()
        return "DSA", prime.bit_length(), None
    if base.startswith(("ecdsa-sha2-", "sk-ecdsa-sha2-")):
        curve_id = reader.string().decode("ascii", "replace")
        reader.string()  # the point
        curve = _CURVES.get(curve_id, curve_id)
        # Only known curves have a size: a blob may name any curve, even "P-x" (found by fuzzing).
        size = _CURVE_BITS.get(curve)
        if base.startswith("sk-"):
            reader.string()  # application
        return "ECDSA", size, curve
    if base in {"ssh-ed25519", "sk-ssh-ed25519@openssh.com"}:
        reader.string()
        if base.startswith("sk-"):
            reader.string()
        return "Ed25519", None, None
    if base == "ssh-ed448":
        reader.string()
        return "Ed448", None, None
    raise WireError(f"unknown key type {base!r}")


def _base_type(key_type: str) -> str:
    if key_type.endswith(_CERT_SUFFIX):
        base = key_type[: -len(_CERT_SUFFIX)]
        # sk- certificate names drop the @openssh.com of their key type.
        return f"{base}@openssh.com" if base.startswith("sk-") else base
    return key_type


def parse_key_blob(blob: bytes, depth: int = 0) -> SshKeyFacts:
    """Describe an SSH public key or OpenSSH certificate blob. Raises WireError."""
    reader = WireReader(blob)
    key_type = reader.string().decode("ascii", "replace")
    base = _base_type(key_type)
    certificate = key_type.endswith(_CERT_SUFFIX)
    if certificate:
        reader.string()  # nonce
    algorithm, size, curve = _key_fields(reader, base)
    facts = SshKeyFacts(
        key_type=key_type,
        algorithm=algorithm,
        key_size=size,
        curve=curve,
        security_key=base.startswith("sk-"),
    )
    if not certificate:
        return facts
    reader.uint64()  # serial
    kind = {1: "user", 2: "host"}.get(reader.uint32(), "unknown")
    key_id = reader.string().decode("utf-8", "replace")
    principals_reader = WireReader(reader.string())
    principals = []
    while principals_reader.remaining:
        principals.append(principals_reader.string().decode("utf-8", "replace"))
    valid_after, valid_before = reader.uint64(), reader.uint64()
    reader.string()  # critical options
    reader.string()  # extensions
    reader.string()  # reserved
    signature_key = reader.string()
    signer = parse_key_blob(signature_key, depth + 1) if depth == 0 else None
    return SshKeyFacts(
        key_type=key_type,
        algorithm=algorithm,
        key_size=size,
        curve=curve,
        certificate=True,
        security_key=facts.security_key,
        key_id=key_id,
        principals=tuple(principals),
        valid_after=valid_after,
        valid_before=valid_before,
        certificate_type=kind,
        signer=signer,
    )


def looks_like_key_type(token: str) -> bool:
    """True for a token shaped like an SSH public key type name."""
    return token.startswith(("ssh-", "ecdsa-sha2-", "sk-")) or token.endswith(_CERT_SUFFIX)


_OPENSSH_MAGIC = b"openssh-key-v1\x00"


@dataclass(frozen=True)
class OpensshPrivateKeyFacts:
    """What the unencrypted header of an OpenSSH private key file tells (PROTOCOL.key)."""

    cipher: str
    """Cipher protecting the private part; ``none`` when unencrypted."""
    keys: tuple[SshKeyFacts, ...]
    """Facts of each key's public half."""


def parse_openssh_private_key(blob: bytes) -> OpensshPrivateKeyFacts:
    """Read the header of an ``openssh-key-v1`` blob: cipher and public halves only."""
    if not blob.startswith(_OPENSSH_MAGIC):
        raise WireError("not an openssh-key-v1 structure")
    reader = WireReader(blob[len(_OPENSSH_MAGIC) :])
    cipher = reader.string().decode("ascii", "replace")
    reader.string()  # kdf name
    reader.string()  # kdf options
    count = reader.uint32()
    if count > 64:
        raise WireError("implausible number of keys")
    keys = tuple(parse_key_blob(reader.string()) for _ in range(count))
    return OpensshPrivateKeyFacts(cipher=cipher, keys=keys)
