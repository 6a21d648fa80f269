"""`pqtriage scan`: find keys and certificates in files and folders; write an inventory."""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import Any, List, Optional

import typer

from pqtriage.cli.common import DiscoveryFormat, GroupByChoice, finish_discovery, write_discovery


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


def scan_command(
    paths: list[str], output: str | None = None, progress: bool | None = None, **options: Any
) -> Any:
    """Scan files and folders, then write the inventory to ``output`` atomically if given.

    Args:
        paths: files and folders to walk.
        output: file to write the inventory to; None leaves printing to the caller.
        progress: show a progress bar; None shows it only when stderr is a terminal.
        options: the other arguments of :func:`pqtriage.sources.scan.run.scan_inventory`.

    Returns:
        The CommandResult, naming the file written.
    """
    from pqtriage.sources.scan.run import scan_inventory

    result = scan_inventory(paths, progress=lambda total: _progress(total, progress), **options)
    return write_discovery(result, output)


def scan(
    paths: List[str] = typer.Argument(..., help="Files and folders to scan for keys and certificates."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Write the inventory here (stdout if absent)."),
    output_format: DiscoveryFormat = typer.Option(DiscoveryFormat.yaml, "--format", "-f", help="yaml (an inventory) or json (same content)."),
    group_by: GroupByChoice = typer.Option(GroupByChoice.folder, "--group-by", help="How findings become systems."),
    merge: Optional[str] = typer.Option(None, "--merge", help="Fold the scan into this existing inventory (hand-written fields kept)."),
    password_file: Optional[str] = typer.Option(None, "--password-file", help="File holding the password of encrypted PKCS#12 bundles."),
    organization: str = typer.Option("Scanned inventory", "--organization", help="Organisation name of a new inventory."),
    shelf_life: float = typer.Option(5.0, "--shelf-life", help="Assumed shelf-life x for found systems (flagged as assumed)."),
    migration_years: float = typer.Option(2.0, "--migration-years", help="Assumed migration time y (flagged as assumed)."),
    max_file_size: int = typer.Option(16 * 1024 * 1024, "--max-file-size", help="Skip files larger than this many bytes."),
) -> None:
    """Find keys and certificates in files and folders; write an inventory."""
    finish_discovery(scan_command(
        list(paths), output=output, output_format=output_format.value, group_by=group_by.value,
        merge=merge, password_file=password_file, organization=organization,
        shelf_life_years=shelf_life, migration_years=migration_years, max_file_bytes=max_file_size,
    ))
