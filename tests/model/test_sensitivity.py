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


def test_the_report_states_which_verdicts_flip_inside_the_band() -> None:
    import datetime as dt
    from pathlib import Path

    from pqtriage.formats.markdown.sensitivity import sensitivity_markdown
    from pqtriage.model.verdict import Verdict
    from pqtriage.pipeline import prepare

    demo = str(Path(__file__).resolve().parents[2] / "inventories" / "demo.yaml")
    run = prepare(demo, "survey-2025-upper", dt.date(2026, 12, 2))
    s = run.sensitivity()
    assert s.band_checked
    by_id = {f.system_id: f for f in s.band_flips}
    # A flip means the use's P band straddles the 10 % tolerance (P > tolerance is exposed).
    for flip in s.band_flips:
        item = next(i for i in run.result.items if i.system.id == flip.system_id)
        bands = [u.band for u in item.uses if u.band is not None]
        assert any(b.exposure_probability.low <= 0.10 < b.exposure_probability.high for b in bands)
        assert Verdict.EXPOSED in (flip.optimistic, flip.pessimistic)
    # Systems whose every band lies above the tolerance do not flip (tape-archive: 85-94 %).
    assert "tape-archive" not in by_id
    text = sensitivity_markdown(s)
    assert "Verdicts that flip inside the uncertainty band" in text
    for system_id in by_id:
        assert f"<code>{system_id}</code>" in text
