"""`pqtriage triage`: rank the inventory's systems by post-quantum exposure."""

from __future__ import annotations

from typing import Optional

import typer

from pqtriage.cli.common import (
    AS_OF_HELP,
    CBOM_DEFAULTS_HELP,
    COLUMNS_HELP,
    FAIL_ON_HELP,
    GROUP_BY_HELP,
    HARDWARE_HELP,
    OUTPUT_HELP,
    PROFILE_HELP,
    TOP_HELP,
    WHERE_HELP,
    ResultFormatChoice,
    check_fail_on,
    check_outputs,
    console,
    emit,
    emit_bytes,
    fail_code,
    plain_text,
    profile_input,
    result_formats,
    to_file,
    view_of,
)


def triage_command(
    inventory: str = typer.Argument(..., help="Inventory file (pqtriage YAML or CycloneDX JSON)."),
    output_format: ResultFormatChoice = typer.Option(ResultFormatChoice.table, "--format", "-f", help="Output format."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help=OUTPUT_HELP),
    profile: Optional[str] = typer.Option(None, "--profile", help=PROFILE_HELP),
    as_of: Optional[str] = typer.Option(None, "--as-of", help=AS_OF_HELP),
    top: Optional[int] = typer.Option(None, "--top", min=1, help=TOP_HELP),
    where: Optional[str] = typer.Option(None, "--where", help=WHERE_HELP),
    group_by: Optional[str] = typer.Option(None, "--group-by", help=GROUP_BY_HELP),
    fail_on: Optional[str] = typer.Option(None, "--fail-on", metavar="VERDICT", callback=check_fail_on, help=FAIL_ON_HELP),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
    hardware: Optional[str] = typer.Option(None, "--hardware", help=HARDWARE_HELP),
    columns: Optional[str] = typer.Option(None, "--columns", help=COLUMNS_HELP),
) -> None:
    """Rank the inventory's systems by post-quantum exposure."""
    from pqtriage.pipeline import parse_as_of, run_triage

    inputs = [inventory, profile_input(profile), cbom_defaults, hardware, columns]
    check_outputs(output, inputs)
    full = run_triage(inventory, profile, parse_as_of(as_of), cbom_defaults, hardware, columns)
    result = view_of(full, where, top, group_by, output_format.value)
    formatter = result_formats()[output_format.value]
    if formatter is None:
        from pqtriage.formats.table.triage import terminal_view

        view = terminal_view(result)
        if to_file(output):
            emit(plain_text(view), output, inputs)
        else:
            console().print(view)
    elif getattr(formatter, "binary", False):
        emit_bytes(formatter.render_bytes(result), output, f"--format {output_format.value}", inputs)
        if to_file(output):
            from pqtriage.formats.table.summary import summary_block

            console(stderr=True).print(summary_block(result))
    else:
        emit(formatter.render(result), output, inputs)
        if to_file(output):
            from pqtriage.formats.table.summary import summary_block

            console(stderr=True).print(summary_block(result))
    raise typer.Exit(fail_code(result, fail_on))  # the systems shown: --where scopes a CI gate
