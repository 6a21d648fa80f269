"""`pqtriage init`: write a commented inventory template to start from."""

from __future__ import annotations

import os

import typer

from pqtriage.cli.common import console


def init_command(
    output: str = typer.Argument("inventory.yaml", help="File to create ('-' prints the template). A symbolic link is written through to its target; devices, pipes and folders are refused."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing file."),
) -> None:
    """Write a commented inventory template to start from."""
    from importlib import resources

    from pqtriage.cli.output import write_atomic, write_stdout
    from pqtriage.errors import UsageError
    from pqtriage.formats.text import visible

    template = (resources.files("pqtriage") / "data" / "inventory-template.yaml").read_text("utf-8")
    if output == "-":
        write_stdout(template)
        return
    if os.path.lexists(output) and not force:
        raise UsageError(f"{output} exists", hint="choose another name or pass --force")
    write_atomic(output, template)
    console(stderr=True).print(f"wrote {visible(output)}: edit it, then run 'pqtriage check {visible(output)}'",
                               markup=False)
