"""Triage results: verdicts per use and per system, ranked."""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from enum import Enum
from typing import TYPE_CHECKING

from pqtriage.catalog.spec import AlgorithmSpec, Conflict
from pqtriage.catalog.transitions import Standing
from pqtriage.model.inventory import CryptoUse, Fact, Inventory, System
from pqtriage.model.priority import Priority
from pqtriage.model.profile import ThreatProfile

if TYPE_CHECKING:
    from pqtriage.model.band import BandSummary, UseBand


class Verdict(str, Enum):
    """The fixed set of verdicts, from most to least urgent."""

    CLASSICALLY_BROKEN = "classically-broken"
    EXPOSED = "exposed"
    UNASSESSED = "unassessed"
    WITHIN_MARGIN = "within-margin"
    QUANTUM_RESISTANT = "quantum-resistant"


SEVERITY: dict[Verdict, int] = {
    Verdict.CLASSICALLY_BROKEN: 4,
    Verdict.EXPOSED: 3,
    Verdict.UNASSESSED: 2,  # unknown is never shown as safe
    Verdict.WITHIN_MARGIN: 1,
    Verdict.QUANTUM_RESISTANT: 0,
}
"""Higher is more urgent; --fail-on compares against this order."""

VERDICT_MEANING: dict[Verdict, str] = {
    Verdict.CLASSICALLY_BROKEN: "broken or not acceptable against classical attacks today: replace now",
    Verdict.EXPOSED: "Mosca's inequality fails at the profile's risk tolerance: x + y exceeds z",
    Verdict.UNASSESSED: "pqtriage could not assess this use: treat as exposed until checked",
    Verdict.WITHIN_MARGIN: "quantum-vulnerable, but migration can still finish before z at the risk tolerance",
    Verdict.QUANTUM_RESISTANT: "no known quantum attack breaks it within the planning horizon",
}
"""One-line meaning of each verdict, for legends, SARIF rules and reports."""

VERDICT_ALIASES: dict[str, Verdict] = {
    "classically-broken": Verdict.CLASSICALLY_BROKEN,
    "broken": Verdict.CLASSICALLY_BROKEN,
    "classical": Verdict.CLASSICALLY_BROKEN,
    "exposed": Verdict.EXPOSED,
    "unassessed": Verdict.UNASSESSED,
    "unknown": Verdict.UNASSESSED,
    "within-margin": Verdict.WITHIN_MARGIN,
    "margin": Verdict.WITHIN_MARGIN,
    "within": Verdict.WITHIN_MARGIN,
    "in-margin": Verdict.WITHIN_MARGIN,
    "quantum-resistant": Verdict.QUANTUM_RESISTANT,
    "resistant": Verdict.QUANTUM_RESISTANT,
}
"""The verdict words and the short forms people type (``--fail-on broken``)."""


def parse_verdict(text: str) -> Verdict | None:
    """The verdict a word names (case, spaces and underscores ignored), or None."""
    key = "-".join(text.strip().casefold().replace("_", "-").split())
    return VERDICT_ALIASES.get(key)


@dataclass(frozen=True)
class Flag:
    """A caution shown beside a verdict in every output: legacy, deprecated or a downgrade."""

    kind: str
    """legacy, deprecated (classical status by date) or downgrade (a weaker method offered)."""
    algorithm: str
    """Catalog name (or input name) of the algorithm it is about."""
    text: str
    """One line, with its date and document: 'legacy since 2011-03-01 (RFC 6151): HMAC-MD5'."""
    date: dt.date | None = None
    """When the status began, if dated."""
    draft: bool = False
    """True when the flag rests on a draft document (shown as DRAFT)."""


@dataclass(frozen=True)
class UseAssessment:
    """The Mosca evaluation of one cryptographic use."""

    use: CryptoUse
    """The use as read from the inventory."""
    spec: AlgorithmSpec | None
    """What the catalog resolved it to (None when unassessed)."""
    deciding: AlgorithmSpec | None
    """For a composite (cipher suite), the part that decided the verdict."""
    verdict: Verdict
    """This use's verdict."""
    x_years: float
    """Mosca's x for this use: shelf-life, trust years or zero, by purpose."""
    y_years: float
    """Mosca's y: the system's migration time."""
    exposure_probability: float | None
    """P(z < as-of + x + y); None when unassessed."""
    margin_years: float | None
    """z at the risk tolerance minus (as-of + x + y); negative is overdue; None if not applicable."""
    start_by: dt.date | None
    """Latest date to start migrating (z at tolerance - x - y); None if no quantum deadline."""
    crqc_year: float | None
    """Decimal year of z at the risk tolerance for this algorithm (inf beyond horizon)."""
    shift_years: float | None
    """This algorithm's arrival shift relative to the reference task."""
    reason: str
    """One line: why this verdict."""
    replacement: str | None
    """Standardized replacement for this purpose, when one is needed."""
    suggestions: tuple[str, ...] = ()
    """Close catalog names, for an unknown algorithm."""
    assumptions: tuple[str, ...] = ()
    """Assumptions this evaluation made (default trust years, assumed shelf-life ...)."""
    classical: Standing | None = None
    """Classical status by date of the algorithm for this purpose (the worst part of a suite);
    None when unassessed."""
    conflicts: tuple[Conflict, ...] = ()
    """Name and attributes that disagree (the use is then unassessed)."""
    facts: tuple[Fact, ...] = ()
    """The facts the assessment rests on, each with where it came from."""
    flags: tuple[Flag, ...] = ()
    """Cautions beside the verdict: legacy or deprecated status, or a downgrade offered."""

    @property
    def offered(self) -> bool:
        """True for a use a server offers but current clients do not negotiate."""
        return self.use.role == "offered"
    band: UseBand | None = None
    """10-90 % band of P(exposed), z and start-by over the uncertainty samples, for the part
    that decides the use; None where no quantum arrival applies (added by the threat model)."""


@dataclass(frozen=True)
class SystemAssessment:
    """A system's place in the ranking; its weakest use decides."""

    system: System
    """The system as read from the inventory."""
    uses: tuple[UseAssessment, ...]
    """Every use, in input order."""
    verdict: Verdict
    """The weakest use's verdict (unassessed if the system lists no use)."""
    weakest: UseAssessment | None
    """The use that decided the verdict."""
    exposure_probability: float | None
    """The weakest use's exposure probability."""
    margin_years: float | None
    """The weakest use's margin."""
    start_by: dt.date | None
    """Earliest start-by date over the system's uses."""
    rank: int
    """1 = migrate first."""
    reason: str
    """One line: why the system has its verdict (the deciding use's reason)."""
    priority: Priority | None = None
    """The priority points that order systems of the same verdict, and their parts."""
    rank_reason: str = ""
    """One line: the factor that put this row below its neighbour above."""
    flags: tuple[Flag, ...] = ()
    """Cautions of its uses (legacy, deprecated, downgrade), in use order."""


@dataclass(frozen=True)
class Summary:
    """Counts and headlines over a whole triage."""

    counts: dict[Verdict, int]
    """Systems per verdict (every verdict present, zero included)."""
    use_counts: dict[Verdict, int]
    """Uses per verdict."""
    overdue: tuple[str, ...]
    """Ids of systems whose start-by date has passed (or that are classically broken)."""
    earliest_start_by: dt.date | None
    """The earliest start-by date over all systems."""
    systems: int
    """Number of systems."""
    uses: int
    """Number of uses."""


@dataclass(frozen=True)
class Selection:
    """What a view (--where, --top, --group-by; pqtriage.model.view) shows of a result."""

    where: str | None
    """The ``--where`` expression, if any."""
    top: int | None
    """``--top N``, if any."""
    group_by: str | None
    """The ``--group-by`` field, if any."""
    total: int
    """Systems in the whole result."""
    matched: int
    """Systems the filter keeps (before --top)."""
    hidden_unassessed: int
    """Unassessed systems not shown (they still need checking by hand)."""
    counts: dict[Verdict, int]
    """Shown systems per verdict."""

    def describe(self) -> str:
        """One sentence: what is shown and why."""
        shown = sum(self.counts.values())
        parts = []
        if self.where is not None:
            parts.append(f"systems matching --where \"{self.where}\"")
        if self.top is not None:
            parts.append(f"the top {self.top}")
        text = f"Showing {shown} of {self.total} systems"
        if parts:
            text += " (" + ", ".join(parts) + ")"
        if self.group_by:
            text += f", grouped by {self.group_by}"
        text += "."
        if self.hidden_unassessed == 1:
            text += " 1 unassessed system is not shown: it is not safe, check it in the full result."
        elif self.hidden_unassessed:
            text += (f" {self.hidden_unassessed} unassessed systems are not shown: they are not safe,"
                     " check them in the full result.")
        return text


@dataclass(frozen=True)
class TriageResult:
    """The ranked output of one triage run."""

    inventory: Inventory
    """The input."""
    items: tuple[SystemAssessment, ...]
    """Systems, ranked."""
    summary: Summary
    """Counts and headlines."""
    as_of: dt.date
    """The date treated as today."""
    profile: ThreatProfile
    """The threat profile used."""
    arrival_model: str
    """Description of how per-algorithm arrivals were set."""
    arrivals: tuple[ArrivalUsed, ...] = ()
    """The arrival of each distinct algorithm used, earliest first."""
    band: BandSummary | None = None
    """What the uncertainty band sampled; None when no band was computed."""
    selection: Selection | None = None
    """When a view (--where, --top, --group-by) shows part of the result: what it shows.
    ``items`` then holds the shown systems; ``summary`` is still that of the whole inventory."""


@dataclass(frozen=True)
class ArrivalUsed:
    """When one algorithm falls, as this run computed it."""

    algorithm: str
    """Catalog name."""
    crqc_year: float
    """Decimal year of z at the risk tolerance (inf beyond the horizon)."""
    shift_years: float
    """Shift against the reference task (inf beyond the horizon)."""
    basis: str
    """One sentence with the numbers behind the shift."""
