"""`pqtriage plan`: deadlines and a dependency-aware migration schedule."""

from __future__ import annotations

from enum import Enum
from typing import List, Optional

import typer


class PlanFormat(str, Enum):
    """--format values of plan."""

    table = "table"
    markdown = "markdown"
    json = "json"


class PlanPeriod(str, Enum):
    """--period values of plan."""

    year = "year"
    quarter = "quarter"


POLICY_HELP = ("Policy timeline to check (repeatable): nist-ir-8547, cnsa2, uk-ncsc, eu-roadmap, au-ism, "
               "ca-roadmap, bsi, nsm-10. Added to those the inventory names.")
CAPACITY_HELP = "Migrations in parallel (3), person-weeks per quarter (40pw), or both (3,40pw)."


def chart_path_for(output: str) -> str:
    """The timeline chart's file name beside a Markdown file: report.md -> report-timeline.svg."""
    from pathlib import Path

    path = Path(output)
    return str(path.with_name(f"{path.stem}-timeline.svg"))


def register(app: typer.Typer) -> None:
    """Add the plan command to the app."""

    @app.command("plan")
    def plan(
        inventory: str = typer.Argument(..., help="Inventory file (pqtriage YAML or CycloneDX JSON)."),
        policy: Optional[List[str]] = typer.Option(None, "--policy", help=POLICY_HELP),
        capacity: Optional[str] = typer.Option(None, "--capacity", help=CAPACITY_HELP),
        output_format: PlanFormat = typer.Option(PlanFormat.table, "--format", "-f", help="Output format."),
        period: PlanPeriod = typer.Option(PlanPeriod.year, "--period", help="Group the terminal view by year or quarter."),
        output: Optional[str] = typer.Option(None, "--output", "-o", help="Write to this file (Markdown also writes NAME-timeline.svg beside it)."),
        profile: Optional[str] = typer.Option(None, "--profile", help="Threat profile (shipped name or YAML file)."),
        as_of: Optional[str] = typer.Option(None, "--as-of", help="Date treated as today (YYYY-MM-DD)."),
        sensitivity: bool = typer.Option(False, "--sensitivity", help="Also show which systems change verdict if the CRQC moves -5..+5 years."),
        cbom_defaults: Optional[str] = typer.Option(None, "--cbom-defaults", help="For a CycloneDX input: YAML side file with values a CBOM cannot carry."),
    ) -> None:
        """Plan the migration: deadlines per system, schedule under capacity, critical path."""
        import json
        from pathlib import Path

        from rich.console import Console

        from pqtriage.output import write_atomic
        from pqtriage.pipeline import parse_as_of, prepare
        from pqtriage.plan.jsonout import plan_to_json
        from pqtriage.plan.markdown import plan_section
        from pqtriage.plan.svg import plan_svg
        from pqtriage.plan.view import plan_view

        run = prepare(inventory, profile, parse_as_of(as_of), cbom_defaults)
        the_plan = run.plan(tuple(policy or ()), capacity)
        console = Console(highlight=False)
        if output_format == PlanFormat.table:
            console.print(plan_view(the_plan, period.value))
            if sensitivity:
                from pqtriage.formats.sensitivity_view import sensitivity_table

                console.print(sensitivity_table(run.sensitivity()))
            return
        if output_format == PlanFormat.json:
            text = json.dumps(plan_to_json(the_plan), indent=2, ensure_ascii=False) + "\n"
        else:
            chart = chart_path_for(output) if output else None
            text = plan_section(the_plan, Path(chart).name if chart else None)
            if chart:
                write_atomic(chart, plan_svg(the_plan))
        if output and output != "-":
            write_atomic(output, text)
        else:
            typer.echo(text, nl=False)
