"""Markdown section of the sensitivity: which systems change verdict if the CRQC moves."""

from __future__ import annotations

from pqtriage.formats.labels import VERDICT_LABEL, sensitivity_title
from pqtriage.formats.text import markdown_code
from pqtriage.model.sensitivity import Sensitivity


def sensitivity_markdown(s: Sensitivity) -> str:
    """Markdown section with the same table."""
    lines = ["## Sensitivity to the CRQC arrival", ""]
    lines.append(
        sensitivity_title(s) + ". Negative shifts mean the CRQC arrives earlier than the profile says, "
        "positive later; every algorithm's arrival moves by the same number of years."
    )
    lines.append("")
    if not s.rows:
        lines.append("No system changes verdict within the shifts tried.")
        return "\n".join(lines) + "\n"
    header = ["System", "Now"] + [f"{shift:+d} years" for shift in s.shifts]
    lines.append("| " + " | ".join(header) + " |")
    lines.append("|" + "|".join("---" for _ in header) + "|")
    for row in s.rows:
        cells = [markdown_code(row.system_id), VERDICT_LABEL[row.baseline]]
        cells += [VERDICT_LABEL[v] if v != row.baseline else f"{VERDICT_LABEL[v]}" for _, v in row.by_shift]
        lines.append("| " + " | ".join(cells) + " |")
    return "\n".join(lines) + "\n"
