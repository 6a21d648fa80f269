"""Timeline chart of a plan as a standalone SVG document (a string).

One ``<rect class="bar">`` per system for its migration window (with the system
id in ``data-system`` and a ``<title>`` tooltip), a triangle for its Mosca
start-by date, a tick per deadline date (red when missed), a year axis, the plan
start and a legend. All inventory text is XML-escaped and control characters
(which XML 1.0 forbids) are shown as ``\\xNN``.
"""

from __future__ import annotations

import datetime
import math

from pqtriage.formats.text import xml_attr, xml_text
from pqtriage.plan.planner import Plan, SystemPlan, plan_status

WIDTH = 1100
LABEL_WIDTH = 300
RIGHT_MARGIN = 30
TOP = 70
ROW_HEIGHT = 28
BAR_HEIGHT = 14
LEGEND_HEIGHT = 70
FONT = "DejaVu Sans, Verdana, Arial, sans-serif"
COLOURS = {
    "on time": "#2e7d32",
    "late start": "#f2a900",
    "misses deadline": "#c62828",
    "undetermined": "#8e24aa",
}
START_BY_COLOUR = "#1565c0"
DEADLINE_MET_COLOUR = "#424242"
DEADLINE_MISSED_COLOUR = "#b71c1c"
def _shorten(text: str, limit: int) -> str:
    return text if len(text) <= limit else text[: limit - 1] + "…"


def _year_start(year: int) -> int:
    """Proleptic Gregorian ordinal of 1 January of a year, also past 9999 (datetime stops there)."""
    before = year - 1
    return before * 365 + before // 4 - before // 100 + before // 400 + 1


class _Scale:
    """Maps dates to x positions over whole calendar years."""

    def __init__(self, first_year: int, last_year: int) -> None:
        self.first_year = first_year
        self.first = _year_start(first_year)
        self.last = _year_start(last_year + 1)
        self.span = self.last - self.first
        self.left = LABEL_WIDTH
        self.width = WIDTH - LABEL_WIDTH - RIGHT_MARGIN

    def x(self, day: datetime.date | int) -> float:
        ordinal = day if isinstance(day, int) else day.toordinal()
        return round(self.left + self.width * (ordinal - self.first) / self.span, 2)


def _years(plan: Plan) -> tuple[int, int]:
    dates = [plan.start]
    for system in plan.systems:
        dates += [system.planned_finish] + [r.deadline.date for r in system.results]
        if system.candidate.start_by is not None:
            dates.append(system.candidate.start_by)
    # One spare year on the right, so that end-of-year deadlines are not on the border. The
    # axis starts two years before the plan: start-by dates decades in the past (overdue) are
    # pinned to the left edge with an "overdue" label instead of squeezing the whole chart.
    return max(min(d.year for d in dates), plan.start.year - 2), max(d.year for d in dates) + 1


def _row(scale: _Scale, system: SystemPlan, index: int) -> list[str]:
    item = system.candidate
    y = TOP + index * ROW_HEIGHT
    mid = y + ROW_HEIGHT / 2
    word = plan_status(system)
    out = [f'<g class="system" data-system={xml_attr(item.id)}>']
    label = _shorten(f"{item.id} — {item.name}", 38)
    weight = ' font-weight="bold"' if system.on_critical_path else ""
    out.append(
        f'<text x="{LABEL_WIDTH - 8}" y="{mid + 4}" text-anchor="end"{weight}>{xml_text(label)}</text>'
    )
    x0 = scale.x(system.planned_start)
    x1 = scale.x(system.planned_finish.toordinal() + 1)
    tooltip = f"{item.id}: {system.planned_start} to {system.planned_finish} ({word})"
    out.append(
        f'<rect class="bar" data-system={xml_attr(item.id)} x="{x0}" y="{mid - BAR_HEIGHT / 2}" '
        f'width="{max(1.0, round(x1 - x0, 2))}" height="{BAR_HEIGHT}" rx="2" '
        f'fill="{COLOURS[word]}"><title>{xml_text(tooltip)}</title></rect>'
    )
    if item.start_by is not None:
        sx = max(scale.x(item.start_by), scale.left + 5)
        top = mid - BAR_HEIGHT / 2 - 1
        if item.start_by.toordinal() < scale.first:
            out.append(
                f'<text class="overdue" x="{sx + 8}" y="{top}" font-size="10" '
                f'fill="{START_BY_COLOUR}">overdue since {item.start_by.year}</text>'
            )
        out.append(
            f'<polygon class="start-by" points="{sx - 5},{top - 7} {sx + 5},{top - 7} {sx},{top}" '
            f'fill="{START_BY_COLOUR}"><title>{xml_text(f"{item.id}: start by {item.start_by}")}'
            "</title></polygon>"
        )
    by_date: dict[datetime.date, list[str]] = {}
    missed: set[datetime.date] = set()
    for result in system.results:
        d = result.deadline
        by_date.setdefault(d.date, []).append(f"{d.label} {d.kind} {d.date} ({d.source})")
        if not result.met:
            missed.add(d.date)
    for date, notes in sorted(by_date.items()):
        dx = scale.x(date.toordinal() + 1)
        colour = DEADLINE_MISSED_COLOUR if date in missed else DEADLINE_MET_COLOUR
        # A white halo keeps the tick visible where it crosses a bar of the same colour.
        out.append(
            f'<line x1="{dx}" x2="{dx}" y1="{y + 3}" y2="{y + ROW_HEIGHT - 3}" '
            'stroke="#ffffff" stroke-width="5.5"/>'
        )
        out.append(
            f'<line class="deadline" x1="{dx}" x2="{dx}" y1="{y + 3}" y2="{y + ROW_HEIGHT - 3}" '
            f'stroke="{colour}" stroke-width="2.5"><title>{xml_text("; ".join(notes))}</title></line>'
        )
    out.append("</g>")
    return out


def _legend(y: float) -> list[str]:
    out = [f'<g class="legend" transform="translate({LABEL_WIDTH},{y})">']
    x = 0
    for word, colour in COLOURS.items():
        out.append(f'<rect x="{x}" y="0" width="22" height="12" rx="2" fill="{colour}"/>')
        out.append(f'<text x="{x + 28}" y="11">{xml_text(word)}</text>')
        x += 40 + 8 * len(word)
    out.append(
        f'<polygon points="0,26 10,26 5,33" fill="{START_BY_COLOUR}"/>'
        '<text x="16" y="35">start-by date (Mosca)</text>'
        f'<line x1="190" x2="190" y1="24" y2="38" stroke="{DEADLINE_MET_COLOUR}" stroke-width="2.5"/>'
        '<text x="198" y="35">policy deadline met</text>'
        f'<line x1="360" x2="360" y1="24" y2="38" stroke="{DEADLINE_MISSED_COLOUR}" '
        'stroke-width="2.5"/><text x="368" y="35">policy deadline missed</text>'
        '<line x1="550" x2="550" y1="24" y2="38" stroke="#0277bd" stroke-dasharray="3,2"/>'
        '<text x="558" y="35">plan start</text>'
    )
    out.append("</g>")
    return out


def plan_svg(plan: Plan, title: str = "Post-quantum migration timeline") -> str:
    """The plan as an SVG document: bars per system, start-by and deadline markers, legend."""
    first_year, last_year = _years(plan)
    scale = _Scale(first_year, last_year)
    rows = len(plan.systems)
    height = TOP + rows * ROW_HEIGHT + 20 + LEGEND_HEIGHT
    bottom = TOP + rows * ROW_HEIGHT
    subtitle = (
        f"Plan from {plan.start} (made {plan.as_of}); capacity {plan.capacity.describe()}; "
        f"policies {', '.join(p.id for p in plan.policies)}"
    )
    out = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        (
            f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height}" '
            f'viewBox="0 0 {WIDTH} {height}" font-family="{FONT}" font-size="12">'
        ),
        f"<title>{xml_text(title)}</title>",
        f'<rect x="0" y="0" width="{WIDTH}" height="{height}" fill="#ffffff"/>',
        f'<text x="12" y="24" font-size="16" font-weight="bold">{xml_text(title)}</text>',
        f'<text x="12" y="42" fill="#555555">{xml_text(subtitle)}</text>',
        '<g class="axis">',
    ]
    # Keep year labels from overlapping: at most about 24 labels and 200 grid lines.
    step = 1 if last_year - first_year < 16 else max(2, math.ceil((last_year - first_year + 1) / 24))
    grid = max(1, math.ceil((last_year - first_year + 2) / 200))
    for year in range(first_year, last_year + 2):
        x = scale.x(_year_start(year))
        if (year - first_year) % grid == 0:
            out.append(f'<line x1="{x}" x2="{x}" y1="{TOP - 6}" y2="{bottom}" stroke="#dddddd"/>')
        if year <= last_year and (year - first_year) % step == 0:
            mid = (x + scale.x(_year_start(year + 1))) / 2
            out.append(
                f'<text x="{round(mid, 2)}" y="{TOP - 10}" text-anchor="middle">{year}</text>'
            )
    out.append("</g>")
    for index in range(rows):
        if index % 2:
            out.append(
                f'<rect x="0" y="{TOP + index * ROW_HEIGHT}" width="{WIDTH}" '
                f'height="{ROW_HEIGHT}" fill="#f5f5f5" fill-opacity="0.6"/>'
            )
    start_x = scale.x(plan.start)
    out.append(
        f'<line class="plan-start" x1="{start_x}" x2="{start_x}" y1="{TOP - 4}" y2="{bottom}" '
        f'stroke="#0277bd" stroke-dasharray="3,2"><title>plan start {plan.start}</title></line>'
    )
    for index, system in enumerate(plan.systems):
        out += _row(scale, system, index)
    out += _legend(bottom + 20)
    out.append("</svg>")
    return "\n".join(out) + "\n"
