"""Official transition timelines: the shipped ``policies.yaml``, loaded once and validated.

Each :class:`Policy` is a list of :class:`Milestone` rows, each with a kind, a
date (the last day it is still met), a scope and its source. Selecting policies
by id for a plan happens here too.
"""

from __future__ import annotations

import datetime
import functools
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from importlib import resources
from typing import Any

import yaml

from pqtriage.errors import CatalogError, Place, UsageError
from pqtriage.plan.inputs import POLICY_CATEGORIES

try:  # The C loader is faster; both are safe loaders.
    from yaml import CSafeLoader as _Loader
except ImportError:  # pragma: no cover - depends on how PyYAML was built
    from yaml import SafeLoader as _Loader  # type: ignore[assignment]

MILESTONE_KINDS: tuple[str, ...] = (
    "deprecated",
    "disallowed",
    "exclusive-use",
    "support-and-prefer",
    "migrate-by",
    "replace-by",
    "mitigate-by",
    "not-approved-beyond",
    "not-recommended-beyond",
    "plan-by",
    "acquisitions-from",
    "support",
)
"""Every milestone kind the data may use."""
CHECKPOINT_KINDS: tuple[str, ...] = ("support-and-prefer", "support")
"""Readiness checkpoints (met, not met, unknown): never counted as missed deadlines."""
REQUIREMENTS: tuple[str, ...] = (
    "migrate",
    "migrate-key-establishment",
    "migrate-signatures",
    "stop-using",
    "support",
    "support-and-prefer",
    "prefer",
    "procure-only-compliant",
    "plan",
)
"""What a milestone asks for."""
SOURCE_STATUSES: tuple[str, ...] = ("final", "draft", "announced")
"""Standing of the source document: in force, a draft for comment, announced or proposed."""
PURPOSE_CLASSES: tuple[str, ...] = ("signature", "key-establishment")
"""Purpose classes of NIST IR 8547 (Table 2 signatures, Table 4 key establishment)."""
FLAGS: tuple[str, ...] = ("V", "V2", "M")
"""V checked against the primary text, V2 several secondary sources, M from memory."""
DEFAULT_POLICY_IDS: tuple[str, ...] = ("nist-ir-8547",)
"""Policies used when neither the command line nor the inventory names any."""

_POLICY_KEYS = {
    "id", "title", "publisher", "published", "source", "flag", "status", "frameworks", "note",
    "milestones",
}
_MILESTONE_KEYS = {
    "id", "kind", "requires", "date", "applies_to", "scope", "status", "source", "note",
}
_SCOPE_KEYS = {
    "quantum_attack",
    "purposes",
    "min_classical_bits",
    "max_classical_bits",
    "policy_categories",
    "priority",
    "algorithms",
    "impact",
    "high_value_asset",
    "classification",
    "protocol",
    "any_of",
}
IMPACT_LEVELS: tuple[str, ...] = ("low", "moderate", "high")
"""FIPS 199 impact levels (FIPS PUB 199, 2004, section 3)."""


@dataclass(frozen=True)
class Scope:
    """Which uses and systems a milestone applies to; None means any."""

    quantum_attacks: tuple[str, ...] | None = None
    """Catalog quantum attack classes in scope (shor, grover, none)."""
    purposes: tuple[str, ...] | None = None
    """IR 8547 purpose classes in scope (signature, key-establishment)."""
    min_classical_bits: int | None = None
    """Lowest classical strength in scope (bits, inclusive)."""
    max_classical_bits: int | None = None
    """Highest classical strength in scope (bits, inclusive)."""
    policy_categories: tuple[str, ...] | None = None
    """CNSA 2.0 system categories in scope."""
    high_priority_only: bool = False
    """True when only high-priority (high-risk) systems are in scope."""
    algorithms: tuple[str, ...] | None = None
    """Catalog display names in scope, matched as a prefix ending at a separator."""
    impacts: tuple[str, ...] | None = None
    """FIPS 199 impact levels in scope; a system without one does not match."""
    high_value_asset: bool | None = None
    """Required high-value-asset designation (OMB M-19-03); an unstated one does not match."""
    classifications: tuple[str, ...] | None = None
    """Data classification labels in scope (compared without regard to case)."""
    protocols: tuple[str, ...] | None = None
    """Main protocols in scope (tls, ssh ...; compared without regard to case)."""
    any_of: tuple[Scope, ...] | None = None
    """Sub-scopes of which at least one must match (an "or")."""


@dataclass(frozen=True)
class Milestone:
    """One dated step of a policy."""

    id: str
    """Identifier, unique within its policy."""
    kind: str
    """One of :data:`MILESTONE_KINDS`."""
    date: datetime.date
    """Last day the milestone is still met (first day for acquisitions-from)."""
    source: str
    """Document, section and wording the milestone comes from."""
    scope: Scope = Scope()
    """Which uses and systems it applies to."""
    applies_to: str = "systems"
    """systems (a finish-by date per system) or organisation (a whole-organisation step)."""
    note: str = ""
    """How the text was read into this row."""
    requires: str = "migrate"
    """What it asks for, one of :data:`REQUIREMENTS`."""
    status: str = "final"
    """Standing of its source: final, draft or announced (:data:`SOURCE_STATUSES`)."""

    @property
    def checkpoint(self) -> bool:
        """True for a readiness checkpoint (support, prefer), False for a deadline."""
        return self.kind in CHECKPOINT_KINDS


@dataclass(frozen=True)
class Policy:
    """One official timeline (NIST IR 8547, CNSA 2.0, UK NCSC ...)."""

    id: str
    """Identifier used with --policy and in inventories (nist-ir-8547, cnsa2 ...)."""
    title: str
    """Title of the document."""
    publisher: str
    """Issuing body and country."""
    published: str
    """Publication date as the document gives it (YYYY-MM)."""
    source: str
    """Document title and identifier."""
    flag: str
    """How the figures were checked: V, V2 or M."""
    milestones: tuple[Milestone, ...]
    """Dated steps, in file order."""
    note: str = ""
    """How the policy was read."""
    status: str = "final"
    """Standing of the document: final, draft or announced."""
    frameworks: tuple[str, ...] = ()
    """Inventory framework ids it governs; empty: it applies whatever a system names."""


def _fail(row: str, message: str, path: str) -> CatalogError:
    return CatalogError(
        f"{row}: {message}", place=Place(path), hint="fix the shipped policies.yaml"
    )


def _strings(value: Any, row: str, key: str, path: str) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(v, str) and v for v in value):
        raise _fail(row, f"'{key}' must be a list of names", path)
    return tuple(value)


def _check_keys(data: Mapping[str, Any], allowed: set[str], row: str, path: str) -> None:
    unknown = sorted(set(data) - allowed)
    if unknown:
        raise _fail(row, f"unknown key(s) {', '.join(unknown)}; allowed: {sorted(allowed)}", path)


def _scope(data: Any, row: str, path: str) -> Scope:
    if data is None:
        return Scope()
    if not isinstance(data, dict):
        raise _fail(row, "'scope' must be a mapping", path)
    _check_keys(data, _SCOPE_KEYS, row + " scope", path)
    bits: dict[str, int | None] = {}
    for key in ("min_classical_bits", "max_classical_bits"):
        value = data.get(key)
        if value is not None and (not isinstance(value, int) or isinstance(value, bool)):
            raise _fail(row, f"'{key}' must be a whole number of bits", path)
        bits[key] = value
    lists = {
        key: _strings(data[key], row, key, path) if key in data else None
        for key in ("quantum_attack", "purposes", "policy_categories", "algorithms")
    }
    for key, allowed in (
        ("quantum_attack", ("shor", "grover", "none")),
        ("purposes", PURPOSE_CLASSES),
        ("policy_categories", POLICY_CATEGORIES),
    ):
        bad = [v for v in lists[key] or () if v not in allowed]
        if bad:
            raise _fail(row, f"'{key}' has unknown value(s) {bad}; allowed: {list(allowed)}", path)
    priority = data.get("priority")
    if priority not in (None, "high"):
        raise _fail(row, "'priority' must be 'high' when given", path)
    texts = {
        key: _strings(data[key], row, key, path) if key in data else None
        for key in ("impact", "classification", "protocol")
    }
    bad = [v for v in texts["impact"] or () if v not in IMPACT_LEVELS]
    if bad:
        raise _fail(row, f"'impact' has unknown value(s) {bad}; allowed: {list(IMPACT_LEVELS)}", path)
    hva = data.get("high_value_asset")
    if hva is not None and not isinstance(hva, bool):
        raise _fail(row, "'high_value_asset' must be true or false", path)
    any_of = data.get("any_of")
    alternatives = None
    if any_of is not None:
        if not isinstance(any_of, list) or not any_of:
            raise _fail(row, "'any_of' must be a non-empty list of scopes", path)
        alternatives = tuple(
            _scope(item, f"{row} any_of {n}", path) for n, item in enumerate(any_of, start=1)
        )
    return Scope(
        quantum_attacks=lists["quantum_attack"],
        purposes=lists["purposes"],
        min_classical_bits=bits["min_classical_bits"],
        max_classical_bits=bits["max_classical_bits"],
        policy_categories=lists["policy_categories"],
        high_priority_only=priority == "high",
        algorithms=lists["algorithms"],
        impacts=texts["impact"],
        high_value_asset=hva,
        classifications=texts["classification"],
        protocols=texts["protocol"],
        any_of=alternatives,
    )


def _text(data: Mapping[str, Any], key: str, row: str, path: str, required: bool = True) -> str:
    value = data.get(key)
    if value is None and not required:
        return ""
    if not isinstance(value, str) or not value.strip():
        raise _fail(row, f"missing or empty '{key}'", path)
    return " ".join(value.split())


def _choice(data: Mapping[str, Any], key: str, allowed: Sequence[str], default: str | None,
            row: str, path: str) -> str:
    value = data.get(key, default)
    if value not in allowed:
        raise _fail(row, f"'{key}' must be one of {list(allowed)}", path)
    return str(value)


def _milestone(data: Any, row: str, path: str, policy_status: str) -> Milestone:
    if not isinstance(data, dict):
        raise _fail(row, "must be a mapping", path)
    _check_keys(data, _MILESTONE_KEYS, row, path)
    kind = _text(data, "kind", row, path)
    if kind not in MILESTONE_KINDS:
        raise _fail(row, f"unknown kind '{kind}'; allowed: {list(MILESTONE_KINDS)}", path)
    date = data.get("date")
    if isinstance(date, str):
        try:
            date = datetime.date.fromisoformat(date)
        except ValueError:
            date = None
    if not isinstance(date, datetime.date) or isinstance(date, datetime.datetime):
        raise _fail(row, "'date' must be a YYYY-MM-DD date", path)
    applies_to = data.get("applies_to", "systems")
    if applies_to not in ("systems", "organisation"):
        raise _fail(row, "'applies_to' must be systems or organisation", path)
    return Milestone(
        id=_text(data, "id", row, path),
        kind=kind,
        date=date,
        source=_text(data, "source", row, path),
        scope=_scope(data.get("scope"), row, path),
        applies_to=applies_to,
        note=_text(data, "note", row, path, required=False),
        requires=_choice(data, "requires", REQUIREMENTS, None, row, path),
        status=_choice(data, "status", SOURCE_STATUSES, policy_status, row, path),
    )


def parse_policies(document: Any, path: str) -> tuple[Policy, ...]:
    """Validate a parsed policies document and build its policies.

    Raises:
        CatalogError: naming the policy or milestone row that is malformed.
    """
    if not isinstance(document, dict) or not isinstance(document.get("policies"), list):
        raise _fail("document", "must be a mapping with a 'policies' list", path)
    _check_keys(document, {"policies"}, "document", path)
    policies: list[Policy] = []
    for index, data in enumerate(document["policies"], start=1):
        row = f"policy {index}"
        if not isinstance(data, dict):
            raise _fail(row, "must be a mapping", path)
        if isinstance(data.get("id"), str):
            row = f"policy '{data['id']}'"
        _check_keys(data, _POLICY_KEYS, row, path)
        flag = _choice(data, "flag", FLAGS, None, row, path)
        status = _choice(data, "status", SOURCE_STATUSES, None, row, path)
        frameworks = (
            _strings(data["frameworks"], row, "frameworks", path) if "frameworks" in data else ()
        )
        rows = data.get("milestones")
        if not isinstance(rows, list) or not rows:
            raise _fail(row, "needs a non-empty 'milestones' list", path)
        milestones = tuple(
            _milestone(item, f"{row} milestone {number}", path, status)
            for number, item in enumerate(rows, start=1)
        )
        ids = [m.id for m in milestones]
        if len(set(ids)) != len(ids):
            raise _fail(row, "milestone ids must be unique", path)
        policies.append(
            Policy(
                id=_text(data, "id", row, path),
                title=_text(data, "title", row, path),
                publisher=_text(data, "publisher", row, path),
                published=_text(data, "published", row, path),
                source=_text(data, "source", row, path),
                flag=flag,
                milestones=milestones,
                note=_text(data, "note", row, path, required=False),
                status=status,
                frameworks=tuple(f.lower() for f in frameworks),
            )
        )
    ids = [p.id for p in policies]
    if len(set(ids)) != len(ids):
        raise _fail("document", "policy ids must be unique", path)
    return tuple(policies)


@functools.lru_cache(maxsize=1)
def load_policies() -> tuple[Policy, ...]:
    """Load and validate the shipped ``pqtriage/data/policies.yaml`` (once per process)."""
    resource = resources.files("pqtriage").joinpath("data/policies.yaml")
    text = resource.read_text(encoding="utf-8")
    return parse_policies(yaml.load(text, Loader=_Loader), "pqtriage/data/policies.yaml")


def select_policies(
    requested: Iterable[str],
    inventory_named: Iterable[str] = (),
    available: Sequence[Policy] | None = None,
) -> tuple[Policy, ...]:
    """Policies for a plan: those requested on the command line plus those the inventory names.

    Order follows the request, then the inventory; duplicates are dropped. When both
    are empty, :data:`DEFAULT_POLICY_IDS` apply.

    Raises:
        UsageError: for an unknown id, listing the valid ids.
    """
    catalog = {p.id: p for p in (load_policies() if available is None else available)}
    wanted = [i.strip().lower() for i in (*requested, *inventory_named) if i.strip()]
    if not wanted:
        wanted = list(DEFAULT_POLICY_IDS)
    chosen: list[Policy] = []
    for policy_id in wanted:
        if policy_id not in catalog:
            raise UsageError(
                f"unknown policy '{policy_id}'",
                hint=f"use one of: {', '.join(catalog)}",
            )
        if catalog[policy_id] not in chosen:
            chosen.append(catalog[policy_id])
    return tuple(chosen)
