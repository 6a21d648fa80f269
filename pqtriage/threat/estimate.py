"""The orchestrator: one :class:`Estimate` per AlgorithmSpec, every number with its working.

Shor targets go through :mod:`shor` then :mod:`surface_code`; Grover targets through
:mod:`grover`; the arrival comes from an :class:`~pqtriage.threat.resource_arrival.ResourceArrivalModel`.
Numbers that do not apply are None, never zero.
"""

from __future__ import annotations

from dataclasses import dataclass

from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.threat.grover import break_even_oracle_operations, grover_resources
from pqtriage.threat.methods import MethodData, load_method_data
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.requirement import family_of, has_own_layer, requirement, variant_of
from pqtriage.threat.resource_arrival import ArrivalRow, ResourceArrivalModel
from pqtriage.threat.shor import select_method


@dataclass(frozen=True)
class Estimate:
    """Everything the threat model says about one algorithm."""

    algorithm: str
    """Algorithm name as the catalog gives it."""
    attack: str
    """shor, grover or none."""
    method: str | None
    """Construction (arXiv id) for Shor, 'NIST <year>' for Grover, None otherwise."""
    method_title: str | None
    """Title of the construction or figures used."""
    method_is_default: bool
    """True when the method is the family's default (stated in the output)."""
    classical_security_bits: int | None
    """Classical strength (NIST SP 800-57 Part 1 Rev. 5), from the catalog."""
    problem: str | None
    """factoring, finite-field-dlog, elliptic-curve-dlog, key-search, preimage or collision."""
    problem_bits: int | None
    """Size of the problem in bits."""
    logical_qubits: float | None
    """Logical qubits of one Shor-type run."""
    toffoli_count: float | None
    """Toffoli gates of one Shor-type run."""
    measurement_depth: float | None
    """Reaction-limited layers of one Shor-type run."""
    code_distance: int | None
    """Surface-code distance chosen for the run."""
    physical_qubits: float | None
    """Physical qubits of one Shor-type run."""
    factories: int | None
    """CCZ factories of one Shor-type run."""
    runtime_hours: float | None
    """Hours per Shor-type run."""
    runtime_limited_by: str | None
    """reaction or factory."""
    failure_probability: float | None
    """Probability that a run fails from logical errors."""
    grover_iterations_log2: float | None
    """log2 of serial Grover iterations."""
    total_gates_log2: float | None
    """log2 of the quantum gates of the search under MAXDEPTH."""
    maxdepth_log2: float | None
    """log2 of the depth limit applied (Grover only)."""
    machines_log2: float | None
    """log2 of the machines MAXDEPTH forces."""
    quantum_security_bits: float | None
    """Effective security against a quantum attacker, in bits (Grover and collisions)."""
    nist_category: int | None
    """NIST category (0 = below category 1) where defined."""
    wallclock_years_log2: float | None
    """log2 of the years of the search on the stated machines."""
    break_even_oracle_operations: float | None
    """Largest oracle for which Grover beats classical search within the window."""
    arrival: ArrivalRow | None
    """Arrival relative to the reference task, when an arrival model is given."""
    working: tuple[str, ...]
    """Every step, with its source."""
    notes: str = ""
    """What the method assumes."""
    expected_runtime_hours: float | None = None
    """Expected hours to a result, retries included (Shor)."""
    method_check: str | None = None
    """How the construction was checked: published circuit, claimed with withheld circuit ..."""
    classically_broken: str = ""
    """Why the algorithm is broken (or not acceptable) against classical attacks today; '' if not."""


def estimate(
    spec: AlgorithmSpec,
    params: ThreatParameters | None = None,
    method: str | None = None,
    *,
    strict: bool = True,
    arrival_model: ResourceArrivalModel | None = None,
    data: MethodData | None = None,
) -> Estimate:
    """Estimate the quantum attack on ``spec``.

    Args:
        spec: the algorithm (from the catalog).
        params: assumptions; the published defaults when None.
        method: construction id (--method); None for the family default.
        strict: when False, a method that does not cover the spec's family is ignored
            (side-by-side tables); when True it raises UsageError.
        arrival_model: computes the arrival; None leaves ``arrival`` unset.
        data: method data (the shipped methods.yaml by default).
    """
    params = params or ThreatParameters()
    data = data or load_method_data()
    arrival = arrival_model.explain(spec) if arrival_model is not None else None
    base: dict[str, object] = {
        "algorithm": spec.name,
        "attack": spec.quantum_attack,
        "classical_security_bits": spec.classical_bits,
        "problem_bits": spec.problem_bits,
        "arrival": arrival,
        "nist_category": spec.nist_category,
    }
    empty: dict[str, object] = {
        k: None
        for k in (
            "method",
            "method_title",
            "problem",
            "logical_qubits",
            "toffoli_count",
            "measurement_depth",
            "code_distance",
            "physical_qubits",
            "factories",
            "runtime_hours",
            "runtime_limited_by",
            "failure_probability",
            "grover_iterations_log2",
            "total_gates_log2",
            "maxdepth_log2",
            "machines_log2",
            "quantum_security_bits",
            "wallclock_years_log2",
            "break_even_oracle_operations",
        )
    }
    if spec.classical_status in ("broken", "weak"):
        base["classically_broken"] = (
            f"{spec.name} is {spec.classical_status} against classical attacks today"
            + (f": {spec.notes}" if spec.notes else "") + "; replace it now, whatever the quantum estimate"
        )
    if spec.quantum_attack == "shor" and spec.shor_problem and spec.problem_bits:
        chosen = method
        if method is not None and not strict:
            known = data.method(method)
            if known is None or spec.shor_problem not in known.families:
                chosen = None
        construction = select_method(spec.shor_problem, chosen, data)
        variant = variant_of(spec) or spec.shor_problem
        need = requirement(construction, variant, spec.problem_bits, spec.classical_bits, params,
                           data, has_own_layer(construction, variant))
        physical = need.physical
        default = family_of(variant) in construction.default_for
        amortised = ""
        if construction.per_key_amortised_toffoli:
            amortised = (
                f"{construction.per_key_amortised_toffoli:.3g} Toffoli per key is amortised over "
                f"several keys; one key alone up to {construction.amortisation_factor:g}x: one run "
                "is costed at that (never the amortised figure)"
            )
        return _build(
            empty,
            base,
            method=construction.id,
            method_title=construction.title,
            method_is_default=default,
            problem=spec.shor_problem,
            logical_qubits=need.logical.logical_qubits,
            toffoli_count=need.logical.toffoli_count,
            measurement_depth=need.logical.measurement_depth,
            code_distance=physical.code_distance if physical else None,
            physical_qubits=need.physical_qubits,
            factories=physical.factories if physical else None,
            runtime_hours=need.hours_per_run,
            runtime_limited_by=physical.limited_by if physical else None,
            failure_probability=physical.failure_probability if physical else None,
            working=need.working + ((amortised,) if amortised else ())
            + (need.runtime_note(params.runtime_limit_hours),),
            notes=construction.notes,
            expected_runtime_hours=need.expected_hours,
            method_check=construction.check_label
            + (f" ({construction.check_note})" if construction.check_note else ""),
        )
    if spec.quantum_attack == "grover" and spec.grover_target and spec.problem_bits:
        g = grover_resources(spec.grover_target, spec.problem_bits, params, data)
        collision = spec.grover_target == "collision"
        figures = data.figures(params.nist_figures_year)
        assert figures is not None
        return _build(
            empty,
            base,
            method=None if collision else f"NIST {figures.year}",
            method_title=None if collision else figures.source,
            method_is_default=params.nist_figures_year == ThreatParameters().nist_figures_year,
            problem=spec.grover_target,
            grover_iterations_log2=g.iterations_log2,
            total_gates_log2=g.total_gates_log2,
            maxdepth_log2=None if collision else params.maxdepth_log2,
            machines_log2=g.machines_log2,
            quantum_security_bits=g.quantum_security_bits,
            nist_category=g.nist_category,
            wallclock_years_log2=g.wallclock_years_log2,
            break_even_oracle_operations=None
            if collision
            else break_even_oracle_operations(params),
            working=g.working,
        )
    reason = {
        "none": "no known quantum attack beyond generic search",
        "shor": "no problem size known: cannot estimate the Shor-type attack",
        "grover": "no key or output size known: cannot estimate the search",
    }[spec.quantum_attack]
    return _build(empty, base, method_is_default=True, working=(reason,))


def _build(empty: dict[str, object], base: dict[str, object], **values: object) -> Estimate:
    return Estimate(**{**empty, **base, **values})  # type: ignore[arg-type]
