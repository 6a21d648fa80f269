"""Catalog types: what an algorithm is, as the rest of pqtriage sees it.

A row of the shipped catalog (``pqtriage/data/catalog.yaml``) resolves to an
:class:`AlgorithmSpec`, much as pyca/cryptography models each algorithm as a
tiny parameter class. Composite names (TLS cipher suites, hybrid groups) carry
their parts in ``components``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

QuantumAttack = Literal["shor", "grover", "none"]
ClassicalStatus = Literal["broken", "weak", "legacy", "acceptable"]
ShorProblem = Literal["factoring", "finite-field-dlog", "elliptic-curve-dlog"]
GroverTarget = Literal["key-search", "preimage", "collision"]

QUANTUM_ATTACKS: tuple[str, ...] = ("shor", "grover", "none")
CLASSICAL_STATUSES: tuple[str, ...] = ("broken", "weak", "legacy", "acceptable")
"""From worst to best. broken and weak are not acceptable for protection today."""


@dataclass(frozen=True)
class AlgorithmSpec:
    """One algorithm with its parameters fixed (RSA-2048, ECDSA P-256, AES-128-GCM ...)."""

    name: str
    """Canonical display name, for example ``RSA-2048`` or ``ECDH P-256``."""
    family: str
    """Algorithm family: RSA, ECDSA, ECDH, EdDSA, FFDH, DSA, AES, ML-KEM, SHA-2 ..."""
    primitive: str
    """signature, kem, key-agreement, public-key-encryption, block-cipher, stream-cipher,
    aead, hash, mac, xof, kdf or cipher-suite."""
    classical_bits: int | None
    """Classical security strength in bits (NIST SP 800-57 Part 1 Rev. 5 Table 2;
    hashes per SP 800-107: collision = half the output, preimage = output)."""
    classical_status: ClassicalStatus
    """broken, weak, legacy or acceptable, against today's classical attacks."""
    quantum_attack: QuantumAttack
    """shor (polynomial-time break), grover (square-root speedup only) or none known."""
    source: str
    """Document(s) the row's facts come from, by title and identifier."""
    nist_category: int | None = None
    """NIST PQC security category (1-5) where defined (PQ schemes, AES, hashes)."""
    shor_problem: ShorProblem | None = None
    """Hard problem Shor's algorithm solves to break it, for the resource estimator."""
    problem_bits: int | None = None
    """Size of that problem: modulus bits, field bits or curve order bits; for
    Grover targets, key bits or hash output bits."""
    grover_target: GroverTarget | None = None
    """What a Grover-type attack searches for: a key, a hash preimage or a collision."""
    replacements: dict[str, str] = field(default_factory=dict, compare=False, hash=False)
    """Standardized replacement per purpose (key-establishment, signature, ...)."""
    components: tuple[Component, ...] = ()
    """Parts of a composite: cipher-suite roles or hybrid halves."""
    hybrid: bool = False
    """True for a hybrid of a classical and a post-quantum scheme (X25519MLKEM768)."""
    notes: str = ""
    """Short remark shown with the finding (why it is weak, what limits it)."""
    preimage_bits: int | None = None
    """Hashes only: classical preimage strength in bits (the full output, SP 800-107 Rev. 1)."""
    preimage_category: int | None = None
    """Hashes only: NIST category against preimage search (NIST IR 8547 ipd, Table 7)."""
    identifiers: dict[str, str] = field(default_factory=dict, compare=False, hash=False)
    """Protocol and format identifiers: X.509 OID, TLS code point, SSH name ..."""
    curve: str | None = None
    """Elliptic-curve schemes: the catalog name of the curve the name fixes (P-256, Curve25519)."""
    block_bits: int | None = None
    """Block ciphers: the block size in bits (64 for TDEA, Blowfish, IDEA; 128 for AES)."""
    signature_hash: str | None = None
    """Signature schemes whose name fixes the hash (ssh-rsa, sha1WithRSAEncryption: SHA-1)."""
    key_sizes: tuple[int, ...] = ()
    """Other spellings of the key size the name fixes (3TDEA: 168 or 192 with parity bits)."""

    def replacement_for(self, purpose: str) -> str | None:
        """Return the standardized replacement for a purpose, or None if none is needed."""
        return self.replacements.get(purpose) or self.replacements.get("default")


@dataclass(frozen=True)
class Component:
    """One part of a composite algorithm and the purpose it serves there."""

    purpose: str
    """Purpose of this part: key-establishment, authentication, encryption, integrity."""
    spec: AlgorithmSpec
    """The part itself."""


@dataclass(frozen=True)
class Conflict:
    """A name and an explicit attribute of the same use that disagree."""

    attribute: str
    """The attribute: key_size, curve or parameter_set."""
    named: str | None
    """What the name fixes for it, as text; None when the attribute does not apply to it."""
    given: str
    """The value the use gives, as written."""

    def describe(self, name: str) -> str:
        """One clause naming both values, for the unassessed reason (``name``: what the catalog read)."""
        if self.named is None:
            return f"{name} takes no {self.attribute}, but the use gives {self.attribute}: {self.given}"
        return f"{name} has {self.attribute} {self.named}, but the use gives {self.attribute}: {self.given}"


@dataclass(frozen=True)
class Resolution:
    """Result of looking a use's algorithm up in the catalog."""

    spec: AlgorithmSpec | None
    """The resolved algorithm, or None when the catalog cannot assess it."""
    reason: str | None = None
    """Why it is unassessed (unknown name, missing key size ...)."""
    suggestions: tuple[str, ...] = ()
    """Close known names, for "did you mean"."""
    family: str | None = None
    """Family recognised even when unassessed (RSA without a key size), else None."""
    quantum_attack: QuantumAttack | None = None
    """Quantum attack class known even when unassessed (RSA of any size falls to Shor)."""
    conflicts: tuple[Conflict, ...] = ()
    """Disagreements between the name and the use's attributes (then spec is None)."""

    @property
    def assessed(self) -> bool:
        """True when the catalog knows the algorithm with all its parameters."""
        return self.spec is not None
