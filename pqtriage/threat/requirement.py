"""What one construction needs to break one problem size: logical costs, physical qubits, time.

Logical costs come from the paper's own table when it has one for the problem (arXiv:2505.15917),
else from the construction's formula (shor.py). Physical qubits and hours come from

- the paper's own physical table (arXiv:1905.09749), when costed on the construction's own
  layer: at the paper's hardware the table itself; at other hardware the surface-code model
  times the table-to-model ratio at the paper's hardware, so the table sets the level and the
  model the hardware dependence;
- else the surface-code model (surface_code.py), with the construction's own layout on its own
  layer, or the generic layer.

The effective requirement adds the runtime rule of the hardware file: an expected runtime above
the limit needs runtime / limit times the capacity (parallel runs or faster hardware), the same
for every construction: log2 of it is the requirement in doublings.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.threat.methods import MethodData, ShorMethod
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.shor import LogicalResources, logical_resources
from pqtriage.threat.surface_code import PhysicalResources, physical_resources
from pqtriage.threat.tables import Reading, cautious_envelope, read_table

PAPER_HARDWARE = ThreatParameters()
"""The hardware of arXiv:1905.09749's table: p = 1e-3, 1 us cycle, 10 us reaction."""


def variant_of(spec: AlgorithmSpec) -> str | None:
    """The table variant of a Shor target: DSA groups are Schnorr groups, other FFDH safe primes."""
    if spec.shor_problem == "finite-field-dlog" and spec.family == "DSA":
        return "schnorr-group"
    return spec.shor_problem


def family_of(variant: str) -> str:
    """The problem family (methods.yaml ``families``) of a table variant."""
    if variant in ("schnorr-group", "finite-field-dlog-full-exponent"):
        return "finite-field-dlog"
    return variant


@dataclass(frozen=True)
class Requirement:
    """Logical and physical cost of one construction at one size, with its working."""

    method_id: str
    """Construction (arXiv id)."""
    variant: str
    """factoring, finite-field-dlog, schnorr-group or elliptic-curve-dlog."""
    bits: int
    """Problem size."""
    logical: LogicalResources
    """Logical qubits, Toffoli count and depth."""
    own_layer: bool
    """True when costed on the construction's own layer (its table or layout)."""
    physical_qubits: float | None
    """Physical qubits; None when no code distance suffices."""
    hours_per_run: float | None
    """Hours of one run."""
    expected_hours: float | None
    """Expected hours to a result, retries included."""
    physical: PhysicalResources | None
    """The surface-code model's result behind the figures (None for a table row read as is)."""
    working: tuple[str, ...]
    """Every step, with its source."""

    def doublings(self, limit_hours: float) -> float:
        """log2 of the effective requirement: physical qubits x max(1, runtime / limit)."""
        if self.physical_qubits is None or self.expected_hours is None:
            return math.inf
        return math.log2(self.physical_qubits) + max(0.0, math.log2(self.expected_hours / limit_hours))

    def runtime_note(self, limit_hours: float) -> str:
        """Why the runtime does or does not add doublings."""
        if self.expected_hours is None:
            return "no runtime: no code distance suffices"
        if self.expected_hours <= limit_hours:
            return f"expected runtime {self.expected_hours:.3g} h within the {limit_hours:g} h limit"
        extra = math.log2(self.expected_hours / limit_hours)
        return (
            f"expected runtime {self.expected_hours:.3g} h over the {limit_hours:g} h limit: "
            f"x{self.expected_hours / limit_hours:.3g} capacity, +{extra:.2f} doublings"
        )


def has_own_layer(method: ShorMethod, variant: str) -> bool:
    """Whether the construction brings its own physical figures for the variant."""
    if method.layout is not None:
        return True
    return _physical_rows(method, variant) is not None


def _physical_rows(method: ShorMethod, variant: str) -> tuple | None:
    table = method.physical_table or {}
    if variant in table:
        return table[variant]
    fallback = family_of(variant)
    if variant == "schnorr-group" and fallback in table:
        return table[fallback]  # a Schnorr group exponent is short like a safe-prime one
    return None


def _logical_rows(method: ShorMethod, variant: str) -> tuple | None:
    table = method.logical_table or {}
    return table.get(variant)


def _formula(method: ShorMethod, variant: str, bits: float, strength: int | None) -> LogicalResources:
    return logical_resources(method, family_of(variant), max(2, round(bits)), strength)


def logical_costs(method: ShorMethod, variant: str, bits: int, strength: int | None) -> LogicalResources:
    """Logical qubits, Toffoli count and depth: the paper's table, or its formula beyond it."""
    rows = _logical_rows(method, variant)
    formula = _formula(method, variant, bits, strength)
    if rows is None:
        return formula
    sizes = [r.bits for r in rows]
    label = f"the {variant} table of arXiv:{method.id} (commit {rows[0].commit[:7]}, {rows[0].verified})"
    qubits = _read(sizes, [r.logical_qubits for r in rows], bits,
                   lambda n: _formula(method, variant, n, _row_strength(rows, n, strength)).logical_qubits)
    toffoli = _read(sizes, [r.toffoli for r in rows], bits,
                    lambda n: _formula(method, variant, n, _row_strength(rows, n, strength)).toffoli_count)
    depth = method.measurement_depth.at(bits, toffoli.value)
    working = (
        qubits.describe("logical qubits", label),
        toffoli.describe("Toffoli count (expected total over all runs)", label),
        f"measurement depth {depth:.3g} (serial in the Toffoli gates, assumption)",
    )
    return LogicalResources(method.id, family_of(variant), bits, qubits.value, toffoli.value, depth, working)


def _row_strength(rows: tuple, n: float, strength: int | None) -> int | None:
    """The strength the formula uses at n: a row's own; beyond the rows never below the last
    row's (nor above the first row's below them), so the anchored formula cannot drop."""
    exact = next((r.strength for r in rows if r.bits == n), None)
    if exact is not None:
        return int(exact)
    first, last = rows[0], rows[-1]
    if n > last.bits and last.strength is not None:
        return max(strength or 0, last.strength)
    if n < first.bits and first.strength is not None:
        return min(strength or first.strength, first.strength)
    return strength


def _read(sizes: list[int], values: list[float], n: int, formula: object) -> Reading:
    reading = read_table(sizes, values, n, formula)  # type: ignore[arg-type]
    least = cautious_envelope(sizes, values, n, reading.value)
    if least < reading.value:
        return Reading(least, reading.how + ", cautious envelope", reading.rows)
    return reading


def requirement(
    method: ShorMethod,
    variant: str,
    bits: int,
    strength: int | None,
    params: ThreatParameters,
    data: MethodData,
    own_layer: bool,
) -> Requirement:
    """Cost one construction at one size on its own layer or on the generic layer."""
    key = (method.id, variant, bits, strength, params, id(data), own_layer)
    found = _CACHE.get(key)
    if found is None or found[0] is not data:
        found = (data, _requirement(method, variant, bits, strength, params, data, own_layer))
        if len(_CACHE) > 8192:
            _CACHE.clear()
        _CACHE[key] = found
    return found[1]


_CACHE: dict[tuple[object, ...], tuple[MethodData, Requirement]] = {}


def _requirement(
    method: ShorMethod, variant: str, bits: int, strength: int | None,
    params: ThreatParameters, data: MethodData, own_layer: bool,
) -> Requirement:  # fmt: skip
    logical = logical_costs(method, variant, bits, strength)
    rows = _physical_rows(method, variant) if own_layer else None
    layout = method.layout if own_layer else None
    model = physical_resources(logical, params, data.surface_code, layout)
    model_expected = _expected(model, params.target_failure)
    if rows is None:
        layer = "its own layout" if layout is not None else "the generic surface-code layer"
        working = logical.working + model.working + (f"costed on {layer}",)
        return Requirement(method.id, variant, bits, logical, own_layer, model.physical_qubits,
                           model.runtime_hours, model_expected, model, working)
    sizes = [r.bits for r in rows]
    label = f"the {variant} table of arXiv:{method.id} ({rows[0].commit}, {rows[0].verified})"

    paper = replace(params, physical_error_rate=PAPER_HARDWARE.physical_error_rate,
                    cycle_us=PAPER_HARDWARE.cycle_us, reaction_us=PAPER_HARDWARE.reaction_us)

    def generic(n: float, hardware: ThreatParameters = paper) -> PhysicalResources:
        return physical_resources(logical_costs(method, variant, max(2, round(n)), strength),
                                  hardware, data.surface_code, None)

    qubits = _read(sizes, [r.physical_qubits for r in rows], bits,
                   lambda n: generic(n).physical_qubits or math.inf)
    per_run = _read(sizes, [r.hours_per_run for r in rows], bits,
                    lambda n: generic(n).runtime_hours or math.inf)
    expected = _read(sizes, [r.expected_hours for r in rows], bits,
                     lambda n: _expected(generic(n)) or math.inf)
    steps = list(logical.working)
    steps += [
        qubits.describe("physical qubits per run", label),
        per_run.describe("hours per run", label),
        expected.describe("expected hours (hours per run / (1 - retry risk))", label),
    ]
    physical: float | None = qubits.value
    hours: float | None = per_run.value
    expected_hours: float | None = expected.value
    if not params.matches_1905_09749:
        # Other hardware: the model's hardware dependence, at the table's level.
        here, there = model, generic(bits)
        if here.physical_qubits and there.physical_qubits and here.runtime_hours and there.runtime_hours:
            q_ratio = here.physical_qubits / there.physical_qubits
            t_ratio = here.runtime_hours / there.runtime_hours
            physical, hours, expected_hours = qubits.value * q_ratio, per_run.value * t_ratio, expected.value * t_ratio
            steps.append(
                f"hardware differs from the paper's (p = 1e-3, 1 us, 10 us): qubits x{q_ratio:.3g} and "
                f"time x{t_ratio:.3g}, the surface-code model's ratio between the two"
            )
        else:
            physical = hours = expected_hours = None
            steps.append("no code distance suffices on this hardware")
    return Requirement(method.id, variant, bits, logical, True, physical, hours, expected_hours,
                       model, tuple(steps))


def _expected(physical: PhysicalResources, target: float = PAPER_HARDWARE.target_failure) -> float | None:
    """Runtime / (1 - target failure): a failed run is repeated, and the chosen distance keeps
    the failure under the target. Taken at the target, not at the distance's own failure, so
    that a larger problem (whose larger distance fails less often) never looks faster."""
    if physical.runtime_hours is None:
        return None
    return physical.runtime_hours / (1.0 - target)
