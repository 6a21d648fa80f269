"""What falls when, side by side: estimates grouped into rows, and the facts of the legend.

Algorithms that share attack, problem and problem size (and so every number) are one row,
their names listed compactly. :class:`TableContext` holds what the legend states (methods,
assumptions, profile). The rendering is :mod:`pqtriage.formats.table.side_by_side`.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from dataclasses import dataclass

from pqtriage.threat.estimate import Estimate
from pqtriage.threat.parameters import ThreatParameters

TARGETS: tuple[str, ...] = (
    "factoring",
    "finite-field dlog",
    "curves",
    "key search",
    "preimages",
)
"""Legend names of what a method attacks, in legend order."""
_SIZED = re.compile(r"^([A-Za-z]+)-(\d+)$")


@dataclass(frozen=True)
class TableContext:
    """What the legend states: the assumptions behind every number in the table."""

    params: ThreatParameters
    """Hardware, search and growth assumptions used."""
    methods: tuple[tuple[str, str, bool], ...]
    """(what it attacks, method id or figures, is default) for each method in the table."""
    reference_physical_qubits: float | None
    """Physical qubits of RSA-2048 under the factoring method (the reference task)."""
    profile: str | None = None
    """Threat profile the years come from."""
    risk_tolerance: float | None = None
    """Profile quantile of the cautious year."""
    as_of: str | None = None
    """Assessment date, YYYY-MM-DD."""
    notes: tuple[str, ...] = ()
    """Further one-line notes (method caveats)."""


@dataclass(frozen=True)
class EstimateGroup:
    """Estimates with the same attack, problem, size and numbers, shown as one row."""

    label: str
    """Compact list of the member names."""
    members: tuple[Estimate, ...]
    """The estimates, in input order."""

    @property
    def first(self) -> Estimate:
        """The member whose numbers the row shows (all members share them)."""
        return self.members[0]


def compact_names(names: Sequence[str]) -> str:
    """List names compactly: modes folded into their cipher, curves with their schemes.

    ``ECDSA P-256, ECDH P-256, ECDH secp256k1`` -> ``P-256, secp256k1 (ECDSA/ECDH)``;
    ``AES-128, AES-128-GCM, Camellia-128`` -> ``AES/Camellia-128``;
    ``DH-2048, DSA-2048, ffdhe2048`` -> ``DH/DSA-2048, ffdhe2048``.
    """
    unique = list(dict.fromkeys(names))
    # A mode or construction of a listed cipher (AES-128-GCM beside AES-128) adds nothing.
    kept = [n for n in unique if not any(n != m and n.startswith(m + "-") for m in unique)]
    curves: list[str] = []
    schemes: list[str] = []
    sized: dict[str, list[str]] = {}
    plain: list[str] = []
    for name in kept:
        scheme, _, curve = name.partition(" ")
        if curve:
            schemes.append(scheme)
            curves.append(curve)
            continue
        match = _SIZED.match(name)
        if match:
            sized.setdefault(match.group(2), []).append(match.group(1))
        else:
            plain.append(name)
    parts = [f"{'/'.join(prefixes)}-{size}" for size, prefixes in sized.items()]
    if curves:
        parts.append(", ".join(dict.fromkeys(curves)) + f" ({'/'.join(dict.fromkeys(schemes))})")
    return ", ".join(parts + plain)


def _group_key(e: Estimate) -> tuple[object, ...]:
    shift = e.arrival.shift_years if e.arrival is not None else None
    return (
        bool(e.classically_broken),
        e.attack,
        e.problem,
        e.problem_bits,
        e.method,
        e.physical_qubits,
        e.runtime_hours,
        e.quantum_security_bits,
        e.nist_category,
        shift,
    )


def group_estimates(estimates: Sequence[Estimate]) -> list[EstimateGroup]:
    """Group estimates that share attack, problem, size and every shown number; sort by year.

    Every estimate is in exactly one group. Order: the year it falls (median), then the
    shift, then the label.
    """
    buckets: dict[tuple[object, ...], list[Estimate]] = {}
    for e in estimates:
        buckets.setdefault(_group_key(e), []).append(e)
    groups = [
        EstimateGroup(compact_names([e.algorithm for e in members]), tuple(members))
        for members in buckets.values()
    ]

    def order(g: EstimateGroup) -> tuple[float, float, float, str]:
        arrival = g.first.arrival
        if arrival is None:
            return (math.inf, math.inf, math.inf, g.label)
        computed = arrival.computed_shift_years
        year = arrival.median_year if arrival.median_year is not None else arrival.shift_years
        return (
            year if not math.isinf(arrival.shift_years) else math.inf,
            arrival.shift_years,
            computed if computed is not None else math.inf,
            g.label,
        )

    return sorted(groups, key=order)
