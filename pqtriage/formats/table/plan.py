"""Terminal view of a plan: systems grouped by the quarter or year they start.

Returns an inert rich renderable; the CLI prints it. Inventory text is wrapped
in :class:`rich.text.Text` (no markup parsing) with control characters shown as
``\\xNN`` escapes, so names cannot style or move the terminal.
"""

from __future__ import annotations

from typing import Literal

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.errors import chain_text
from pqtriage.formats.text import MAX_CELL_CHARACTERS, cell
from pqtriage.plan.calendar import quarter_label, quarter_of
from pqtriage.plan.planner import Plan, SystemPlan, plan_status

Period = Literal["quarter", "year"]
STATUS_STYLE: dict[str, str] = {
    "misses deadline": "bold red",
    "late start": "yellow",
    "undetermined": "magenta",
    "on time": "green",
}
"""Terminal style of each plan status word."""


MAX_TIMELINE = 100
"""Periods drawn in the timeline chart (more than a 100-column terminal shows)."""


def literal(text: str, style: str = "", limit: int = MAX_CELL_CHARACTERS) -> Text:
    """Input text shown as written: no markup, invisible characters escaped, bounded length."""
    return Text(cell(text, limit), style=style)


def status_of(system: SystemPlan) -> tuple[str, str]:
    """Short status word and its style."""
    word = plan_status(system)
    return word, STATUS_STYLE[word]


def _period_key(plan: Plan, quarter: int, period: Period) -> int:
    return (plan.origin + quarter) // 4 if period == "year" else plan.origin + quarter


def _period_label(plan: Plan, quarter: int, period: Period) -> str:
    if period == "year":
        return str((plan.origin + quarter) // 4)
    return quarter_label(plan.origin, quarter)


def _timeline(plan: Plan, system: SystemPlan, period: Period, first: int, last: int) -> Text:
    """One character per period: █ migrating, S start-by, D earliest deadline, · idle."""
    first_active = _period_key(plan, system.slot.start, period)
    last_active = _period_key(plan, system.slot.finish, period)
    marks: dict[int, str] = {}
    if system.candidate.start_by is not None:
        marks[_period_key(plan, quarter_of(plan.origin, system.candidate.start_by), period)] = "S"
    earliest = system.deadlines.earliest
    if earliest is not None:
        marks[_period_key(plan, quarter_of(plan.origin, earliest.date), period)] = "D"
    text = Text()
    _, style = status_of(system)
    run_char, run_style, run_length = "", "", 0  # consecutive equal cells go in as one span
    for key in range(first, last + 1):
        active = first_active <= key <= last_active
        if key in marks:
            char, char_style = marks[key], "bold reverse" if active else "bold"
        elif active:
            char, char_style = "█", style
        else:
            char, char_style = "·", "dim"
        if (char, char_style) != (run_char, run_style):
            if run_length:
                text.append(run_char * run_length, style=run_style)
            run_char, run_style, run_length = char, char_style, 0
        run_length += 1
    if run_length:
        text.append(run_char * run_length, style=run_style)
    return text


def plan_view(plan: Plan, period: Period = "year") -> RenderableType:
    """The plan for a terminal: one row per system, grouped by the period it starts in."""
    first_q = 0
    last_q = max((s.slot.finish for s in plan.systems), default=0)
    for system in plan.systems:
        dates = [system.candidate.start_by] + [r.deadline.date for r in system.results]
        for date in dates:
            if date is not None:
                last_q = max(last_q, quarter_of(plan.origin, date))
    first = _period_key(plan, first_q, period)
    # The chart is cropped at the terminal's width anyway: draw at most MAX_TIMELINE periods
    # (a chain over thousands of years would otherwise draw millions of characters).
    last = min(_period_key(plan, last_q, period), first + MAX_TIMELINE - 1)
    unit = "year" if period == "year" else "quarter"
    table = Table(box=box.SIMPLE_HEAD, pad_edge=False, collapse_padding=True, title_justify="left")
    table.add_column("Period", no_wrap=True)
    table.add_column("System", overflow="fold", min_width=12)
    table.add_column("Rank", justify="right", no_wrap=True)
    table.add_column("Window", no_wrap=True)
    table.add_column("Start by", no_wrap=True)
    table.add_column("Earliest deadline", overflow="fold", min_width=14)
    table.add_column("Slack (d)", justify="right", no_wrap=True)
    table.add_column("Status", min_width=10, overflow="fold")
    chart = Table(box=box.SIMPLE_HEAD, pad_edge=False)
    chart.add_column("System", no_wrap=True, overflow="ellipsis", max_width=24)
    chart.add_column(
        f"{_period_label(plan, first_q, period)} … {_period_label(plan, last_q, period)}",
        no_wrap=True,
        overflow="crop",
    )
    current: int | None = None
    for system in plan.systems:
        key = _period_key(plan, system.slot.start, period)
        group = ""
        if key != current:
            if current is not None:
                table.add_section()
            group = _period_label(plan, system.slot.start, period)
            current = key
        item = system.candidate
        earliest = system.deadlines.earliest
        word, style = status_of(system)
        ident = literal(item.id, style="bold" if system.on_critical_path else "")
        name = ident.copy()
        name.append("\n")
        name.append(literal(item.name, style="dim"))
        table.add_row(
            Text(group, style="bold"),
            name,
            str(item.priority_rank),
            f"{quarter_label(plan.origin, system.slot.start)}–"
            f"{quarter_label(plan.origin, system.slot.finish)}",
            item.start_by.isoformat() if item.start_by else "-",
            Text.assemble(literal(str(earliest.date)), "\n", literal(f"{earliest.kind} ({earliest.label})"))
            if earliest
            else "-",
            "" if system.deadline_slack_days is None else str(system.deadline_slack_days),
            Text(word, style=style),
        )
        chart.add_row(ident, _timeline(plan, system, period, first, last))
    header = Text(
        f"Migration plan from {plan.start} (made {plan.as_of}); capacity "
        f"{plan.capacity.describe()}; policies "
    )
    header.append(literal(", ".join(
        p.id if p.status == "final" else f"{p.id} ({p.status})" for p in plan.policies
    )))
    legend = Text(
        f"Timeline: 1 character = 1 {unit}; █ migrating, S start-by, D earliest deadline; "
        "bold id: critical path",
        style="dim",
    )
    parts: list[RenderableType] = [header, table, chart, legend]
    path = Text("Critical path: ")
    path.append(literal(chain_text(list(plan.critical_path)) or "none", limit=4 * MAX_CELL_CHARACTERS))
    parts.append(path)
    for system in plan.systems:
        for miss in system.misses:
            line = Text("  ")
            line.append(literal(system.candidate.id, style="bold"))
            line.append(f" misses {miss.target} {miss.date}: ")
            line.append(literal("; ".join(f.text for f in miss.fixes) or "no fix found",
                                limit=4 * MAX_CELL_CHARACTERS))
            parts.append(line)
        for reason in system.deadlines.undetermined:
            line = Text("  ")
            line.append(literal(system.candidate.id, style="bold"))
            line.append(" undetermined: ")
            line.append(literal(reason, limit=4 * MAX_CELL_CHARACTERS))
            parts.append(line)
    return Group(*parts)
