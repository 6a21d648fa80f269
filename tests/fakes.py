"""Small stand-ins for the catalog, so model tests do not depend on shipped data."""

from __future__ import annotations

from pqtriage.catalog.spec import AlgorithmSpec, Component, Resolution

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
