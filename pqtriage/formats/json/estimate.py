"""Estimates as JSON: numbers that do not apply are null; infinities become null with a flag."""

from __future__ import annotations

import json
import math
from collections.abc import Sequence
from typing import Any

from pqtriage.threat.estimate import Estimate


def _finite(value: float | None) -> float | None:
    return None if value is None or not math.isfinite(value) else value


def _pair(band: tuple[float, float] | None) -> dict[str, Any] | None:
    if band is None:
        return None
    return {"low": _finite(band[0]), "high": _finite(band[1]), "percentiles": [10, 90]}


def to_json_dict(estimate: Estimate) -> dict[str, Any]:
    """A JSON-ready dict: numbers that do not apply are None; infinities become None with a flag."""
    arrival = estimate.arrival
    arrival_dict: dict[str, Any] | None = None
    if arrival is not None:
        arrival_dict = {
            "median_year": _finite(arrival.median_year),
            "cautious_year": _finite(arrival.cautious_year),
            "risk_tolerance": arrival.risk_tolerance,
            "profile": arrival.profile,
            "as_of_year": arrival.as_of_year,
            "shift_years": _finite(arrival.shift_years),
            "beyond_horizon": math.isinf(arrival.shift_years),
            "computed_shift_years": _finite(arrival.computed_shift_years),
            "physical_qubits_log2": arrival.physical_qubits_log2,
            "reference": "RSA-2048",
            "reference_physical_qubits": arrival.reference_physical_qubits,
            "basis": arrival.basis,
            "explanation": arrival.explanation,
            "why_method": arrival.why_method,
            "alternatives": [{"method": m, "shift_years": _finite(s)} for m, s in arrival.alternatives],
            "cautious_year_band": _pair(arrival.cautious_band),
            "median_year_band": _pair(arrival.median_band),
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
        "expected_runtime_hours": estimate.expected_runtime_hours,
        "method_check": estimate.method_check,
        "classically_broken": estimate.classically_broken or None,
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


def estimate_json(estimate: Estimate) -> str:
    """One estimate as JSON text."""
    return json.dumps(to_json_dict(estimate), indent=2)


def estimates_json(estimates: Sequence[Estimate]) -> str:
    """Several estimates (``estimate --all``) as a JSON list."""
    return json.dumps([to_json_dict(e) for e in estimates], indent=2)
