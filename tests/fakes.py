"""Small stand-ins for the catalog, so model tests do not depend on shipped data."""

from __future__ import annotations

import datetime as dt

from pqtriage.catalog.spec import AlgorithmSpec, Component, Resolution
from pqtriage.catalog.transitions import Document, Rule, Standing, Transitions
from pqtriage.catalog.trust import TrustDefault, TrustDefaults
from pqtriage.model.inventory import SignatureRole

RSA_2048 = AlgorithmSpec(
    name="RSA-2048", family="RSA", primitive="public-key-encryption", classical_bits=112,
    classical_status="acceptable", quantum_attack="shor", source="test", shor_problem="factoring",
    problem_bits=2048, replacements={"key-establishment": "ML-KEM-768", "signature": "ML-DSA-65"},
)
RSA_1024 = AlgorithmSpec(
    name="RSA-1024", family="RSA", primitive="public-key-encryption", classical_bits=80,
    classical_status="weak", quantum_attack="shor", source="test", shor_problem="factoring",
    problem_bits=1024, replacements={"key-establishment": "ML-KEM-768"},
)
P256 = AlgorithmSpec(
    name="ECDSA P-256", family="ECDSA", primitive="signature", classical_bits=128,
    classical_status="acceptable", quantum_attack="shor", source="test",
    shor_problem="elliptic-curve-dlog", problem_bits=256, replacements={"signature": "ML-DSA-65"},
)
AES_128 = AlgorithmSpec(
    name="AES-128-GCM", family="AES", primitive="aead", classical_bits=128,
    classical_status="acceptable", quantum_attack="grover", source="test", nist_category=1,
    grover_target="key-search", problem_bits=128, replacements={"encryption": "AES-256-GCM"},
)
ML_KEM_768 = AlgorithmSpec(
    name="ML-KEM-768", family="ML-KEM", primitive="kem", classical_bits=192,
    classical_status="acceptable", quantum_attack="none", source="test", nist_category=3,
)
SUITE = AlgorithmSpec(
    name="TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256", family="TLS", primitive="cipher-suite",
    classical_bits=112, classical_status="acceptable", quantum_attack="shor", source="test",
    components=(Component("key-establishment", P256), Component("authentication", RSA_2048),
                Component("encryption", AES_128)),
)


class FakeCatalog:
    """Resolves a handful of names; everything else is unknown."""

    table = {s.name: s for s in (RSA_2048, RSA_1024, P256, AES_128, ML_KEM_768, SUITE)}

    def resolve(self, algorithm: str, *, key_size: int | None = None, curve: str | None = None,
                parameter_set: str | None = None, purpose: str | None = None) -> Resolution:
        spec = self.table.get(algorithm)
        if spec is None:
            return Resolution(None, reason=f"'{algorithm}' is not in the catalog", suggestions=("RSA-2048",))
        return Resolution(spec)


def _rule(rule_id: str, status: str, match: dict) -> Rule:
    return Rule(rule_id, Document("test", "test rules", "test rules", False), "test", "row", match,
                None, None, status, f"test rule: {status}")


FAKE_TRANSITIONS = Transitions((
    _rule("broken", "broken", {"catalog_status": ["broken"]}),
    _rule("weak", "disallowed", {"catalog_status": ["weak"]}),
    _rule("legacy", "legacy", {"catalog_status": ["legacy"]}),
    _rule("rest", "acceptable", {}),
))
"""Classical status straight from each fake spec's classical_status (no dates)."""
FAKE_TRUST = TrustDefaults({
    **{role.value: TrustDefault(role.value, 20.0, "test", "test") for role in SignatureRole},
    "live-authentication": TrustDefault("live-authentication", 0.0, "test", "test"),
    "unspecified": TrustDefault("unspecified", 5.0, "test", "test"),
})
"""Every signature role 20 years, live authentication 0, unknown roles 5."""


def _standing(self: FakeCatalog, spec: AlgorithmSpec, purpose: str, as_of: dt.date) -> Standing:
    return FAKE_TRANSITIONS.standing(spec, purpose, as_of)


def _trust(self: FakeCatalog, role: str | None) -> TrustDefault:
    return FAKE_TRUST.for_role(role)


FakeCatalog.classical_standing = _standing  # type: ignore[attr-defined]
FakeCatalog.trust_default = _trust  # type: ignore[attr-defined]
