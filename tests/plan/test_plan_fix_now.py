"""The "fix now" track: classically broken systems start in the first plan quarter.

Replacing RC4, DES, 3DES, SHA-1, MD5 or a short RSA or DH key needs no post-quantum product:
NIST SP 800-131A Rev. 2 (Transitioning the Use of Cryptographic Algorithms and Key Lengths)
disallows them today and names classical replacements (AES, SHA-2, RSA/DH of 2048 bits and
more), so vendor post-quantum readiness cannot delay the work.
"""

from __future__ import annotations

import datetime
from pathlib import Path

from plan_helpers import candidate

from pqtriage.pipeline import prepare
from pqtriage.plan.planner import FIX_NOW, POST_QUANTUM, build_plan
from pqtriage.plan.scheduler import UNLIMITED

DEMO = str(Path(__file__).resolve().parents[2] / "inventories" / "demo.yaml")
AS_OF = datetime.date(2026, 12, 1)


def test_demo_broken_systems_start_in_the_first_period_with_vendor_unknown() -> None:
    run = prepare(DEMO, None, AS_OF, None, None, None)
    plan = run.plan()
    broken = [s for s in plan.systems if s.candidate.verdict == "classically-broken"]
    by_id = {s.candidate.id: s for s in broken}
    # The demo's rank-1 DH-1024 VPN (readiness announced) and rank-2 RC4 link (readiness
    # unknown): both waited four quarters for a post-quantum vendor before this track.
    assert by_id["site-vpn"].vendor_readiness == "announced"
    assert by_id["mainframe-link"].vendor_readiness == "unknown"
    for system in broken:
        assert system.track == FIX_NOW
        assert system.slot.start == 0, (system.candidate.id, system.slot)
        assert system.planned_start == plan.start
    # The post-quantum track keeps its model: unknown readiness waits 4 quarters.
    waiting = [s for s in plan.systems if s.track == POST_QUANTUM and s.vendor_readiness != "available"
               and not s.candidate.depends_on]
    assert waiting and all(s.slot.start == 4 for s in waiting)


def test_same_system_on_the_post_quantum_track_waits_for_the_vendor() -> None:
    broken = candidate("b", vendor=None)
    broken = type(broken)(**{**broken.__dict__, "verdict": "classically-broken"})
    exposed = candidate("e", vendor=None)
    plan = build_plan([broken, exposed], AS_OF, (), UNLIMITED)
    by_id = {s.candidate.id: s for s in plan.systems}
    assert by_id["b"].track == FIX_NOW and by_id["b"].slot.start == 0
    assert by_id["e"].track == POST_QUANTUM and by_id["e"].slot.start == 4


def test_timeline_chart_rows_are_in_priority_order() -> None:
    import re

    from pqtriage.formats.svg.plan import plan_svg

    plan = prepare(DEMO, None, AS_OF, None, None, None).plan()
    rows = re.findall(r'<g class="system" data-system="([^"]+)"', plan_svg(plan))
    expected = [s.candidate.id for s in sorted(plan.systems, key=lambda s: s.candidate.priority_rank)]
    assert rows == expected
    # Planned start order differs (rank 6 waits for its dependencies), so the check can fail.
    assert rows != [s.candidate.id for s in plan.systems]
