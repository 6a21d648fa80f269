"""The critical path of a plan: the dependency chain that ends last.

Start from the system that finishes last (ties: the lower id) and step back, each
time to the dependency that finished last (ties: the lower id), until a system
without dependencies. Shortening any link of this chain, or removing what delayed
it, is what brings the end of the whole plan forward.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

from pqtriage.plan.scheduler import Slot


def _latest(ids: Sequence[str], slots: Mapping[str, Slot]) -> str:
    return min(ids, key=lambda i: (-slots[i].finish, i))


def critical_path(
    slots: Mapping[str, Slot], depends_on: Mapping[str, Sequence[str]]
) -> tuple[str, ...]:
    """Ids of the critical path, first migration first (empty for an empty plan)."""
    if not slots:
        return ()
    chain = [_latest(list(slots), slots)]
    while depends_on.get(chain[-1]):
        chain.append(_latest(list(depends_on[chain[-1]]), slots))
    return tuple(reversed(chain))
