"""Terminal view of one estimate (its working) and the labels the estimate views share.

The side-by-side table of every algorithm is in :mod:`pqtriage.formats.table.side_by_side`,
the JSON in :mod:`pqtriage.formats.json.estimate`. They never print.

Names from inputs are placed in :class:`rich.text.Text` objects, never parsed as markup.
"""

from __future__ import annotations

import math

from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.threat.estimate import Estimate
from pqtriage.threat.resource_arrival import ArrivalRow

NOT_APPLICABLE = "-"


def _count(value: float | None) -> str:
    if value is None:
        return NOT_APPLICABLE
    if value < 1e5:
        return f"{value:,.0f}"
    return f"{value:.3g}"


def compact_qubits(value: float | None) -> str:
    """Physical qubits in millions with two or so significant figures: 0.95 M, 6.5 M, 22 M."""
    if value is None:
        return NOT_APPLICABLE
    if value >= 1e9:
        return f"{value / 1e9:.2g} G"
    millions = value / 1e6
    if millions < 1:
        return f"{millions:.2f} M"
    return f"{millions:.1f} M" if millions < 10 else f"{millions:.0f} M"


def compact_hours(value: float | None) -> str:
    """Runtime in minutes, hours, days or years: 8 min, 5.9 h, 18 h, 2.0 d, 39 d, 3.0 y."""
    if value is None:
        return NOT_APPLICABLE
    if value < 1:
        return f"{value * 60:.0f} min"
    if value < 48:
        return f"{value:.1f} h" if value < 10 else f"{value:.0f} h"
    days = value / 24
    if days >= 365.25:
        return f"{days / 365.25:.1f} y"
    return f"{days:.1f} d" if days < 10 else f"{days:.0f} d"


def year_label(year: float | None) -> str:
    """Calendar year of a decimal year; 'beyond' when the profile never reaches it."""
    if year is None:
        return NOT_APPLICABLE
    if math.isinf(year):
        return "beyond"
    return f"{math.floor(year)}"


def year_band_label(band: tuple[float, float] | None) -> str:
    """'2029-2031' for a band of decimal years; '' without one or without width."""
    if band is None or year_label(band[0]) == year_label(band[1]):
        return ""
    return f"{year_label(band[0])}-{year_label(band[1])}"


def falls_label(estimate: Estimate) -> str:
    """'2031 / 2037' (cautious / median), 'broken' (classical status), 'beyond horizon', or '-' without years."""
    if estimate.classically_broken:
        return "broken"
    arrival = estimate.arrival
    if arrival is None:
        return NOT_APPLICABLE
    if math.isinf(arrival.shift_years):
        return "beyond horizon"
    if arrival.cautious_year is None:
        return year_label(arrival.median_year)
    return f"{year_label(arrival.cautious_year)} / {year_label(arrival.median_year)}"


def _log2(value: float | None) -> str:
    return NOT_APPLICABLE if value is None else f"2^{value:.1f}"


def _shift(estimate: Estimate) -> str:
    arrival = estimate.arrival
    if arrival is None:
        return NOT_APPLICABLE
    if math.isinf(arrival.shift_years):
        return "never"
    return f"{arrival.shift_years:+.1f} y"


def _method(estimate: Estimate) -> str:
    if estimate.method is None:
        return NOT_APPLICABLE
    return estimate.method + (" (default)" if estimate.method_is_default else "")


def key_figures(estimate: Estimate) -> list[tuple[str, str]]:
    """The headline figures of one estimate as (label, value) pairs, applicable ones only."""
    rows: list[tuple[str, str]] = [
        ("attack", estimate.attack),
        ("method", _method(estimate)),
        ("classical security", _bits(estimate.classical_security_bits)),
    ]
    if estimate.classically_broken:
        rows.insert(0, ("classical status", "BROKEN TODAY: " + estimate.classically_broken))
    if estimate.method_check:
        rows.append(("how checked", estimate.method_check))
    if estimate.attack == "shor" and estimate.logical_qubits is not None:
        rows += [
            ("logical qubits", _count(estimate.logical_qubits)),
            ("Toffoli count", _count(estimate.toffoli_count)),
            ("code distance", _count(estimate.code_distance)),
            ("physical qubits", _physical(estimate.physical_qubits)),
            ("runtime per run", compact_hours(estimate.runtime_hours)),
        ]
        if estimate.expected_runtime_hours is not None:
            rows.append(("expected runtime",
                         compact_hours(estimate.expected_runtime_hours) + " (retries included)"))
    if estimate.attack == "grover":
        rows += [
            ("Grover iterations", _log2(estimate.grover_iterations_log2)),
            ("total gates", _log2(estimate.total_gates_log2)),
            ("MAXDEPTH", _log2(estimate.maxdepth_log2)),
            ("quantum security", _bits(estimate.quantum_security_bits)),
        ]
    rows.append(("NIST category", _category(estimate.nist_category)))
    rows.append(("arrival shift", _shift(estimate)))
    arrival = estimate.arrival
    if arrival is not None and arrival.why_method:
        rows.append(("why this method", arrival.why_method))
    if estimate.classically_broken:
        rows.append(("falls", "already broken by classical means: no quantum date applies"))
    elif arrival is not None and arrival.profile is not None:
        if math.isinf(arrival.shift_years):
            rows.append(("falls", "beyond the planning horizon"))
        else:
            tolerance = arrival.risk_tolerance or 0.0
            rows.append(("falls (median)", _with_band(year_label(arrival.median_year), arrival.median_band)))
            rows.append((f"falls ({tolerance:.0%} risk)",
                         _with_band(year_label(arrival.cautious_year), arrival.cautious_band)))
    return rows


def _with_band(text: str, band: tuple[float, float] | None) -> str:
    extra = year_band_label(band)
    return f"{text} (10-90 % band {extra})" if extra else text


def _physical(value: float | None) -> str:
    if value is None:
        return NOT_APPLICABLE
    return f"{compact_qubits(value)} ({value:,.0f})"


def _bits(value: float | None) -> str:
    return NOT_APPLICABLE if value is None else f"{value:g} bits"


def _category(value: int | None) -> str:
    if value is None:
        return NOT_APPLICABLE
    return "below 1" if value == 0 else str(value)


def working_view(estimate: Estimate) -> RenderableType:
    """One estimate with every step of its working and the source of each step."""
    figures = Table(box=None, show_header=False, padding=(0, 2, 0, 0))
    figures.add_column("quantity", style="bold")
    figures.add_column("value")
    for label, value in key_figures(estimate):
        figures.add_row(label, Text(value))
    steps = Text()
    for number, step in enumerate(estimate.working, start=1):
        steps.append(f"{number}. {step}\n")
    parts: list[RenderableType] = [
        Text(estimate.algorithm, style="bold"),
        figures,
        Text("working:"),
        steps,
    ]
    if estimate.arrival is not None and not estimate.classically_broken:
        parts.append(Text(f"arrival: {estimate.arrival.explanation}"))
        if estimate.arrival.alternatives:
            listed = ", ".join(f"{m} {_signed(s)}" for m, s in estimate.arrival.alternatives)
            parts.append(Text(f"other constructions the band samples: {listed}"))
        if estimate.arrival.profile is not None:
            parts.append(Text(_years_sentence(estimate.arrival)))
    if estimate.notes:
        parts.append(Text(f"notes: {estimate.notes}"))
    return Group(*parts)


def _signed(shift: float) -> str:
    return "beyond horizon" if math.isinf(shift) else f"{shift:+.1f} y"


def _years_sentence(arrival: ArrivalRow) -> str:
    as_of = arrival.as_of_year or 0.0
    return (
        f"years: quantiles of profile {arrival.profile} shifted by {arrival.shift_years:+.1f} "
        f"years, given no CRQC by {as_of:.2f}: median, and the year its probability reaches the "
        f"{arrival.risk_tolerance or 0:.0%} risk tolerance; bands over the survey range, the "
        "doubling time and the construction. Estimates are uncertain; official guidance comes first."
    )
