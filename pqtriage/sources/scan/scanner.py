"""Scan orchestration: walk, read, recognise each file's format, collect findings and problems.

Recognition order (first match wins): PKCS#12 structure, PEM BEGIN line, one DER SEQUENCE,
JSON Web Key (Set), OpenSSH key lines. Files in none of these formats are counted and left
alone, unless their name announces key material (``.key``, ``.pem``, ``.p12`` ...), in which
case they are reported as corrupt.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass

from pqtriage.sources.scan.der import MATERIAL_SUFFIXES, parse_der
from pqtriage.sources.scan.findings import (
    Finding,
    ParseOutcome,
    ProblemKind,
    ScanProblem,
)
from pqtriage.sources.scan.issuers import link_issuers
from pqtriage.sources.scan.jwks import looks_like_jwk, parse_jwks
from pqtriage.sources.scan.openssh import parse_openssh_text
from pqtriage.sources.scan.pem import has_pem, parse_pem
from pqtriage.sources.scan.pkcs12 import looks_like_pkcs12, parse_pkcs12
from pqtriage.sources.scan.walker import DEFAULT_MAX_FILE_BYTES, FileEntry, read_file, walk

_SSH_HINTS = (b"ssh-", b"ecdsa-sha2-", b"sk-")


@dataclass(frozen=True)
class ScanResult:
    """Everything a scan found and everything it could not read."""

    findings: tuple[Finding, ...]
    """Cryptographic uses, in walk order."""
    problems: tuple[ScanProblem, ...]
    """Unread or skipped inputs, in walk order."""
    files_read: int
    """Regular files read."""
    files_with_material: int
    """Files in which at least one format was recognised."""

    @property
    def complete(self) -> bool:
        """True when everything could be read (skips are notes, not failures)."""
        return not any(problem.is_failure for problem in self.problems)


def classify(data: bytes, path: str, password: bytes | None = None) -> ParseOutcome:
    """Recognise one file's format and describe what it holds. Pure: bytes in, data out."""
    if looks_like_pkcs12(data):
        return parse_pkcs12(data, path, password)
    if has_pem(data):
        return parse_pem(data, path, password)
    if data[:1] == b"\x30":
        outcome = parse_der(data, path, password)
        if outcome.recognised:
            return outcome
    if looks_like_jwk(data):
        outcome = parse_jwks(data, path)
        if outcome.recognised:
            return outcome
    if any(hint in data for hint in _SSH_HINTS):
        outcome = parse_openssh_text(data.decode("utf-8", "replace"), path)
        if outcome.recognised:
            return outcome
    if data and path.lower().endswith(MATERIAL_SUFFIXES):
        problem = ScanProblem(path, ProblemKind.CORRUPT, "no recognised key or certificate")
        return ParseOutcome(problems=(problem,), recognised=True)
    return ParseOutcome()


def plan(
    paths: list[str], max_file_bytes: int = DEFAULT_MAX_FILE_BYTES
) -> tuple[list[FileEntry], list[ScanProblem]]:
    """Walk the paths first, so a progress bar knows the total."""
    entries: list[FileEntry] = []
    problems: list[ScanProblem] = []
    for item in walk(paths, max_file_bytes):
        (entries if isinstance(item, FileEntry) else problems).append(item)  # type: ignore[arg-type]
    return entries, problems


def scan_entries(
    entries: Iterable[FileEntry],
    walk_problems: Iterable[ScanProblem] = (),
    password: bytes | None = None,
    max_file_bytes: int = DEFAULT_MAX_FILE_BYTES,
    advance: Callable[[str], None] | None = None,
) -> ScanResult:
    """Read and classify each file; one file's failure never stops the scan."""
    findings: list[Finding] = []
    problems: list[ScanProblem] = list(walk_problems)
    read = with_material = 0
    for entry in entries:
        data = read_file(entry, max_file_bytes)
        if isinstance(data, ScanProblem):
            problems.append(data)
        else:
            read += 1
            outcome = classify(data, entry.path, password)
            findings.extend(outcome.findings)
            problems.extend(outcome.problems)
            with_material += outcome.recognised
        if advance is not None:
            advance(entry.path)
    return ScanResult(tuple(link_issuers(findings)), tuple(problems), read, with_material)


def scan_paths(
    paths: list[str], password: bytes | None = None, max_file_bytes: int = DEFAULT_MAX_FILE_BYTES
) -> ScanResult:
    """Walk and scan in one call (no progress reporting)."""
    entries, problems = plan(paths, max_file_bytes)
    return scan_entries(entries, problems, password, max_file_bytes)
