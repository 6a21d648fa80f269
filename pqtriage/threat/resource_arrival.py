"""Per-algorithm CRQC arrival from resource requirements (an ArrivalModel).

The profile's CRQC distribution is for the reference task of the hardware file: RSA-2048
factored within a day. An algorithm whose effective requirement is L doublings above the
reference's (physical qubits, times runtime / limit where the expected runtime exceeds the
hardware file's limit) falls

    shift = doubling_years x L   years later (earlier when negative),

the time usable qubits need to grow from one to the other when they double every
``doubling_years``. Grover-type searches need a fleet of oracle machines that finishes within
the search window under MAXDEPTH; that fleet's qubits are the requirement.

Like with like: the algorithm and RSA-2048 are costed on the same layer, their own (a paper's
physical table or a construction's layout) only when both have one, else the generic
surface-code layer. The central shift uses the family's default construction (the most recent
result whose circuit is published) against its ``reference_counterpart``, or the constructions
named by an override; the uncertainty band samples the other constructions marked ``in_band``.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Protocol

from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.threat.grover import grover_resources
from pqtriage.threat.methods import MethodData, ShorMethod, load_method_data
from pqtriage.threat.parameters import ThreatParameters
from pqtriage.threat.requirement import (
    Requirement,
    family_of,
    has_own_layer,
    requirement,
    variant_of,
)
from pqtriage.threat.shor import select_method
from pqtriage.threat.surface_code import block_tiles, distance_for_volume, qubits_per_tile

REFERENCE_NAME = "RSA-2048"
REFERENCE_BITS = 2048
REFERENCE_STRENGTH = 112


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
        """Earliest decimal year the shifted arrival reaches ``probability``."""
        ...


class SampleSource(Protocol):
    """What the arrival model needs of the band's sample design (pqtriage.model.band)."""

    @property
    def doubling_years(self) -> tuple[float, ...]:
        """Doubling time per sample."""
        ...

    @property
    def size(self) -> int:
        """Number of samples."""
        ...


@dataclass(frozen=True)
class Comparison:
    """One like-with-like comparison of an algorithm with the reference task."""

    method: str
    """Construction attacking the algorithm (arXiv id)."""
    reference_method: str
    """Factoring construction costing RSA-2048 (arXiv id)."""
    own_layouts: bool
    """True when both are costed on their own layers (tables or layouts), False for the generic."""
    physical_qubits: float | None
    """Physical qubits of the algorithm on that layer; None when no distance suffices."""
    reference_physical_qubits: float
    """Physical qubits of RSA-2048 on that layer."""
    doublings: float = 0.0
    """Effective requirement over the reference's, in doublings (runtime rule included)."""
    runtime_note: str = ""
    """How the runtime limit entered, both sides."""

    @property
    def layer(self) -> str:
        """The layer both sides were costed on, in words."""
        if self.own_layouts:
            return "both costed on their own physical layers"
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
    """Median decimal year it falls (inf: beyond the horizon); None without a profile."""
    explanation: str
    """One sentence with the numbers."""
    cautious_year: float | None = None
    """Decimal year it falls at the profile's risk tolerance (inf as above); None without one."""
    risk_tolerance: float | None = None
    """The profile's risk tolerance used for ``cautious_year``."""
    profile: str | None = None
    """Name of the threat profile the years come from."""
    as_of_year: float | None = None
    """Decimal year on which "no CRQC yet" is known."""
    comparison: Comparison | None = None
    """The like-with-like comparison behind a Shor-type shift; None otherwise."""
    alternatives: tuple[tuple[str, float], ...] = ()
    """Other constructions the band samples, with their shifts at the central doubling time."""
    cautious_band: tuple[float, float] | None = None
    """10-90 % band of ``cautious_year`` over the uncertainty samples."""
    median_band: tuple[float, float] | None = None
    """10-90 % band of ``median_year`` over the uncertainty samples."""
    why_method: str = ""
    """Why the construction was chosen."""


class ResourceArrivalModel:
    """Arrival shifted by the time usable qubits need to grow to each algorithm's requirement."""

    def __init__(
        self,
        doubling_years: float | None = None,
        methods: Mapping[str, str] | None = None,
        params: ThreatParameters | None = None,
        data: MethodData | None = None,
        profile: ArrivalDistribution | None = None,
        as_of_year: float | None = None,
        design: SampleSource | None = None,
    ) -> None:
        """Args:
        doubling_years: years for usable qubits to double (default from params).
        methods: construction per problem family (``{"factoring": "1905.09749"}``); others default.
        params: physical, runtime and search assumptions (the hardware file).
        data: method data (the shipped methods.yaml by default).
        profile: threat profile for the years it falls; needs ``as_of_year``.
        as_of_year: decimal year of the assessment.
        design: the uncertainty band's samples, for the year bands of ``explain``.
        """
        if profile is not None and as_of_year is None:
            raise ValueError("a profile needs the as-of year")
        self.profile = profile
        self.as_of_year = as_of_year
        self.design = design
        self.params = params or ThreatParameters()
        self.doubling_years = (
            doubling_years if doubling_years is not None else self.params.doubling_years
        )
        if not (math.isfinite(self.doubling_years) and self.doubling_years > 0):
            from pqtriage.errors import ProfileError

            raise ProfileError(
                f"doubling years must be a positive number, not {self.doubling_years!r}",
                hint="for example 1.0",
            )
        self.limit_hours = self.params.runtime_limit_hours
        self.data = data or load_method_data()
        self.methods = dict(methods or {})
        for family, method_id in self.methods.items():
            select_method(family, method_id, self.data)  # raises on a bad override
        factoring = select_method("factoring", self.methods.get("factoring"), self.data)
        self.reference_method = factoring.id
        own = has_own_layer(factoring, "factoring")
        self.reference_requirement = self._cost(factoring, "factoring", REFERENCE_BITS,
                                                REFERENCE_STRENGTH, own)
        self.reference_physical_qubits = self.reference_requirement.physical_qubits or math.inf
        self.reference_generic_physical_qubits = (
            self._cost(factoring, "factoring", REFERENCE_BITS, REFERENCE_STRENGTH, False).physical_qubits
            or math.inf
        )
        self._doublings: dict[int, tuple[AlgorithmSpec, _Doublings]] = {}
        self.name = (
            f"resource arrival (usable qubits double every {self.doubling_years:g} years; reference "
            f"{REFERENCE_NAME} within {self.limit_hours:g} h with {factoring.id}, "
            f"{self.reference_physical_qubits:.3g} physical qubits; like with like; runtime over "
            f"{self.limit_hours:g} h counted as extra doublings)"
        )

    # -- costing -----------------------------------------------------------------------------

    def _cost(self, method: ShorMethod, variant: str, bits: int, strength: int | None,
              own: bool) -> Requirement:
        return requirement(method, variant, bits, strength, self.params, self.data, own)

    def candidates(self, family: str) -> tuple[ShorMethod, ...]:
        """Constructions for a family, the central one first: the override or the default,
        then (without an override) the others the band samples."""
        chosen = select_method(family, self.methods.get(family), self.data)
        if family in self.methods:
            return (chosen,)
        others = tuple(
            m for m in self.data.shor_methods
            if m is not chosen and family in m.families and m.in_band and m.credible
            and not m.arrival_exclusion
        )
        return (chosen, *others)

    def counterpart(self, method: ShorMethod) -> ShorMethod:
        """The factoring construction RSA-2048 is costed with when comparing ``method``."""
        if "factoring" in method.families:
            return method
        reference_id = self.methods.get("factoring", method.reference_counterpart)
        return select_method("factoring", reference_id, self.data)

    def pairs(self, family: str) -> tuple[tuple[ShorMethod, ShorMethod], ...]:
        """(construction, reference construction) pairs for a family, the central one first."""
        return tuple((m, self.counterpart(m)) for m in self.candidates(family))

    def compare(self, method: ShorMethod, reference: ShorMethod, variant: str, bits: int,
                strength: int | None) -> Comparison:
        """Cost the algorithm and RSA-2048 on one layer: their own only if both have one."""
        own = has_own_layer(method, variant) and has_own_layer(reference, "factoring")
        mine = self._cost(method, variant, bits, strength, own)
        ref = self._cost(reference, "factoring", REFERENCE_BITS, REFERENCE_STRENGTH, own)
        doublings = mine.doublings(self.limit_hours) - ref.doublings(self.limit_hours)
        note = (f"{method.id}: {mine.runtime_note(self.limit_hours)}; {REFERENCE_NAME} under "
                f"{reference.id}: {ref.runtime_note(self.limit_hours)}")
        return Comparison(method.id, reference.id, own, mine.physical_qubits,
                          ref.physical_qubits or math.inf, doublings, note)

    def _grover_doublings(self, spec: AlgorithmSpec) -> tuple[float, float, str]:
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
        window_hours = self.params.window_days * 24
        runtime = max(0.0, math.log2(window_hours / self.limit_hours))
        ref = self._cost(select_method("factoring", self.methods.get("factoring"), self.data),
                         "factoring", REFERENCE_BITS, REFERENCE_STRENGTH, False)
        doublings = qubits_log2 + runtime - ref.doublings(self.limit_hours)
        basis = (
            f"2^{machines:.1f} Grover machines of {g.oracle_qubits:,} logical qubits (distance "
            f"{distance}) to finish within {self.params.window_days:g} days under MAXDEPTH "
            f"2^{self.params.maxdepth_log2:g}"
        )
        if runtime:
            basis += f"; the {self.params.window_days:g}-day window over the {self.limit_hours:g} h limit: +{runtime:.2f} doublings"
        return qubits_log2, doublings, basis

    # -- doublings per construction ---------------------------------------------------------

    def doublings(self, spec: AlgorithmSpec) -> _Doublings:
        """The algorithm's requirement over the reference's, in doublings, per construction."""
        known = self._doublings.get(id(spec))
        if known is not None and known[0] is spec:
            return known[1]
        result = self._compute(spec)
        self._doublings[id(spec)] = (spec, result)
        return result

    def _compute(self, spec: AlgorithmSpec) -> _Doublings:
        ref = self.reference_physical_qubits
        if spec.quantum_attack == "none":
            return _Doublings(None, (), "no known quantum attack", None, ref, "", ())
        if spec.quantum_attack == "shor":
            variant = variant_of(spec)
            if variant is None or spec.problem_bits is None:
                return _Doublings(0.0, (), "no problem size known: falls with the reference task "
                                  "(cautious)", None, ref, "no problem size", ())
            family = family_of(variant)
            comparisons = [
                self.compare(m, r, variant, spec.problem_bits, spec.classical_bits)
                for m, r in self.pairs(family)
            ]
            central = comparisons[0]
            per_method = tuple((c.method, c.doublings) for c in comparisons)
            return _Doublings(central.doublings, per_method, "", central,
                              central.reference_physical_qubits,
                              f"Shor ({variant}, {central.method} against {central.reference_method})",
                              tuple(comparisons))
        if spec.grover_target is None or spec.problem_bits is None:
            return _Doublings(None, (), "no key or output size known: not assessed, treated as "
                              "beyond horizon", None, ref, "no search size", ())
        if spec.grover_target == "collision":
            text = (f"collision search costs 2^{spec.problem_bits / 2:g} classically; "
                    "no quantum attack is cheaper")
            return _Doublings(None, (), text, None, ref, "classical collision bound", ())
        qubits_log2, doublings, basis = self._grover_doublings(spec)
        return _Doublings(doublings, (("grover", doublings),), "", None,
                          self.reference_generic_physical_qubits, basis, (), qubits_log2)

    def _shift(self, doublings: float | None, doubling_years: float) -> tuple[float, float | None]:
        """(shift with the horizon cut-off, computed shift) at a doubling time."""
        if doublings is None:
            return math.inf, None
        if math.isinf(doublings):
            return math.inf, math.inf
        computed = doubling_years * doublings
        if computed > self.params.planning_horizon_years:
            return math.inf, computed
        return computed, computed

    def shift_years(self, spec: AlgorithmSpec) -> float:
        """Years after the reference task's arrival that ``spec`` falls (inf = beyond horizon)."""
        return self._shift(self.doublings(spec).central, self.doubling_years)[0]

    def shift_samples(self, spec: AlgorithmSpec, design: SampleSource, choices: Sequence[str]) -> list[float]:
        """Each sample's shift: the sample's doubling time x the chosen construction's doublings."""
        d = self.doublings(spec)
        by_method = dict(d.per_method)
        shifts = []
        for years, method in zip(design.doubling_years, choices, strict=True):
            value = by_method.get(method, d.central)
            shifts.append(self._shift(value, years)[0])
        return shifts

    def band_methods(self, spec: AlgorithmSpec) -> tuple[str, list[str]]:
        """(central construction, the other constructions the band samples) for ``spec``."""
        d = self.doublings(spec)
        if not d.per_method:
            return "", []
        return d.per_method[0][0], [m for m, _ in d.per_method[1:]]

    # -- explanation --------------------------------------------------------------------------

    def explain(self, spec: AlgorithmSpec) -> ArrivalRow:
        """The arrival of ``spec`` relative to the reference task, with its numbers."""
        d = self.doublings(spec)
        shift, computed = self._shift(d.central, self.doubling_years)
        if d.central is None or d.text:
            return self._row(spec, d.basis or d.text, None, shift, computed, d.text, d.reference, None, d)
        if d.comparison is not None:
            c = d.comparison
            if c.physical_qubits is None:
                text = "no code distance suffices: beyond horizon"
                return self._row(spec, d.basis, None, math.inf, None, text, d.reference, c, d)
            text = (
                f"{c.method} needs 2^{math.log2(c.physical_qubits):.1f} physical qubits against "
                f"{c.reference_physical_qubits:.3g} for {REFERENCE_NAME} under {c.reference_method}, "
                f"like-with-like: {c.layer}; {c.runtime_note}: {c.doublings:+.2f} doublings"
            )
            log2q: float | None = math.log2(c.physical_qubits)
        else:
            log2q = d.qubits_log2
            text = (
                f"needs 2^{log2q:.1f} physical qubits against {d.reference:.3g} for "
                f"{REFERENCE_NAME} under {self.reference_method}, like-with-like: both costed on "
                f"the generic surface-code layer; {d.basis}: {d.central:+.2f} doublings"
            )
        assert computed is not None
        text += f": {computed:+.1f} years at one doubling per {self.doubling_years:g} years"
        if math.isinf(shift):
            text += f", beyond the {self.params.planning_horizon_years:g}-year planning horizon"
        return self._row(spec, d.basis, log2q, shift, computed, text, d.reference, d.comparison, d)

    def _row(self, spec: AlgorithmSpec, basis: str, log2q: float | None, shift: float,
             computed: float | None, text: str, ref: float, comparison: Comparison | None,
             d: _Doublings) -> ArrivalRow:
        alternatives = tuple(
            (m, self._shift(v, self.doubling_years)[0]) for m, v in d.per_method[1:]
        )
        why = self._why(spec, d)
        profile, as_of = self.profile, self.as_of_year
        if profile is None or as_of is None:
            median = self.params.reference_median_year
            year = None if median is None or math.isinf(shift) else median + shift
            return ArrivalRow(spec.name, spec.quantum_attack, basis, log2q, ref, shift, computed,
                              year, text, comparison=comparison, alternatives=alternatives,
                              why_method=why)
        median_year = profile.quantile(0.5, as_of, shift)
        cautious = profile.quantile(profile.risk_tolerance, as_of, shift)
        cautious_band = median_band = None
        if self.design is not None and d.central is not None:
            cautious_band, median_band = self._year_bands(spec, d)
        return ArrivalRow(spec.name, spec.quantum_attack, basis, log2q, ref, shift, computed,
                          median_year, text, cautious, profile.risk_tolerance, profile.name, as_of,
                          comparison, alternatives, cautious_band, median_band, why)

    def _year_bands(self, spec: AlgorithmSpec, d: _Doublings) -> tuple[tuple[float, float], tuple[float, float]]:
        from pqtriage.model.band import choose, order_band
        from pqtriage.model.band_evaluation import BandEvaluator

        assert self.profile is not None and self.as_of_year is not None and self.design is not None
        central, others = self.band_methods(spec)
        choices = choose(self.design, central, others)  # type: ignore[arg-type]
        evaluator = BandEvaluator(self.profile, self.design,  # type: ignore[arg-type]
                                  lambda s: self.shift_samples(s, self.design, choices))  # type: ignore[arg-type]
        cautious = order_band(evaluator.years(spec, self.profile.risk_tolerance, self.as_of_year).tolist())
        median = order_band(evaluator.years(spec, 0.5, self.as_of_year).tolist())
        return (cautious.low, cautious.high), (median.low, median.high)

    def _why(self, spec: AlgorithmSpec, d: _Doublings) -> str:
        if spec.quantum_attack == "grover":
            return "Grover search costed with NIST's gate figures; no choice of construction"
        if d.comparison is None:
            return ""
        method = self.data.method(d.comparison.method)
        assert method is not None
        family = family_of(variant_of(spec) or "factoring")
        if family in self.methods:
            return f"{method.id} named with --method"
        return (f"{method.id}: the default for {family}, the most recent result whose circuit is "
                f"published ({method.check_label}); the band also samples "
                + (", ".join(m for m, _ in d.per_method[1:]) or "no other construction"))


@dataclass(frozen=True)
class _Doublings:
    """An algorithm's requirement over the reference's, in doublings."""

    central: float | None
    """Doublings under the central construction; None when no quantum attack applies."""
    per_method: tuple[tuple[str, float], ...]
    """(construction, doublings), the central one first."""
    text: str
    """Explanation when nothing is costed."""
    comparison: Comparison | None
    """The central like-with-like comparison (Shor)."""
    reference: float
    """Physical qubits of the reference on the central comparison's layer."""
    basis: str
    """What the requirement counts."""
    comparisons: tuple[Comparison, ...]
    """Every comparison, the central one first."""
    qubits_log2: float | None = None
    """log2 of a Grover fleet's physical qubits."""
