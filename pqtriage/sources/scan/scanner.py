"""Scan orchestration: walk, read, recognise each file's format, collect findings and problems.

Recognition order (first match wins): PKCS#12 structure, PEM BEGIN line, one DER SEQUENCE,
JSON Web Key (Set), OpenSSH key lines. Files in none of these formats are counted and left
alone, unless their name announces key material (``.key``, ``.pem``, ``.p12`` ...), in which
case they are reported as corrupt.
"""

from __future__ import annotations

import dataclasses
import os
import warnings
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass

from pqtriage.sources.scan.finders import default_finders
from pqtriage.sources.scan.finders.dispatch import Dispatcher, ScanSummary
from pqtriage.sources.scan.finders.interface import Finder, FinderContext
from pqtriage.sources.scan.finders.openssl_cli import system_expander
from pqtriage.sources.scan.findings import (
    Finding,
    ParseOutcome,
    ProblemKind,
    ScanProblem,
)
from pqtriage.sources.scan.issuers import link_issuers
from pqtriage.sources.scan.recognise import material_name_fallback, recognise
from pqtriage.sources.scan.walker import DEFAULT_MAX_FILE_BYTES, FileEntry, read_file, walk


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
    summary: ScanSummary | None = None
    """What each finder saw, understood and could not understand."""

    @property
    def complete(self) -> bool:
        """True when everything could be read (skips are notes, not failures)."""
        return not any(problem.is_failure for problem in self.problems)


def classify(data: bytes, path: str, password: bytes | None = None) -> ParseOutcome:
    """Recognise one file's format and describe what it holds. Pure: bytes in, data out."""
    outcome = recognise(data, path, password)
    if outcome.recognised:
        return outcome
    return material_name_fallback(data, path)


def warned(found: list[Finding], trouble: list[ScanProblem], path: str,
           caught: list[warnings.WarningMessage]) -> tuple[list[Finding], list[ScanProblem]]:
    """Warnings a library raised while one file was read (the cryptography library on a serial
    number that is not positive, RFC 5280 section 4.1.2.2), recorded instead of printed: a note
    on each of the file's findings and one summary line each."""
    if not caught:
        return found, trouble
    messages = list(dict.fromkeys(" ".join(str(w.message).split()) for w in caught))
    notes = tuple(f"library warning: {message}" for message in messages)
    return ([dataclasses.replace(f, notes=f.notes + notes) for f in found],
            [*trouble, *(ScanProblem(path, ProblemKind.WARNING, m) for m in messages)])


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
    context: FinderContext | None = None,
    finders: Sequence[Finder] | None = None,
) -> ScanResult:
    """Read each file and hand it to the finders; one file's failure never stops the scan."""
    entries = list(entries)
    if context is None:
        context = FinderContext(
            passwords=(password,) if password is not None else (),
            expand_cipher_string=system_expander(),
        )
    dispatcher = Dispatcher(
        finders if finders is not None else default_finders(),
        context,
        read_reference=lambda path: read_named_file(path, max_file_bytes),
        fallback=material_name_fallback,
    )
    dispatcher.mark_seen([entry.path for entry in entries])
    findings: list[Finding] = []
    problems: list[ScanProblem] = list(walk_problems)
    read = 0
    for entry in entries:
        data = read_file(entry, max_file_bytes)
        if isinstance(data, ScanProblem):
            problems.append(data)
        else:
            read += 1
            with warnings.catch_warnings(record=True) as caught:
                warnings.simplefilter("always")
                found, trouble = dispatcher.run_file(data, entry.path)
            found, trouble = warned(list(found), list(trouble), entry.path, caught)
            findings.extend(found)
            problems.extend(trouble)
        if advance is not None:
            advance(entry.path)
    summary = dispatcher.summary
    understood = summary.understood
    findings = dispatcher.link_facts(link_issuers(findings))
    return ScanResult(tuple(findings), tuple(problems), read, understood, summary)


def read_named_file(path: str, max_file_bytes: int = DEFAULT_MAX_FILE_BYTES) -> bytes | ScanProblem:
    """Read a file a configuration names (the walk's rules: regular files within the limit)."""
    if os.path.isdir(path):
        return ScanProblem(path, ProblemKind.SKIPPED, "a folder, not a file")
    for item in walk([path], max_file_bytes):
        if isinstance(item, ScanProblem):
            return item
        return read_file(item, max_file_bytes)
    return ScanProblem(path, ProblemKind.UNREADABLE, "no such file")


def scan_paths(
    paths: list[str], password: bytes | None = None, max_file_bytes: int = DEFAULT_MAX_FILE_BYTES
) -> ScanResult:
    """Walk and scan in one call (no progress reporting)."""
    entries, problems = plan(paths, max_file_bytes)
    return scan_entries(entries, problems, password, max_file_bytes)
