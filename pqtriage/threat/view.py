"""Formatters for estimates: they return rich renderables or plain data, and never print.

Names from inputs are placed in :class:`rich.text.Text` objects, never parsed as markup.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

from rich import box
from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from pqtriage.threat.estimate import Estimate

NOT_APPLICABLE = "-"


def _count(value: float | None) -> str:
    if value is None:
        return NOT_APPLICABLE
    if value < 1e5:
        return f"{value:,.0f}"
    return f"{value:.3g}"


def _log2(value: float | None) -> str:
    return NOT_APPLICABLE if value is None else f"2^{value:.1f}"


def _hours(value: float | None) -> str:
    if value is None:
        return NOT_APPLICABLE
    return f"{value:.3g} h" if value < 48 else f"{value / 24:.3g} d"


def _shift(estimate: Estimate) -> str:
    arrival = estimate.arrival
    if arrival is None:
        return NOT_APPLICABLE
    if math.isinf(arrival.shift_years):
        return "never"
    return f"{arrival.shift_years:+.1f} y"


def _falls(estimate: Estimate) -> str:
    arrival = estimate.arrival
    if arrival is None or arrival.median_year is None or math.isinf(arrival.shift_years):
        return NOT_APPLICABLE
    return f"{arrival.median_year:.0f}"


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
    if estimate.attack == "shor" and estimate.logical_qubits is not None:
        rows += [
            ("logical qubits", _count(estimate.logical_qubits)),
            ("Toffoli count", _count(estimate.toffoli_count)),
            ("code distance", _count(estimate.code_distance)),
            ("physical qubits", _count(estimate.physical_qubits)),
            ("runtime per run", _hours(estimate.runtime_hours)),
        ]
    if estimate.attack == "grover":
        rows += [
            ("Grover iterations", _log2(estimate.grover_iterations_log2)),
            ("total gates", _log2(estimate.total_gates_log2)),
            ("MAXDEPTH", _log2(estimate.maxdepth_log2)),
            ("quantum security", _bits(estimate.quantum_security_bits)),
        ]
    rows.append(("NIST category", _category(estimate.nist_category)))
    rows.append(("arrival shift", _shift(estimate)))
    return rows


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
    if estimate.arrival is not None:
        parts.append(Text(f"arrival: {estimate.arrival.explanation}"))
    if estimate.notes:
        parts.append(Text(f"notes: {estimate.notes}"))
    return Group(*parts)


def side_by_side(estimates: Sequence[Estimate]) -> Table:
    """A table of what falls when: one row per estimate, ordered by arrival shift."""
    table = Table(
        box=box.SIMPLE, title="What falls when (shift against RSA-2048 factored in about a day)"
    )
    table.add_column("algorithm", no_wrap=True)
    # qubits: physical qubits of one Shor-type run; quantum: bits of security against Grover.
    for column in ("attack", "method", "qubits", "runtime", "quantum", "category"):
        table.add_column(column)
    table.add_column("shift", justify="right")
    table.add_column("falls")

    def order(e: Estimate) -> tuple[float, str]:
        shift = e.arrival.shift_years if e.arrival is not None else math.inf
        return (shift, e.algorithm)

    for e in sorted(estimates, key=order):
        table.add_row(
            Text(e.algorithm),
            e.attack,
            e.method or NOT_APPLICABLE,
            _count(e.physical_qubits),
            _hours(e.runtime_hours),
            NOT_APPLICABLE if e.quantum_security_bits is None else f"{e.quantum_security_bits:.0f}",
            _category(e.nist_category),
            _shift(e),
            _falls(e),
        )
    return table


def _finite(value: float | None) -> float | None:
    return None if value is None or not math.isfinite(value) else value


def to_json_dict(estimate: Estimate) -> dict[str, Any]:
    """A JSON-ready dict: numbers that do not apply are None; infinities become None with a flag."""
    arrival = estimate.arrival
    arrival_dict: dict[str, Any] | None = None
    if arrival is not None:
        arrival_dict = {
            "median_year": _finite(arrival.median_year),
            "shift_years": _finite(arrival.shift_years),
            "beyond_horizon": math.isinf(arrival.shift_years),
            "computed_shift_years": _finite(arrival.computed_shift_years),
            "physical_qubits_log2": arrival.physical_qubits_log2,
            "reference": "RSA-2048",
            "reference_physical_qubits": arrival.reference_physical_qubits,
            "basis": arrival.basis,
            "explanation": arrival.explanation,
        }
    return {
        "algorithm": estimate.algorithm,
        "attack": estimate.attack,
        "method": estimate.method,
        "method_title": estimate.method_title,
        "method_is_default": estimate.method_is_default,
        "classical_security_bits": estimate.classical_security_bits,
        "problem": estimate.problem,
        "problem_bits": estimate.problem_bits,
        "logical_qubits": estimate.logical_qubits,
        "toffoli_count": estimate.toffoli_count,
        "measurement_depth": estimate.measurement_depth,
        "code_distance": estimate.code_distance,
        "physical_qubits": estimate.physical_qubits,
        "factories": estimate.factories,
        "runtime_hours": estimate.runtime_hours,
        "runtime_limited_by": estimate.runtime_limited_by,
        "failure_probability": estimate.failure_probability,
        "grover_iterations_log2": estimate.grover_iterations_log2,
        "total_gates_log2": estimate.total_gates_log2,
        "maxdepth_log2": estimate.maxdepth_log2,
        "machines_log2": estimate.machines_log2,
        "quantum_security_bits": estimate.quantum_security_bits,
        "nist_category": estimate.nist_category,
        "wallclock_years_log2": estimate.wallclock_years_log2,
        "break_even_oracle_operations": estimate.break_even_oracle_operations,
        "arrival": arrival_dict,
        "working": list(estimate.working),
    }
