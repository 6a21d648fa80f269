"""`pqtriage check`: validate an inventory file and report unknown algorithms."""

from __future__ import annotations

from typing import Optional

import typer

from pqtriage.cli.common import CBOM_DEFAULTS_HELP, COLUMNS_HELP, console
from pqtriage.errors import EXIT_BAD_INPUT, EXIT_OK


def check_command(
    inventory: str = typer.Argument(..., help="Inventory file to validate."),
    strict: bool = typer.Option(False, "--strict", help="Treat warnings (dependencies outside the file) as errors."),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
    columns: Optional[str] = typer.Option(None, "--columns", help=COLUMNS_HELP),
) -> None:
    """Validate an inventory file (YAML, CSV, workbook or CycloneDX): every problem at once."""
    from pqtriage.catalog import load_catalog
    from pqtriage.formats.text import visible
    from pqtriage.pipeline import load_any

    catalog = load_catalog()
    inv = load_any(inventory, cbom_defaults, columns, catalog)
    err = console(stderr=True)
    unknown = 0
    for system in inv.systems:
        for use in system.uses:
            found = catalog.resolve(use.algorithm, key_size=use.key_size, curve=use.curve,
                                    parameter_set=use.parameter_set, purpose=use.purpose.value)
            if not found.assessed:
                unknown += 1
                if (found.reason or "").endswith("is not in the algorithm catalog"):
                    continue  # already a warning, with close names
                err.print(f"note: {visible(use.source)}: {visible(use.algorithm)}: "
                          f"{visible(found.reason)} (this use will be unassessed)", markup=False, soft_wrap=True)
    for warning in inv.warnings:
        err.print(f"warning: {visible(warning)}", markup=False, soft_wrap=True)
    uses = sum(len(s.uses) for s in inv.systems)
    err.print(f"{visible(inventory)}: valid inventory of {len(inv.systems)} systems and {uses} uses"
              f" ({unknown} unassessed, {len(inv.warnings)} warnings)", markup=False, soft_wrap=True)
    if strict and inv.warnings:
        raise typer.Exit(EXIT_BAD_INPUT)
    raise typer.Exit(EXIT_OK)
