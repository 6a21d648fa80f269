"""Terminal styles shared by the table views (rich style names, plain strings)."""

from __future__ import annotations

from pqtriage.model.verdict import Verdict

VERDICT_STYLE: dict[Verdict, str] = {
    Verdict.CLASSICALLY_BROKEN: "bold red",
    Verdict.EXPOSED: "red",
    Verdict.UNASSESSED: "bold yellow",
    Verdict.WITHIN_MARGIN: "yellow",
    Verdict.QUANTUM_RESISTANT: "green",
}
"""Style of each verdict's label in the terminal."""
