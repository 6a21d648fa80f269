"""`pqtriage check`: validate an inventory file and report unknown algorithms."""

from __future__ import annotations

from typing import Optional

import typer

from pqtriage.cli.common import CBOM_DEFAULTS_HELP, console
from pqtriage.errors import EXIT_BAD_INPUT, EXIT_OK


def check_command(
    inventory: str = typer.Argument(..., help="Inventory file to validate."),
    strict: bool = typer.Option(False, "--strict", help="Treat warnings (dependencies outside the file) as errors."),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
) -> None:
    """Validate an inventory file (YAML or CycloneDX); report unknown algorithms."""
    from pqtriage.catalog import load_catalog
    from pqtriage.formats.text import visible
    from pqtriage.pipeline import load_any

    inv = load_any(inventory, cbom_defaults)
    catalog = load_catalog()
    err = console(stderr=True)
    unknown = 0
    for system in inv.systems:
        for use in system.uses:
            found = catalog.resolve(use.algorithm, key_size=use.key_size, curve=use.curve,
                                    parameter_set=use.parameter_set, purpose=use.purpose.value)
            if not found.assessed:
                unknown += 1
                err.print(f"note: {visible(use.source)}: {visible(use.algorithm)}: "
                          f"{visible(found.reason)} (this use will be unassessed)", markup=False)
    for warning in inv.warnings:
        err.print(f"warning: {visible(warning)}", markup=False)
    uses = sum(len(s.uses) for s in inv.systems)
    err.print(f"{visible(inventory)}: valid inventory of {len(inv.systems)} systems and {uses} uses"
              f" ({unknown} unassessed, {len(inv.warnings)} warnings)", markup=False)
    if strict and inv.warnings:
        raise typer.Exit(EXIT_BAD_INPUT)
    raise typer.Exit(EXIT_OK)
