"""Shor-type logical resources: qubits, Toffoli count and depth per construction and size.

The coefficients are rows of ``pqtriage/data/methods.yaml``; the formula shapes
are :class:`~pqtriage.threat.methods.Quantity`. Pure functions only.
"""

from __future__ import annotations

from dataclasses import dataclass

from pqtriage.errors import UsageError
from pqtriage.threat.methods import MethodData, ShorMethod, load_method_data


@dataclass(frozen=True)
class LogicalResources:
    """What one run of a Shor-type circuit needs at the logical level."""

    method_id: str
    """arXiv id of the construction used."""
    problem: str
    """factoring, finite-field-dlog or elliptic-curve-dlog."""
    problem_bits: int
    """Modulus, field or curve-order bits."""
    logical_qubits: float
    """Logical qubits of the circuit."""
    toffoli_count: float
    """Toffoli (+T/2) gates."""
    measurement_depth: float
    """Layers that each wait one reaction time."""
    working: tuple[str, ...]
    """Each step of the computation, with its source."""


def select_method(
    problem: str, method_id: str | None, data: MethodData | None = None
) -> ShorMethod:
    """Return the construction for ``problem``: ``method_id`` when given, else the default.

    Raises:
        UsageError: the method is unknown or does not solve that problem.
    """
    data = data or load_method_data()
    if method_id is None:
        return data.default_method(problem)
    method = data.method(method_id)
    known = ", ".join(m.id for m in data.shor_methods)
    if method is None:
        raise UsageError(f"--method {method_id!r} is not a known construction", hint=f"use {known}")
    if problem not in method.families:
        fitting = ", ".join(m.id for m in data.shor_methods if problem in m.families)
        raise UsageError(
            f"--method {method_id} does not cover {problem}",
            hint=f"for {problem} use {fitting}",
        )
    return method


def _finite_field_scale(method: ShorMethod, field_bits: int, strength_bits: int) -> float:
    """Ratio of exponent-register lengths, short discrete logarithm over factoring.

    Ekera-Hastad (as used by arXiv:1905.09749): factoring n bits uses 1.5 n exponent
    qubits; a short discrete logarithm of m = 2 s bits uses 3 m (NIST SP 800-56A Rev. 3,
    5.6.1.1.1: exponents of 2 s bits for strength s).
    """
    assert method.ff_factoring_exponent_per_bit is not None
    assert method.ff_dlog_exponent_per_bit is not None
    assert method.ff_exponent_bits_per_strength_bit is not None
    dlog_exponent = (
        method.ff_dlog_exponent_per_bit * method.ff_exponent_bits_per_strength_bit * strength_bits
    )
    return min(1.0, dlog_exponent / (method.ff_factoring_exponent_per_bit * field_bits))


def logical_resources(
    method: ShorMethod, problem: str, problem_bits: int, strength_bits: int | None = None
) -> LogicalResources:
    """Logical qubits, Toffoli count and measurement depth of one run.

    Args:
        method: the construction (a row of methods.yaml).
        problem: factoring, finite-field-dlog or elliptic-curve-dlog.
        problem_bits: n, the modulus, field or curve-order size in bits.
        strength_bits: classical strength, needed for finite-field short exponents.
    """
    if problem_bits < 2:
        raise UsageError(f"problem size {problem_bits} bits is too small to estimate")
    n = problem_bits
    qubits = method.logical_qubits.at(n)
    toffoli = method.toffoli_count.at(n)
    depth = method.measurement_depth.at(n, toffoli)
    working = [
        f"logical qubits {qubits:,.0f} at n = {n} ({method.id}: {_shape(method, 'logical_qubits')})",
        f"Toffoli count {toffoli:.3g} ({method.id}: {_shape(method, 'toffoli_count')})",
        f"measurement depth {depth:.3g} ({method.id}: {_shape(method, 'measurement_depth')})",
    ]
    if problem == "finite-field-dlog":
        strength = strength_bits or _strength_for_field(n)
        scale = _finite_field_scale(method, n, strength)
        toffoli *= scale
        depth *= scale
        working.append(
            f"short exponent of {2 * strength} bits for strength {strength}: Toffoli count and "
            f"depth x {scale:.3f} (exponent 3 m against 1.5 n, Ekera-Hastad; SP 800-56A Rev. 3)"
        )
    return LogicalResources(method.id, problem, n, qubits, toffoli, depth, tuple(working))


def _strength_for_field(field_bits: int) -> int:
    """Classical strength of a finite field (NIST SP 800-57 Part 1 Rev. 5, Table 2)."""
    for bits, strength in ((15360, 256), (7680, 192), (3072, 128), (2048, 112)):
        if field_bits >= bits:
            return strength
    return 80


def _shape(method: ShorMethod, name: str) -> str:
    quantity = getattr(method, name)
    if quantity.per_toffoli is not None:
        return f"{quantity.per_toffoli:g} x Toffoli count, serial (assumption)"
    if quantity.anchor_bits is not None:
        shape = f"{quantity.anchor_value:.3g} at n = {quantity.anchor_bits}, scaled as n^{quantity.n_power:g}"
        if quantity.lg_power:
            shape += f" lg(n)^{quantity.lg_power:g}"
        return shape + " (scaling assumption)"
    parts = []
    for c, a, b in quantity.terms:
        part = f"{c:g}"
        if a:
            part += " n" if a == 1 else f" n^{a:g}"
        if b:
            lg = "ceil(lg n)" if quantity.ceil_lg else "lg n"
            part += f" {lg}" if b == 1 else f" ({lg})^{b:g}"
        parts.append(part)
    return " + ".join(parts)
