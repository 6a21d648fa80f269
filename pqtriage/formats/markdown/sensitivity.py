"""Markdown section of the sensitivity: which systems change verdict if the CRQC moves."""

from __future__ import annotations

from pqtriage.formats.labels import VERDICT_LABEL, sensitivity_title
from pqtriage.formats.text import markdown_code
from pqtriage.model.sensitivity import Sensitivity


def band_lines(s: Sensitivity) -> list[str]:
    """Which verdicts flip inside the uncertainty band (10-90 %), as Markdown lines."""
    if not s.band_checked:
        return []
    lines = ["### Verdicts that flip inside the uncertainty band", ""]
    if not s.band_flips:
        lines += ["No system's verdict changes between the optimistic and pessimistic ends of the "
                  "10-90 % band.", ""]
        return lines
    lines.append(f"{len(s.band_flips)} systems change verdict between the ends of the 10-90 % band "
                 "(every use at its optimistic end, or every use at its pessimistic end); the "
                 "report's verdict is the central one.")
    lines.append("")
    lines.append("| System | Central | Optimistic end | Pessimistic end |")
    lines.append("|---|---|---|---|")
    for flip in s.band_flips:
        lines.append(f"| {markdown_code(flip.system_id)} | {VERDICT_LABEL[flip.central]} | "
                     f"{VERDICT_LABEL[flip.optimistic]} | {VERDICT_LABEL[flip.pessimistic]} |")
    lines.append("")
    lines.append("### Moving the arrival")
    lines.append("")
    return lines


def sensitivity_markdown(s: Sensitivity) -> str:
    """Markdown section with the same table."""
    lines = ["## Sensitivity to the CRQC arrival", ""]
    lines.append(
        sensitivity_title(s) + ". Negative shifts mean the CRQC arrives earlier than the profile says, "
        "positive later; every algorithm's arrival moves by the same number of years."
    )
    lines.append("")
    lines += band_lines(s)
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
