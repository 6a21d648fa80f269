"""The papers' own per-size tables, and how sizes between and beyond their rows are read.

arXiv:2505.15917 publishes logical costs per size (authors' generated tables: logical qubits
and expected Toffoli count for RSA, short-exponent Diffie-Hellman and Schnorr groups);
arXiv:1905.09749 publishes physical qubits and hours per run (and the retry risk) per size.

Between two rows a quantity is interpolated on log scales only: log(value) is linear in
log(n). Beyond the first or last row the construction's formula (or its scaling) takes over,
multiplied by the table-to-formula ratio at that row, so the two meet there. Every reading
says which of these it was.
"""

from __future__ import annotations

import bisect
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

VARIANTS: tuple[str, ...] = (
    "factoring",
    "finite-field-dlog",
    "schnorr-group",
    "finite-field-dlog-full-exponent",
    "elliptic-curve-dlog",
)
"""Problems a table row can describe (schnorr-group: DSA-style prime-order subgroups)."""


@dataclass(frozen=True)
class LogicalRow:
    """One row of a logical-cost table (arXiv:2505.15917)."""

    bits: int
    """Problem size n in bits."""
    logical_qubits: float
    """Logical qubits of the circuit."""
    toffoli: float
    """Toffoli gates, expected total over all runs."""
    strength: int | None
    """Security strength the paper assumes at this size."""
    commit: str
    """Repository commit the row was read from."""
    verified: str
    """V, V2 or M."""


@dataclass(frozen=True)
class PhysicalRow:
    """One row of a physical-cost table (arXiv:1905.09749)."""

    bits: int
    """Problem size n in bits."""
    physical_qubits: float
    """Physical qubits of one run."""
    hours_per_run: float
    """Hours of one run."""
    retry_risk: float | None
    """Probability that a run must be repeated; None when the paper gives none."""
    distances: str
    """Code distances used (d1/d2), '' when not given."""
    commit: str
    """Commit of the authors' LaTeX the row was read from."""
    verified: str
    """V, V2 or M."""

    @property
    def expected_hours(self) -> float:
        """Hours per run / (1 - retry risk): the expected time to a result."""
        return self.hours_per_run / (1.0 - (self.retry_risk or 0.0))


@dataclass(frozen=True)
class Reading:
    """A value read from a table (or beyond it) at one size, with how it was obtained."""

    value: float
    """The value."""
    how: str
    """'row' (the size is a row), 'log-interpolated', 'formula anchored' or 'formula'."""
    rows: tuple[int, ...]
    """The row sizes used (one for a row or an anchor, two for an interpolation)."""

    def describe(self, quantity: str, source: str) -> str:
        """One line for the working."""
        if self.how == "row":
            return f"{quantity} {self.value:.3g}: the {self.rows[0]}-bit row of {source}"
        if self.how == "log-interpolated":
            return (
                f"{quantity} {self.value:.3g}: interpolated on log scales (log value linear in "
                f"log n) between the {self.rows[0]}- and {self.rows[1]}-bit rows of {source}"
            )
        return (
            f"{quantity} {self.value:.3g}: outside the rows of {source}; the formula scaled to "
            f"meet the {self.rows[0]}-bit row"
        )


def read_table(
    sizes: Sequence[int],
    values: Sequence[float],
    n: float,
    formula: Callable[[float], float] | None = None,
) -> Reading:
    """The value at size ``n`` from rows (sizes ascending) and a formula for beyond them.

    Between rows: log-log linear interpolation. Outside: formula(n) x value(edge) /
    formula(edge) (continuous at the edge); without a formula, the power law of the two
    nearest rows is extended.
    """
    if not sizes or len(sizes) != len(values):
        raise ValueError("a table needs at least one row and one value per row")
    index = bisect.bisect_left(sizes, n)
    if index < len(sizes) and sizes[index] == n:
        return Reading(values[index], "row", (sizes[index],))
    if 0 < index < len(sizes):
        lo, hi = sizes[index - 1], sizes[index]
        fraction = (math.log(n) - math.log(lo)) / (math.log(hi) - math.log(lo))
        value = math.exp(
            math.log(values[index - 1])
            + fraction * (math.log(values[index]) - math.log(values[index - 1]))
        )
        return Reading(value, "log-interpolated", (lo, hi))
    edge = 0 if index == 0 else len(sizes) - 1
    if formula is not None:
        at_edge = formula(sizes[edge])
        if at_edge > 0:
            return Reading(
                formula(n) * values[edge] / at_edge, "formula anchored", (sizes[edge],)
            )
    if len(sizes) == 1:
        return Reading(values[0], "formula anchored", (sizes[0],))
    a, b = (0, 1) if edge == 0 else (edge - 1, edge)
    slope = (math.log(values[b]) - math.log(values[a])) / (math.log(sizes[b]) - math.log(sizes[a]))
    value = values[edge] * (n / sizes[edge]) ** slope
    return Reading(value, "formula anchored", (sizes[edge],))


def cautious_envelope(sizes: Sequence[int], values: Sequence[float], n: float, value: float) -> float:
    """The least of ``value`` and every row value at a size above ``n``.

    The tables' rows minimise Toffoli x qubits^3, so a row can need fewer qubits than a
    smaller size's (Schnorr groups: 406 at 2048 bits against 483 at 1536): a smaller problem
    is never taken to need more than a larger one. Exact for log-log interpolation, whose
    pieces are monotone: the least value above ``n`` sits at ``n`` or at a row.
    """
    above = [v for s, v in zip(sizes, values, strict=True) if s > n]
    return min([value, *above])
