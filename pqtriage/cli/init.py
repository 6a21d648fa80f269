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
    output: str = typer.Argument("inventory.yaml", help="File to create ('-' prints the template). A symbolic link is written through to its target; devices, pipes and folders are refused."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing file."),
    template_format: TemplateFormat = typer.Option(TemplateFormat.yaml, "--format", "-f",
                                                   help="yaml (commented) or xlsx (the same template as a workbook: one row per use)."),
) -> None:
    """Write a commented inventory template to start from (YAML, or a workbook)."""
    from importlib import resources

    from pqtriage.cli.output import write_atomic, write_stdout
    from pqtriage.errors import UsageError
    from pqtriage.formats.text import visible

    template = (resources.files("pqtriage") / "data" / "inventory-template.yaml").read_text("utf-8")
    if output == "-" and template_format is not TemplateFormat.xlsx:
        write_stdout(template)
        return
    if os.path.lexists(output) and not force:
        raise UsageError(f"{output} exists", hint="choose another name or pass --force")
    if template_format is TemplateFormat.xlsx:
        from dataclasses import replace

        from pqtriage.formats.xlsx.inventory import inventory_workbook
        from pqtriage.sources.yaml_inventory import YamlInventorySource

        inventory = YamlInventorySource().parse(template, "inventory-template.yaml")
        write_atomic(output, inventory_workbook(replace(inventory, warnings=())))
    else:
        write_atomic(output, template)
    console(stderr=True).print(f"wrote {visible(output)}: edit it, then run 'pqtriage check {visible(output)}'",
                               markup=False)
