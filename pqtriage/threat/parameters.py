"""The threat model's parameters, each defaulting to a published assumption.

One frozen :class:`ThreatParameters` travels through every estimator, so an
estimate can always say which assumptions produced it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields

from pqtriage.errors import UsageError

SECONDS_PER_DAY = 86_400.0
SECONDS_PER_YEAR = 365.25 * SECONDS_PER_DAY


@dataclass(frozen=True)
class ThreatParameters:
    """Hardware, search and growth assumptions of the threat model."""

    physical_error_rate: float = 1e-3
    """Physical error rate per operation (arXiv:1905.09749, section 2)."""
    cycle_us: float = 1.0
    """Surface-code cycle time in microseconds (arXiv:1905.09749)."""
    reaction_us: float = 10.0
    """Reaction time (measure, decode, feed forward) in microseconds (arXiv:1905.09749)."""
    threshold: float = 1e-2
    """Surface-code threshold p_th (modelling practice, Phys. Rev. A 86, 032324, 2012)."""
    target_failure: float = 0.25
    """Largest accepted probability that a run fails from logical errors (assumption, A)."""
    max_factories: int | None = None
    """Cap on CCZ factories; None sizes them to keep pace with the reaction-limited depth."""
    maxdepth_log2: float = 64.0
    """log2 of NIST's MAXDEPTH: 40 about a year, 64 a decade, 96 a millennium (PQC call 2016)."""
    logical_gate_rate: float = 1e6
    """Logical gate layers per second of a future machine (common practice, no source: 1e4-1e6)."""
    machines: float = 1e6
    """Parallel Grover machines for the wall-clock figure (assumption, A)."""
    classical_rate: float = 1e14
    """Classical operations per second of a search accelerator (common practice, no source)."""
    window_days: float = 14.0
    """Time window of a search, in days (common practice, no source: two weeks)."""
    doubling_years: float = 1.0
    """Years for usable physical qubits to double (hardware file; derived from the default
    profile, A; docs/threat-model.md section 3)."""
    nist_figures_year: int = 2022
    """NIST gate figures: 2022 (call for additional signatures) or 2016 (PQC call)."""
    planning_horizon_years: float = 50.0
    """A shift beyond this many years is reported as beyond any planning horizon: 50 doublings
    (a 1e15-fold growth) at the central doubling time; exponential growth is not extrapolated
    further (A)."""
    reference_median_year: float | None = None
    """Median CRQC year of the reference task from the threat profile; None when not given."""
    runtime_limit_hours: float = 24.0
    """Expected runtime within which a construction meets the reference task (RSA-2048 within
    a day); runtime above it costs log2(runtime / limit) extra doublings, for every method."""

    def __post_init__(self) -> None:
        for name in (
            "physical_error_rate",
            "cycle_us",
            "reaction_us",
            "threshold",
            "logical_gate_rate",
            "machines",
            "classical_rate",
            "window_days",
            "doubling_years",
            "planning_horizon_years",
            "runtime_limit_hours",
        ):
            value = getattr(self, name)
            if not (isinstance(value, int | float) and math.isfinite(value) and value > 0):
                raise UsageError(
                    f"{_option(name)} must be a positive number, not {value!r}",
                    hint="give a value greater than zero",
                )
        if self.physical_error_rate >= self.threshold:
            raise UsageError(
                f"--error-rate {self.physical_error_rate:g} is not below the surface-code "
                f"threshold {self.threshold:g}: no code distance suppresses errors",
                hint="give a physical error rate below the threshold, for example 1e-3",
            )
        if not 0 < self.target_failure < 1:
            raise UsageError(
                f"target failure probability must lie strictly between 0 and 1, "
                f"not {self.target_failure!r}",
                hint="for example 0.25",
            )
        if self.max_factories is not None and self.max_factories < 1:
            raise UsageError(
                f"factory cap must be at least 1, not {self.max_factories!r}",
                hint="leave it unset to size factories to the circuit",
            )
        if not 1 <= self.maxdepth_log2 <= 200:
            raise UsageError(
                f"--maxdepth {self.maxdepth_log2!r} is out of range (log2 of the depth limit)",
                hint="NIST uses 40, 64 or 96",
            )
        if self.nist_figures_year not in (2016, 2022):
            raise UsageError(
                f"NIST figures year {self.nist_figures_year!r} is unknown",
                hint="use 2022 (call for additional signatures) or 2016 (PQC call)",
            )

    @property
    def cycle_seconds(self) -> float:
        """Code cycle time in seconds."""
        return self.cycle_us * 1e-6

    @property
    def reaction_seconds(self) -> float:
        """Reaction time in seconds."""
        return self.reaction_us * 1e-6

    @property
    def matches_1905_09749(self) -> bool:
        """Whether the physical layer is the one 1905.09749's and 2505.15917's figures assume."""
        return (self.physical_error_rate, self.cycle_us, self.reaction_us) == (1e-3, 1.0, 10.0)

    @property
    def window_seconds(self) -> float:
        """Search window in seconds."""
        return self.window_days * SECONDS_PER_DAY


def _option(name: str) -> str:
    options = {
        "physical_error_rate": "--error-rate",
        "cycle_us": "--cycle-us",
        "reaction_us": "--reaction-us",
        "doubling_years": "qubit_doubling_years",
    }
    return options.get(name, name.replace("_", " "))


PARAMETER_NAMES: tuple[str, ...] = tuple(f.name for f in fields(ThreatParameters))
"""Field names, for profiles that override some of them."""
