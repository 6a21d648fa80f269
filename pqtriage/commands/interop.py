"""`pqtriage schema` and `pqtriage diff`: the inventory JSON Schema, and changes between two reviews."""

from __future__ import annotations

from enum import Enum
from typing import Any

import typer


class DiffFormat(str, Enum):
    """--format values of diff."""

    table = "table"
    markdown = "markdown"
    json = "json"


def _write(text: str, output: str | None) -> None:
    if output and output != "-":
        from pqtriage.output import write_atomic

        write_atomic(output, text)
    else:
        typer.echo(text, nl=not text.endswith("\n"))


def load_review(path: str, profile: str | None, as_of: Any, cbom_defaults: str | None) -> Any:
    """A Review from a JSON result file, or from an inventory (YAML or CycloneDX) triaged now."""
    from pqtriage.errors import InventoryError, Place
    from pqtriage.model.diff import review_of_json, review_of_result
    from pqtriage.sources.interface import read_input
    from pqtriage.yamlio import MAX_FILE_BYTES, decode_text

    data, _ = read_input(path)
    if len(data) <= MAX_FILE_BYTES:
        text = decode_text(data, path, InventoryError)
        if text.lstrip().startswith("{") and '"schema_version"' in text and '"bomFormat"' not in text:
            from pqtriage.sources.cbom import load_json

            try:
                return review_of_json(load_json(text, path), path)
            except ValueError as exc:
                raise InventoryError(str(exc), place=Place(path),
                                     hint="give a file written by 'pqtriage triage --format json'") from exc
    from pqtriage.catalog import load_catalog
    from pqtriage.model.triage import triage
    from pqtriage.pipeline import arrival_model_for
    from pqtriage.sources.loading import load_inventory_with_side_file
    from pqtriage.sources.profile_file import load_profile

    inventory = load_inventory_with_side_file(path, cbom_defaults)
    threat = load_profile(profile)
    result = triage(inventory, load_catalog(), threat, arrival_model_for(threat, as_of), as_of)
    return review_of_result(result, path)


def register(app: typer.Typer) -> None:
    """Add the schema and diff commands to the app."""

    @app.command("schema")
    def schema(
        output: str | None = typer.Option(None, "--output", "-o", help="Write to this file instead of stdout."),
    ) -> None:
        """Print the JSON Schema of the inventory format (for editors and CI validation)."""
        import json

        from pqtriage.sources.schema import json_schema

        _write(json.dumps(json_schema(), indent=2, ensure_ascii=False) + "\n", output)

    @app.command("diff")
    def diff(
        old: str = typer.Argument(..., help="Earlier review: an inventory or a 'triage --format json' result."),
        new: str = typer.Argument(..., help="Later review: an inventory or a 'triage --format json' result."),
        output_format: DiffFormat = typer.Option(DiffFormat.table, "--format", "-f", help="table, markdown or json."),
        output: str | None = typer.Option(None, "--output", "-o", help="Write to this file instead of stdout."),
        profile: str | None = typer.Option(None, "--profile", help="Threat profile for inventories (not for JSON results)."),
        as_of: str | None = typer.Option(None, "--as-of", help="Date treated as today for inventories (YYYY-MM-DD)."),
        cbom_defaults: str | None = typer.Option(None, "--cbom-defaults", help="CBOM side file (shelf-life, migration time) for CycloneDX inputs."),
    ) -> None:
        """Compare two reviews: systems migrated, improved, worsened, new and removed."""
        from pqtriage.formats.diff_view import markdown_section, render_json, terminal_view
        from pqtriage.model.diff import compare
        from pqtriage.pipeline import parse_as_of

        date = parse_as_of(as_of)
        result = compare(load_review(old, profile, date, cbom_defaults),
                         load_review(new, profile, date, cbom_defaults))
        if output_format is DiffFormat.markdown:
            _write(markdown_section(result), output)
        elif output_format is DiffFormat.json:
            _write(render_json(result), output)
        else:
            from io import StringIO

            from rich.console import Console

            if output and output != "-":
                buffer = StringIO()
                Console(file=buffer, width=100, no_color=True, color_system=None).print(terminal_view(result))
                _write(buffer.getvalue(), output)
            else:
                Console(highlight=False).print(terminal_view(result))
