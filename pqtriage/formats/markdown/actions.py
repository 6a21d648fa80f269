"""Action lists: for each owner (or business unit), their systems, verdicts, start-by dates and
the replacement of every use that needs one. How the work is handed out.
"""

from __future__ import annotations

from pqtriage.formats.labels import VERDICT_LABEL, short_replacement
from pqtriage.formats.markdown.triage import _start_by, _table, md
from pqtriage.formats.notes import CAUTIONS, assumptions
from pqtriage.formats.text import markdown_code
from pqtriage.model.verdict import SEVERITY, SystemAssessment, TriageResult, Verdict

NEEDS_ACTION = SEVERITY[Verdict.WITHIN_MARGIN]
"""Uses at or above this severity are listed with their replacement (resistant ones are not)."""


def _uses(item: SystemAssessment, as_of: object) -> list[list[str]]:
    rows = []
    for use in item.uses:
        if SEVERITY[use.verdict] < NEEDS_ACTION:
            continue
        spec = use.deciding or use.spec
        if use.verdict == Verdict.UNASSESSED:
            replacement = "check by hand: " + use.reason
        else:
            replacement = use.replacement or "none needed"
        rows.append([
            md(item.system.id), md(spec.name if spec else use.use.algorithm), md(use.use.purpose.value),
            VERDICT_LABEL[use.verdict], _start_by(use.start_by, as_of), md(replacement),
            markdown_code(str(use.use.source)) if use.use.source else "n/a",
        ])
    return rows


def action_list(result: TriageResult, field: str, label: str, items: tuple[SystemAssessment, ...]) -> str:
    """One owner's action list as a Markdown document."""
    inventory = result.inventory
    lines = [f"# Post-quantum action list: {md(label)}", ""]
    lines.append(f"{md(field)} {md(label)} in the inventory of {md(inventory.organization)}, as of "
                 f"{result.as_of.isoformat()} (threat profile {md(result.profile.name)}; inventory "
                 f"{markdown_code(inventory.source_sha256 or 'n/a')}).")
    lines.append("")
    lines.append("> **Caution.** " + md(CAUTIONS[0]) + " " + md(CAUTIONS[1]))
    lines.append("")
    urgent = [i for i in items if i.verdict in (Verdict.CLASSICALLY_BROKEN, Verdict.EXPOSED, Verdict.UNASSESSED)]
    lines.append(f"{len(items)} systems, {len(urgent)} of them broken now, exposed or unassessed.")
    lines.append("")
    lines += ["## Systems", ""]
    lines += _table(
        ["Rank", "System", "Name", "Verdict", "Start by", "Replace first"],
        [[str(i.rank), md(i.system.id), md(i.system.name), VERDICT_LABEL[i.verdict],
          _start_by(i.start_by, result.as_of),
          md(short_replacement(i.weakest.replacement if i.weakest else None))] for i in items],
    )
    lines.append("")
    rows = [row for item in items for row in _uses(item, result.as_of)]
    lines += ["## Uses to replace or check", ""]
    if rows:
        lines += _table(["System", "Algorithm", "Purpose", "Verdict", "Start by", "Replace with", "Where"], rows)
    else:
        lines.append("None: every use of these systems is quantum-resistant.")
    lines.append("")
    lines += ["## Assumptions", ""]
    lines += [f"- {md(a)}" for a in assumptions(result)]
    lines.append("")
    lines += ["## Cautions", ""]
    lines += [f"- {md(c)}" for c in CAUTIONS]
    lines.append("")
    return "\n".join(lines)


def action_lists(result: TriageResult, field: str) -> list[tuple[str, int, str]]:
    """(label, systems, Markdown document) per value of the field, in the grouping's order."""
    from pqtriage.model.view import groups

    return [(label, len(items), action_list(result, field, label, items))
            for label, items in groups(result, field)]


def action_index(result: TriageResult, field: str, files: list[tuple[str, str, int]]) -> str:
    """The index of the action lists written: (label, file name, systems) per list."""
    lines = [f"# Post-quantum action lists by {md(field)}: {md(result.inventory.organization)}", ""]
    lines.append(f"As of {result.as_of.isoformat()}, threat profile {md(result.profile.name)}.")
    lines.append("")
    lines += _table([md(field), "Systems", "File"],
                    [[md(label), str(count), f"[{md(name)}]({name})"] for label, name, count in files])
    lines.append("")
    lines.append("> **Caution.** " + md(CAUTIONS[2]))
    lines.append("")
    return "\n".join(lines)
