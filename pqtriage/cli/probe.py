"""`pqtriage probe`: record what live TLS and SSH endpoints negotiate; write an inventory."""

from __future__ import annotations

from typing import Any, List, Optional

import typer

from pqtriage.cli.common import (
    OUTPUT_HELP,
    DiscoveryFormat,
    check_outputs,
    finish_discovery,
    write_discovery,
)


def probe_command(targets: list[str], output: str | None = None, **options: Any) -> Any:
    """Probe the targets, then write the inventory to ``output`` atomically if given.

    Args:
        targets: host:port (TLS) or ssh://host:port (SSH).
        output: file to write the inventory to; None leaves printing to the caller.
        options: the other arguments of :func:`pqtriage.sources.probe.run.probe_inventory`.

    Returns:
        The CommandResult, naming the file written.
    """
    from pqtriage.sources.probe.run import probe_inventory

    inputs = [options.get("targets_file")]  # the --merge inventory may be the output
    check_outputs(output, inputs)
    return write_discovery(probe_inventory(targets, **options), output, inputs)


def probe(
    targets: Optional[List[str]] = typer.Argument(None, help="host:port (TLS) or ssh://host:port (SSH), named explicitly."),
    targets_file: Optional[str] = typer.Option(None, "--targets", help="File with one target per line."),
    timeout: float = typer.Option(5.0, "--timeout", help="Seconds per target."),
    concurrency: int = typer.Option(8, "--concurrency", help="Targets probed at once."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Write the inventory here (stdout if absent). The --merge inventory may be named to update it in place. " + OUTPUT_HELP),
    output_format: DiscoveryFormat = typer.Option(DiscoveryFormat.yaml, "--format", "-f", help="yaml or json."),
    merge: Optional[str] = typer.Option(None, "--merge", help="Fold the results into this existing inventory."),
    organization: str = typer.Option("Probed endpoints", "--organization", help="Organisation name of a new inventory."),
    shelf_life: float = typer.Option(5.0, "--shelf-life", help="Assumed shelf-life x (flagged as assumed)."),
    migration_years: float = typer.Option(2.0, "--migration-years", help="Assumed migration time y (flagged as assumed)."),
    as_of: Optional[str] = typer.Option(None, "--as-of", help="Date the remaining validity of certificates is counted from (YYYY-MM-DD, default today)."),
) -> None:
    """Record what live TLS and SSH endpoints negotiate; write an inventory."""
    from pqtriage.pipeline import parse_as_of

    finish_discovery(probe_command(
        list(targets or []), targets_file=targets_file, timeout=timeout, concurrency=concurrency,
        output=output, output_format=output_format.value, merge=merge, organization=organization,
        shelf_life_years=shelf_life, migration_years=migration_years, as_of=parse_as_of(as_of),
    ))
