"""The diff between two reviews as JSON."""

from __future__ import annotations

import json
from typing import Any

from pqtriage.formats.labels import verdict_text
from pqtriage.model.diff import Diff, SystemChange


def diff_dict(diff: Diff) -> dict[str, Any]:
    """The diff as a JSON-ready dict."""
    def change(c: SystemChange) -> dict[str, Any]:
        return {"id": c.id, "name": c.name, "old": verdict_text(c.old) if c.old else None,
                "new": verdict_text(c.new) if c.new else None, "old_rank": c.old_rank, "new_rank": c.new_rank}

    out: dict[str, Any] = {
        "old": {"label": diff.old.label, "as_of": diff.old.as_of, "profile": diff.old.profile},
        "new": {"label": diff.new.label, "as_of": diff.new.as_of, "profile": diff.new.profile},
        "counts": {v.value: {"before": b, "now": n, "change": n - b} for v, b, n in diff.counts},
    }
    for key in ("migrated", "improved", "worsened", "added", "removed", "unchanged"):
        out[key] = [change(c) for c in getattr(diff, key)]
    out["notes"] = list(diff.notes)
    return out


def render_json(diff: Diff) -> str:
    """The diff as JSON text."""
    return json.dumps(diff_dict(diff), indent=2, ensure_ascii=False) + "\n"
