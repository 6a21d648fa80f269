"""Triage what a route produced (scan, probe or a hand-written inventory) and look uses up.

The same pipeline `pqtriage triage` runs, on the default profile, so a test can compare the
verdict one fact gets by each route.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

from pqtriage.model.verdict import TriageResult, UseAssessment
from pqtriage.pipeline import run_triage

AS_OF = dt.date(2026, 12, 2)
"""The date the tests assess at (the scan date too, unless a test says otherwise)."""


def triage_text(text: str, folder: Path, name: str = "inventory.yaml") -> TriageResult:
    """Write an inventory text to folder/name and triage it on the default profile."""
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return run_triage(str(path), None, AS_OF)


def uses_by_source(result: TriageResult) -> dict[str, UseAssessment]:
    """Every assessed use keyed by its ``source`` (the scan or probe locator, or the
    hand-written ``source`` field)."""
    found: dict[str, UseAssessment] = {}
    for item in result.items:
        for use in item.uses:
            assert use.use.source is not None and use.use.source.detail is not None
            found[use.use.source.detail] = use
    return found


def one_use_inventory(use: str, system_id: str = "hand-written") -> str:
    """A hand-written inventory of one system with one use (a YAML flow mapping)."""
    return (
        "version: 1\norganization: Fictional Harbour Authority\nsystems:\n"
        f"  - id: {system_id}\n    shelf_life_years: 5\n    migration_years: 2\n"
        f"    uses:\n      - {use}\n"
    )
