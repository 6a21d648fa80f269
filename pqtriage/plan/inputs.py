"""What the triage engine hands the planner: one :class:`PlanCandidate` per system.

The planner never reads an inventory or a threat profile itself. The triage
engine resolves each use of cryptography in the catalog, computes the Mosca
start-by date and the priority rank, and passes the result here as plain,
frozen data. Tests build candidates by hand.
"""

from __future__ import annotations

import datetime
from dataclasses import dataclass
from typing import Literal

from pqtriage.errors import Place

# Defined once with the inventory format; re-exported here for the planner.
from pqtriage.sources.schema import POLICY_CATEGORIES as POLICY_CATEGORIES
from pqtriage.sources.schema import VENDOR_READINESS as VENDOR_READINESS

VendorReadiness = Literal["available", "announced", "unknown"]

HIGH_PRIORITY_CRITICALITIES: tuple[str, ...] = ("critical", "high")
"""Criticalities that make a system high-priority (or high-risk) for the policies that
set an earlier date for such systems (UK NCSC 2031, EU roadmap 2030, Canada 2031,
BSI very high protection needs 2030). Our reading, documented in docs/planning.md."""


@dataclass(frozen=True)
class PlanUse:
    """One use of cryptography of a system, as far as deadlines need to know it."""

    purpose: str
    """What the use protects: key-establishment, encryption, signature, authentication, integrity."""
    algorithm: str
    """Catalog display name of the algorithm (RSA-2048, ECDH P-256 ...) or the input text."""
    classical_bits: int | None
    """Classical security strength in bits (NIST SP 800-57 Part 1 Rev. 5, Table 2), if known."""
    quantum_attack: Literal["shor", "grover", "none"] | None
    """Quantum attack class of the algorithm; None when unassessed."""
    primitive: str | None
    """Catalog primitive (signature, kem, key-agreement, public-key-encryption ...), if known."""
    assessed: bool
    """False when the catalog could not resolve the algorithm with all its parameters."""
    reason: str | None = None
    """Why the use is unassessed (unknown name, missing key size ...), shown with the plan."""
    not_after: datetime.date | None = None
    """End of validity of the certificate or key the use rests on, if known."""


@dataclass(frozen=True)
class PlanCandidate:
    """One system to migrate, with everything the planner needs."""

    id: str
    """System id, unique within the inventory."""
    name: str
    """Human-readable system name."""
    priority_rank: int
    """Triage rank: 1 is the most urgent system."""
    migration_years: float
    """Mosca's y: how long the migration takes (years); the planned duration."""
    depends_on: tuple[str, ...] = ()
    """Ids of systems that must finish migrating before this one starts."""
    start_by: datetime.date | None = None
    """Latest start date from Mosca's inequality; None when no quantum deadline applies."""
    effort_person_weeks: float | None = None
    """Effort of the migration in person-weeks; None uses the documented default."""
    vendor_readiness: VendorReadiness | None = None
    """Vendor post-quantum support; None is treated as unknown (a documented default)."""
    policy_category: str | None = None
    """CNSA 2.0 system category, one of :data:`POLICY_CATEGORIES`, if given."""
    verdict: str = ""
    """Triage verdict text (at-risk, on-track, unassessed ...), shown with the plan."""
    uses: tuple[PlanUse, ...] = ()
    """The system's uses of cryptography."""
    criticality: str | None = None
    """Business criticality (critical, high, medium, low); critical and high count as
    high-priority for policy milestones scoped to high-priority systems."""
    place: Place | None = None
    """Where the system is written in the inventory, for messages about it."""
    frameworks: tuple[str, ...] = ()
    """Policy frameworks that govern it (its own list, else the inventory's); empty: not stated."""
    impact: str | None = None
    """FIPS 199 impact level (low, moderate, high), if given."""
    high_value_asset: bool | None = None
    """High-value asset (OMB M-19-03); None when not stated."""
    data_classification: str | None = None
    """Data classification label, if given."""
    protocol: str | None = None
    """Main protocol (tls, ssh ...), if given."""
    protocol_version: str | None = None
    """Version of the main protocol, if given."""

    @property
    def high_priority(self) -> bool:
        """True when milestones for high-priority (high-risk) systems apply to this system."""
        return (self.criticality or "").lower() in HIGH_PRIORITY_CRITICALITIES
