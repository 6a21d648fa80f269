"""Per-algorithm CRQC arrival from resource requirements (an ArrivalModel).

The profile's CRQC distribution is for a reference task: RSA-2048 factored in about a day.
An algorithm that needs R physical qubits, against R_ref for the reference, falls

    shift = doubling_years x log2(R / R_ref)   years later (earlier when negative),

the time hardware capacity needs to grow from one to the other when it doubles every
``doubling_years`` (assumption, see docs/threat-model.md). Only physical-qubit capacity
counts: every Shor-type run here takes hours to days on the stated hardware, so the qubit
count, not speed, is what must grow. Grover-type searches need S machines of the oracle's
width to finish within the search window and under MAXDEPTH; that fleet's qubits are R.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Protocol

from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.threat.grover import grover_resources
from pqtriage.threat.methods import MethodData, load_method_data
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.shor import logical_resources, select_method
from pqtriage.threat.surface_code import (
    block_tiles,
    distance_for_volume,
    physical_resources,
    qubits_per_tile,
)

REFERENCE_NAME = "RSA-2048"
REFERENCE_BITS = 2048


class ArrivalDistribution(Protocol):
    """What the arrival model needs of a threat profile (pqtriage.model.profile.ThreatProfile)."""

    @property
    def name(self) -> str:
        """Short identifier of the profile."""
        ...

    @property
    def risk_tolerance(self) -> float:
        """Accepted probability of exposure: the cautious year is read at this quantile."""
        ...

    def quantile(self, probability: float, as_of: float, shift_years: float = 0.0) -> float:
        """Earliest decimal year the shifted, conditioned arrival reaches ``probability``."""
        ...


@dataclass(frozen=True)
class ArrivalRow:
    """Why one algorithm falls when it does, relative to the reference task."""

    name: str
    """Algorithm name."""
    attack: str
    """shor, grover or none."""
    basis: str
    """What the requirement counts (method and quantity)."""
    physical_qubits_log2: float | None
    """log2 of the physical qubits the attack needs; None when nothing applies."""
    reference_physical_qubits: float
    """Physical qubits of the reference task (RSA-2048 under the factoring method)."""
    shift_years: float
    """Years after the reference task's arrival (negative: earlier; inf: beyond horizon)."""
    computed_shift_years: float | None
    """The shift before the horizon cut-off (finite even when shift_years is inf)."""
    median_year: float | None
    """Median decimal year it falls (profile quantile 0.5 with the shift; inf: the profile
    never reaches it); None without a profile."""
    explanation: str
    """One sentence with the numbers."""
    cautious_year: float | None = None
    """Decimal year it falls at the profile's risk tolerance (inf as above); None without one."""
    risk_tolerance: float | None = None
    """The profile's risk tolerance used for ``cautious_year``."""
    profile: str | None = None
    """Name of the threat profile the years come from."""
    as_of_year: float | None = None
    """Decimal year on which "not fallen yet" is known (conditions the profile)."""


class ResourceArrivalModel:
    """Arrival shifted by the time hardware needs to grow to each algorithm's requirement."""

    def __init__(
        self,
        doubling_years: float | None = None,
        methods: Mapping[str, str] | None = None,
        params: ThreatParameters | None = None,
        data: MethodData | None = None,
        profile: ArrivalDistribution | None = None,
        as_of_year: float | None = None,
    ) -> None:
        """Args:
        doubling_years: years for physical-qubit capacity to double (default from params).
        methods: construction per problem family (``{"factoring": "1905.09749"}``); others default.
        params: physical and search assumptions.
        data: method data (the shipped methods.yaml by default).
        profile: threat profile for the years it falls; needs ``as_of_year``.
        as_of_year: decimal year of the assessment (conditions the profile).
        """
        if profile is not None and as_of_year is None:
            raise ValueError("a profile needs the as-of year")
        self.profile = profile
        self.as_of_year = as_of_year
        self.params = params or ThreatParameters()
        self.doubling_years = (
            doubling_years if doubling_years is not None else self.params.doubling_years
        )
        if not (math.isfinite(self.doubling_years) and self.doubling_years > 0):
            from pqtriage.errors import ProfileError

            raise ProfileError(
                f"doubling years must be a positive number, not {self.doubling_years!r}",
                hint="for example 2.0",
            )
        self.data = data or load_method_data()
        self.methods = dict(methods or {})
        for family, method_id in self.methods.items():
            select_method(family, method_id, self.data)  # raises on a bad override
        reference = self._shor_qubits("factoring", REFERENCE_BITS, 112)
        assert reference is not None, "the reference task must be feasible"
        self.reference_physical_qubits = reference
        self.name = (
            f"resource arrival (capacity doubles every {self.doubling_years:g} years; reference "
            f"{REFERENCE_NAME} with {self._method_id('factoring')}, {reference:.3g} physical qubits)"
        )

    def _method_id(self, family: str) -> str:
        return select_method(family, self.methods.get(family), self.data).id

    def _shor_qubits(self, family: str, bits: int, strength: int | None) -> float | None:
        method = select_method(family, self.methods.get(family), self.data)
        logical = logical_resources(method, family, bits, strength)
        physical = physical_resources(logical, self.params, self.data.surface_code, method.layout)
        return physical.physical_qubits

    def _grover_qubits_log2(self, spec: AlgorithmSpec) -> tuple[float, str]:
        assert spec.grover_target is not None and spec.problem_bits is not None
        g = grover_resources(spec.grover_target, spec.problem_bits, self.params, self.data)
        assert g.serial_depth_log2 is not None and g.oracle_qubits is not None
        # Per machine, depth is capped by MAXDEPTH and by what the gate rate does in the window.
        window_depth = math.log2(self.params.logical_gate_rate * self.params.window_seconds)
        allowed = min(self.params.maxdepth_log2, window_depth)
        machines = max(0.0, 2 * (g.serial_depth_log2 - allowed))  # D = D_serial / sqrt(S)
        depth = g.serial_depth_log2 - machines / 2
        tiles = block_tiles(g.oracle_qubits, self.data.surface_code)
        cycles_log2 = depth - math.log2(self.params.logical_gate_rate * self.params.cycle_seconds)
        distance = distance_for_volume(
            math.log2(tiles) + cycles_log2, self.params, self.data.surface_code
        )
        per_tile = qubits_per_tile(
            distance or self.data.surface_code.max_distance, self.data.surface_code
        )
        qubits_log2 = machines + math.log2(tiles * per_tile)
        basis = (
            f"2^{machines:.1f} Grover machines of {g.oracle_qubits:,} logical qubits (distance "
            f"{distance}) to finish within {self.params.window_days:g} days under MAXDEPTH "
            f"2^{self.params.maxdepth_log2:g}"
        )
        return qubits_log2, basis

    def explain(self, spec: AlgorithmSpec) -> ArrivalRow:
        """The arrival of ``spec`` relative to the reference task, with its numbers."""
        ref = self.reference_physical_qubits
        median = self.params.reference_median_year

        def row(
            basis: str, log2q: float | None, shift: float, computed: float | None, text: str
        ) -> ArrivalRow:
            profile, as_of = self.profile, self.as_of_year
            if profile is not None and as_of is not None:
                # Conditioned on "not fallen by as_of" (pqtriage.model.profile.quantile).
                year: float | None = profile.quantile(0.5, as_of, shift)
                cautious: float | None = profile.quantile(profile.risk_tolerance, as_of, shift)
                return ArrivalRow(
                    spec.name, spec.quantum_attack, basis, log2q, ref, shift, computed, year,
                    text, cautious, profile.risk_tolerance, profile.name, as_of,
                )  # fmt: skip
            year = None if median is None or math.isinf(shift) else median + shift
            return ArrivalRow(
                spec.name, spec.quantum_attack, basis, log2q, ref, shift, computed, year, text
            )

        if spec.quantum_attack == "none":
            return row("no known quantum attack", None, math.inf, None, "no known quantum attack")
        if spec.quantum_attack == "shor":
            if spec.shor_problem is None or spec.problem_bits is None:
                return row(
                    "no problem size",
                    None,
                    0.0,
                    None,
                    "no problem size known: falls with the reference task (cautious)",
                )
            qubits = self._shor_qubits(spec.shor_problem, spec.problem_bits, spec.classical_bits)
            method = self._method_id(spec.shor_problem)
            basis = f"Shor ({spec.shor_problem}, {method})"
            if qubits is None:
                return row(basis, None, math.inf, None, "no code distance suffices: beyond horizon")
            log2q = math.log2(qubits)
        else:
            if spec.grover_target is None or spec.problem_bits is None:
                return row(
                    "no search size",
                    None,
                    math.inf,
                    None,
                    "no key or output size known: not assessed, treated as beyond horizon",
                )
            if spec.grover_target == "collision":
                return row(
                    "classical collision bound",
                    None,
                    math.inf,
                    None,
                    f"collision search costs 2^{spec.problem_bits / 2:g} classically; "
                    "no quantum attack is cheaper",
                )
            log2q, basis = self._grover_qubits_log2(spec)
        computed = self.doubling_years * (log2q - math.log2(ref))
        beyond = computed > self.params.planning_horizon_years
        shift = math.inf if beyond else computed
        text = (
            f"needs 2^{log2q:.1f} physical qubits against {ref:.3g} for {REFERENCE_NAME}: "
            f"{computed:+.1f} years at one doubling per {self.doubling_years:g} years"
        )
        if beyond:
            text += f", beyond the {self.params.planning_horizon_years:g}-year planning horizon"
        return row(basis, log2q, shift, computed, text)

    def shift_years(self, spec: AlgorithmSpec) -> float:
        """Years after the reference task's arrival that ``spec`` falls (inf = beyond horizon)."""
        return self.explain(spec).shift_years
