"""``pqtriage scan`` and ``pqtriage probe`` as plain functions; pqtriage.cli wires them.

Each returns a :class:`CommandResult`: the inventory text, summary lines for stderr and the
exit code (0 all read, 1 something could not be read or reached). Bad usage raises a
:class:`~pqtriage.errors.PqtriageError` subclass (exit code 2). Only this module writes files.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from typing import Any

import yaml

from pqtriage.errors import EXIT_FINDINGS, EXIT_OK, InventoryError, Place, UsageError
from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.output import write_atomic  # noqa: F401  (the one writer; re-exported for callers)
from pqtriage.sources.probe.runner import DEFAULT_CONCURRENCY, DEFAULT_TIMEOUT, run_probes
from pqtriage.sources.probe.targets import parse_target, read_targets_file
from pqtriage.sources.scan.emit import (
    ASSUMED_SYSTEM_FIELDS,
    DEFAULT_EXPOSURE,
    DEFAULT_MIGRATION_YEARS,
    DEFAULT_ORGANIZATION,
    DEFAULT_SHELF_LIFE_YEARS,
    inventory_dict,
    render,
    slugify,
    unique_id,
)
from pqtriage.sources.scan.findings import Finding, FindingKind, ProblemKind, ScanProblem
from pqtriage.sources.scan.grouping import GroupBy, group_findings
from pqtriage.sources.scan.merge import merge_inventory, path_scope, target_scope
from pqtriage.sources.scan.scanner import plan, scan_entries
from pqtriage.sources.scan.walker import DEFAULT_MAX_FILE_BYTES

OUTPUT_FORMATS = ("yaml", "json")


@dataclass(frozen=True)
class CommandResult:
    """What a discovery command produced."""

    text: str
    """The inventory (YAML or JSON); the CLI prints it when no output file was given."""
    summary: list[str]
    """Lines for stderr: counts, one line per problem, assumed defaults, merge report."""
    exit_code: int
    """0 when everything was read or reached, 1 otherwise."""
    written: str | None = None
    """Path the inventory was written to, if any."""


def _check_format(output_format: str) -> None:
    if output_format not in OUTPUT_FORMATS:
        raise UsageError(f"unknown format {output_format!r}", hint="use yaml or json")


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


def _load_existing(merge: str) -> Any:
    try:
        with open(merge, encoding="utf-8") as stream:
            document = yaml.safe_load(stream)
    except OSError as error:
        raise InventoryError(
            f"cannot read the inventory to merge into ({error.strerror})",
            place=Place(merge),
            hint="check the path given to --merge",
        ) from error
    except yaml.YAMLError as error:
        mark = getattr(error, "problem_mark", None)
        place = Place(merge, mark.line + 1, mark.column + 1) if mark else Place(merge)
        raise InventoryError(
            "the inventory to merge into is not valid YAML", place=place
        ) from error
    if document is None:
        document = {"version": 1, "organization": DEFAULT_ORGANIZATION, "systems": []}
    return document


@contextmanager
def _progress(total: int, enabled: bool | None) -> Iterator[Callable[[str], None] | None]:
    """A rich progress bar on stderr, only when stderr is a terminal (or when forced)."""
    show = sys.stderr.isatty() if enabled is None else enabled
    if not show or total < 2:
        yield None
        return
    from rich.console import Console
    from rich.progress import Progress

    with Progress(console=Console(stderr=True), transient=True) as bar:
        task = bar.add_task("scanning", total=total)
        yield lambda _path: bar.advance(task)


def _assumed_line(systems: int, shelf_life: float, migration: float) -> str:
    return (
        f"assumed in {systems} systems: shelf_life_years={shelf_life:g}, "
        f"migration_years={migration:g}, exposure={DEFAULT_EXPOSURE} (defaults a scan cannot "
        "know, marked 'assumed'; set them in the inventory)"
    )


def _finish(
    findings: list[Finding],
    group_by: GroupBy,
    organization: str,
    shelf_life_years: float,
    migration_years: float,
    merge: str | None,
    in_scope: Callable[[str], bool],
    output: str | None,
    output_format: str,
    summary: list[str],
    failed: bool,
    system_extras: dict[str, dict[str, Any]] | None = None,
    unreached: list[tuple[str, str]] | None = None,
) -> CommandResult:
    groups = group_findings(findings, group_by)
    document = inventory_dict(
        groups, organization, shelf_life_years, migration_years, system_extras
    )
    if unreached and merge is None:
        # A target that could not be probed is not dropped: it becomes a system with no
        # uses, which triage reports as unassessed in every output. (With --merge the
        # existing entry for it is left untouched instead.)
        taken = {system["id"] for system in document["systems"]}
        for target, line in unreached:
            document["systems"].append({
                "id": unique_id(slugify(target), taken),
                "name": target,
                "shelf_life_years": shelf_life_years,
                "migration_years": migration_years,
                "assumed": list(ASSUMED_SYSTEM_FIELDS),
                "source": target,
                "exposure": DEFAULT_EXPOSURE,
                "notes": f"probe failed, not assessed: {line}",
                "uses": [],
            })
    summary.append(f"{len(findings)} uses in {len(groups)} systems (grouped by {group_by.value})")
    if groups:
        summary.append(_assumed_line(len(groups), shelf_life_years, migration_years))
    private = sum(1 for f in findings if f.kind is FindingKind.PRIVATE_KEY)
    if private:
        summary.append(f"{private} private keys in plain files (type and size recorded only)")
    if merge is not None:
        document, report = merge_inventory(_load_existing(merge), document, in_scope)
        summary.extend(report.lines())
    text = render(document, output_format)
    if output is not None:
        try:
            write_atomic(output, text)
        except OSError as error:
            raise UsageError(
                f"cannot write {output} ({error.strerror})", hint="check the folder exists"
            ) from error
    return CommandResult(text, summary, EXIT_FINDINGS if failed else EXIT_OK, output)


def scan_command(
    paths: list[str],
    output: str | None = None,
    output_format: str = "yaml",
    group_by: str = "folder",
    merge: str | None = None,
    password_file: str | None = None,
    organization: str = DEFAULT_ORGANIZATION,
    shelf_life_years: float = DEFAULT_SHELF_LIFE_YEARS,
    migration_years: float = DEFAULT_MIGRATION_YEARS,
    max_file_bytes: int = DEFAULT_MAX_FILE_BYTES,
    progress: bool | None = None,
) -> CommandResult:
    """Scan files and folders for keys and certificates and return an inventory.

    Args:
        paths: files and folders to walk (each must exist: bad usage otherwise).
        output: write the inventory here (atomically); None leaves printing to the caller.
        output_format: ``yaml`` or ``json``.
        group_by: ``folder``, ``file``, ``subject`` or ``host`` (see docs/discovery.md).
        merge: an existing inventory to fold the scan into.
        password_file: file whose first line opens encrypted PKCS#12 bundles and keys.
        organization: the inventory's organization when not merging.
        shelf_life_years, migration_years: defaults written and marked assumed.
        max_file_bytes: larger files are skipped with a note.
        progress: show a progress bar; None shows it only when stderr is a terminal.
    """
    _check_format(output_format)
    rule = _group_rule(group_by)
    if not paths:
        raise UsageError("scan needs at least one file or folder")
    for path in paths:
        if not os.path.lexists(path):
            raise UsageError(f"{path}: no such file or folder", hint="check the path")
    _check_years(shelf_life_years, migration_years)
    password = _read_password(password_file)
    entries, walk_problems = plan(list(paths), max_file_bytes)
    with _progress(len(entries), progress) as advance:
        result = scan_entries(entries, walk_problems, password, max_file_bytes, advance)
    summary = [
        (
            f"scan: {result.files_read} files read, {result.files_with_material} with key or "
            "certificate material"
        )
    ]
    summary.extend(problem.line() for problem in result.problems)
    summary.extend(_problem_counts(result.problems))
    return _finish(
        list(result.findings) + damaged_findings(result.problems), rule, organization, shelf_life_years, migration_years, merge,
        path_scope(list(paths)), output, output_format, summary, not result.complete,
    )  # fmt: skip


def damaged_findings(problems: tuple[ScanProblem, ...] | list[ScanProblem]) -> list[Finding]:
    """Corrupt or truncated material stays in the inventory as an unknown use (unassessed in
    triage), so nothing found is dropped; unreadable files and skips stay notes only."""
    found = []
    for problem in problems:
        if problem.kind not in (ProblemKind.CORRUPT, ProblemKind.TRUNCATED):
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


def probe_command(
    targets: list[str],
    targets_file: str | None = None,
    timeout: float = DEFAULT_TIMEOUT,
    concurrency: int = DEFAULT_CONCURRENCY,
    output: str | None = None,
    output_format: str = "yaml",
    merge: str | None = None,
    organization: str = DEFAULT_ORGANIZATION,
    shelf_life_years: float = DEFAULT_SHELF_LIFE_YEARS,
    migration_years: float = DEFAULT_MIGRATION_YEARS,
) -> CommandResult:
    """Probe explicitly named TLS (``host:port``) and SSH (``ssh://host:port``) endpoints.

    One system per target. Every target is parsed before any connection is made, so bad
    usage fails fast with exit code 2.
    """
    _check_format(output_format)
    _check_years(shelf_life_years, migration_years)
    names = list(targets)
    if targets_file is not None:
        try:
            with open(targets_file, encoding="utf-8") as stream:
                names += read_targets_file(stream.read(), targets_file)
        except OSError as error:
            raise UsageError(
                f"targets file {targets_file} cannot be read ({error.strerror})"
            ) from error
    if not names:
        raise UsageError("probe needs at least one target", hint="give host:port or ssh://host")
    parsed = list({target.text: target for target in map(parse_target, names)}.values())
    outcomes = run_probes(parsed, timeout, concurrency)
    findings: list[Finding] = []
    problems: list[ScanProblem] = []
    extras: dict[str, dict[str, Any]] = {}
    summary = [f"probe: {len(parsed)} targets"]
    unreached: list[tuple[str, str]] = []
    for outcome in outcomes:
        problem = outcome.problem()
        if problem is not None:
            problems.append(problem)
            summary.append(problem.line())
            unreached.append((outcome.target, problem.line()))
            continue
        findings.extend(outcome.findings)
        extras[outcome.target] = {"protocol": outcome.protocol, "notes": outcome.summary}
        summary.append(outcome.summary or outcome.target)
    return _finish(
        findings, GroupBy.FILE, organization, shelf_life_years, migration_years, merge,
        target_scope([t.text for t in parsed if t.text in extras]), output, output_format,
        summary, bool(problems), extras, unreached,
    )  # fmt: skip


def _group_rule(group_by: str) -> GroupBy:
    try:
        return GroupBy(group_by)
    except ValueError:
        choices = ", ".join(rule.value for rule in GroupBy)
        raise UsageError(f"unknown grouping {group_by!r}", hint=f"use one of {choices}") from None


def _check_years(shelf_life_years: float, migration_years: float) -> None:
    if shelf_life_years < 0 or migration_years < 0:
        raise UsageError("shelf-life and migration years must not be negative")


def _problem_counts(problems: tuple[ScanProblem, ...]) -> list[str]:
    failed = sum(problem.is_failure for problem in problems)
    skipped = len(problems) - failed
    if not problems:
        return ["everything was read"]
    return [f"{failed} could not be read, {skipped} skipped with a note"]
