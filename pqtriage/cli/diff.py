"""`pqtriage diff`: what changed between two reviews (inventories or JSON results)."""

from __future__ import annotations

import typer

from pqtriage.cli.common import (
    COLUMNS_HELP,
    HARDWARE_HELP,
    OUTPUT_HELP,
    DiffFormat,
    check_outputs,
    console,
    echo,
    plain_text,
    profile_input,
    to_file,
)


def diff(
    old: str = typer.Argument(..., help="Earlier review: an inventory or a 'triage --format json' result."),
    new: str = typer.Argument(..., help="Later review: an inventory or a 'triage --format json' result."),
    output_format: DiffFormat = typer.Option(DiffFormat.table, "--format", "-f", help="table, markdown or json."),
    output: str | None = typer.Option(None, "--output", "-o", help=OUTPUT_HELP),
    profile: str | None = typer.Option(None, "--profile", help="Threat profile for inventories (not for JSON results)."),
    as_of: str | None = typer.Option(None, "--as-of", help="Date treated as today for inventories (YYYY-MM-DD)."),
    cbom_defaults: str | None = typer.Option(None, "--cbom-defaults", help="CBOM side file (shelf-life, migration time) for CycloneDX inputs."),
    columns: str | None = typer.Option(None, "--columns", help=COLUMNS_HELP),
    hardware: str | None = typer.Option(None, "--hardware", help=HARDWARE_HELP),
) -> None:
    """Compare two reviews: systems migrated, improved, worsened, new and removed."""
    from pqtriage.model.diff import compare
    from pqtriage.pipeline import load_review, parse_as_of

    inputs = [old, new, profile_input(profile), cbom_defaults, hardware, columns]
    check_outputs(output, inputs)
    date = parse_as_of(as_of)
    result = compare(load_review(old, profile, date, cbom_defaults, hardware, columns),
                     load_review(new, profile, date, cbom_defaults, hardware, columns))
    if output_format is DiffFormat.markdown:
        from pqtriage.formats.markdown.diff import markdown_section

        echo(markdown_section(result), output, inputs)
    elif output_format is DiffFormat.json:
        from pqtriage.formats.json.diff import render_json

        echo(render_json(result), output, inputs)
    else:
        from pqtriage.formats.table.diff import terminal_view

        if to_file(output):
            echo(plain_text(terminal_view(result)), output, inputs)
        else:
            console().print(terminal_view(result))
