"""Which policy milestones bind each use and each system.

A milestone applies to a use when every key of its scope matches. A use that the
catalog could not assess gets no deadline and a stated reason instead; so does a
system for which a selected policy needs an input the system lacks (a CNSA 2.0
category). Nothing is skipped silently.
"""

from __future__ import annotations

import datetime
import re
from collections.abc import Sequence
from dataclasses import dataclass

from pqtriage.plan.inputs import PlanCandidate, PlanUse
from pqtriage.plan.policies import Milestone, Policy, Scope

SIGNATURE_PRIMITIVES = frozenset({"signature"})
KEY_ESTABLISHMENT_PRIMITIVES = frozenset({"kem", "key-agreement", "public-key-encryption"})
WEAKEST_ASSUMED_BITS = 0
"""Strength assumed for an assessed use whose strength is unknown: the weakest rows apply."""


@dataclass(frozen=True)
class Deadline:
    """One milestone that binds a system (or one of its uses)."""

    policy: str
    """Policy id (nist-ir-8547, cnsa2 ...)."""
    milestone: str
    """Milestone id within the policy."""
    kind: str
    """deprecated, disallowed, exclusive-use, migrate-by ..."""
    date: datetime.date
    """Last day on which the migration must be finished to meet it."""
    source: str
    """Document, section and wording it comes from."""
    note: str = ""
    """How the text was read into this row."""
    requires: str = "migrate"
    """What it asks for (migrate-key-establishment, stop-using, support ...)."""
    status: str = "final"
    """Standing of its source: final, draft or announced (labelled in every output)."""
    checkpoint: bool = False
    """True for a readiness checkpoint (support, prefer): met, not met or unknown, never missed."""

    @property
    def label(self) -> str:
        """Policy id with the standing of a draft or announced source: "nist-ir-8547 (draft)"."""
        return self.policy if self.status == "final" else f"{self.policy} ({self.status})"


@dataclass(frozen=True)
class UseDeadlines:
    """The deadlines of one use, or why none could be determined."""

    use: PlanUse
    """The use."""
    deadlines: tuple[Deadline, ...]
    """Binding milestones, earliest first."""
    undetermined: str | None = None
    """Why no deadline could be determined (unassessed algorithm), or None."""
    note: str | None = None
    """Assumption made for this use (unknown strength), or None."""


@dataclass(frozen=True)
class SystemDeadlines:
    """Every deadline of one system, merged over its uses."""

    system_id: str
    """System id."""
    uses: tuple[UseDeadlines, ...]
    """Per-use detail, in input order."""
    deadlines: tuple[Deadline, ...]
    """Distinct binding milestones of any use, earliest first."""
    undetermined: tuple[str, ...]
    """Reasons some deadline could not be determined (empty when all are known)."""

    @property
    def earliest(self) -> Deadline | None:
        """The earliest binding deadline, or None when none applies."""
        return self.deadlines[0] if self.deadlines else None


def purpose_class(use: PlanUse) -> str | None:
    """IR 8547 purpose class of a use: signature, key-establishment, or None.

    The catalog primitive decides (signature vs KEM / key agreement / public-key
    encryption); for composites and unknown primitives the use's purpose does
    (signature and authentication are signatures; key establishment and encryption
    are key establishment).
    """
    if use.primitive in SIGNATURE_PRIMITIVES:
        return "signature"
    if use.primitive in KEY_ESTABLISHMENT_PRIMITIVES:
        return "key-establishment"
    if use.purpose in ("signature", "authentication"):
        return "signature"
    if use.purpose in ("key-establishment", "encryption"):
        return "key-establishment"
    return None


def _name_matches(algorithm: str, prefixes: Sequence[str]) -> bool:
    name = algorithm.strip().lower()
    for prefix in prefixes:
        # "AES-128" matches "AES-128" and "AES-128-GCM", not "AES-1280".
        if re.fullmatch(re.escape(prefix.lower()) + r"(?:[^a-z0-9].*)?", name):
            return True
    return False


def _in(value: str | None, allowed: Sequence[str]) -> bool:
    return value is not None and value.strip().lower() in {a.lower() for a in allowed}


def governs(policy: Policy, system: PlanCandidate) -> bool:
    """True when the policy may judge the system by the frameworks it names.

    A system naming no framework (nor its inventory) is judged by every selected policy;
    one naming frameworks only by policies that govern one of them (a policy listing no
    framework governs every system).
    """
    if not system.frameworks or not policy.frameworks:
        return True
    return bool(set(system.frameworks) & set(policy.frameworks))


def milestone_applies(milestone: Milestone, use: PlanUse, system: PlanCandidate) -> bool:
    """True when every key of the milestone's scope matches the use and its system."""
    if milestone.applies_to != "systems":
        return False
    return scope_matches(milestone.scope, use, system)


def scope_matches(scope: Scope, use: PlanUse, system: PlanCandidate) -> bool:
    """True when every key of a scope matches the use and its system (None matches anything)."""
    if scope.impacts is not None and not _in(system.impact, scope.impacts):
        return False
    if scope.high_value_asset is not None and system.high_value_asset is not scope.high_value_asset:
        return False
    if scope.classifications is not None and not _in(system.data_classification, scope.classifications):
        return False
    if scope.protocols is not None and not _in(system.protocol, scope.protocols):
        return False
    if scope.any_of is not None and not any(scope_matches(s, use, system) for s in scope.any_of):
        return False
    if scope.quantum_attacks is not None and use.quantum_attack not in scope.quantum_attacks:
        return False
    if scope.purposes is not None and purpose_class(use) not in scope.purposes:
        return False
    bits = use.classical_bits if use.classical_bits is not None else WEAKEST_ASSUMED_BITS
    if scope.min_classical_bits is not None and bits < scope.min_classical_bits:
        return False
    if scope.max_classical_bits is not None and bits > scope.max_classical_bits:
        return False
    if (
        scope.policy_categories is not None
        and system.policy_category not in scope.policy_categories
    ):
        return False
    if scope.high_priority_only and not system.high_priority:
        return False
    return scope.algorithms is None or _name_matches(use.algorithm, scope.algorithms)


def _deadline(policy: Policy, milestone: Milestone) -> Deadline:
    return Deadline(
        policy=policy.id,
        milestone=milestone.id,
        kind=milestone.kind,
        date=milestone.date,
        source=milestone.source,
        note=milestone.note,
        requires=milestone.requires,
        status=milestone.status,
        checkpoint=milestone.checkpoint,
    )


def _order(deadline: Deadline) -> tuple[datetime.date, str, str]:
    return (deadline.date, deadline.policy, deadline.milestone)


def use_deadlines(use: PlanUse, system: PlanCandidate, policies: Sequence[Policy]) -> UseDeadlines:
    """Deadlines of one use under the selected policies."""
    if not use.assessed or use.quantum_attack is None:
        reason = use.reason or "the algorithm could not be assessed"
        return UseDeadlines(
            use,
            (),
            undetermined=f"{use.algorithm} ({use.purpose}): no deadline could be "
            f"determined: {reason}",
        )
    found = [
        _deadline(policy, milestone)
        for policy in policies
        if governs(policy, system)
        for milestone in policy.milestones
        if milestone_applies(milestone, use, system)
    ]
    note = None
    if use.classical_bits is None and use.quantum_attack == "shor":
        note = "classical strength unknown: the rows for the weakest strength were applied"
    return UseDeadlines(use, tuple(sorted(found, key=_order)), note=note)


def system_deadlines(system: PlanCandidate, policies: Sequence[Policy]) -> SystemDeadlines:
    """Deadlines of a system: every milestone binding any of its uses, earliest first."""
    per_use = tuple(use_deadlines(use, system, policies) for use in system.uses)
    merged: dict[tuple[str, str], Deadline] = {}
    for item in per_use:
        for deadline in item.deadlines:
            merged.setdefault((deadline.policy, deadline.milestone), deadline)
    undetermined = [item.undetermined for item in per_use if item.undetermined]
    has_quantum_vulnerable = any(u.quantum_attack == "shor" for u in system.uses)
    for policy in policies:
        needs_category = any(
            m.scope.policy_categories is not None and m.applies_to == "systems"
            for m in policy.milestones
        )
        if (needs_category and system.policy_category is None and has_quantum_vulnerable
                and governs(policy, system)):
            undetermined.append(
                f"{policy.id}: the system has no policy_category, so its {policy.id} "
                "deadlines could not be determined"
            )
    return SystemDeadlines(
        system_id=system.id,
        uses=per_use,
        deadlines=tuple(sorted(merged.values(), key=_order)),
        undetermined=tuple(undetermined),
    )


def organisation_milestones(policies: Sequence[Policy]) -> tuple[Deadline, ...]:
    """Milestones for the organisation as a whole (plans, inventories, acquisitions)."""
    found = [
        _deadline(policy, milestone)
        for policy in policies
        for milestone in policy.milestones
        if milestone.applies_to == "organisation"
    ]
    return tuple(sorted(found, key=_order))
