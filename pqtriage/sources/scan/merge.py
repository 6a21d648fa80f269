"""Fold a scan into an existing inventory document (as loaded by yaml.safe_load).

Semantics (docs/discovery.md):
  - A use is identified by its ``source`` string (``path#block2``, ``host:port#group``).
  - A scanned use whose source is already in the inventory stays where it is (even in a
    system the owner moved it to). Only the facts the scan reads (algorithm, key_size, curve,
    parameter_set, protocol, role, not_before, not_after) are refreshed, and each change is
    reported. ``trust_years`` only grows: the longer of the owner's value and the remaining
    validity of the certificate now found (a renewed certificate lengthens it; an owner's
    longer trust period is never cut). Every other field, notes included, is the owner's
    and is kept.
  - A scanned system matches an existing one by its ``source``; hand-written system fields
    are kept. Fields still listed in ``assumed`` take the scan's defaults.
  - New uses join their matched system; new systems are appended with an id made unique.
  - A use inside the scan's scope (its file under a scanned path, or a probed target) that the
    scan no longer finds is reported as vanished and kept: nothing is dropped silently.
  - Uses outside the scope and uses without a source are left alone.
Merging the same scan twice gives the same document (idempotent).
"""

from __future__ import annotations

import copy
import os
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

from pqtriage.errors import InventoryError
from pqtriage.sources.scan.emit import unique_id

#: Use fields whose values a scan reads from the material itself.
SCANNED_FACTS = (
    "algorithm", "key_size", "curve", "parameter_set", "protocol", "role", "not_before", "not_after",
)  # fmt: skip


@dataclass
class MergeReport:
    """What a merge changed, one line per item."""

    added_systems: list[str] = field(default_factory=list)
    """Ids of systems the scan added."""
    added_uses: list[str] = field(default_factory=list)
    """Sources of uses added to existing systems."""
    updated_uses: list[str] = field(default_factory=list)
    """``source: field old -> new`` for refreshed facts."""
    vanished_uses: list[str] = field(default_factory=list)
    """Sources of uses in scope that the scan no longer found (kept in the inventory)."""
    vanished_systems: list[str] = field(default_factory=list)
    """Ids of systems all of whose in-scope uses vanished (kept in the inventory)."""

    def lines(self) -> list[str]:
        """Summary lines for the terminal."""
        lines = [
            (
                f"merge: {len(self.added_systems)} systems added, {len(self.added_uses)} uses "
                f"added to existing systems, {len(self.updated_uses)} facts updated, "
                f"{len(self.vanished_uses)} uses vanished (kept)"
            )
        ]
        lines += [f"updated: {line}" for line in self.updated_uses]
        lines += [f"vanished (kept, remove by hand if retired): {s}" for s in self.vanished_uses]
        lines += [f"vanished system (kept): {s}" for s in self.vanished_systems]
        return lines


def _systems(document: Any, what: str) -> list[dict[str, Any]]:
    if not isinstance(document, dict):
        raise InventoryError(f"{what} is not a mapping", hint="give an inventory YAML file")
    systems = document.setdefault("systems", [])
    if not isinstance(systems, list) or not all(isinstance(s, dict) for s in systems):
        raise InventoryError(f"{what}: systems must be a list of mappings")
    for system in systems:
        uses = system.setdefault("uses", [])
        if not isinstance(uses, list) or not all(isinstance(u, dict) for u in uses):
            raise InventoryError(f"{what}: uses of system {system.get('id')!r} must be a list")
    return systems


def merge_inventory(
    existing: Any, scanned: dict[str, Any], in_scope: Callable[[str], bool]
) -> tuple[dict[str, Any], MergeReport]:
    """Return the merged document and a report; neither input is modified."""
    result = copy.deepcopy(existing)
    systems = _systems(result, "existing inventory")
    scanned_systems = _systems(copy.deepcopy(scanned), "scan")
    report = MergeReport()
    use_index: dict[str, dict[str, Any]] = {}
    for system in systems:
        for use in system["uses"]:
            if isinstance(use.get("source"), str):
                use_index.setdefault(use["source"], use)
    by_source = {s["source"]: s for s in systems if isinstance(s.get("source"), str)}
    taken_ids = {str(s.get("id")) for s in systems}
    scanned_sources: set[str] = set()
    for new_system in scanned_systems:
        target = by_source.get(new_system.get("source"))
        if target is not None:
            _refresh_assumed(target, new_system)
        for use in new_system["uses"]:
            source = use["source"]
            scanned_sources.add(source)
            old = use_index.get(source)
            if old is not None:
                _refresh_use(old, use, report)
            elif target is not None:
                target["uses"].append(use)
                use_index[source] = use
                report.added_uses.append(source)
        if target is None:
            new_system["id"] = unique_id(str(new_system["id"]), taken_ids)
            new_system["uses"] = [u for u in new_system["uses"] if u["source"] not in use_index]
            for use in new_system["uses"]:
                use_index[use["source"]] = use
            if new_system["uses"]:
                systems.append(new_system)
                report.added_systems.append(new_system["id"])
    for system in systems:
        in_scope_uses = [
            u for u in system["uses"] if isinstance(u.get("source"), str) and in_scope(u["source"])
        ]
        gone = [u["source"] for u in in_scope_uses if u["source"] not in scanned_sources]
        report.vanished_uses.extend(gone)
        if in_scope_uses and len(gone) == len(in_scope_uses):
            report.vanished_systems.append(str(system.get("id")))
    return result, report


def _refresh_assumed(target: dict[str, Any], scanned: dict[str, Any]) -> None:
    assumed = target.get("assumed")
    if not isinstance(assumed, list):
        return
    for name in assumed:
        if name in scanned.get("assumed", []) and name in scanned:
            target[name] = scanned[name]


def _refresh_use(old: dict[str, Any], new: dict[str, Any], report: MergeReport) -> None:
    for name in SCANNED_FACTS:
        if old.get(name) != new.get(name):
            report.updated_uses.append(
                f"{new['source']}: {name} {old.get(name)!r} -> {new.get(name)!r}"
            )
            if name in new:
                old[name] = new[name]
            else:
                old.pop(name, None)
    old_trust, new_trust = old.get("trust_years"), new.get("trust_years")
    if (
        isinstance(new_trust, int | float)
        and isinstance(old_trust, int | float)
        and not isinstance(old_trust, bool)
        and new_trust > old_trust
    ):
        report.updated_uses.append(f"{new['source']}: trust_years {old_trust!r} -> {new_trust!r}")
        old["trust_years"] = new_trust
    for name, value in new.items():
        old.setdefault(name, value)


def path_scope(paths: list[str]) -> Callable[[str], bool]:
    """Scope of a file scan: a source whose file part is a scanned path or below one."""
    roots = [os.path.normpath(p) for p in paths]

    def in_scope(source: str) -> bool:
        file_part = os.path.normpath(source.split("#", 1)[0])
        return any(
            file_part == root or file_part.startswith(root.rstrip(os.sep) + os.sep) or root == "."
            for root in roots
        )

    return in_scope


def target_scope(targets: list[str]) -> Callable[[str], bool]:
    """Scope of a probe: a source whose target part is one of the probed targets."""
    wanted = set(targets)
    return lambda source: source.split("#", 1)[0] in wanted
