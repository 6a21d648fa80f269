"""`pqtriage plan`: deadlines and a dependency-aware migration schedule.

:func:`run_plan` is the same as a plain function for callers that hold planning candidates
rather than an inventory: it builds the plan and returns it rendered; it never writes.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING, List, Literal, Optional

import typer

from pqtriage.cli.common import (
    CAPACITY_HELP,
    COLUMNS_HELP,
    HARDWARE_HELP,
    OUTPUT_HELP,
    POLICY_HELP,
    PlanFormat,
    PlanPeriod,
    chart_path_for,
    check_outputs,
    console,
    emit,
    plain_text,
    profile_input,
    to_file,
)
from pqtriage.errors import UsageError

if TYPE_CHECKING:  # annotations only: --help must not load the planner
    import datetime

    from rich.console import RenderableType

    from pqtriage.formats.table.plan import Period
    from pqtriage.plan.inputs import PlanCandidate
    from pqtriage.plan.planner import PlanSettings
    from pqtriage.plan.policies import Policy
    from pqtriage.plan.scheduler import Capacity

OutputFormat = Literal["table", "markdown", "json"]
OUTPUT_FORMATS: tuple[str, ...] = ("table", "markdown", "json")
DEFAULT_CHART_NAME = "plan-timeline.svg"
"""File name of the timeline chart the Markdown output refers to."""


def run_plan(
    candidates: Sequence[PlanCandidate],
    *,
    as_of: datetime.date,
    policies: Sequence[Policy],
    capacity: Capacity | None = None,
    output_format: OutputFormat = "table",
    period: Period = "year",
    settings: PlanSettings | None = None,
    chart_name: str = DEFAULT_CHART_NAME,
) -> tuple[RenderableType | str, str | None]:
    """Plan the migration and render it.

    Args:
        candidates: one per system, from the triage.
        as_of: date the plan is made for; the plan starts at the next quarter boundary.
        policies: selected policies (see :func:`pqtriage.plan.policies.select_policies`).
        capacity: migrations in parallel and/or person-weeks per quarter (None: unlimited).
        output_format: table (a rich renderable), markdown or json (strings).
        period: quarter or year, for the terminal view.
        settings: planner defaults (None: pqtriage.plan.planner.DEFAULT_SETTINGS).
        chart_name: name the Markdown output uses for the SVG chart.

    Returns:
        (the rendered plan, the SVG chart text for markdown output, else None).

    Raises:
        PlanError: dependency cycle, unknown dependency, invalid planning value.
        UsageError: unknown output format or period.
    """
    from pqtriage.plan.planner import DEFAULT_SETTINGS, build_plan
    from pqtriage.plan.scheduler import UNLIMITED

    if output_format not in OUTPUT_FORMATS:
        raise UsageError(
            f"unknown plan format '{output_format}'",
            hint=f"use one of: {', '.join(OUTPUT_FORMATS)}",
        )
    if period not in ("quarter", "year"):
        raise UsageError(f"unknown period '{period}'", hint="use quarter or year")
    plan = build_plan(candidates, as_of, policies, capacity or UNLIMITED, settings or DEFAULT_SETTINGS)
    if output_format == "json":
        from pqtriage.formats.json.plan import plan_json

        return plan_json(plan), None
    if output_format == "markdown":
        from pqtriage.formats.markdown.plan import plan_section
        from pqtriage.formats.svg.plan import plan_svg

        return plan_section(plan, chart_name) + "\n", plan_svg(plan)
    from pqtriage.formats.table.plan import plan_view

    return plan_view(plan, period), None


def plan(
    inventory: str = typer.Argument(..., help="Inventory file (pqtriage YAML or CycloneDX JSON)."),
    policy: Optional[List[str]] = typer.Option(None, "--policy", help=POLICY_HELP),
    capacity: Optional[str] = typer.Option(None, "--capacity", help=CAPACITY_HELP),
    output_format: PlanFormat = typer.Option(PlanFormat.table, "--format", "-f", help="Output format."),
    period: PlanPeriod = typer.Option(PlanPeriod.year, "--period", help="Group the terminal view by year or quarter."),
    output: Optional[str] = typer.Option(None, "--output", "-o", help="Write to this file (Markdown also writes NAME-timeline.svg beside it). " + OUTPUT_HELP),
    profile: Optional[str] = typer.Option(None, "--profile", help="Threat profile (shipped name or YAML file)."),
    as_of: Optional[str] = typer.Option(None, "--as-of", help="Date treated as today (YYYY-MM-DD)."),
    sensitivity: bool = typer.Option(False, "--sensitivity", help="Also show which systems change verdict if the CRQC moves -5..+5 years."),
    cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help="For a CycloneDX input: YAML side file with values a CBOM cannot carry."),
    columns: Optional[str] = typer.Option(None, "--columns", help=COLUMNS_HELP),
    hardware: Optional[str] = typer.Option(None, "--hardware", help=HARDWARE_HELP),
) -> None:
    """Plan the migration: deadlines per system, schedule under capacity, critical path."""
    from pathlib import Path

    from pqtriage.cli.output import write_atomic
    from pqtriage.pipeline import parse_as_of, prepare

    inputs = [inventory, profile_input(profile), cbom_defaults, hardware, columns]
    chart = chart_path_for(output) if output_format == PlanFormat.markdown and to_file(output) and output else None
    check_outputs(output, inputs, chart)
    run = prepare(inventory, profile, parse_as_of(as_of), cbom_defaults, hardware, columns)
    the_plan = run.plan(tuple(policy or ()), capacity)
    if output_format == PlanFormat.table:
        from rich.console import Group

        from pqtriage.formats.table.plan import plan_view

        view = plan_view(the_plan, period.value)
        if sensitivity:
            from pqtriage.formats.table.sensitivity import band_table, sensitivity_table

            moved = run.sensitivity()
            parts = [view, sensitivity_table(moved)]
            if moved.band_checked:
                parts.append(band_table(moved))
            view = Group(*parts)
        if to_file(output):
            emit(plain_text(view), output, inputs)
        else:
            console().print(view)
        return
    if output_format == PlanFormat.json:
        from pqtriage.formats.json.plan import plan_json

        text = plan_json(the_plan)
    else:
        from pqtriage.formats.markdown.plan import plan_section
        from pqtriage.formats.svg.plan import plan_svg

        text = plan_section(the_plan, Path(chart).name if chart else None)
        if chart:
            write_atomic(chart, plan_svg(the_plan), inputs)
    emit(text, output, inputs)
