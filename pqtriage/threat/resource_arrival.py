"""Per-algorithm CRQC arrival from resource requirements (an ArrivalModel).

The profile's CRQC distribution is for a reference task: RSA-2048 factored in about a day.
An algorithm that needs R physical qubits, against R_ref for the reference, falls

    shift = doubling_years x log2(R / R_ref)   years later (earlier when negative),

the time hardware capacity needs to grow from one to the other when it doubles every
``doubling_years`` (assumption, see docs/threat-model.md). Only physical-qubit capacity
counts: every Shor-type run here takes hours to days on the stated hardware, so the qubit
count, not speed, is what must grow. Grover-type searches need S machines of the oracle's
width to finish within the search window and under MAXDEPTH; that fleet's qubits are R.

Like with like: R and R_ref are costed on the same physical layer, the generic surface-code
layer unless both constructions bring their own layout (a compact layout on one side only
would move the shift by the layout, not by the problem). By default every credible
construction of the family is compared with its ``reference_counterpart`` (methods.yaml) and
the earliest shift is kept (cautious); an explicit method override uses only that pair.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Protocol

from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.threat.grover import grover_resources
from pqtriage.threat.methods import MethodData, ShorMethod, load_method_data
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
class Comparison:
    """One like-with-like comparison of an algorithm with the reference task."""

    method: str
    """Construction attacking the algorithm (arXiv id)."""
    reference_method: str
    """Factoring construction costing RSA-2048 (arXiv id)."""
    own_layouts: bool
    """True when both are costed on their own layouts, False for the generic layer."""
    physical_qubits: float | None
    """Physical qubits of the algorithm on that layer; None when no distance suffices."""
    reference_physical_qubits: float
    """Physical qubits of RSA-2048 on that layer."""

    @property
    def layer(self) -> str:
        """The layer both sides were costed on, in words."""
        if self.own_layouts:
            return "both costed on their own physical layouts"
        return "both costed on the generic surface-code layer"


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
    """log2 of the physical qubits the attack needs, on the layer of the deciding comparison;
    None when nothing applies."""
    reference_physical_qubits: float
    """Physical qubits of the reference task (RSA-2048) in the deciding comparison."""
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
    comparison: Comparison | None = None
    """The like-with-like comparison that decided a Shor-type shift; None otherwise."""


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
        self._reference_cache: dict[tuple[str, bool], float] = {}
        factoring = select_method("factoring", self.methods.get("factoring"), self.data)
        self.reference_method = factoring.id
        # RSA-2048 under the factoring method with its own layout (what ``estimate`` shows),
        # and on the generic layer (what layout-less comparisons, Grover fleets among them, use).
        self.reference_physical_qubits = self._reference_qubits(factoring, own_layout=True)
        self.reference_generic_physical_qubits = self._reference_qubits(factoring, False)
        self.name = (
            f"resource arrival (capacity doubles every {self.doubling_years:g} years; reference "
            f"{REFERENCE_NAME} with {factoring.id}, {self.reference_physical_qubits:.3g} physical "
            "qubits; like with like, earliest credible construction)"
        )

    def _method_id(self, family: str) -> str:
        return select_method(family, self.methods.get(family), self.data).id

    def _qubits(
        self, method: ShorMethod, family: str, bits: int, strength: int | None, own_layout: bool
    ) -> float | None:
        logical = logical_resources(method, family, bits, strength)
        layout = method.layout if own_layout else None
        physical = physical_resources(logical, self.params, self.data.surface_code, layout)
        return physical.physical_qubits

    def _reference_qubits(self, method: ShorMethod, own_layout: bool) -> float:
        key = (method.id, own_layout)
        if key not in self._reference_cache:
            qubits = self._qubits(method, "factoring", REFERENCE_BITS, 112, own_layout)
            assert qubits is not None, "the reference task must be feasible"
            self._reference_cache[key] = qubits
        return self._reference_cache[key]

    def pairs(self, family: str) -> tuple[tuple[ShorMethod, ShorMethod], ...]:
        """(construction, reference construction) pairs compared for a family, default first.

        With an override of the family or of factoring: the one pair of the named methods
        (the family's override or default, against the factoring override or the method's
        counterpart). Otherwise every credible construction of the family without an
        ``arrival_exclusion`` against its counterpart (methods.yaml ``reference_counterpart``).
        """
        if family in self.methods or "factoring" in self.methods:
            method = select_method(family, self.methods.get(family), self.data)
            reference_id = self.methods.get("factoring", method.reference_counterpart)
            return ((method, select_method("factoring", reference_id, self.data)),)
        found = []
        for method in sorted(
            self.data.shor_methods, key=lambda m: family not in m.default_for
        ):  # the default first, so that it decides ties
            reference = self.data.method(method.reference_counterpart)
            if (
                family in method.families
                and method.credible
                and not method.arrival_exclusion
                and reference is not None
                and reference.credible
                and not reference.arrival_exclusion
            ):
                found.append((method, reference))
        return tuple(found)

    def compare(
        self, method: ShorMethod, reference: ShorMethod, family: str, bits: int,
        strength: int | None,
    ) -> Comparison:  # fmt: skip
        """Cost the algorithm and RSA-2048 on one layer: their own layouts only if both have one."""
        own = method.layout is not None and reference.layout is not None
        return Comparison(
            method.id,
            reference.id,
            own,
            self._qubits(method, family, bits, strength, own),
            self._reference_qubits(reference, own),
        )

    def _shift(self, qubits: float | None, reference: float) -> float:
        if qubits is None:
            return math.inf
        return self.doubling_years * (math.log2(qubits) - math.log2(reference))

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

    def _row(
        self, spec: AlgorithmSpec, basis: str, log2q: float | None, shift: float,
        computed: float | None, text: str, ref: float, comparison: Comparison | None = None,
    ) -> ArrivalRow:  # fmt: skip
        profile, as_of = self.profile, self.as_of_year
        if profile is not None and as_of is not None:
            # Conditioned on "not fallen by as_of" (pqtriage.model.profile.quantile).
            year: float | None = profile.quantile(0.5, as_of, shift)
            cautious: float | None = profile.quantile(profile.risk_tolerance, as_of, shift)
            return ArrivalRow(
                spec.name, spec.quantum_attack, basis, log2q, ref, shift, computed, year,
                text, cautious, profile.risk_tolerance, profile.name, as_of, comparison,
            )  # fmt: skip
        median = self.params.reference_median_year
        year = None if median is None or math.isinf(shift) else median + shift
        return ArrivalRow(
            spec.name, spec.quantum_attack, basis, log2q, ref, shift, computed, year, text,
            comparison=comparison,
        )  # fmt: skip

    def _timed(
        self, spec: AlgorithmSpec, log2q: float, ref: float, basis: str, text: str,
        comparison: Comparison | None = None, after: str = "",
    ) -> ArrivalRow:  # fmt: skip
        computed = self._shift(2.0**log2q, ref)
        beyond = computed > self.params.planning_horizon_years
        text += f": {computed:+.1f} years at one doubling per {self.doubling_years:g} years"
        if beyond:
            text += f", beyond the {self.params.planning_horizon_years:g}-year planning horizon"
        shift = math.inf if beyond else computed
        return self._row(spec, basis, log2q, shift, computed, text + after, ref, comparison)

    def _explain_shor(self, spec: AlgorithmSpec, family: str, bits: int) -> ArrivalRow:
        comparisons = [
            self.compare(m, r, family, bits, spec.classical_bits) for m, r in self.pairs(family)
        ]
        # Cautious across credible constructions: the earliest shift decides (min is stable
        # and the default comes first, so the default decides ties).
        best = min(
            comparisons, key=lambda c: self._shift(c.physical_qubits, c.reference_physical_qubits)
        )
        basis = f"Shor ({family}, {best.method} against {best.reference_method})"
        ref = best.reference_physical_qubits
        if best.physical_qubits is None:
            text = "no code distance suffices: beyond horizon"
            return self._row(spec, basis, None, math.inf, None, text, ref, best)
        text = (
            f"{best.method} needs 2^{math.log2(best.physical_qubits):.1f} physical qubits "
            f"against {ref:.3g} for {REFERENCE_NAME} under {best.reference_method}, "
            f"like-with-like: {best.layer}"
        )
        others = [c for c in comparisons if c is not best]
        after = ""
        if others:
            listed = ", ".join(
                f"{c.method} vs {c.reference_method} "
                + _signed(self._shift(c.physical_qubits, c.reference_physical_qubits))
                for c in others
            )
            after = (
                f"; earliest of the credible pairs, decided by {best.method} vs "
                f"{best.reference_method} (also {listed})"
            )
        return self._timed(spec, math.log2(best.physical_qubits), ref, basis, text, best, after)

    def explain(self, spec: AlgorithmSpec) -> ArrivalRow:
        """The arrival of ``spec`` relative to the reference task, with its numbers."""
        ref = self.reference_physical_qubits
        if spec.quantum_attack == "none":
            text = "no known quantum attack"
            return self._row(spec, text, None, math.inf, None, text, ref)
        if spec.quantum_attack == "shor":
            if spec.shor_problem is None or spec.problem_bits is None:
                text = "no problem size known: falls with the reference task (cautious)"
                return self._row(spec, "no problem size", None, 0.0, None, text, ref)
            return self._explain_shor(spec, spec.shor_problem, spec.problem_bits)
        if spec.grover_target is None or spec.problem_bits is None:
            text = "no key or output size known: not assessed, treated as beyond horizon"
            return self._row(spec, "no search size", None, math.inf, None, text, ref)
        if spec.grover_target == "collision":
            text = (
                f"collision search costs 2^{spec.problem_bits / 2:g} classically; "
                "no quantum attack is cheaper"
            )
            return self._row(spec, "classical collision bound", None, math.inf, None, text, ref)
        log2q, basis = self._grover_qubits_log2(spec)
        # The search fleet is costed on the generic layer, so the reference is too.
        ref = self.reference_generic_physical_qubits
        text = (
            f"needs 2^{log2q:.1f} physical qubits against {ref:.3g} for {REFERENCE_NAME} under "
            f"{self.reference_method}, like-with-like: both costed on the generic surface-code "
            "layer"
        )
        return self._timed(spec, log2q, ref, basis, text)

    def shift_years(self, spec: AlgorithmSpec) -> float:
        """Years after the reference task's arrival that ``spec`` falls (inf = beyond horizon)."""
        return self.explain(spec).shift_years


def _signed(shift: float) -> str:
    return "beyond horizon" if math.isinf(shift) else f"{shift:+.1f}"
