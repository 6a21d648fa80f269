"""The side-by-side table of what falls when, sized for a 100-column terminal.

Algorithms that share attack, problem and problem size (and so every number) are one row,
their names listed compactly. A legend under the table names the methods and the key
assumptions. Names from inputs go into :class:`rich.text.Text`, never parsed as markup.
"""

from __future__ import annotations

import math
import re
import textwrap
from collections.abc import Sequence
from dataclasses import dataclass

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.threat.estimate import Estimate
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.view import (
    NOT_APPLICABLE,
    compact_hours,
    compact_qubits,
    falls_label,
)

NAME_WIDTH = 30
LEGEND_WIDTH = 98
"""Legend lines are wrapped here so that they read well at 100 columns."""
"""Widest algorithms column; longer lists wrap at commas, never truncate."""
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


def _shift(e: Estimate) -> str:
    arrival = e.arrival
    if arrival is None or arrival.computed_shift_years is None:
        return NOT_APPLICABLE
    shift = arrival.computed_shift_years
    return f"{shift:+.0f} y" if abs(shift) >= 100 else f"{shift:+.1f} y"


def _category(value: int | None) -> str:
    if value is None:
        return NOT_APPLICABLE
    return "below 1" if value == 0 else str(value)


def _legend(context: TableContext) -> Text:
    p = context.params
    by_method: dict[str, list[str]] = {}
    for target, method, default in sorted(context.methods, key=lambda m: TARGETS.index(m[0])):
        by_method.setdefault(method + (" (default)" if default else ""), []).append(target)
    methods = "; ".join(f"{', '.join(t)} {m}" for m, t in by_method.items())
    reference = (
        f"; reference RSA-2048 {compact_qubits(context.reference_physical_qubits)} qubits"
        if context.reference_physical_qubits
        else ""
    )
    lines = [
        f"methods: {methods}; collisions: classical bound.",
        (
            f"assumptions: error rate {p.physical_error_rate:g}, cycle {p.cycle_us:g} us, "
            f"reaction {p.reaction_us:g} us, run failure <= {p.target_failure:g}, capacity "
            f"doubles every {p.doubling_years:g} y, MAXDEPTH 2^{p.maxdepth_log2:g}{reference}."
        ),
        (
            f"shift = {p.doubling_years:g} x log2(qubits / reference qubits), both costed like "
            "with like (so not always the qubits shown); beyond horizon: over "
            f"{p.planning_horizon_years:g} y. Qubits: physical, one run (Shor); q-bits: quantum "
            "security bits (Grover)."
        ),
    ]
    if context.profile is not None:
        tolerance = context.risk_tolerance or 0.0
        lines.append(
            f"falls: year at {tolerance:.0%} risk tolerance / median, profile {context.profile}, "
            f"given no CRQC by {context.as_of}."
        )
    lines.extend(context.notes)
    lines.append(
        "Caution: estimates are uncertain by years; official guidance and deadlines come first."
    )
    wrapped = [textwrap.fill(line, LEGEND_WIDTH, subsequent_indent="  ") for line in lines]
    return Text("\n".join(wrapped))


def side_by_side(
    estimates: Sequence[Estimate], context: TableContext | None = None
) -> RenderableType:
    """What falls when: one row per group of equal estimates, by year, with a legend."""
    table = Table(
        box=box.SIMPLE_HEAD,
        show_edge=False,
        pad_edge=False,
        padding=(0, 1, 0, 0),
        title="What falls when, against RSA-2048 factored in about a day",
    )
    table.add_column("algorithms", max_width=NAME_WIDTH, overflow="fold")
    table.add_column("method", no_wrap=True)
    table.add_column("qubits", justify="right", no_wrap=True)
    table.add_column("runtime", justify="right", no_wrap=True)
    table.add_column("q-bits", justify="right", no_wrap=True)
    table.add_column("NIST\ncat.", no_wrap=True)
    table.add_column("shift", justify="right", no_wrap=True)
    falls = "falls\n(median)"
    if context is not None and context.profile is not None:
        falls = f"falls\n{context.risk_tolerance or 0:.0%} / median"
    table.add_column(falls, no_wrap=True)
    for group in group_estimates(estimates):
        e = group.first
        bits = e.quantum_security_bits
        table.add_row(
            Text(group.label),
            e.method or ("collision" if e.problem == "collision" else NOT_APPLICABLE),
            compact_qubits(e.physical_qubits),
            compact_hours(e.runtime_hours),
            NOT_APPLICABLE if bits is None else f"{bits:.0f}",
            _category(e.nist_category) if e.attack == "grover" else NOT_APPLICABLE,
            _shift(e),
            falls_label(e),
        )
    if context is None:
        return table
    return Group(table, _legend(context))
