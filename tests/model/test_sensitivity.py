"""Sensitivity: the fast verdict-only re-evaluation agrees with full triage runs."""

from __future__ import annotations

import datetime as dt
from pathlib import Path

from pqtriage.model.sensitivity import ShiftedArrival
from pqtriage.model.triage import triage
from pqtriage.pipeline import prepare

DEMO = str(Path(__file__).resolve().parents[2] / "inventories" / "demo.yaml")


def test_sensitivity_matches_full_triage_runs() -> None:
    run = prepare(DEMO, None, dt.date(2026, 12, 1))
    result = run.result
    table = run.sensitivity()
    for shift in table.shifts:
        full = triage(result.inventory, run.catalog, result.profile, ShiftedArrival(run.arrival, shift), result.as_of)
        expected = {i.system.id: i.verdict for i in full.items}
        changed = {row.system_id: dict(row.by_shift)[shift] for row in table.rows}
        for item in result.items:
            assert changed.get(item.system.id, item.verdict) == expected[item.system.id]
    # An earlier CRQC can only make things worse: nothing improves at -5 years.
    from pqtriage.model.verdict import SEVERITY

    for row in table.rows:
        assert SEVERITY[dict(row.by_shift)[-5]] >= SEVERITY[row.baseline]
    assert table.rows, "the demo has systems near the boundary"
