"""`pqtriage scan` and `pqtriage probe`: typer wiring of the discovery functions."""

from __future__ import annotations

import sys
from enum import Enum
from typing import List, Optional

import typer

from pqtriage.commands.discovery import CommandResult


class DiscoveryFormat(str, Enum):
    """--format values of scan and probe."""

    yaml = "yaml"
    json = "json"


class GroupBy(str, Enum):
    """--group-by values of scan."""

    folder = "folder"
    file = "file"
    subject = "subject"
    host = "host"


def _finish(result: CommandResult) -> None:
    text = result.text
    if result.written is None:
        sys.stdout.write(text)
    for line in result.summary:
        sys.stderr.write(line.rstrip("\n") + "\n")
    raise typer.Exit(result.exit_code)


def register(app: typer.Typer) -> None:
    """Add scan and probe to the app."""

    @app.command("scan")
    def scan(
        paths: List[str] = typer.Argument(..., help="Files and folders to scan for keys and certificates."),
        output: Optional[str] = typer.Option(None, "--output", "-o", help="Write the inventory here (stdout if absent)."),
        output_format: DiscoveryFormat = typer.Option(DiscoveryFormat.yaml, "--format", "-f", help="yaml (an inventory) or json (same content)."),
        group_by: GroupBy = typer.Option(GroupBy.folder, "--group-by", help="How findings become systems."),
        merge: Optional[str] = typer.Option(None, "--merge", help="Fold the scan into this existing inventory (hand-written fields kept)."),
        password_file: Optional[str] = typer.Option(None, "--password-file", help="File holding the password of encrypted PKCS#12 bundles."),
        organization: str = typer.Option("Scanned inventory", "--organization", help="Organisation name of a new inventory."),
        shelf_life: float = typer.Option(5.0, "--shelf-life", help="Assumed shelf-life x for found systems (flagged as assumed)."),
        migration_years: float = typer.Option(2.0, "--migration-years", help="Assumed migration time y (flagged as assumed)."),
        max_file_size: int = typer.Option(16 * 1024 * 1024, "--max-file-size", help="Skip files larger than this many bytes."),
    ) -> None:
        """Find keys and certificates in files and folders; write an inventory."""
        from pqtriage.commands.discovery import scan_command

        _finish(scan_command(
            list(paths), output=output, output_format=output_format.value, group_by=group_by.value,
            merge=merge, password_file=password_file, organization=organization,
            shelf_life_years=shelf_life, migration_years=migration_years, max_file_bytes=max_file_size,
        ))

    @app.command("probe")
    def probe(
        targets: Optional[List[str]] = typer.Argument(None, help="host:port (TLS) or ssh://host:port (SSH), named explicitly."),
        targets_file: Optional[str] = typer.Option(None, "--targets", help="File with one target per line."),
        timeout: float = typer.Option(5.0, "--timeout", help="Seconds per target."),
        concurrency: int = typer.Option(8, "--concurrency", help="Targets probed at once."),
        output: Optional[str] = typer.Option(None, "--output", "-o", help="Write the inventory here (stdout if absent)."),
        output_format: DiscoveryFormat = typer.Option(DiscoveryFormat.yaml, "--format", "-f", help="yaml or json."),
        merge: Optional[str] = typer.Option(None, "--merge", help="Fold the results into this existing inventory."),
        organization: str = typer.Option("Probed endpoints", "--organization", help="Organisation name of a new inventory."),
        shelf_life: float = typer.Option(5.0, "--shelf-life", help="Assumed shelf-life x (flagged as assumed)."),
        migration_years: float = typer.Option(2.0, "--migration-years", help="Assumed migration time y (flagged as assumed)."),
    ) -> None:
        """Record what live TLS and SSH endpoints negotiate; write an inventory."""
        from pqtriage.commands.discovery import probe_command

        _finish(probe_command(
            list(targets or []), targets_file=targets_file, timeout=timeout, concurrency=concurrency,
            output=output, output_format=output_format.value, merge=merge, organization=organization,
            shelf_life_years=shelf_life, migration_years=migration_years,
        ))
