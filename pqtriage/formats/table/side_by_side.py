"""Terminal view of what falls when: one row per group of equal estimates, with a legend.

Sized for a 100-column terminal. The grouping and the legend's facts come from
:mod:`pqtriage.threat.side_by_side`. Names from inputs go into :class:`rich.text.Text`,
never parsed as markup.
"""

from __future__ import annotations

import textwrap
from collections.abc import Sequence

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.formats.table.estimate import (
    NOT_APPLICABLE,
    compact_hours,
    compact_qubits,
    falls_label,
)
from pqtriage.threat.estimate import Estimate
from pqtriage.threat.methods import MethodData
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.resource_arrival import ArrivalDistribution, ResourceArrivalModel
from pqtriage.threat.side_by_side import TARGETS, TableContext, group_estimates

NAME_WIDTH = 30
"""Widest algorithms column; longer lists wrap at commas, never truncate."""
LEGEND_WIDTH = 98
"""Legend lines are wrapped here so that they read well at 100 columns."""


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


def legend_context(
    estimates: Sequence[Estimate],
    params: ThreatParameters,
    model: ResourceArrivalModel,
    data: MethodData,
    profile: ArrivalDistribution | None,
    as_of_label: str | None,
) -> TableContext:
    """The legend's facts: methods in use, assumptions, profile, and method caveats."""
    targets = dict(
        zip(
            ("factoring", "finite-field-dlog", "elliptic-curve-dlog", "key-search", "preimage"),
            TARGETS,
            strict=True,
        )
    )
    seen: dict[tuple[str, str], bool] = {}
    for e in estimates:
        if e.method is not None and e.problem in targets:
            seen.setdefault((targets[e.problem], e.method), e.method_is_default)
    methods = tuple((target, method, default) for (target, method), default in seen.items())
    notes: list[str] = []
    decided: dict[str, list[str]] = {}
    grover = False
    for e in estimates:
        comparison = e.arrival.comparison if e.arrival is not None else None
        grover = grover or (e.attack == "grover" and e.problem in targets)
        if comparison is None or e.problem not in targets:
            continue
        pair = f"{comparison.method} vs {comparison.reference_method}"
        pair += " (own layouts)" if comparison.own_layouts else " (generic)"
        pairs = decided.setdefault(targets[e.problem], [])
        if pair not in pairs:
            pairs.append(pair)
    if decided or grover:
        listed = "; ".join(
            f"{target} {', '.join(decided[target])}" for target in TARGETS if target in decided
        )
        if grover:
            listed += ("; " if listed else "") + f"key search vs {model.reference_method} (generic)"
        notes.append(
            "Shifts compare like with like: both sides on one layer, their own layouts only if "
            f"both have one, else the generic surface-code layer (RSA-2048 under "
            f"{model.reference_method}: {compact_qubits(model.reference_generic_physical_qubits)}"
            f"); the earliest credible pair decides{' unless named by --method' if model.methods else ''}. "
            f"Pairs used: {listed} (docs/threat-model.md section 4)."
        )
    return TableContext(
        params=params,
        methods=methods,
        reference_physical_qubits=model.reference_physical_qubits,
        profile=None if profile is None else profile.name,
        risk_tolerance=None if profile is None else profile.risk_tolerance,
        as_of=as_of_label,
        notes=tuple(notes),
    )
