"""Terminal view: the ranked table and its summary, as inert rich renderables."""

from __future__ import annotations

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.formats.notes import CAUTIONS
from pqtriage.formats.text import visible
from pqtriage.model.verdict import SystemAssessment, TriageResult, Verdict

VERDICT_LABEL: dict[Verdict, str] = {
    Verdict.CLASSICALLY_BROKEN: "broken now",
    Verdict.EXPOSED: "exposed",
    Verdict.UNASSESSED: "unassessed",
    Verdict.WITHIN_MARGIN: "in margin",
    Verdict.QUANTUM_RESISTANT: "resistant",
}
"""Short labels for narrow terminals; the legend spells each out."""

VERDICT_STYLE: dict[Verdict, str] = {
    Verdict.CLASSICALLY_BROKEN: "bold red",
    Verdict.EXPOSED: "red",
    Verdict.UNASSESSED: "bold yellow",
    Verdict.WITHIN_MARGIN: "yellow",
    Verdict.QUANTUM_RESISTANT: "green",
}

_PURPOSE_SHORT = {
    "key-establishment": "kex",
    "encryption": "enc",
    "signature": "sig",
    "authentication": "auth",
    "integrity": "mac",
}


def _years(value: float) -> str:
    return f"{value:g}"


def short_replacement(text: str | None) -> str:
    """The first recommendation of a replacement text, without its citation."""
    if not text:
        return "-"
    head = text.split(";")[0]
    head = head.split(" or ")[0]
    return head.split(" (")[0].strip()


def _start_by(item: SystemAssessment, as_of: object) -> Text:
    """The start-by date, or 'overdue' when it has passed (the JSON keeps the date)."""
    if item.start_by is None:
        return Text("-")
    if item.start_by <= as_of:  # type: ignore[operator]
        return Text("overdue", style="red")
    return Text(item.start_by.isoformat())


def _row(item: SystemAssessment, as_of: object) -> list[RenderableType]:
    weakest = item.weakest
    if weakest is None:
        algo = Text("(no uses)")
        x = "-"
        replacement = "-"
    else:
        spec = weakest.deciding or weakest.spec
        name = spec.name if spec else weakest.use.algorithm
        algo = Text(visible(name))
        algo.append(f" {_PURPOSE_SHORT[weakest.use.purpose.value]}", style="dim")
        x = _years(weakest.x_years)
        replacement = short_replacement(weakest.replacement)
    probability = "-" if item.exposure_probability is None else f"{item.exposure_probability:.0%}"
    start_by = _start_by(item, as_of)
    system = Text(visible(item.system.id))
    if item.system.assumed:
        system.append("*", style="bold")
    return [
        str(item.rank),
        system,
        algo,
        x,
        _years(item.system.migration_years),
        start_by,
        probability,
        Text(VERDICT_LABEL[item.verdict], style=VERDICT_STYLE[item.verdict]),
        Text(visible(replacement)),
    ]


def ranked_table(result: TriageResult, top: int | None = None) -> Table:
    """The ranked table: one row per system, most urgent first."""
    table = Table(
        title=Text(f"Post-quantum triage of {visible(result.inventory.organization)}"),
        caption=Text(f"as of {result.as_of.isoformat()}, profile {visible(result.profile.name)}"),
        header_style="bold",
        box=box.SIMPLE_HEAD,
        expand=False,
        pad_edge=False,
        collapse_padding=True,
    )
    table.add_column("#", justify="right", no_wrap=True)
    table.add_column("System", overflow="fold", min_width=19)
    table.add_column("Weakest use", overflow="fold", min_width=12)
    table.add_column("x", justify="right", no_wrap=True)
    table.add_column("y", justify="right", no_wrap=True)
    table.add_column("Start by", no_wrap=True)
    table.add_column("P(exp)", justify="right", no_wrap=True)
    table.add_column("Verdict", no_wrap=True)
    table.add_column("Replace with", overflow="fold", min_width=10)
    items = result.items if top is None else result.items[:top]
    for item in items:
        table.add_row(*_row(item, result.as_of))
    return table


def summary_block(result: TriageResult, top: int | None = None) -> Text:
    """Counts by verdict, what is overdue, the earliest start date and a caution."""
    summary = result.summary
    text = Text()
    text.append(f"{summary.systems} systems, {summary.uses} uses: ")
    parts = []
    for verdict in Verdict:
        parts.append((f"{summary.counts[verdict]} {VERDICT_LABEL[verdict]}", VERDICT_STYLE[verdict]))
    for index, (label, style) in enumerate(parts):
        if index:
            text.append(", ")
        text.append(label, style=style)
    text.append("\n")
    if top is not None and top < summary.systems:
        text.append(f"Showing the top {top} of {summary.systems} systems.\n")
    if summary.overdue:
        shown = ", ".join(visible(s) for s in summary.overdue[:8])
        more = f" and {len(summary.overdue) - 8} more" if len(summary.overdue) > 8 else ""
        text.append(f"Overdue (start-by date passed or broken now): {shown}{more}\n", style="red")
    upcoming = sorted(i.start_by for i in result.items if i.start_by and i.start_by > result.as_of)
    if upcoming:
        text.append(f"Next start-by date still ahead: {upcoming[0].isoformat()}\n")
    if any(item.system.assumed for item in result.items):
        text.append("* some x or y values are assumed defaults, not inventory facts\n")
    for warning in result.inventory.warnings[:5]:
        text.append(f"warning: {visible(warning)}\n", style="yellow")
    text.append(
        "x = years data or signatures must stay secure, y = migration years, "
        "P(exp) = probability the CRQC arrives before x + y.\n",
        style="dim",
    )
    text.append(f"Caution: {CAUTIONS[0].split(':')[0]}; {CAUTIONS[2].split('.')[0].lower()}. "
                "Follow NIST, your national agency and your regulator.", style="dim")
    return text


def terminal_view(result: TriageResult, top: int | None = None) -> RenderableType:
    """Table plus summary, ready for Console.print."""
    return Group(ranked_table(result, top), summary_block(result, top))
