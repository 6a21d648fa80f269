"""Terminal view of a triage result: the ranked table and its summary, as inert rich renderables."""

from __future__ import annotations

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.formats.bands import probability_range, system_band
from pqtriage.formats.labels import VERDICT_LABEL, flag_short, short_replacement, system_replacement
from pqtriage.formats.table.styles import VERDICT_STYLE
from pqtriage.formats.table.summary import summary_block
from pqtriage.formats.text import MAX_CELL_CHARACTERS, cell, visible
from pqtriage.model.verdict import SystemAssessment, TriageResult

_PURPOSE_SHORT = {
    "key-establishment": "kex",
    "encryption": "enc",
    "signature": "sig",
    "authentication": "auth",
    "integrity": "mac",
}


def _years(value: float) -> str:
    return f"{value:g}"


def _date(day: object, as_of: object) -> Text:
    if day is None:
        return Text("-")
    if day <= as_of:  # type: ignore[operator]
        return Text("overdue", style="red")
    return Text(day.isoformat())  # type: ignore[attr-defined]


def _start_by(item: SystemAssessment, as_of: object) -> Text:
    """The start-by date, or 'overdue' when it has passed (the JSON keeps the date); the
    band's latest start-by beneath it, dim."""
    text = _date(item.start_by, as_of)
    band = system_band(item)
    latest_day = band.start_by[1] if band is not None else None
    if band is not None and latest_day != item.start_by and not (
        latest_day is not None and latest_day <= as_of  # type: ignore[operator]
    ):
        text.append("\n")
        latest = _date(band.start_by[1], as_of)
        text.append("..", style="dim")
        text.append(latest.plain, style="dim")
    return text


def _probability(item: SystemAssessment) -> Text:
    """P(exposed), with its 10-90 % band beneath it, dim."""
    if item.exposure_probability is None:
        return Text("-")
    text = Text(f"{item.exposure_probability:.0%}")
    band = probability_range(system_band(item))
    if band:
        text.append("\n" + band, style="dim")
    return text


def _row(item: SystemAssessment, as_of: object) -> list[RenderableType]:
    weakest = item.weakest
    if weakest is None:
        algo = Text("(no uses)")
        x = ""
        replacement = "-"
    else:
        spec = weakest.deciding or weakest.spec
        name = spec.name if spec else weakest.use.algorithm
        algo = Text(cell(name, MAX_CELL_CHARACTERS))
        algo.append(f" {_PURPOSE_SHORT[weakest.use.purpose.value]}", style="dim")
        x = _years(weakest.x_years)
        replacement = short_replacement(system_replacement(item))
    probability = _probability(item)
    start_by = _start_by(item, as_of)
    system = Text(cell(item.system.id, MAX_CELL_CHARACTERS))
    if item.system.assumed:
        system.append("*", style="bold")
    verdict = Text(VERDICT_LABEL[item.verdict], style=VERDICT_STYLE[item.verdict])
    for flag in dict.fromkeys(flag_short(f) for f in item.flags):
        verdict.append("\n+ ")
        verdict.append(visible(flag), style="yellow")
    return [
        str(item.rank),
        system,
        algo,
        f"{x}+{_years(item.system.migration_years)}" if x else "-",
        start_by,
        probability,
        "-" if item.priority is None else f"{item.priority.points:g}",
        verdict,
        Text(cell(replacement, MAX_CELL_CHARACTERS)),
    ]


def ranked_table(result: TriageResult, top: int | None = None, group: str | None = None,
                 items: tuple[SystemAssessment, ...] | None = None) -> Table:
    """The ranked table: one row per system, most urgent first (one group's rows if given)."""
    title = (f"Post-quantum triage of {cell(result.inventory.organization, MAX_CELL_CHARACTERS)}"
             if group is None else group)
    table = Table(
        title=Text(title),
        caption=Text(f"as of {result.as_of.isoformat()}, profile {cell(result.profile.name, MAX_CELL_CHARACTERS)}"
                     + ("; dim: 10-90 % band (latest start-by, P range); ranked by the central value"
                        if result.band is not None else "")),
        header_style="bold",
        box=box.SIMPLE_HEAD,
        expand=False,
        pad_edge=False,
        collapse_padding=True,
        padding=(0, 0),
    )
    table.add_column("#", justify="right", no_wrap=True)
    table.add_column("System", overflow="fold", min_width=12, max_width=19)
    table.add_column("Weakest use", overflow="fold", min_width=12, max_width=18)
    table.add_column("x+y", justify="right", no_wrap=True)
    table.add_column("Start by", no_wrap=True)
    table.add_column("P", justify="right", no_wrap=True)
    table.add_column("Pts", justify="right", no_wrap=True)
    table.add_column("Verdict", overflow="fold", min_width=18)
    table.add_column("Replace with", overflow="fold", min_width=12)
    rows = result.items if items is None else items
    for item in rows if top is None else rows[:top]:
        table.add_row(*_row(item, result.as_of))
    return table


def terminal_view(result: TriageResult, top: int | None = None) -> RenderableType:
    """Table (one per group with --group-by) plus summary, ready for Console.print."""
    selection = result.selection
    if selection is None or selection.group_by is None:
        return Group(ranked_table(result, top), summary_block(result, top))
    from pqtriage.model.view import groups

    tables: list[RenderableType] = []
    for label, items in groups(result, selection.group_by):
        count = f"{len(items)} system" + ("" if len(items) == 1 else "s")
        tables.append(ranked_table(result, None, f"{selection.group_by}: {cell(label, MAX_CELL_CHARACTERS)} ({count})", items))
    return Group(*tables, summary_block(result))
