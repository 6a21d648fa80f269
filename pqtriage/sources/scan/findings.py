"""What discovery found: one Finding per cryptographic use, one ScanProblem per unread input.

Pure data. A Finding never holds key material: for a private key only its type and size.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from enum import Enum
from typing import TYPE_CHECKING

from pqtriage.model.inventory import IN_USE, Purpose, SourceRef

if TYPE_CHECKING:
    from cryptography import x509


class FindingKind(str, Enum):
    """What kind of object a finding describes."""

    CERTIFICATE_KEY = "certificate-key"
    CERTIFICATE_SIGNATURE = "certificate-signature"
    CERTIFICATE_SIGNATURE_HASH = "certificate-signature-hash"
    """The hash inside a certificate's signature (SHA-1 in sha1WithRSAEncryption ...)."""
    CSR_KEY = "csr-key"
    PUBLIC_KEY = "public-key"
    PRIVATE_KEY = "private-key"
    PKCS12_ENCRYPTED = "pkcs12-encrypted"
    SSH_KEY = "ssh-key"
    SSH_CERTIFICATE = "ssh-certificate"
    JWK = "jwk"
    TLS_GROUP = "tls-group"
    TLS_CIPHER = "tls-cipher"
    SSH_KEX = "ssh-kex"
    SSH_HOST_KEY = "ssh-host-key"
    SSH_CIPHER = "ssh-cipher"
    SSH_MAC = "ssh-mac"
    CONFIG_SETTING = "config-setting"
    """An algorithm a configuration file enables (nginx, sshd_config, swanctl.conf ...)."""
    KEYSTORE_ENCRYPTED = "keystore-encrypted"
    """A keystore present but unread: no password, or the password did not open it."""
    SOURCE_CALL = "source-call"
    """A call in source code that chooses an algorithm."""
    TRAFFIC = "traffic"
    """An algorithm offered or chosen in a captured TLS or SSH handshake."""
    DAMAGED = "damaged"
    """Material recognised as cryptographic but corrupt or truncated: kept as an unknown use."""


class ProblemKind(str, Enum):
    """Why an input was not (fully) read."""

    UNREADABLE = "unreadable"
    """The operating system refused the read (permissions, I/O error)."""
    CORRUPT = "corrupt"
    """The bytes look like cryptographic material but do not parse."""
    TRUNCATED = "truncated"
    """The material ends before its own length or END line says it should."""
    SKIPPED = "skipped"
    """Deliberately not read: symlink loop, special file, oversized file."""
    UNREACHABLE = "unreachable"
    """A probe target that could not be reached or did not speak the protocol."""
    WARNING = "warning"
    """Read, but a library warned about it (a certificate serial number that is not positive):
    the item is kept, the warning is noted beside it."""
    NOT_UNDERSTOOD = "not understood"
    """A file of a kind a finder reads (by name or content) whose content it could not use."""


#: Problems that mean something could not be read (exit code 1); skips are notes only.
FAILURE_KINDS = frozenset(
    {
        ProblemKind.UNREADABLE,
        ProblemKind.CORRUPT,
        ProblemKind.TRUNCATED,
        ProblemKind.UNREACHABLE,
        ProblemKind.NOT_UNDERSTOOD,
    }
)


@dataclass(frozen=True)
class Finding:
    """One cryptographic use found in a file or at an endpoint."""

    source: SourceRef
    """Where it was found: file plus block or line, or the probe target."""
    kind: FindingKind
    """What kind of object it is."""
    algorithm: str
    """Algorithm in catalog spelling (RSA, ECDSA, Ed25519, ML-DSA-65, X25519MLKEM768 ...)."""
    purpose: Purpose
    """What the algorithm protects here (rule documented in docs/discovery.md)."""
    key_size: int | None = None
    """Key or modulus size in bits, when the algorithm name does not fix it."""
    curve: str | None = None
    """Elliptic curve (P-256, P-384, P-521 ...), when it applies."""
    parameter_set: str | None = None
    """Parameter set (65 for ML-DSA-65 ...), when it applies."""
    subject: str | None = None
    """Certificate subject (RFC 4514 string), when the finding comes from a certificate."""
    subject_name: str | None = None
    """Short name for grouping: the subject's common name or first DNS name."""
    issuer: str | None = None
    """Certificate issuer (RFC 4514 string)."""
    not_before: str | None = None
    """Start of validity, ISO 8601 date."""
    not_after: str | None = None
    """End of validity, ISO 8601 date."""
    ca: bool | None = None
    """True for a CA certificate (basicConstraints cA), None when not a certificate."""
    key_usage: tuple[str, ...] = ()
    """Key usage and extended key usage names."""
    host: str | None = None
    """Host the use belongs to: known_hosts name, probe target, certificate DNS name."""
    protocol: str | None = None
    """Protocol carrying the use (TLS 1.3, SSH ...)."""
    notes: tuple[str, ...] = ()
    """Short facts worth keeping beside the use (hash, encryption, markers ...)."""
    role: str = IN_USE
    """``in-use``, or ``offered`` for a method a server offers that a current client does not
    negotiate (probes)."""
    subject_key_id: str | None = None
    """Subject key identifier of a certificate (hex), used to find what it signed."""
    authority_key_id: str | None = None
    """Authority key identifier of a certificate (hex), used to find its issuer."""
    certificate: x509.Certificate | None = field(default=None, compare=False, repr=False)
    """The parsed certificate, kept only to confirm issuers by their signature (public data,
    never written to any output)."""

    def locator(self) -> str:
        """Return the source as one string: ``path#block2``, ``path#line3``, ``host:port#group``."""
        return locator(self.source)


def locator(source: SourceRef) -> str:
    """Return ``file#detail`` (or just ``file``) for a source reference."""
    return f"{source.file}#{source.detail}" if source.detail else source.file


@dataclass(frozen=True)
class ScanProblem:
    """An input that could not be read, or was skipped with a note."""

    place: str
    """File path (with block or line) or probe target."""
    kind: ProblemKind
    """Why it was not read."""
    reason: str
    """One line for the user; never contains key material."""

    def line(self) -> str:
        """One line for the summary: ``place: kind: reason``."""
        text = f"{self.place}: {self.kind.value}: {self.reason}"
        return " ".join(text.split())

    @property
    def is_failure(self) -> bool:
        """True when this problem means something could not be read (exit code 1)."""
        return self.kind in FAILURE_KINDS


@dataclass(frozen=True)
class ParseOutcome:
    """What one parser made of one file."""

    findings: tuple[Finding, ...] = ()
    """Cryptographic uses found."""
    problems: tuple[ScanProblem, ...] = ()
    """Blocks or lines that could not be read."""
    recognised: bool = False
    """True when the parser recognised the file's format, even if it found nothing in it."""
