"""`pqtriage init`: write a commented inventory template to start from."""

from __future__ import annotations

import os

import typer

from pqtriage.cli.common import console


def init_command(
    output: str = typer.Argument("inventory.yaml", help="File to create."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing file."),
) -> None:
    """Write a commented inventory template to start from."""
    from importlib import resources

    from pqtriage.cli.output import write_atomic
    from pqtriage.errors import UsageError

    if os.path.exists(output) and not force:
        raise UsageError(f"{output} exists", hint="choose another name or pass --force")
    template = (resources.files("pqtriage") / "data" / "inventory-template.yaml").read_text("utf-8")
    write_atomic(output, template)
    console(stderr=True).print(f"wrote {output}: edit it, then run 'pqtriage check {output}'", markup=False)
