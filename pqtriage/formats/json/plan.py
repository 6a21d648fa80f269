"""The plan as a JSON-ready dict (``pqtriage plan --format json``) and its text.

Dates are ISO 8601 strings; every system appears once in ``items``, with at least
id, planned_start, planned_finish, deadlines (policy, date, kind, source),
meets_deadlines and meets_start_by.
"""

from __future__ import annotations

import json
from typing import Any

from pqtriage.plan.calendar import quarter_label
from pqtriage.plan.deadlines import Deadline
from pqtriage.plan.planner import Plan, SystemPlan

PLAN_JSON_VERSION = 1
"""Version of this JSON layout; raised on any incompatible change."""


def _deadline(deadline: Deadline) -> dict[str, Any]:
    return {
        "policy": deadline.policy,
        "milestone": deadline.milestone,
        "kind": deadline.kind,
        "date": deadline.date.isoformat(),
        "source": deadline.source,
        "note": deadline.note or None,
        "requires": deadline.requires,
        "source_status": deadline.status,
        "checkpoint": deadline.checkpoint,
    }


def _item(plan: Plan, system: SystemPlan) -> dict[str, Any]:
    item = system.candidate
    return {
        "id": item.id,
        "name": item.name,
        "priority_rank": item.priority_rank,
        "verdict": item.verdict,
        "planned_start": system.planned_start.isoformat(),
        "planned_finish": system.planned_finish.isoformat(),
        "start_quarter": quarter_label(plan.origin, system.slot.start),
        "finish_quarter": quarter_label(plan.origin, system.slot.finish),
        "duration_quarters": system.slot.duration,
        "start_gate": system.slot.gate,
        "earliest_start": system.earliest_start.isoformat(),
        "depends_on": list(item.depends_on),
        "effort_person_weeks": system.effort_person_weeks,
        "effort_assumed": system.effort_assumed,
        "vendor_readiness": system.vendor_readiness,
        "vendor_readiness_assumed": system.vendor_assumed,
        "policy_category": item.policy_category,
        "start_by": item.start_by.isoformat() if item.start_by else None,
        "meets_start_by": system.meets_start_by,
        "start_by_slack_days": system.start_by_slack_days,
        "deadlines": [
            {**_deadline(r.deadline), "met": r.met, "slack_days": r.slack_days}
            for r in system.results
        ],
        "meets_deadlines": system.meets_deadlines,
        "deadline_slack_days": system.deadline_slack_days,
        "undetermined": list(system.deadlines.undetermined),
        "uses": [
            {
                "algorithm": u.use.algorithm,
                "purpose": u.use.purpose,
                "deadlines": [f"{d.policy}/{d.milestone}" for d in u.deadlines],
                "undetermined": u.undetermined,
                "note": u.note,
            }
            for u in system.deadlines.uses
        ],
        "misses": [
            {
                "target": miss.target,
                "date": miss.date.isoformat(),
                "latest_start": miss.latest_start.isoformat() if miss.latest_start else None,
                "fixes": [
                    {"kind": f.kind, "text": f.text, "sufficient": f.sufficient} for f in miss.fixes
                ],
            }
            for miss in system.misses
        ],
        "on_critical_path": system.on_critical_path,
    }


def plan_to_json(plan: Plan) -> dict[str, Any]:
    """The whole plan as plain data, ready for ``json.dumps``."""
    return {
        "plan_version": PLAN_JSON_VERSION,
        "as_of": plan.as_of.isoformat(),
        "plan_start": plan.start.isoformat(),
        "capacity": {
            "concurrent": plan.capacity.concurrent,
            "person_weeks_per_quarter": plan.capacity.person_weeks_per_quarter,
            "description": plan.capacity.describe(),
        },
        "defaults": {
            "vendor_delay_quarters": dict(plan.settings.vendor_delay_quarters),
            "vendor_readiness": plan.settings.default_vendor_readiness,
            "person_weeks_per_year": plan.settings.person_weeks_per_year,
        },
        "policies": [
            {
                "id": p.id,
                "title": p.title,
                "publisher": p.publisher,
                "published": p.published,
                "source": p.source,
                "flag": p.flag,
                "source_status": p.status,
                "frameworks": list(p.frameworks),
            }
            for p in plan.policies
        ],
        "organisation_milestones": [_deadline(d) for d in plan.organisation_milestones],
        "critical_path": list(plan.critical_path),
        "items": [_item(plan, system) for system in plan.systems],
    }


def plan_json(plan: Plan) -> str:
    """The plan as JSON text."""
    return json.dumps(plan_to_json(plan), indent=2, ensure_ascii=False) + "\n"
