"""`pqtriage report`: the Markdown report for the compliance file (ranking, plan, sensitivity)."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any, List, Optional

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
    chart_path_for,
    check_fail_on,
    check_outputs,
    console,
    emit,
    fail_code,
    profile_input,
    to_file,
    view_of,
)
from pqtriage.errors import UsageError


def report_command(
    inventory: str = typer.Argument(..., help="Inventory file (pqtriage YAML or CycloneDX JSON)."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Markdown file to write (stdout if absent or -); the timeline chart goes beside it as NAME-timeline.svg. " + OUTPUT_HELP),
    profile: Optional[str] = typer.Option(None, "--profile", help=PROFILE_HELP),
    as_of: Optional[str] = typer.Option(None, "--as-of", help=AS_OF_HELP),
    policy: Optional[List[str]] = typer.Option(None, "--policy", help="Policy timeline for the plan section (repeatable); added to those the inventory names."),
    capacity: Optional[str] = typer.Option(None, "--capacity", help="Plan capacity: migrations in parallel (3), person-weeks per quarter (40pw), or both."),
    fail_on: Optional[str] = typer.Option(None, "--fail-on", metavar="VERDICT", callback=check_fail_on, help=FAIL_ON_HELP),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help=CBOM_DEFAULTS_HELP),
    hardware: Optional[str] = typer.Option(None, "--hardware", help=HARDWARE_HELP),
    columns: Optional[str] = typer.Option(None, "--columns", help=COLUMNS_HELP),
    where: Optional[str] = typer.Option(None, "--where", help=WHERE_HELP),
    top: Optional[int] = typer.Option(None, "--top", min=1, help=TOP_HELP),
    group_by: Optional[str] = typer.Option(None, "--group-by", help=GROUP_BY_HELP),
    by: Optional[str] = typer.Option(None, "--by", help="Write one action list per owner (or business_unit, or another grouping field): with -o, a folder of Markdown files and an index."),
) -> None:
    """Write the Markdown report for the compliance file (ranking, plan, sensitivity); with --by,
    one action list per owner or business unit."""
    from pathlib import Path

    from pqtriage.formats.markdown.plan import plan_section
    from pqtriage.formats.markdown.sensitivity import sensitivity_markdown
    from pqtriage.formats.markdown.triage import render_report
    from pqtriage.formats.svg.plan import plan_svg
    from pqtriage.formats.table.summary import summary_block
    from pqtriage.pipeline import parse_as_of, prepare

    inputs = [inventory, profile_input(profile), cbom_defaults, hardware, columns]
    chart = chart_path_for(output) if by is None and to_file(output) and output else None
    if by is None:  # with --by, -o names a folder: each file in it is checked as it is written
        check_outputs(output, inputs, chart)
    run = prepare(inventory, profile, parse_as_of(as_of), cbom_defaults, hardware, columns)
    if by is not None:
        if group_by is not None:
            raise UsageError("--by and --group-by both group the report", hint="give one of them")
        result = view_of(run.result, where, top, by, "markdown")
        write_action_lists(result, output, inputs)
        console(stderr=True).print(summary_block(result))
        raise typer.Exit(fail_code(result, fail_on))
    result = view_of(run.result, where, top, group_by, "markdown")
    the_plan = run.plan(tuple(policy or ()), capacity)
    sections = [
        plan_section(the_plan, Path(chart).name if chart else None),
        sensitivity_markdown(run.sensitivity()),
    ]
    if chart:
        from pqtriage.cli.output import write_atomic

        write_atomic(chart, plan_svg(the_plan), inputs)
    emit(render_report(result, sections), output, inputs)
    console(stderr=True).print(summary_block(result))
    raise typer.Exit(fail_code(result, fail_on))


def write_action_lists(result: Any, output: Optional[str], inputs: Sequence[Optional[str]] = ()) -> None:
    """One Markdown action list per group; with -o DIR one file each plus index.md, else stdout."""
    from pqtriage.formats.markdown.actions import action_index, action_lists

    field = result.selection.group_by
    lists = action_lists(result, field)
    if not to_file(output):
        emit("\n\n".join(text for _, _, text in lists), output, inputs)
        return
    import re
    from pathlib import Path

    from pqtriage.cli.output import write_atomic
    from pqtriage.formats.text import visible

    folder = Path(str(output))
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise UsageError(f"cannot create the folder {output} ({exc.strerror})",
                         hint="with --by, -o names a folder for the action lists") from exc
    taken: set[str] = {"index"}
    files = []
    for label, count, text in lists:
        base = re.sub(r"[^a-z0-9]+", "-", label.lower()).strip("-")[:60] or "list"
        name, number = base, 2
        while name in taken:
            name, number = f"{base}-{number}", number + 1
        taken.add(name)
        write_atomic(folder / f"{name}.md", text, inputs)
        files.append((label, f"{name}.md", count))
    write_atomic(folder / "index.md", action_index(result, field, files), inputs)
    console(stderr=True).print(f"wrote {len(files)} action lists and index.md to {visible(output)}", markup=False)

