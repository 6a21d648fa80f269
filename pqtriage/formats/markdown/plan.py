"""The plan section of the Markdown report.

Text from the inventory goes through :func:`pqtriage.formats.text.md_escape`, so a system called
``a|b <script>`` shows literally and cannot break a table or inject HTML.
"""

from __future__ import annotations

from pqtriage.formats.text import md_escape
from pqtriage.plan.calendar import quarter_label
from pqtriage.plan.planner import Plan, SystemPlan


def _yes_no(value: bool | None) -> str:
    return {True: "yes", False: "**no**", None: "undetermined"}[value]


def _row(plan: Plan, system: SystemPlan) -> str:
    item = system.candidate
    earliest = system.deadlines.earliest
    deadline = (
        f"{earliest.date} ({md_escape(earliest.label)} {md_escape(earliest.kind)})"
        if earliest
        else "none"
    )
    start_by = item.start_by.isoformat() if item.start_by else "none"
    slack = "" if system.deadline_slack_days is None else f"{system.deadline_slack_days}"
    cells = [
        md_escape(item.id) + (" \\*" if system.on_critical_path else ""),
        md_escape(item.name),
        str(item.priority_rank),
        f"{system.planned_start} ({quarter_label(plan.origin, system.slot.start)})",
        f"{system.planned_finish} ({quarter_label(plan.origin, system.slot.finish)})",
        start_by,
        _yes_no(system.meets_start_by) if item.start_by else "n/a",
        deadline,
        _yes_no(system.meets_deadlines),
        slack,
    ]
    return "| " + " | ".join(cells) + " |"


def plan_section(plan: Plan, chart_name: str | None = None, heading_level: int = 2) -> str:
    """The plan as a Markdown section.

    Args:
        plan: the plan.
        chart_name: file name of the timeline SVG written beside the report, or None.
        heading_level: level of the section heading (2 = ``##``).
    """
    h = "#" * heading_level
    lines = [f"{h} Migration plan", ""]
    lines.append(
        f"Plan made on {plan.as_of}, starting {plan.start}, in calendar quarters; "
        f"capacity: {md_escape(plan.capacity.describe())}. Policies: "
        + ", ".join(f"{md_escape(p.id)} ({md_escape(p.source)}, {p.flag}"
                   + ("" if p.status == "final" else f", {p.status}") + ")" for p in plan.policies)
        + "."
    )
    lines.append("")
    if chart_name:
        lines += [f"![Migration timeline]({chart_name.replace(' ', '%20')})", ""]
    lines.append(
        "| System | Name | Rank | Start | Finish | Start by | Meets start-by "
        "| Earliest deadline | Meets deadlines | Slack (days) |"
    )
    lines.append("|---|---|---|---|---|---|---|---|---|---|")
    lines += [_row(plan, s) for s in plan.systems]
    lines.append("")
    path = " → ".join(md_escape(i) for i in plan.critical_path) or "none"
    lines.append(f"\\* on the critical path: {path}.")
    lines.append("")
    lines += [f"{h}# Deadlines per system", ""]
    for system in plan.systems:
        lines.append(f"- **{md_escape(system.candidate.id)}**:")
        for result in system.results:
            d = result.deadline
            status = "met" if result.met else "**missed**"
            lines.append(
                f"  - {d.date} {md_escape(d.label)} {md_escape(d.kind)}: {status} "
                f"({result.slack_days} days); source: {md_escape(d.source)}"
            )
        for reason in system.deadlines.undetermined:
            lines.append(f"  - undetermined: {md_escape(reason)}")
        if not system.results and not system.deadlines.undetermined:
            lines.append("  - no policy deadline applies")
    lines.append("")
    missed = [s for s in plan.systems if s.misses]
    lines += [f"{h}# What would fix each miss", ""]
    if not missed:
        lines.append("Every system meets its start-by date and its deadlines.")
    for system in missed:
        for miss in system.misses:
            latest = f"; latest start {miss.latest_start}" if miss.latest_start else ""
            lines.append(
                f"- **{md_escape(system.candidate.id)}** misses {md_escape(miss.target)} "
                f"({miss.date}{latest}):"
            )
            for fix in miss.fixes:
                alone = "enough alone" if fix.sufficient else "helps, not enough alone"
                lines.append(f"  - {md_escape(fix.kind)}: {md_escape(fix.text)} ({alone})")
    lines.append("")
    if plan.organisation_milestones:
        lines += [f"{h}# Organisation milestones", ""]
        for d in plan.organisation_milestones:
            lines.append(
                f"- {d.date} {md_escape(d.label)} {md_escape(d.kind)}: {md_escape(d.source)}"
            )
        lines.append("")
    assumed = [s.candidate.id for s in plan.systems if s.effort_assumed or s.vendor_assumed]
    if assumed:
        lines.append(
            "Defaults applied (effort "
            f"{plan.settings.person_weeks_per_year:g} person-weeks per migration year, vendor "
            f"readiness {md_escape(plan.settings.default_vendor_readiness)}) for: "
            + ", ".join(md_escape(i) for i in assumed)
            + "."
        )
        lines.append("")
    return "\n".join(lines)
