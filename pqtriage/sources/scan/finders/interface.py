"""What every finder is: a reader of one kind of file, chosen by the file's name and content.

A finder is pure: bytes and a path in, a :class:`FinderResult` out. It never opens a file.
What it needs read next (a certificate a configuration names, the members of an archive) it
returns as :class:`Reference` or :class:`Member` items, and the dispatcher, at the edge,
reads or recurses on them.

``claimed`` says whether the file is of the finder's kind at all; a claimed file that the
finder could not use is *not understood*, with the reason, and never counted as read.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from collections.abc import Callable
from dataclasses import dataclass, field

from pqtriage.model.inventory import SourceRef
from pqtriage.sources.scan.findings import Finding, ProblemKind, ScanProblem


@dataclass(frozen=True)
class Reference:
    """A file that a configuration names and the scan should read too."""

    path: str
    """The path as written in the configuration, made absolute against the file's folder."""
    referrer: SourceRef
    """Directive that names it (file and line)."""
    role: str
    """What it holds according to the directive: certificate, private key, CA bundle ..."""
    finder: str | None = None
    """Finder to read it with (an included configuration fragment); None: choose by content."""


@dataclass(frozen=True)
class Member:
    """One file inside an archive, read into memory within the archive limits."""

    name: str
    """``archive.jar!/path/inside`` (nested: ``outer.zip!/inner.jar!/path``)."""
    data: bytes
    """The member's bytes."""


@dataclass(frozen=True)
class FinderResult:
    """What one finder made of one file."""

    claimed: bool = False
    """True when the file is of this finder's kind (by name or content)."""
    findings: tuple[Finding, ...] = ()
    """Cryptographic uses found."""
    problems: tuple[ScanProblem, ...] = ()
    """Parts that could not be read, each with its reason."""
    not_understood: str | None = None
    """Why a claimed file could not be used at all (None when it was understood)."""
    references: tuple[Reference, ...] = ()
    """Files named inside (certificate paths in configurations)."""
    members: tuple[Member, ...] = ()
    """Files inside (archives)."""

    @property
    def understood(self) -> bool:
        """True when the file was claimed and could be used."""
        return self.claimed and self.not_understood is None


NOT_MINE = FinderResult()
"""The result of a finder for a file that is not of its kind."""


def not_understood(path: str, reason: str, findings: tuple[Finding, ...] = ()) -> FinderResult:
    """A claimed file that could not be used: one problem line, findings kept if any."""
    problem = ScanProblem(path, ProblemKind.NOT_UNDERSTOOD, reason)
    return FinderResult(
        claimed=True, findings=findings, problems=(problem,), not_understood=reason
    )


@dataclass(frozen=True)
class FinderContext:
    """What a finder may be given besides the file: passwords and optional helpers."""

    passwords: tuple[bytes, ...] = ()
    """Passwords to try on encrypted keystores and bundles (never shown anywhere)."""
    expand_cipher_string: Callable[[str], list[str] | None] | None = None
    """Expands an OpenSSL cipher string with the system's OpenSSL (None: use our own table)."""
    openssh_version: str | None = None
    """OpenSSH version whose defaults apply when a configuration does not state one."""
    limits: ArchiveLimits = field(default_factory=lambda: ArchiveLimits())
    """Bounds on archives (depth, total size, member count)."""
    depth: int = 0
    """Archive nesting depth of the file being read (0 for a file on disk)."""
    budget: ArchiveBudget | None = None
    """What the archive on disk being read may still unpack (shared by nested archives)."""

    @property
    def password(self) -> bytes | None:
        """The first password, for readers that take only one."""
        return self.passwords[0] if self.passwords else None


@dataclass(frozen=True)
class ArchiveLimits:
    """Bounds that keep a hostile archive (a zip bomb, a deep nest) from exhausting the scan."""

    max_depth: int = 4
    """Archives inside archives, at most this deep (the outer archive is depth 1)."""
    max_total_bytes: int = 256 * 1024 * 1024
    """Uncompressed bytes read from one archive on disk, members and nested members together."""
    max_members: int = 20_000
    """Members read from one archive on disk, nested members included."""
    max_member_bytes: int = 16 * 1024 * 1024
    """Largest single member read (larger ones are skipped with a note)."""
    max_ratio: int = 200
    """Largest uncompressed-to-compressed ratio accepted for a member over 1 MiB."""


@dataclass
class ArchiveBudget:
    """What one archive on disk may still unpack; nested archives draw on the same budget."""

    total_bytes: int
    """Uncompressed bytes left."""
    members: int
    """Members left."""


class Finder(ABC):
    """A reader of one kind of file."""

    name: str = ""
    """Short name shown in the summary (``nginx``, ``keystore``, ``archive`` ...)."""

    @abstractmethod
    def wants(self, path: str, head: bytes) -> bool:
        """Cheap test on the file name and its first bytes: worth calling :meth:`read`?"""

    @abstractmethod
    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        """Read the file's bytes; :data:`NOT_MINE` when it turns out not to be of this kind."""
