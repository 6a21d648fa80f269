"""CycloneDX 1.6 JSON BOMs (1.7 tolerated) as inventories: the CBOM import.

Recognised by content: a JSON object whose ``bomFormat`` is ``CycloneDX``.

Grouping rule (docs/interop.md, "CBOM import"):

- A *system* is a non-crypto component (application, library, device, service, the BOM's
  ``metadata.component`` ...) that depends on at least one cryptographic asset, through
  ``dependencies[].dependsOn`` or by nesting the asset in its ``components``, or that carries
  a ``pqtriage:shelf_life_years`` property (written by ``--format cbom``). Its id is its bom-ref.
- Each asset a system depends on directly is a *carrier*; it becomes one or more uses
  (:mod:`pqtriage.sources.cbom_assets`). Assets a carrier refers to (a protocol's algorithms,
  a certificate's key) are parts of that carrier's uses, not uses of their own.
- An asset no system reaches goes to the component that ``provides`` it, else to the BOM's
  ``metadata.component``, else it becomes a system of its own (one per such asset, with the
  assets it refers to).
- ``dependsOn`` between two systems (directly, or through components that are not systems)
  becomes ``depends_on``. A cycle is broken with a warning.
- Shelf-life, migration time, exposure ... come from :mod:`pqtriage.sources.cbom_side`.
"""

from __future__ import annotations

import math
import re
from collections import deque
from dataclasses import replace
from typing import Any

from pqtriage import jsonio
from pqtriage.errors import InventoryError, Place, quoted
from pqtriage.model.inventory import Criticality, CryptoUse, Exposure, Inventory, SourceRef, System
from pqtriage.sources.cbom_assets import (
    Positions,
    UseBuilder,
    mapping_of,
    properties_of,
    refs_of,
    text_of,
)
from pqtriage.sources.cbom_fields import apply_system_fields, use_fields
from pqtriage.sources.cbom_side import (
    BUILTIN_DEFAULTS,
    SIDE_SYSTEM_FIELDS,
    CbomSideFile,
)
from pqtriage.sources.interface import InventorySource
from pqtriage.sources.schema import FieldSpec
from pqtriage.sources.yaml_inventory import find_cycle

SUPPORTED_VERSIONS = ("1.6", "1.7")
"""specVersion values read without a warning (cryptographic assets exist since 1.6)."""
PROPERTY_PREFIX = "pqtriage:"
"""Namespace of the CycloneDX properties pqtriage reads and writes."""
_BOM_FORMAT = re.compile(r'"bomFormat"\s*:\s*"CycloneDX"')
_REF_FIELDS = (("certificateProperties", ("signatureAlgorithmRef", "subjectPublicKeyRef")),
               ("relatedCryptoMaterialProperties", ("algorithmRef",)))


def load_json(text: str, path: str) -> Any:
    """Parse JSON strictly; errors name file:line:column (duplicate keys and NaN refused, depth
    bounded): :func:`pqtriage.jsonio.load_json` with inventory errors."""
    return jsonio.load_json(text, path, InventoryError)


def asset_parts(component: dict[str, Any]) -> list[str]:
    """bom-refs an asset's cryptoProperties refer to (its algorithms, keys, suites)."""
    crypto = component.get("cryptoProperties")
    if not isinstance(crypto, dict):
        return []
    found: list[str] = []
    for section, keys in _REF_FIELDS:
        props = crypto.get(section)
        if isinstance(props, dict):
            found += [props[k] for k in keys if isinstance(props.get(k), str)]
    protocol = crypto.get("protocolProperties")
    if isinstance(protocol, dict):
        suites = protocol.get("cipherSuites")
        for suite in suites if isinstance(suites, list) else []:
            found += refs_of(mapping_of(suite).get("algorithms"))
        for refs in mapping_of(protocol.get("ikev2TransformTypes")).values():
            found += refs_of(refs)
        found += refs_of(protocol.get("cryptoRefArray"))
    for section in ("certificateProperties", "relatedCryptoMaterialProperties", "protocolProperties"):
        props = crypto.get(section)
        related = props.get("relatedCryptographicAssets") if isinstance(props, dict) else None  # CycloneDX 1.7
        for item in related if isinstance(related, list) else []:
            if isinstance(mapping_of(item).get("ref"), str):
                found.append(item["ref"])
    return found


class _BomReader:
    """Reads one BOM; keeps document order so the same file gives the same inventory."""

    def __init__(self, path: str, side: CbomSideFile):
        self.path = path
        self.side = side
        self.warnings: list[str] = []
        self.nodes: dict[str, dict[str, Any]] = {}
        self.crypto: dict[str, dict[str, Any]] = {}
        self.nested: dict[str, list[str]] = {}
        self.edges: dict[str, list[str]] = {}
        self.provides: dict[str, list[str]] = {}
        self.subject: str | None = None
        self.positions = Positions("")
        self.located = jsonio.JsonPositions("")
        self._parts: dict[str, list[str]] = {}

    def fail(self, where: str, message: str, ref: str | None = None, hint: str | None = None,
             at: str | None = None) -> InventoryError:
        # The value the JSON path names (or ``at``), found in the text; else the nearest bom-ref.
        line, column = self.located.at(at or where)
        if line is None:
            line, column = self.positions.of(ref)
        return InventoryError(f"{where}: {message}", place=Place(self.path, line, column), hint=hint)

    def inventory(self, text: str, sha256: str | None) -> Inventory:
        self.positions = Positions(text)
        self.located = jsonio.JsonPositions(text)
        doc = load_json(text, self.path)
        if not isinstance(doc, dict) or doc.get("bomFormat") != "CycloneDX":
            raise InventoryError("not a CycloneDX BOM: the top level has no \"bomFormat\": \"CycloneDX\"",
                                 place=Place(self.path, 1, 1))
        version = doc.get("specVersion")
        if not isinstance(version, str):
            raise InventoryError("the BOM has no specVersion", place=Place(self.path, 1, 1),
                                 hint='add "specVersion": "1.6"')
        if version in ("1.0", "1.1", "1.2", "1.3", "1.4", "1.5"):
            raise InventoryError(f"CycloneDX {version} cannot describe cryptographic assets",
                                 place=Place(self.path), hint="export the BOM as CycloneDX 1.6 with its CBOM part")
        if version not in SUPPORTED_VERSIONS:
            self.warnings.append(f"{self.path}: CycloneDX {version[:20]} is newer than pqtriage knows;"
                                 " read as 1.6")
        metadata = mapping_of(doc.get("metadata"))
        if isinstance(metadata.get("component"), dict):
            self.subject = self._collect(metadata["component"], "metadata.component", None, None)
        for key in ("components", "services"):
            self._collect_list(doc.get(key), key, None)
        self._dependencies(doc.get("dependencies"))
        if not self.crypto:
            raise InventoryError("the BOM lists no cryptographic assets", place=Place(self.path),
                                 hint="components of type cryptographic-asset are the CBOM part of CycloneDX 1.6")
        systems = self._systems()
        return Inventory(
            organization=self.side.organization or self._organization(metadata),
            systems=tuple(systems), version=1, source_path=self.path, source_sha256=sha256,
            policies=self.side.policies, warnings=tuple(self.warnings),
            extra={"format": "CycloneDX", "specVersion": version, "serialNumber": doc.get("serialNumber"),
                   "bomVersion": doc.get("version")},
        )

    def _collect_list(self, value: object, where: str, parent: str | None) -> None:
        if value is None:
            return
        if not isinstance(value, list):
            raise self.fail(where, "must be a list", parent)
        for index, item in enumerate(value):
            self._collect(item, where, index, parent)

    def _collect(self, component: object, where: str, index: int | None, parent: str | None) -> str:
        def label() -> str:  # built only when needed: most components have a bom-ref and no children
            return where if index is None else f"{where}[{index}]"

        if not isinstance(component, dict):
            raise self.fail(label(), "must be a JSON object", parent)
        ref = component.get("bom-ref")
        if ref is not None and not text_of(ref):
            raise self.fail(label(), "bom-ref must be non-empty text", parent)
        ref = ref or label()
        if ref in self.nodes or ref in self.crypto:
            first, _ = self.positions.of(ref)
            raise self.fail(label(), f"duplicate bom-ref {quoted(ref, 80)} (first at line {first})", ref,
                            "bom-refs must be unique in a BOM", at=f"{label()}.bom-ref")
        is_crypto = component.get("type") == "cryptographic-asset" or "cryptoProperties" in component
        (self.crypto if is_crypto else self.nodes)[ref] = component
        if is_crypto and not isinstance(component.get("cryptoProperties"), dict):
            self.warnings.append(f"{self.path}: {label()} is a cryptographic asset without cryptoProperties;"
                                 " read as an algorithm named by its name")
        if parent is not None:
            self.nested.setdefault(parent, []).append(ref)
        if "components" in component:
            self._collect_list(component["components"], f"{label()}.components", ref)
        if "services" in component:
            self._collect_list(component["services"], f"{label()}.services", ref)
        return ref

    def _dependencies(self, value: object) -> None:
        if value is None:
            return
        if not isinstance(value, list):
            raise self.fail("dependencies", "must be a list")
        for index, entry in enumerate(value):
            if not isinstance(entry, dict) or not text_of(entry.get("ref")):
                raise self.fail(f"dependencies[{index}]", "must be an object with a 'ref'")
            for key, target in (("dependsOn", self.edges), ("provides", self.provides)):
                if key not in entry:
                    continue
                if not isinstance(entry[key], list):
                    raise self.fail(f"dependencies[{index}].{key}", "must be a list of bom-refs")
                target.setdefault(entry["ref"], []).extend(refs_of(entry[key]))

    def _closure(self, start: list[str]) -> set[str]:
        """Crypto assets reached from these through refs and dependsOn between crypto assets."""
        seen: set[str] = set()
        queue = deque(r for r in start if r in self.crypto)
        while queue:
            ref = queue.popleft()
            if ref in seen:
                continue
            seen.add(ref)
            parts = self._parts.get(ref)
            if parts is None:
                parts = self._parts[ref] = asset_parts(self.crypto[ref])
            for nxt in (parts, self.edges.get(ref, ()), self.nested.get(ref, ())):
                queue.extend(r for r in nxt if r in self.crypto and r not in seen)
        return seen

    def _carriers(self) -> tuple[dict[str, list[str]], list[str]]:
        carriers: dict[str, list[str]] = {}
        for ref in self.nodes:
            direct = [r for r in self.edges.get(ref, []) + self.nested.get(ref, []) if r in self.crypto]
            if direct:
                carriers[ref] = list(dict.fromkeys(direct))
        covered = self._closure([r for refs in carriers.values() for r in refs])
        loose = [r for r in self.crypto if r not in covered]
        inner: set[str] = set()
        for ref in loose:
            inner |= self._closure([ref]) - {ref}
        roots = [r for r in loose if r not in inner]
        reached = self._closure(roots)
        for ref in loose:  # assets only reachable through a cycle of references
            if ref not in reached:
                roots.append(ref)
                reached |= self._closure([ref])
        orphans: list[str] = []
        for ref in roots:
            provider = next((n for n in self.nodes if ref in self.provides.get(n, [])), None)
            owner = provider or self.subject
            if owner is not None:
                carriers.setdefault(owner, []).append(ref)
            else:
                orphans.append(ref)
        return carriers, orphans

    def _systems(self) -> list[System]:
        carriers, orphans = self._carriers()
        children = {r: tuple(self.edges.get(r, []) + self.nested.get(r, [])) for r in self.crypto}
        builder = UseBuilder(self.path, self.crypto, self.positions, children)
        # A component pqtriage exported as a system stays one even when it lists no use yet.
        ordered = [r for r in self.nodes if r in carriers
                   or PROPERTY_PREFIX + "shelf_life_years" in properties_of(self.nodes[r])]
        depends = self._system_edges(ordered)
        systems = []
        for ref in ordered:
            uses = [self._use_fields(u, c) for c in carriers.get(ref, []) for u in builder.uses_of(c)]
            systems.append(self._system(ref, self.nodes[ref], uses, depends.get(ref, ())))
        for ref in orphans:
            uses = [self._use_fields(u, ref) for u in builder.uses_of(ref)]
            systems.append(self._system(ref, self.crypto[ref], uses, ()))
        self.warnings.extend(builder.warnings)
        assumed = [s.id for s in systems if {"shelf_life_years", "migration_years"} & set(s.assumed)]
        if assumed:
            self.warnings.append(
                f"{self.path}: {len(assumed)} of {len(systems)} systems use assumed shelf-life or migration"
                " time (the BOM cannot carry them); give real values in a CBOM side file")
        return systems

    def _system_edges(self, ordered: list[str]) -> dict[str, tuple[str, ...]]:
        systems = set(ordered)
        graph: dict[str, tuple[str, ...]] = {}
        for ref in ordered:
            found: list[str] = []
            seen = {ref}
            queue = deque(self.edges.get(ref, []))
            while queue:
                target = queue.popleft()
                if target in seen or target not in self.nodes:
                    continue
                seen.add(target)
                if target in systems:
                    found.append(target)
                else:  # a component without cryptography: look through it
                    queue.extend(self.edges.get(target, []))
            graph[ref] = tuple(found)
        while (cycle := find_cycle(graph)) is not None:
            last, first = cycle[-1], cycle[0]
            graph[last] = tuple(d for d in graph[last] if d != first)
            self.warnings.append(f"{self.path}: dependency cycle {' -> '.join(cycle + [first])};"
                                 f" dropped '{last}' depends on '{first}'")
        return graph

    def _use_fields(self, use: CryptoUse, carrier: str) -> CryptoUse:
        """The guidance fields of a use (docs/interop.md; pqtriage.sources.cbom_fields)."""
        changes = use_fields(self.crypto.get(carrier, {}), self.crypto)
        return replace(use, **changes) if changes else use

    def _system(self, ref: str, component: dict[str, Any], uses: list[CryptoUse],
                depends: tuple[str, ...]) -> System:
        name = text_of(component.get("name")) or ref
        if text_of(component.get("version")):
            name = f"{name} {component['version']}"
        values, assumed = self._values(ref, text_of(component.get("name")) or ref, component)
        line, column = self.positions.of(ref if "bom-ref" in component else None)
        system = System(
            id=ref, name=values.get("name", name), shelf_life_years=float(values["shelf_life_years"]),
            migration_years=float(values["migration_years"]), uses=tuple(uses), depends_on=depends,
            owner=values.get("owner"),
            description=values.get("description") or text_of(component.get("description")),
            exposure=Exposure(values.get("exposure", Exposure.INTERNAL.value)),
            criticality=Criticality(values.get("criticality", Criticality.MEDIUM.value)),
            notes=values.get("notes"), policy_category=values.get("policy_category"),
            effort_person_weeks=values.get("effort_person_weeks"),
            vendor_readiness=values.get("vendor_readiness"),
            source=SourceRef(self.path, line, column, f"bom-ref {ref}"), assumed=tuple(assumed),
        )
        side = self.side.for_system(ref, text_of(component.get("name")) or ref) or {}
        return apply_system_fields(system, component, side, self.warnings)

    def _values(self, ref: str, name: str, component: dict[str, Any]) -> tuple[dict[str, Any], list[str]]:
        side = self.side.for_system(ref, name) or {}
        own = {k[len(PROPERTY_PREFIX):]: v for k, v in properties_of(component).items()
               if k.startswith(PROPERTY_PREFIX)}
        flagged = {f.strip() for f in own.get("assumed", "").split(",") if f.strip()}
        values: dict[str, Any] = {}
        assumed: list[str] = []
        for spec in SIDE_SYSTEM_FIELDS:
            key = spec.name
            if key in side:
                values[key] = side[key]
            elif key in own and (value := self._property(spec, own[key])) is not None:
                values[key] = value
                if key in flagged:
                    assumed.append(key)
            elif key in self.side.defaults:
                values[key] = self.side.defaults[key]
                if key in BUILTIN_DEFAULTS:
                    assumed.append(key)
            elif key in BUILTIN_DEFAULTS:
                values[key] = BUILTIN_DEFAULTS[key]
                assumed.append(key)
        return values, assumed

    @staticmethod
    def _property(spec: FieldSpec, text: str) -> Any:
        if spec.kind == "number":
            try:
                number = float(text)
            except ValueError:
                return None
            ok = math.isfinite(number) and not spec.below_minimum(number) and (
                spec.maximum is None or number <= spec.maximum)
            return number if ok else None
        if spec.kind == "enum":
            return text if text in spec.choices else None
        return text if text.strip() else None

    def _organization(self, metadata: dict[str, Any]) -> str:
        props = properties_of(metadata)
        for candidate in (props.get(PROPERTY_PREFIX + "organization"),
                          mapping_of(metadata.get("manufacturer")).get("name"),
                          mapping_of(metadata.get("supplier")).get("name"),
                          mapping_of(metadata.get("component")).get("name")):
            if text_of(candidate):
                return str(candidate)
        return "(organisation not named in the BOM)"


class CycloneDxSource(InventorySource):
    """CycloneDX 1.6 JSON BOMs with cryptographic assets (1.7 tolerated)."""

    name = "CycloneDX JSON BOM"

    def __init__(self, side_file: CbomSideFile | None = None):
        self.side_file = side_file or CbomSideFile()

    def accepts(self, text: str) -> bool:
        return text.lstrip().startswith("{") and _BOM_FORMAT.search(text) is not None

    def parse(self, text: str, path: str, sha256: str | None = None) -> Inventory:
        return _BomReader(path, self.side_file).inventory(text, sha256)
