"""`pqtriage schema`: the JSON Schema of the inventory format, for editors and CI validation."""

from __future__ import annotations

import typer

from pqtriage.cli.common import OUTPUT_HELP, echo


def schema(
    output: str | None = typer.Option(None, "--output", "-o", help=OUTPUT_HELP),
) -> None:
    """Print the JSON Schema of the inventory format (for editors and CI validation)."""
    import json

    from pqtriage.sources.schema import json_schema

    echo(json.dumps(json_schema(), indent=2, ensure_ascii=False) + "\n", output)
