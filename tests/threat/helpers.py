"""Specs built directly (the catalog is a separate layer)."""

from __future__ import annotations

from pqtriage.catalog.spec import AlgorithmSpec, GroverTarget

SOURCE = "test fixture"


def rsa(bits: int, strength: int = 112) -> AlgorithmSpec:
    """RSA with a modulus of ``bits``."""
    return AlgorithmSpec(
        f"RSA-{bits}",
        "RSA",
        "signature",
        strength,
        "acceptable",
        "shor",
        SOURCE,
        shor_problem="factoring",
        problem_bits=bits,
    )


def curve(name: str, bits: int, strength: int = 128) -> AlgorithmSpec:
    """An elliptic-curve scheme over a curve of ``bits``-bit order."""
    return AlgorithmSpec(
        name,
        "ECDH",
        "key-agreement",
        strength,
        "acceptable",
        "shor",
        SOURCE,
        shor_problem="elliptic-curve-dlog",
        problem_bits=bits,
    )


def ffdh(bits: int, strength: int) -> AlgorithmSpec:
    """Finite-field Diffie-Hellman over a ``bits``-bit prime."""
    return AlgorithmSpec(
        f"ffdhe{bits}",
        "FFDH",
        "key-agreement",
        strength,
        "acceptable",
        "shor",
        SOURCE,
        shor_problem="finite-field-dlog",
        problem_bits=bits,
    )


def cipher(bits: int, name: str | None = None) -> AlgorithmSpec:
    """A block cipher with a ``bits``-bit key."""
    return AlgorithmSpec(
        name or f"AES-{bits}",
        "AES",
        "block-cipher",
        bits,
        "acceptable",
        "grover",
        SOURCE,
        grover_target="key-search",
        problem_bits=bits,
    )


def hash_(name: str, bits: int, target: GroverTarget) -> AlgorithmSpec:
    """A hash of ``bits`` output bits attacked for ``target``."""
    return AlgorithmSpec(
        name,
        "SHA-2",
        "hash",
        bits // 2,
        "acceptable",
        "grover",
        SOURCE,
        grover_target=target,
        problem_bits=bits,
    )
