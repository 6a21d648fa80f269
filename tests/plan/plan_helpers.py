"""Builders shared by the plan tests: candidates and uses written as in a triage result."""

from __future__ import annotations

import datetime

from pqtriage.plan.inputs import PlanCandidate, PlanUse

# Classical strengths per NIST SP 800-57 Part 1 Rev. 5, Table 2:
# RSA-2048 = 112 bits, RSA-3072 = 128 bits, P-256 (256-bit order) = 128 bits.
RSA_2048_SIGNATURE = PlanUse("signature", "RSA-2048", 112, "shor", "signature", True)
RSA_3072_SIGNATURE = PlanUse("signature", "RSA-3072", 128, "shor", "signature", True)
ECDSA_P256 = PlanUse("signature", "ECDSA P-256", 128, "shor", "signature", True)
ECDH_P256 = PlanUse("key-establishment", "ECDH P-256", 128, "shor", "key-agreement", True)
RSA_2048_KEY_TRANSPORT = PlanUse(
    "key-establishment", "RSA-2048", 112, "shor", "public-key-encryption", True
)
AES_128_GCM = PlanUse("encryption", "AES-128-GCM", 128, "grover", "aead", True)
AES_256_GCM = PlanUse("encryption", "AES-256-GCM", 256, "grover", "aead", True)
ML_KEM_768 = PlanUse("key-establishment", "ML-KEM-768", 192, "none", "kem", True)
ML_KEM_1024 = PlanUse("key-establishment", "ML-KEM-1024", 256, "none", "kem", True)
UNKNOWN = PlanUse("encryption", "FrobCipher", None, None, None, False, "unknown algorithm name")


def candidate(
    system_id: str,
    *,
    rank: int = 1,
    years: float = 1.0,
    depends_on: tuple[str, ...] = (),
    start_by: datetime.date | None = None,
    effort: float | None = None,
    vendor: str | None = "available",
    category: str | None = None,
    criticality: str | None = "medium",
    uses: tuple[PlanUse, ...] = (RSA_2048_SIGNATURE,),
    name: str | None = None,
) -> PlanCandidate:
    """A candidate with planning defaults that do not get in the way (vendor available)."""
    return PlanCandidate(
        id=system_id,
        name=name or f"System {system_id}",
        priority_rank=rank,
        migration_years=years,
        depends_on=depends_on,
        start_by=start_by,
        effort_person_weeks=effort,
        vendor_readiness=vendor,  # type: ignore[arg-type]
        policy_category=category,
        verdict="at-risk",
        uses=uses,
        criticality=criticality,
    )
