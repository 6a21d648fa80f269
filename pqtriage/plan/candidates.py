"""From a triage result to planning candidates: the seam between triage and plan."""

from __future__ import annotations

from pqtriage.errors import Place
from pqtriage.model.verdict import TriageResult, Verdict
from pqtriage.plan.inputs import PlanCandidate, PlanUse


def candidates_from_triage(result: TriageResult) -> tuple[PlanCandidate, ...]:
    """One candidate per ranked system that still has to migrate.

    Quantum-resistant systems need no migration and are left out; dependencies on them
    or outside the inventory (reported as inventory warnings) do not constrain the plan.
    """
    planned = [i for i in result.items if i.verdict != Verdict.QUANTUM_RESISTANT]
    known = {item.system.id for item in planned}
    candidates = []
    for item in planned:
        system = item.system
        uses = []
        for use in item.uses:
            spec = use.deciding or use.spec
            uses.append(PlanUse(
                purpose=use.use.purpose.value,
                algorithm=spec.name if spec else use.use.algorithm,
                classical_bits=spec.classical_bits if spec else None,
                quantum_attack=spec.quantum_attack if spec else None,
                primitive=spec.primitive if spec else None,
                assessed=spec is not None,
                reason=None if spec is not None else use.reason,
                not_after=use.use.not_after,
            ))
        candidates.append(PlanCandidate(
            id=system.id,
            name=system.name,
            priority_rank=item.rank,
            migration_years=system.migration_years,
            depends_on=tuple(d for d in system.depends_on if d in known),
            start_by=item.start_by,
            effort_person_weeks=system.effort_person_weeks,
            vendor_readiness=system.vendor_readiness,  # type: ignore[arg-type]
            policy_category=system.policy_category,
            verdict=item.verdict.value,
            uses=tuple(uses),
            criticality=system.criticality.value,
            place=Place(system.source.file, system.source.line, system.source.column)
            if system.source is not None else None,
            frameworks=result.inventory.frameworks_of(system),
            impact=system.impact.value if system.impact is not None else None,
            high_value_asset=system.high_value_asset,
            data_classification=system.data_classification.label
            if system.data_classification is not None else None,
            protocol=system.protocol,
            protocol_version=system.protocol_version,
        ))
    return tuple(candidates)
