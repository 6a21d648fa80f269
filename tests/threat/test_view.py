"""Formatters: exact text for small cases, and the JSON shape."""

from __future__ import annotations

import io
import json
import math

import pytest
from rich.console import Console, RenderableType

from pqtriage.formats.json.estimate import to_json_dict
from pqtriage.formats.table.estimate import compact_hours, compact_qubits, working_view
from pqtriage.threat.estimate import Estimate, estimate
from pqtriage.threat.resource_arrival import ArrivalRow
from tests.threat.helpers import cipher, hash_, rsa

JSON_FIELDS = (
    "algorithm",
    "attack",
    "method",
    "classical_security_bits",
    "logical_qubits",
    "toffoli_count",
    "code_distance",
    "physical_qubits",
    "runtime_hours",
    "grover_iterations_log2",
    "total_gates_log2",
    "maxdepth_log2",
    "nist_category",
    "arrival",
)


def render(renderable: RenderableType) -> str:
    console = Console(file=io.StringIO(), width=100, color_system=None, force_terminal=False)
    console.print(renderable)
    out = console.file.getvalue()  # type: ignore[attr-defined]
    return "\n".join(line.rstrip() for line in out.splitlines())


def _small(
    name: str = "RSA-[bold]2048[/bold]", years: tuple[float, float] | None = None
) -> Estimate:
    """A hand-made estimate; ``years`` = (median, cautious) from a profile named 'test'."""
    arrival = ArrivalRow(name, "shor", "Shor", 24.0, 2.0**24, 0.0, 0.0, None, "needs 2^24.0")
    if years is not None:
        arrival = ArrivalRow(
            name, "shor", "Shor", 24.0, 2.0**24, 0.0, 0.0, years[0], "needs 2^24.0",
            years[1], 0.1, "test", 2026.25,
        )  # fmt: skip
    none = dict.fromkeys(
        (
            "grover_iterations_log2",
            "total_gates_log2",
            "maxdepth_log2",
            "machines_log2",
            "quantum_security_bits",
            "nist_category",
            "wallclock_years_log2",
            "break_even_oracle_operations",
        ),
    )
    return Estimate(
        algorithm=name,
        attack="shor",
        method="1905.09749",
        method_title="t",
        method_is_default=False,
        classical_security_bits=112,
        problem="factoring",
        problem_bits=2048,
        logical_qubits=6189.0,
        toffoli_count=2.7e9,
        measurement_depth=2.1e9,
        code_distance=27,
        physical_qubits=2.0e7,
        factories=19,
        runtime_hours=5.1,
        runtime_limited_by="reaction",
        failure_probability=0.2,
        arrival=arrival,
        working=("step one (source A)", "step two [red]x[/red]"),
        notes="",
        **none,  # type: ignore[arg-type]
    )


def test_working_view_exact_text_and_literal_names() -> None:
    assert render(working_view(_small())) == (
        "RSA-[bold]2048[/bold]\n"
        "attack              shor\n"
        "method              1905.09749\n"
        "classical security  112 bits\n"
        "logical qubits      6,189\n"
        "Toffoli count       2.7e+09\n"
        "code distance       27\n"
        "physical qubits     20 M (20,000,000)\n"
        "runtime per run     5.1 h\n"
        "NIST category       -\n"
        "arrival shift       +0.0 y\n"
        "working:\n"
        "1. step one (source A)\n"
        "2. step two [red]x[/red]\n"
        "\n"
        "arrival: needs 2^24.0"
    )


def test_working_view_shows_the_years_from_the_profile() -> None:
    text = render(working_view(_small("RSA-2048", years=(2036.4, 2029.6))))
    assert text.splitlines()[10:13] == [
        "arrival shift       +0.0 y",
        "falls (median)      2036",
        "falls (10% risk)    2029",
    ]
    assert text.endswith(
        "years: quantiles of profile test shifted by +0.0 years, given no CRQC by 2026.25: median, "
        "and the\nyear its probability reaches the 10% risk tolerance; bands over the survey range, "
        "the doubling time\nand the construction. Estimates are uncertain; official guidance comes first."
    )


@pytest.mark.parametrize(
    "qubits, label",
    [(948_467.5, "0.95 M"), (6.09e6, "6.1 M"), (21.56e6, "22 M"), (None, "-"), (2.4e9, "2.4 G")],
)
def test_compact_qubits(qubits: float | None, label: str) -> None:
    assert compact_qubits(qubits) == label


@pytest.mark.parametrize(
    "hours, label",
    [(0.139, "8 min"), (5.94, "5.9 h"), (18.1, "18 h"), (48.75, "2.0 d"), (447.8, "19 d"),
     (26_660.0, "3.0 y")],
)  # fmt: skip
def test_compact_hours(hours: float, label: str) -> None:
    assert compact_hours(hours) == label


@pytest.mark.parametrize("spec", [rsa(2048), cipher(128), hash_("SHA-256", 256, "collision")])
def test_json_has_the_fields_and_nulls_not_zeros(spec: object) -> None:
    from pqtriage.sources.profile_file import load_profile
    from pqtriage.threat.resource_arrival import ResourceArrivalModel

    model = ResourceArrivalModel(profile=load_profile("survey-2025-upper"), as_of_year=2026.25)
    result = to_json_dict(estimate(spec, arrival_model=model))  # type: ignore[arg-type]
    for field in JSON_FIELDS:
        assert field in result
    assert {"median_year", "shift_years", "cautious_year", "risk_tolerance"} <= set(
        result["arrival"]
    )
    assert result["arrival"]["profile"] == "survey-2025-upper"
    if result["attack"] == "shor":
        assert result["arrival"]["cautious_year"] < result["arrival"]["median_year"]
    else:
        assert result["arrival"]["median_year"] is None
    json.dumps(result, allow_nan=False)  # no NaN or Infinity in the JSON
    if result["attack"] == "shor":
        assert result["grover_iterations_log2"] is None and result["maxdepth_log2"] is None
        assert result["physical_qubits"] > 0
    else:
        assert result["logical_qubits"] is None and result["code_distance"] is None
        assert result["arrival"]["shift_years"] is None and result["arrival"]["beyond_horizon"]
        assert not math.isinf(result["arrival"]["computed_shift_years"] or 0)
