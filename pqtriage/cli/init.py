"""`pqtriage init`: write a commented inventory template (or the same as a workbook) to start from."""

from __future__ import annotations

import os
from enum import Enum

import typer

from pqtriage.cli.common import console


class TemplateFormat(str, Enum):
    """--format values of init."""

    yaml = "yaml"
    xlsx = "xlsx"


def init_command(
    output: str = typer.Argument("inventory.yaml", help="File to create."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing file."),
    template_format: TemplateFormat = typer.Option(TemplateFormat.yaml, "--format", "-f",
                                                   help="yaml (commented) or xlsx (the same template as a workbook: one row per use)."),
) -> None:
    """Write a commented inventory template to start from (YAML, or a workbook)."""
    from importlib import resources

    from pqtriage.cli.output import write_atomic
    from pqtriage.errors import UsageError

    if os.path.exists(output) and not force:
        raise UsageError(f"{output} exists", hint="choose another name or pass --force")
    template = (resources.files("pqtriage") / "data" / "inventory-template.yaml").read_text("utf-8")
    if template_format is TemplateFormat.xlsx:
        from dataclasses import replace

        from pqtriage.formats.xlsx.inventory import inventory_workbook
        from pqtriage.sources.yaml_inventory import YamlInventorySource

        inventory = YamlInventorySource().parse(template, "inventory-template.yaml")
        write_atomic(output, inventory_workbook(replace(inventory, warnings=())))
    else:
        write_atomic(output, template)
    console(stderr=True).print(f"wrote {output}: edit it, then run 'pqtriage check {output}'", markup=False)
