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
)
"""Every milestone kind the data may use."""
PURPOSE_CLASSES: tuple[str, ...] = ("signature", "key-establishment")
"""Purpose classes of NIST IR 8547 (Table 2 signatures, Table 4 key establishment)."""
STATUSES: tuple[str, ...] = ("V", "V2", "M")
"""V checked against the primary text, V2 several secondary sources, M from memory."""
DEFAULT_POLICY_IDS: tuple[str, ...] = ("nist-ir-8547",)
"""Policies used when neither the command line nor the inventory names any."""

_POLICY_KEYS = {"id", "title", "publisher", "published", "source", "status", "note", "milestones"}
_MILESTONE_KEYS = {"id", "kind", "date", "applies_to", "scope", "source", "note"}
_SCOPE_KEYS = {
    "quantum_attack",
    "purposes",
    "min_classical_bits",
    "max_classical_bits",
    "policy_categories",
    "priority",
    "algorithms",
}


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
    status: str
    """How the figures were checked: V, V2 or M."""
    milestones: tuple[Milestone, ...]
    """Dated steps, in file order."""
    note: str = ""
    """How the policy was read."""


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
    return Scope(
        quantum_attacks=lists["quantum_attack"],
        purposes=lists["purposes"],
        min_classical_bits=bits["min_classical_bits"],
        max_classical_bits=bits["max_classical_bits"],
        policy_categories=lists["policy_categories"],
        high_priority_only=priority == "high",
        algorithms=lists["algorithms"],
    )


def _text(data: Mapping[str, Any], key: str, row: str, path: str, required: bool = True) -> str:
    value = data.get(key)
    if value is None and not required:
        return ""
    if not isinstance(value, str) or not value.strip():
        raise _fail(row, f"missing or empty '{key}'", path)
    return " ".join(value.split())


def _milestone(data: Any, row: str, path: str) -> Milestone:
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
        status = _text(data, "status", row, path)
        if status not in STATUSES:
            raise _fail(row, f"'status' must be one of {list(STATUSES)}", path)
        rows = data.get("milestones")
        if not isinstance(rows, list) or not rows:
            raise _fail(row, "needs a non-empty 'milestones' list", path)
        milestones = tuple(
            _milestone(item, f"{row} milestone {number}", path)
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
                status=status,
                milestones=milestones,
                note=_text(data, "note", row, path, required=False),
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
