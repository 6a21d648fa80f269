"""`pqtriage scan`: find cryptography in files and folders; write an inventory."""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import Any, List, Optional

import typer

from pqtriage.cli.common import (
    OUTPUT_HELP,
    DiscoveryFormat,
    GroupByChoice,
    check_outputs,
    finish_discovery,
    write_discovery,
)


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


KEYSTORE_PASSWORD_VARIABLE = "PQTRIAGE_KEYSTORE_PASSWORD"


def _keystore_passwords(given: Optional[List[str]]) -> tuple[bytes, ...]:
    """Passwords from the command line, then the environment variable (taken whole: a password
    may hold spaces). None of them is ever shown."""
    import os

    passwords = [p.encode() for p in given or ()]
    variable = os.environ.get(KEYSTORE_PASSWORD_VARIABLE)
    if variable:
        passwords.append(variable.encode())
    return tuple(passwords)


def scan_command(
    paths: list[str],
    output: str | None = None,
    progress: bool | None = None,
    summary_json: str | None = None,
    **options: Any,
) -> Any:
    """Scan files and folders, then write the inventory to ``output`` atomically if given.

    Args:
        paths: files and folders to walk.
        output: file to write the inventory to; None leaves printing to the caller.
        progress: show a progress bar; None shows it only when stderr is a terminal.
        summary_json: write the per-finder summary here as JSON (atomically).
        options: the other arguments of :func:`pqtriage.sources.scan.run.scan_inventory`.

    Returns:
        The CommandResult, naming the file written.
    """
    from pqtriage.sources.scan.run import scan_inventory

    # The --merge inventory may be the output (updated in place: it is read whole first);
    # the password file and every scanned file may not.
    inputs = [options.get("password_file"), options.get("keystore_password_file")]
    check_outputs(output, inputs, summary_json)
    result = scan_inventory(paths, progress=lambda total: _progress(total, progress), **options)
    if summary_json is not None:
        import json

        from pqtriage.cli.output import write_atomic

        write_atomic(summary_json, json.dumps(result.scan_summary, indent=2) + "\n",
                     [*inputs, *getattr(result, "read", ())])
    return write_discovery(result, output, inputs)


def scan(
    paths: List[str] = typer.Argument(..., help="Files and folders to scan (keys, certificates, keystores, configurations, archives, source code, captures)."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Write the inventory here (stdout if absent). The --merge inventory may be named to update it in place. " + OUTPUT_HELP),
    output_format: DiscoveryFormat = typer.Option(DiscoveryFormat.yaml, "--format", "-f", help="yaml (an inventory) or json (same content)."),
    group_by: GroupByChoice = typer.Option(GroupByChoice.folder, "--group-by", help="How findings become systems."),
    merge: Optional[str] = typer.Option(None, "--merge", help="Fold the scan into this existing inventory (hand-written fields kept)."),
    password_file: Optional[str] = typer.Option(None, "--password-file", help="File holding the password of encrypted PKCS#12 bundles and keys (also tried on keystores)."),
    organization: str = typer.Option("Scanned inventory", "--organization", help="Organisation name of a new inventory."),
    shelf_life: float = typer.Option(5.0, "--shelf-life", help="Assumed shelf-life x for found systems (flagged as assumed)."),
    migration_years: float = typer.Option(2.0, "--migration-years", help="Assumed migration time y (flagged as assumed)."),
    as_of: Optional[str] = typer.Option(None, "--as-of", help="Date the remaining validity of certificates is counted from (YYYY-MM-DD, default today)."),
    max_file_size: int = typer.Option(16 * 1024 * 1024, "--max-file-size", help="Skip files larger than this many bytes."),
    keystore_password: Optional[List[str]] = typer.Option(None, "--keystore-password", help="Password to try on keystores and PKCS#12 bundles (repeatable). The variable PQTRIAGE_KEYSTORE_PASSWORD is tried too, whole. Prefer the variable or --keystore-password-file: a command line is visible to other users."),
    keystore_password_file: Optional[str] = typer.Option(None, "--keystore-password-file", help="File whose first line is a keystore password."),
    openssh_version: Optional[str] = typer.Option(None, "--openssh-version", help="OpenSSH version whose default algorithm lists apply to sshd_config/ssh_config files that state none (e.g. 9.2)."),
    archive_depth: int = typer.Option(4, "--archive-depth", min=0, help="Open archives nested at most this deep (0: do not open archives)."),
    archive_max_bytes: int = typer.Option(256 * 1024 * 1024, "--archive-max-bytes", min=0, help="Unpack at most this many bytes from one archive on disk (members and nested members together)."),
    summary_json: Optional[str] = typer.Option(None, "--summary-json", help="Also write the per-finder summary (files seen, understood, findings, not understood and why) as JSON to this file."),
) -> None:
    """Find cryptography in files and folders; write an inventory."""
    from pqtriage.pipeline import parse_as_of
    from pqtriage.sources.scan.finders.interface import ArchiveLimits

    finish_discovery(scan_command(
        list(paths), output=output, output_format=output_format.value, group_by=group_by.value,
        merge=merge, password_file=password_file, organization=organization,
        shelf_life_years=shelf_life, migration_years=migration_years, max_file_bytes=max_file_size,
        as_of=parse_as_of(as_of),
        keystore_passwords=_keystore_passwords(keystore_password),
        keystore_password_file=keystore_password_file, openssh_version=openssh_version,
        archive_limits=ArchiveLimits(max_depth=archive_depth, max_total_bytes=archive_max_bytes),
        summary_json=summary_json,
    ))
