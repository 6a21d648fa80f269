"""`pqtriage report`: the Markdown report for the compliance file (ranking, plan, sensitivity)."""

from __future__ import annotations

from typing import List, Optional

import typer

from pqtriage.cli.common import (
    AS_OF_HELP,
    CBOM_DEFAULTS_HELP,
    HARDWARE_HELP,
    PROFILE_HELP,
    VerdictChoice,
    chart_path_for,
    console,
    emit,
    fail_code,
    to_file,
)


def report_command(
    inventory: str = typer.Argument(..., help="Inventory file (pqtriage YAML or CycloneDX JSON)."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Markdown file to write (stdout if absent); the timeline chart goes beside it as NAME-timeline.svg."),
    profile: Optional[str] = typer.Option(None, "--profile", help=PROFILE_HELP),
    as_of: Optional[str] = typer.Option(None, "--as-of", help=AS_OF_HELP),
    policy: Optional[List[str]] = typer.Option(None, "--policy", help="Policy timeline for the plan section (repeatable); added to those the inventory names."),
    capacity: Optional[str] = typer.Option(None, "--capacity", help="Plan capacity: migrations in parallel (3), person-weeks per quarter (40pw), or both."),
    fail_on: Optional[VerdictChoice] = typer.Option(None, "--fail-on", help="Exit 1 if any system is at or above this verdict."),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
    hardware: Optional[str] = typer.Option(None, "--hardware", help=HARDWARE_HELP),
) -> None:
    """Write the Markdown report for the compliance file (ranking, plan, sensitivity)."""
    from pathlib import Path

    from pqtriage.formats.markdown.plan import plan_section
    from pqtriage.formats.markdown.sensitivity import sensitivity_markdown
    from pqtriage.formats.markdown.triage import render_report
    from pqtriage.formats.svg.plan import plan_svg
    from pqtriage.formats.table.summary import summary_block
    from pqtriage.pipeline import parse_as_of, prepare

    run = prepare(inventory, profile, parse_as_of(as_of), cbom_defaults, hardware)
    result = run.result
    the_plan = run.plan(tuple(policy or ()), capacity)
    chart = chart_path_for(output) if to_file(output) and output else None
    sections = [
        plan_section(the_plan, Path(chart).name if chart else None),
        sensitivity_markdown(run.sensitivity()),
    ]
    if chart:
        from pqtriage.cli.output import write_atomic

        write_atomic(chart, plan_svg(the_plan))
    emit(render_report(result, sections), output)
    console(stderr=True).print(summary_block(result))
    raise typer.Exit(fail_code(result, fail_on))
