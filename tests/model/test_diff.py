"""Diff between two reviews, against results worked out by hand."""

from __future__ import annotations

from pqtriage.model.diff import Review, ReviewSystem, compare, review_of_json
from pqtriage.model.verdict import Verdict

B, E, U, W, R = (Verdict.CLASSICALLY_BROKEN, Verdict.EXPOSED, Verdict.UNASSESSED, Verdict.WITHIN_MARGIN,
                 Verdict.QUANTUM_RESISTANT)


def _review(label: str, rows: list[tuple[str, Verdict]], as_of: str = "2026-12-01") -> Review:
    return Review(label, as_of, "survey-2025-upper",
                  tuple(ReviewSystem(i, i.upper(), v, n, None) for n, (i, v) in enumerate(rows, start=1)))


OLD = _review("old.yaml", [("a", E), ("b", E), ("c", R), ("d", B), ("e", B), ("f", W), ("h", U)])
NEW = _review("new.yaml", [("a", E), ("b", R), ("c", R), ("d", W), ("f", E), ("g", U), ("h", E)])


def test_changes_sorted_into_groups() -> None:
    diff = compare(OLD, NEW)
    # By hand: b exposed -> resistant = migrated; d broken -> in margin = improved;
    # f in margin -> exposed and h unassessed -> exposed = worsened; g only new; e only old.
    assert [c.id for c in diff.migrated] == ["b"]
    assert [(c.id, c.old, c.new) for c in diff.improved] == [("d", B, W)]
    assert [(c.id, c.old, c.new) for c in diff.worsened] == [("f", W, E), ("h", U, E)]
    assert [(c.id, c.old, c.new, c.new_rank) for c in diff.added] == [("g", None, U, 6)]
    assert [(c.id, c.old, c.new, c.old_rank) for c in diff.removed] == [("e", B, None, 5)]
    assert [c.id for c in diff.unchanged] == ["a", "c"]
    assert diff.notes == ()


def test_counts_by_verdict() -> None:
    diff = compare(OLD, NEW)
    # Old: broken d,e; exposed a,b; unassessed h; in margin f; resistant c.
    # New: exposed a,f,h; unassessed g; in margin d; resistant b,c.
    assert diff.counts == ((B, 2, 0), (E, 2, 3), (U, 1, 1), (W, 1, 1), (R, 1, 2))


def test_every_system_is_in_exactly_one_group() -> None:
    diff = compare(OLD, NEW)
    groups = (diff.migrated, diff.improved, diff.worsened, diff.added, diff.removed, diff.unchanged)
    ids = [c.id for group in groups for c in group]
    assert sorted(ids) == sorted({s.id for s in OLD.systems} | {s.id for s in NEW.systems})


def test_different_dates_are_noted() -> None:
    diff = compare(OLD, _review("new.yaml", [("a", E)], as_of="2027-12-01"))
    assert diff.notes and "different dates" in diff.notes[0]


def test_json_results_are_read() -> None:
    data = {"schema_version": 1, "as_of": "2026-12-01", "profile": {"name": "p"},
            "items": [{"id": "a", "name": "A", "rank": 1, "verdict": "exposed", "exposure_probability": 0.4}]}
    review = review_of_json(data, "r.json")
    assert review.systems == (ReviewSystem("a", "A", E, 1, 0.4),)
    for bad in ({"schema_version": 99, "items": []}, {"schema_version": 1, "items": [{"id": "a", "verdict": "fine"}]}):
        try:
            review_of_json(bad, "r.json")
        except ValueError:
            continue
        raise AssertionError(bad)
