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
    year_label,
)
from pqtriage.threat.estimate import Estimate
from pqtriage.threat.methods import MethodData
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.resource_arrival import ArrivalDistribution, ResourceArrivalModel
from pqtriage.threat.side_by_side import TARGETS, TableContext, group_estimates

NAME_WIDTH = 24
"""Widest algorithms column; longer lists wrap at commas, never truncate."""
LEGEND_WIDTH = 98
"""Legend lines are wrapped here so that they read well at 100 columns."""


def _shift(e: Estimate) -> str:
    arrival = e.arrival
    if arrival is None or arrival.computed_shift_years is None:
        return NOT_APPLICABLE
    shift = arrival.computed_shift_years
    return f"{shift:+.0f} y" if abs(shift) >= 100 else f"{shift:+.1f} y"


def _band(e: Estimate) -> str:
    """The 10-90 % band of the cautious year, as two-digit years ('26-31')."""
    arrival = e.arrival
    if e.classically_broken or arrival is None or arrival.cautious_band is None:
        return NOT_APPLICABLE
    low, high = (year_label(v) for v in arrival.cautious_band)
    if low == "beyond":
        return NOT_APPLICABLE
    return f"{low[2:]}-{high[2:] if high != 'beyond' else 'never'}"


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
            f"assumptions (hardware file): error rate {p.physical_error_rate:g}, cycle "
            f"{p.cycle_us:g} us, reaction {p.reaction_us:g} us, run failure <= "
            f"{p.target_failure:g}, usable qubits double every {p.doubling_years:g} y, runtime "
            f"limit {p.runtime_limit_hours:g} h, MAXDEPTH 2^{p.maxdepth_log2:g}{reference}."
        ),
        (
            f"shift = {p.doubling_years:g} y x (log2(qubits / reference qubits) + log2(expected "
            f"runtime / {p.runtime_limit_hours:g} h) where over the limit), both costed like "
            "with like (so not always the qubits shown); beyond horizon: over "
            f"{p.planning_horizon_years:g} y. Qubits: one run (Shor); q-bits/cat.: quantum "
            "security bits and NIST category. Methods: the default per family is the most "
            "recent result whose circuit is published. Tables: arXiv:2505.15917 and 1905.09749 "
            "rows, log-scale interpolation between them."
        ),
    ]
    if context.profile is not None:
        tolerance = context.risk_tolerance or 0.0
        lines.append(
            f"falls: year at {tolerance:.0%} risk tolerance / median, profile {context.profile}, "
            f"given no CRQC by {context.as_of}; band 10%: the 10-90 % band of the first year over "
            "the survey range, the doubling time and the construction; broken: classically "
            "broken today (its classical status), no quantum date applies."
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
    table.add_column("logical\nqubits", justify="right", no_wrap=True)
    table.add_column("physical\nqubits", justify="right", no_wrap=True)
    table.add_column("runtime", justify="right", no_wrap=True)
    table.add_column("q-bits\n/cat.", justify="right", no_wrap=True)
    table.add_column("shift", justify="right", no_wrap=True)
    falls = "falls\n(median)"
    if context is not None and context.profile is not None:
        falls = f"falls\n{context.risk_tolerance or 0:.0%} / median"
    table.add_column(falls, no_wrap=True)
    table.add_column("band\n10%", no_wrap=True)
    for group in group_estimates(estimates):
        e = group.first
        bits = e.quantum_security_bits
        grover = NOT_APPLICABLE
        if bits is not None:
            category = _category(e.nist_category).replace("below 1", "<1")
            grover = f"{bits:.0f}/{category}"
        table.add_row(
            Text(group.label),
            e.method or ("collision" if e.problem == "collision" else NOT_APPLICABLE),
            NOT_APPLICABLE if e.logical_qubits is None else f"{e.logical_qubits:,.0f}",
            compact_qubits(e.physical_qubits),
            compact_hours(e.runtime_hours),
            grover,
            _shift(e),
            falls_label(e),
            _band(e),
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
            f"); the default construction decides{' (named by --method)' if model.methods else ''}, "
            f"the band samples the others. Pairs used: {listed} (docs/threat-model.md section 5)."
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
