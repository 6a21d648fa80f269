"""``pqtriage scan`` as a plain function: paths in, an inventory (text) and a summary out.

It returns a :class:`~pqtriage.sources.scan.result.CommandResult`: the inventory text,
summary lines for stderr and the exit code (0 all read, 1 something could not be read).
Bad usage raises a :class:`~pqtriage.errors.PqtriageError` subclass (exit code 2). It
writes nothing; progress is reported through a plain callback the caller supplies.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import os
from collections.abc import Callable
from contextlib import AbstractContextManager, nullcontext

from pqtriage.errors import UsageError
from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.emit import (
    DEFAULT_MIGRATION_YEARS,
    DEFAULT_ORGANIZATION,
    DEFAULT_SHELF_LIFE_YEARS,
)
from pqtriage.sources.scan.finders.interface import ArchiveLimits, FinderContext
from pqtriage.sources.scan.finders.openssh_config import defaults_for, known_versions
from pqtriage.sources.scan.finders.openssl_cli import system_expander
from pqtriage.sources.scan.findings import Finding, FindingKind, ProblemKind, ScanProblem
from pqtriage.sources.scan.grouping import GroupBy
from pqtriage.sources.scan.merge import path_scope
from pqtriage.sources.scan.result import CommandResult, check_format, check_years, finish_inventory
from pqtriage.sources.scan.scanner import plan, scan_entries
from pqtriage.sources.scan.walker import DEFAULT_MAX_FILE_BYTES

Progress = Callable[[int], AbstractContextManager[Callable[[str], None] | None]]
"""Given the number of files to read, a context giving a callback called once per file read
(or None for no progress report)."""


def _read_password(password_file: str | None) -> bytes | None:
    if password_file is None:
        return None
    try:
        with open(password_file, "rb") as stream:
            data = stream.read(4096)
    except OSError as error:
        raise UsageError(
            f"password file {password_file} cannot be read ({error.strerror})",
            hint="give a readable file holding the password on its first line",
        ) from error
    # The password never appears in any output; only its absence is reported.
    password = data.splitlines()[0] if data.splitlines() else b""
    return password


def scan_inventory(
    paths: list[str],
    output_format: str = "yaml",
    group_by: str = "folder",
    merge: str | None = None,
    password_file: str | None = None,
    organization: str = DEFAULT_ORGANIZATION,
    shelf_life_years: float = DEFAULT_SHELF_LIFE_YEARS,
    migration_years: float = DEFAULT_MIGRATION_YEARS,
    max_file_bytes: int = DEFAULT_MAX_FILE_BYTES,
    progress: Progress | None = None,
    as_of: dt.date | None = None,
    keystore_passwords: tuple[bytes, ...] = (),
    keystore_password_file: str | None = None,
    openssh_version: str | None = None,
    archive_limits: ArchiveLimits | None = None,
) -> CommandResult:
    """Scan files and folders for keys and certificates and return an inventory.

    Args:
        paths: files and folders to walk (each must exist: bad usage otherwise).
        output_format: ``yaml`` or ``json``.
        group_by: ``folder``, ``file``, ``subject`` or ``host`` (see docs/discovery.md).
        merge: an existing inventory to fold the scan into.
        password_file: file whose first line opens encrypted PKCS#12 bundles and keys.
        organization: the inventory's organization when not merging.
        shelf_life_years, migration_years: defaults written and marked assumed.
        max_file_bytes: larger files are skipped with a note.
        progress: reports progress (the CLI's progress bar); None reports nothing.
        as_of: date the remaining validity of certificates is counted from (default today).
        keystore_passwords: passwords to try on keystores and PKCS#12 bundles (never shown).
        keystore_password_file: file whose first line is one more such password.
        openssh_version: OpenSSH version whose defaults apply to sshd_config / ssh_config
            files that do not state one.
        archive_limits: bounds on archives (depth, total size, members).
    """
    check_format(output_format)
    rule = _group_rule(group_by)
    if not paths:
        raise UsageError("scan needs at least one file or folder")
    for path in paths:
        if not os.path.lexists(path):
            raise UsageError(f"{path}: no such file or folder", hint="check the path")
    check_years(shelf_life_years, migration_years)
    passwords = [p for p in (_read_password(password_file),
                             _read_password(keystore_password_file)) if p is not None]  # fmt: skip
    passwords += [p for p in keystore_passwords if p not in passwords]
    if openssh_version is not None and defaults_for(openssh_version, "sshd") is None:
        raise UsageError(
            f"no shipped defaults for OpenSSH {openssh_version!r}",
            hint="use one of " + ", ".join(known_versions()),
        )
    context = FinderContext(
        passwords=tuple(passwords),
        expand_cipher_string=system_expander(),
        openssh_version=openssh_version,
        limits=archive_limits or ArchiveLimits(),
    )
    entries, walk_problems = plan(list(paths), max_file_bytes)
    with (progress or _no_progress)(len(entries)) as advance:
        result = scan_entries(
            entries, walk_problems, None, max_file_bytes, advance, context=context
        )
    summary = [
        result.summary.headline(result.files_read)
        if result.summary is not None
        else f"scan: {result.files_read} files read"
    ]
    if result.summary is not None:
        summary.extend(result.summary.lines({problem.place for problem in result.problems}))
    summary.extend(problem.line() for problem in result.problems)
    summary.extend(_problem_counts(result.problems))
    inventory = finish_inventory(
        list(result.findings) + damaged_findings(result.problems), rule, organization, shelf_life_years, migration_years, merge,
        path_scope(list(paths)), output_format, summary, not result.complete,
        as_of=as_of or dt.date.today(),
    )  # fmt: skip
    details = result.summary.to_dict() if result.summary is not None else {}
    details["files_read"] = result.files_read
    read = frozenset(entry.identity for entry in entries if entry.identity is not None)
    return dataclasses.replace(inventory, scan_summary=details, read=read)


def damaged_findings(problems: tuple[ScanProblem, ...] | list[ScanProblem]) -> list[Finding]:
    """Corrupt or truncated material, and files a finder claimed but could not understand,
    stay in the inventory as unknown uses (unassessed in triage), so nothing found is dropped;
    unreadable files and skips stay notes only."""
    found = []
    for problem in problems:
        if problem.kind not in (ProblemKind.CORRUPT, ProblemKind.TRUNCATED, ProblemKind.NOT_UNDERSTOOD):
            continue
        path, _, detail = problem.place.partition("#")
        found.append(Finding(
            source=SourceRef(path, detail=detail or None),
            kind=FindingKind.DAMAGED,
            algorithm="unknown",
            purpose=Purpose.AUTHENTICATION,
            notes=(f"{problem.kind.value} material, not assessed: {problem.reason}",),
        ))
    return found


def _no_progress(total: int) -> AbstractContextManager[Callable[[str], None] | None]:
    return nullcontext(None)


def _group_rule(group_by: str) -> GroupBy:
    try:
        return GroupBy(group_by)
    except ValueError:
        choices = ", ".join(rule.value for rule in GroupBy)
        raise UsageError(f"unknown grouping {group_by!r}", hint=f"use one of {choices}") from None


def _problem_counts(problems: tuple[ScanProblem, ...]) -> list[str]:
    failed = sum(problem.is_failure for problem in problems)
    warned = sum(problem.kind is ProblemKind.WARNING for problem in problems)
    skipped = len(problems) - failed - warned
    if not failed and not skipped:
        return ["everything was read" + (f" ({warned} with a library warning)" if warned else "")]
    text = f"{failed} could not be read, {skipped} skipped with a note"
    return [text + (f", {warned} read with a library warning" if warned else "")]
