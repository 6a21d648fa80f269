"""Hardware and progress assumptions: the hardware file (``pqtriage/data/hardware.yaml``).

Error rate, cycle and reaction times, the doubling time of usable physical qubits (with the
range the uncertainty band samples), the reference task and the runtime limit, and the band's
sampling. Pure: the files are read in pqtriage.sources.hardware_file.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from pqtriage.model.band import BandSettings
from pqtriage.threat.parameters import ThreatParameters

NUMBERS: tuple[str, ...] = (
    "physical_error_rate",
    "cycle_us",
    "reaction_us",
    "qubit_doubling_years",
    "good_physical_qubits_today",
    "runtime_limit_hours",
)
"""Keys that hold one number (qubit_doubling_years with its low and high ends)."""


@dataclass(frozen=True)
class HardwareValue:
    """One value of the hardware file with its provenance."""

    name: str
    """Key in the file."""
    value: float
    """The value used."""
    low: float | None
    """Lowest value the band samples (qubit_doubling_years only)."""
    high: float | None
    """Highest value the band samples (qubit_doubling_years only)."""
    flag: str
    """V, V2, M or A."""
    source: str
    """Where it comes from, or why it was chosen."""


@dataclass(frozen=True)
class Hardware:
    """The hardware file as the threat model uses it."""

    origin: str
    """'shipped default' or the user file's path (with the shipped values for missing keys)."""
    values: tuple[HardwareValue, ...]
    """Every numeric value, in NUMBERS order."""
    reference_algorithm: str
    """The survey's reference task: the algorithm (RSA-2048)."""
    reference_hours: float
    """... within this many hours (24)."""
    reference_source: str
    """Where the reference task comes from."""
    samples: int
    """Monte Carlo samples of the band."""
    seed: int
    """Seed of the band's sampler."""

    def value(self, name: str) -> HardwareValue:
        """The entry called ``name``."""
        return next(v for v in self.values if v.name == name)

    def parameters(self, base: ThreatParameters | None = None, doubling_years: float | None = None) -> ThreatParameters:
        """ThreatParameters with this hardware (``doubling_years`` overrides the file's)."""
        return replace(
            base or ThreatParameters(),
            physical_error_rate=self.value("physical_error_rate").value,
            cycle_us=self.value("cycle_us").value,
            reaction_us=self.value("reaction_us").value,
            doubling_years=doubling_years or self.value("qubit_doubling_years").value,
            runtime_limit_hours=self.value("runtime_limit_hours").value,
        )

    def band_settings(self, doubling_years: float | None = None) -> BandSettings:
        """How the band samples: its size, seed and the doubling range (around an override too)."""
        entry = self.value("qubit_doubling_years")
        central = doubling_years or entry.value
        low = min(entry.low or central, central)
        high = max(entry.high or central, central)
        return BandSettings(self.samples, self.seed, central, low, high)

    def notes(self) -> list[str]:
        """One line per value, for the assumptions of every output."""
        lines = [f"Hardware file: {self.origin}."]
        for v in self.values:
            rng = f" (band {v.low:g} to {v.high:g})" if v.low is not None and v.high is not None else ""
            lines.append(f"{v.name} = {v.value:g}{rng} [{v.flag}]")
        lines.append(f"Reference task: {self.reference_algorithm} within {self.reference_hours:g} hours.")
        return lines
