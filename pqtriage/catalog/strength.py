"""Classical security strength from NIST SP 800-57 Part 1 Rev. 5 (2020), Table 2.

The table gives comparable strengths for IFC (RSA modulus bits), FFC (prime
bits L) and ECC (order bits f). A size between two rows takes the lower row;
a size below the first row has no strength in the table (None).
"""

from __future__ import annotations

from dataclasses import dataclass

from pqtriage.catalog.loader import Row
from pqtriage.catalog.spec import CLASSICAL_STATUSES

COLUMNS = {"ifc": "ifc", "ffc": "ffc_l", "ecc": "ecc"}
"""Parameter kind -> Table 2 column."""


@dataclass(frozen=True)
class StrengthTable:
    """Table 2 rows and the status policy for a computed strength."""

    rows: tuple[Row, ...]
    """Rows sorted from the weakest to the strongest."""
    policy: Row
    """minimum_bits, below_minimum status and the notes to attach."""

    def bits(self, kind: str, size: int) -> int | None:
        """Strength of a ``kind`` (ifc, ffc, ecc) key of ``size`` bits; None below the table."""
        column = COLUMNS[kind]
        strength: int | None = None
        # SP 800-57 Part 1 Rev. 5, Table 2: take the last row whose size is <= the given size.
        for row in self.rows:
            if size >= row[column]:
                strength = row["bits"]
        return strength

    def status(self, bits: int | None) -> tuple[str, str]:
        """Classical status and note for a computed strength (SP 800-131A Rev. 2: >= 112 bits)."""
        if bits is None:
            return str(self.policy["below_minimum"]), str(self.policy["below_table_note"])
        if bits < self.policy["minimum_bits"]:
            return str(self.policy["below_minimum"]), str(self.policy["below_minimum_note"])
        if bits == self.policy["minimum_bits"]:
            return "acceptable", str(self.policy["at_minimum_note"])
        return "acceptable", ""

    def source(self) -> str:
        """Source text of the table and of the status policy."""
        return f"{self.rows[0]['source']}; {self.policy['source']}"


def worst_status(*statuses: str) -> str:
    """The worst of several classical statuses (broken < weak < legacy < acceptable)."""
    return min(statuses, key=CLASSICAL_STATUSES.index)


def best_status(*statuses: str) -> str:
    """The best of several classical statuses."""
    return max(statuses, key=CLASSICAL_STATUSES.index)


def cap_status(status: str, at_best: str | None) -> str:
    """``status`` limited to be no better than ``at_best`` (when given)."""
    return worst_status(status, at_best) if at_best else status


def join_notes(*notes: str | None) -> str:
    """Join non-empty notes with '; ', dropping repeats."""
    seen: list[str] = []
    for note in notes:
        if note and note not in seen:
            seen.append(note)
    return "; ".join(seen)
