"""The ArrivalModel protocol, and the shared arrival (one arrival for every algorithm).

The threat profile gives a distribution for the year a cryptographically
relevant quantum computer (CRQC) first completes a reference task (RSA-2048
factored within about a day). An :class:`ArrivalModel` says, per algorithm,
how many years later (positive) or earlier (negative) that algorithm falls;
``math.inf`` means beyond any planning horizon.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Protocol

from pqtriage.catalog.spec import AlgorithmSpec


class ArrivalModel(Protocol):
    """Per-algorithm shift of the CRQC arrival relative to the reference task."""

    name: str
    """Short description shown in reports (for example 'shared arrival')."""

    def shift_years(self, spec: AlgorithmSpec) -> float:
        """Years after the reference task's arrival that ``spec`` falls (inf = never in horizon)."""
        ...

    def __hash__(self) -> int:
        """Models are hashable (by identity by default), so evaluations can be memoised."""
        ...


class SampledArrival(Protocol):
    """An arrival model that also gives a shift per uncertainty sample (pqtriage.model.band)."""

    def shift_samples(self, spec: AlgorithmSpec, design: object, choices: Sequence[str]) -> list[float]:
        """Each sample's shift, given the sample design and each sample's construction."""
        ...

    def band_methods(self, spec: AlgorithmSpec) -> tuple[str, list[str]]:
        """(central construction, other constructions the band samples)."""
        ...


class SharedArrival:
    """Every Shor-attackable algorithm falls with the reference task.

    Grover-only algorithms at 128 bits or more of classical strength lie beyond
    the horizon (NIST IR 8547 ipd: at least 128-bit symmetric primitives meet
    category 1); smaller symmetric keys are treated, cautiously, like Shor targets.
    """

    name = "shared arrival (every Shor-attackable algorithm falls with the reference task)"

    def shift_samples(self, spec: AlgorithmSpec, design: object, choices: Sequence[str]) -> list[float]:
        """The same shift for every sample: this what-if has no growth model to vary."""
        return [self.shift_years(spec)] * len(choices)

    def band_methods(self, spec: AlgorithmSpec) -> tuple[str, list[str]]:
        """No constructions: the shared arrival costs nothing."""
        return "", []

    def shift_years(self, spec: AlgorithmSpec) -> float:
        if spec.quantum_attack == "shor":
            return 0.0
        if spec.quantum_attack == "grover":
            bits = spec.classical_bits or 0
            return math.inf if bits >= 128 else 0.0
        return math.inf
