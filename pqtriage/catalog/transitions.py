"""Classical status by date: which algorithms may still apply protection, and until when.

The rules are shipped data (``pqtriage/data/transitions.yaml``): NIST SP 800-131A Rev. 2 (2019)
for today, the draft Rev. 3 (October 2024, labelled DRAFT) for its later dates, and a few other
documents (FIPS 186-5, RFC 6151). Each rule matches an algorithm and a purpose and gives a
status from one date through another. On a given date the worst applicable status wins:
broken, disallowed, deprecated, legacy, acceptable (among equals, the first row).

Pure once loaded: :func:`read_transitions` reads and validates the file, :meth:`Transitions.standing`
answers for one algorithm, purpose and date.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import yaml

from pqtriage.catalog.loader import _Loader
from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.errors import CatalogError, Place

STANDINGS: tuple[str, ...] = ("acceptable", "legacy", "deprecated", "disallowed", "broken")
"""Classical statuses from best to worst."""
NOT_ACCEPTABLE: tuple[str, ...] = ("disallowed", "broken")
"""Statuses that make a use classically-broken."""
CAUTIONED: tuple[str, ...] = ("legacy", "deprecated")
"""Statuses shown as a flag beside the verdict."""
FLAGS: tuple[str, ...] = ("V", "V2", "M", "row")
"""V checked in the document, V2 agreed by secondary sources, M from memory, row: the catalog row's."""

_MATCH_KEYS = {
    "families": list, "names": list, "primitives": list, "purposes": list, "catalog_status": list,
    "hash_used": list, "bits": int, "bits_below": int, "block_bits_below": int,
}
_RULE_KEYS = {"id", "document", "section", "flag", "match", "from", "until", "status", "note"}


@dataclass(frozen=True)
class Document:
    """A document the rules cite."""

    key: str
    """Short key used by the rules."""
    short: str
    """Identifier for narrow places (NIST SP 800-131A Rev. 2)."""
    title: str
    """Title and identifier, as outputs cite it."""
    draft: bool
    """True for a draft (every output labels it DRAFT)."""

    @property
    def citation(self) -> str:
        """The title, with DRAFT in front for a draft."""
        return f"DRAFT {self.title}" if self.draft else self.title

    @property
    def short_citation(self) -> str:
        """The short identifier, with DRAFT in front for a draft."""
        return f"DRAFT {self.short}" if self.draft else self.short


@dataclass(frozen=True)
class Rule:
    """One transition row: a status for matching algorithms and purposes over a period."""

    id: str
    """Stable identifier of the row."""
    document: Document
    """Where the rule comes from."""
    section: str
    """Table or section of the document."""
    flag: str
    """V, V2, M or row (see FLAGS)."""
    match: dict[str, Any]
    """Which algorithms and purposes it covers (all keys must fit)."""
    start: dt.date | None
    """First day the status holds (None: as long as the document stands)."""
    end: dt.date | None
    """Last day the status holds (None: open-ended)."""
    status: str
    """One of STANDINGS."""
    note: str
    """One line: what the rule says."""

    def covers(self, day: dt.date) -> bool:
        """Whether the rule's period includes ``day``."""
        return (self.start is None or self.start <= day) and (self.end is None or day <= self.end)


@dataclass(frozen=True)
class Standing:
    """The classical status of one algorithm for one purpose on one date, and why."""

    status: str
    """acceptable, legacy, deprecated, disallowed or broken."""
    algorithm: str
    """Catalog name of the algorithm (the part of a cipher suite it applies to)."""
    purpose: str
    """The purpose it was judged for."""
    since: dt.date | None
    """First day of this status under its rule (None: undated)."""
    rule: str
    """Id of the deciding rule."""
    document: str
    """Title and identifier of the rule's document (DRAFT in front for a draft)."""
    short: str
    """Short identifier of the document (DRAFT in front for a draft)."""
    section: str
    """Table or section of the document."""
    draft: bool
    """True when the deciding rule comes from a draft."""
    flag: str
    """V, V2, M or row."""
    note: str
    """One line: what the rule says."""
    source: str
    """The catalog row's own source, when the rule defers to it; else the document."""
    next_status: str | None = None
    """The next worse status scheduled after the date, if any."""
    next_date: dt.date | None = None
    """When that status begins."""
    next_document: str | None = None
    """Document of the next status (DRAFT in front for a draft)."""
    next_short: str | None = None
    """Short identifier of that document (DRAFT in front for a draft)."""
    until: dt.date | None = None
    """Last day of this status under its rule (None: open-ended)."""

    @property
    def not_acceptable(self) -> bool:
        """True for disallowed or broken: the use is classically-broken."""
        return self.status in NOT_ACCEPTABLE

    @property
    def cautioned(self) -> bool:
        """True for legacy or deprecated: shown as a flag beside the verdict."""
        return self.status in CAUTIONED

    def when(self) -> str:
        """'since 2024-01-01', 'through 2023-12-31', or '' for an undated status."""
        if self.since:
            return f"since {self.since.isoformat()}"
        if self.until:
            return f"through {self.until.isoformat()}"
        return ""

    def label(self) -> str:
        """Short text: 'legacy since 2011-03-01 (RFC 6151)'."""
        when = self.when()
        return f"{self.status}{' ' + when if when else ''} ({self.short})"

    def next_label(self) -> str | None:
        """'deprecated from 2031-01-01 (DRAFT NIST SP 800-131A Rev. 3 ipd)' or None."""
        if self.next_status is None or self.next_date is None:
            return None
        return f"{self.next_status} from {self.next_date.isoformat()} ({self.next_short})"


def worst(*statuses: str) -> str:
    """The worst of several statuses."""
    return max(statuses, key=STANDINGS.index)


class Transitions:
    """The transition rules, answering for an algorithm, a purpose and a date."""

    def __init__(self, rules: tuple[Rule, ...]):
        self.rules = rules
        self._known: dict[tuple[int, str, dt.date], tuple[AlgorithmSpec, Standing]] = {}

    def applicable(self, spec: AlgorithmSpec, purpose: str) -> tuple[Rule, ...]:
        """Rules whose match fits the algorithm and purpose, whatever the date."""
        return tuple(rule for rule in self.rules if _fits(rule.match, spec, purpose))

    def standing(self, spec: AlgorithmSpec, purpose: str, day: dt.date) -> Standing:
        """The status of ``spec`` used for ``purpose`` on ``day``, with its rule and the next change.

        Remembered per (spec, purpose, day): many uses share them, and the answer is pure. Keyed
        by the spec's identity (hashing every field of a spec each time costs more than the rule
        scan); the entry keeps the spec alive, so an id is never reused while it is remembered.
        """
        key = (id(spec), purpose, day)
        known = self._known.get(key)
        if known is None or known[0] is not spec:
            if len(self._known) > 65536:
                self._known.clear()
            known = self._known[key] = (spec, self._standing(spec, purpose, day))
        return known[1]

    def _standing(self, spec: AlgorithmSpec, purpose: str, day: dt.date) -> Standing:
        rules = self.applicable(spec, purpose)
        current = [rule for rule in rules if rule.covers(day)]
        chosen: Rule | None = None
        for rule in current:
            if chosen is None or STANDINGS.index(rule.status) > STANDINGS.index(chosen.status):
                chosen = rule
        if chosen is None:  # the last shipped row matches everything; a custom file may not
            return Standing("acceptable", spec.name, purpose, None, "none", "no rule applies",
                            "no rule", "", False, "row", "acceptable", spec.source)
        upcoming = sorted(
            (rule for rule in rules if rule.start is not None and rule.start > day
             and STANDINGS.index(rule.status) > STANDINGS.index(chosen.status)),
            key=lambda rule: (rule.start, -STANDINGS.index(rule.status)),
        )
        following = upcoming[0] if upcoming else None
        document, short = chosen.document.citation, chosen.document.short_citation
        if chosen.flag == "row" and chosen.status != "acceptable":
            # The status is the catalog row's own: cite the row's first source.
            document = short = spec.source.split(";")[0].strip() or document
        return Standing(
            status=chosen.status,
            algorithm=spec.name,
            purpose=purpose,
            since=chosen.start,
            rule=chosen.id,
            document=document,
            short=short,
            section=chosen.section,
            draft=chosen.document.draft,
            flag=chosen.flag,
            note=chosen.note,
            source=spec.source if chosen.flag == "row" and chosen.status != "acceptable" else chosen.document.citation,
            next_status=following.status if following else None,
            next_date=following.start if following else None,
            next_document=following.document.citation if following else None,
            next_short=following.document.short_citation if following else None,
            until=chosen.end,
        )


def hash_used(spec: AlgorithmSpec) -> str | None:
    """The hash a signature name fixes, or the hash itself for a hash entry."""
    if spec.signature_hash:
        return spec.signature_hash
    return spec.name if spec.primitive == "hash" else None


_CHECKS: dict[str, Any] = {
    "families": lambda v, spec, purpose: spec.family in v,
    "names": lambda v, spec, purpose: spec.name in v,
    "primitives": lambda v, spec, purpose: spec.primitive in v,
    "purposes": lambda v, spec, purpose: purpose in v,
    "catalog_status": lambda v, spec, purpose: spec.classical_status in v,
    "hash_used": lambda v, spec, purpose: hash_used(spec) in v,
    "bits": lambda v, spec, purpose: spec.classical_bits == v,
    # A strength the tables do not give (None) is left to the catalog row's own status.
    "bits_below": lambda v, spec, purpose: spec.classical_bits is not None and spec.classical_bits < v,
    "block_bits_below": lambda v, spec, purpose: spec.block_bits is not None and spec.block_bits < v,
}


def _fits(match: dict[str, Any], spec: AlgorithmSpec, purpose: str) -> bool:
    return all(_CHECKS[key](value, spec, purpose) for key, value in match.items())


def _fail(path: str, label: str, message: str) -> CatalogError:
    return CatalogError(f"{label}: {message}", place=Place(path),
                        hint="fix the row in the transitions file; see docs/catalog.md")


def _date(value: Any, path: str, label: str, key: str) -> dt.date | None:
    if value is None:
        return None
    if isinstance(value, dt.date) and not isinstance(value, dt.datetime):
        return value
    raise _fail(path, label, f"'{key}' must be a date YYYY-MM-DD or null")


def parse_transitions(data: Any, path: str) -> Transitions:
    """Validate the transitions document.

    Raises:
        CatalogError: a section or a row breaks the format (the message names it).
    """
    if not isinstance(data, dict) or set(data) != {"version", "documents", "rules"}:
        raise _fail(path, "top level", "needs exactly 'version', 'documents' and 'rules'")
    documents: dict[str, Document] = {}
    if not isinstance(data["documents"], dict):
        raise _fail(path, "documents", "must map keys to {title, draft}")
    for key, row in data["documents"].items():
        if not isinstance(row, dict) or set(row) != {"short", "title", "draft"} \
                or not all(isinstance(row[k], str) and row[k].strip() for k in ("short", "title")) \
                or not isinstance(row["draft"], bool):
            raise _fail(path, f"documents.{key}", "needs a non-empty 'short' and 'title', and 'draft: true/false'")
        documents[str(key)] = Document(str(key), row["short"], row["title"], row["draft"])
    if not isinstance(data["rules"], list) or not data["rules"]:
        raise _fail(path, "rules", "must be a non-empty list")
    rules: list[Rule] = []
    seen: set[str] = set()
    for index, row in enumerate(data["rules"]):
        label = f"rules[{index}]"
        if not isinstance(row, dict):
            raise _fail(path, label, "must be a mapping")
        label = f"{label} ({row.get('id', '?')})"
        unknown = set(row) - _RULE_KEYS
        missing = {"id", "document", "section", "flag", "match", "status", "note"} - set(row)
        if unknown or missing:
            raise _fail(path, label, f"unknown keys {sorted(unknown)}" if unknown else f"missing {sorted(missing)}")
        if row["id"] in seen:
            raise _fail(path, label, "id used twice")
        seen.add(row["id"])
        if row["document"] not in documents:
            raise _fail(path, label, f"unknown document '{row['document']}' (known: {', '.join(documents)})")
        if row["status"] not in STANDINGS:
            raise _fail(path, label, f"status '{row['status']}' is not one of {', '.join(STANDINGS)}")
        if row["flag"] not in FLAGS:
            raise _fail(path, label, f"flag '{row['flag']}' is not one of {', '.join(FLAGS)}")
        for key in ("section", "note"):
            if not isinstance(row[key], str) or not row[key].strip():
                raise _fail(path, label, f"'{key}' must be a non-empty text")
        match = row["match"]
        if not isinstance(match, dict):
            raise _fail(path, label, "'match' must be a mapping")
        for key, value in match.items():
            kind = _MATCH_KEYS.get(key)
            if kind is None:
                raise _fail(path, label, f"unknown match key '{key}' (known: {', '.join(_MATCH_KEYS)})")
            if not isinstance(value, kind) or isinstance(value, bool):
                raise _fail(path, label, f"match '{key}' must be a {'list' if kind is list else 'number'}")
        start = _date(row.get("from"), path, label, "from")
        end = _date(row.get("until"), path, label, "until")
        if start and end and end < start:
            raise _fail(path, label, "'until' is before 'from'")
        rules.append(Rule(row["id"], documents[row["document"]], row["section"], row["flag"],
                          dict(match), start, end, row["status"], row["note"]))
    return Transitions(tuple(rules))


def shipped_transitions_path() -> Path:
    """Path of the transitions file shipped with the package."""
    from importlib import resources

    return Path(str(resources.files("pqtriage") / "data" / "transitions.yaml"))


def read_transitions(path: Path | None = None) -> Transitions:
    """Read and validate the shipped transitions file, or the one at ``path``.

    Raises:
        CatalogError: the file is missing, not YAML, or a row is malformed.
    """
    path = path or shipped_transitions_path()
    where = str(path)
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as error:
        raise CatalogError(f"cannot read the transitions file: {error.strerror}", place=Place(where)) from error
    try:
        data = yaml.load(text, Loader=_Loader)  # noqa: S506 - a safe loader
    except yaml.YAMLError as error:
        mark = getattr(error, "problem_mark", None)
        place = Place(where, mark.line + 1, mark.column + 1) if mark else Place(where)
        raise CatalogError("the transitions file is not valid YAML", place=place) from error
    return parse_transitions(data, where)
