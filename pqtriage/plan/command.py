"""``pqtriage plan FILE``: a plain function the CLI wires; it builds and renders, never writes.

The CLI reads the inventory, runs the triage to get :class:`PlanCandidate` rows,
parses the options, then calls :func:`run_plan` and prints or writes what it returns
(the SVG beside the Markdown report, under the name it passed as ``chart_name``).
"""

from __future__ import annotations

import datetime
import json
from collections.abc import Sequence
from typing import Literal

from rich.console import RenderableType

from pqtriage.errors import UsageError
from pqtriage.plan.inputs import PlanCandidate
from pqtriage.plan.jsonout import plan_to_json
from pqtriage.plan.markdown import plan_section
from pqtriage.plan.planner import DEFAULT_SETTINGS, PlanSettings, build_plan
from pqtriage.plan.policies import Policy
from pqtriage.plan.scheduler import UNLIMITED, Capacity
from pqtriage.plan.svg import plan_svg
from pqtriage.plan.view import Period, plan_view

OutputFormat = Literal["table", "markdown", "json"]
OUTPUT_FORMATS: tuple[str, ...] = ("table", "markdown", "json")
DEFAULT_CHART_NAME = "plan-timeline.svg"
"""File name of the timeline chart the Markdown output refers to."""


def parse_capacity(text: str | None) -> Capacity:
    """Parse a ``--capacity`` value: ``N`` (migrations in parallel) or ``Npw`` (person-weeks
    per quarter); both may be given joined by a comma, for example ``3,40pw``. None or empty
    means unlimited.

    Raises:
        UsageError: for anything else.
    """
    if text is None or not text.strip():
        return Capacity()
    concurrent: int | None = None
    weeks: float | None = None
    for part in (p.strip().lower() for p in text.split(",")):
        try:
            if part.endswith("pw"):
                weeks = float(part[:-2])
            else:
                concurrent = int(part)
        except ValueError as exc:
            raise UsageError(
                f"--capacity '{text}' is not understood",
                hint="give N migrations in parallel (3), N person-weeks per quarter (40pw), or both (3,40pw)",
            ) from exc
    return Capacity(concurrent=concurrent, person_weeks_per_quarter=weeks)


def run_plan(
    candidates: Sequence[PlanCandidate],
    *,
    as_of: datetime.date,
    policies: Sequence[Policy],
    capacity: Capacity = UNLIMITED,
    output_format: OutputFormat = "table",
    period: Period = "year",
    settings: PlanSettings = DEFAULT_SETTINGS,
    chart_name: str = DEFAULT_CHART_NAME,
) -> tuple[RenderableType | str, str | None]:
    """Plan the migration and render it.

    Args:
        candidates: one per system, from the triage.
        as_of: date the plan is made for; the plan starts at the next quarter boundary.
        policies: selected policies (see :func:`pqtriage.plan.policies.select_policies`).
        capacity: migrations in parallel and/or person-weeks per quarter.
        output_format: table (a rich renderable), markdown or json (strings).
        period: quarter or year, for the terminal view.
        settings: planner defaults.
        chart_name: name the Markdown output uses for the SVG chart.

    Returns:
        (the rendered plan, the SVG chart text for markdown output, else None).

    Raises:
        PlanError: dependency cycle, unknown dependency, invalid planning value.
        UsageError: unknown output format or period.
    """
    if output_format not in OUTPUT_FORMATS:
        raise UsageError(
            f"unknown plan format '{output_format}'",
            hint=f"use one of: {', '.join(OUTPUT_FORMATS)}",
        )
    if period not in ("quarter", "year"):
        raise UsageError(f"unknown period '{period}'", hint="use quarter or year")
    plan = build_plan(candidates, as_of, policies, capacity, settings)
    if output_format == "json":
        return json.dumps(plan_to_json(plan), indent=2, ensure_ascii=False) + "\n", None
    if output_format == "markdown":
        return plan_section(plan, chart_name) + "\n", plan_svg(plan)
    return plan_view(plan, period), None
