"""CBOM export: the triaged inventory as CycloneDX 1.6 JSON, with the verdicts as properties.

Mapping (docs/interop.md, "CBOM export"):

- each system is a component of type ``application`` whose bom-ref is the system id; its
  shelf-life, migration time, exposure ... and its verdict, rank and start-by date are
  ``pqtriage:*`` properties (the CBOM import reads the inventory facts back);
- each use is a ``cryptographic-asset`` component (bom-ref ``<system>#use-<n>``, made unique
  against every other bom-ref of the BOM whatever the ids: :class:`_Refs`): an
  ``algorithm`` with ``classicalSecurityLevel`` (NIST SP 800-57 Part 1 Rev. 5 Table 2 strength
  from the catalog) and ``nistQuantumSecurityLevel`` (the NIST PQC security category; 0 for an
  algorithm Shor's algorithm breaks, as CycloneDX defines 0 as "none of the categories met"),
  or, for a TLS cipher suite, a ``protocol`` whose suite refers to one algorithm per part;
- ``dependencies``: system -> its uses and the systems it depends on; suite -> its parts.
- every fact that decides a use's verdict is written twice: in the standard fields where
  CycloneDX has one (name, oid, parameterSetIdentifier, curve, primitive) and exactly, as
  ``pqtriage:<field>`` properties (algorithm as written, key_size, curve, parameter_set, purpose,
  trust_years, not_before, not_after, role, protocol, notes), which the CBOM import reads back
  first. So a hash inside a composite name (the SHA-1 of ``ssh-rsa``), a hybrid, a size, a
  validity or an offered role survive the round trip.

Same inputs give the same bytes: the serial number is a UUID 5 of the inventory's SHA-256,
the as-of date and the profile, and the only timestamp is the as-of date.
"""

from __future__ import annotations

import hashlib
import json
import uuid
from typing import Any

from pqtriage import __version__
from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.formats.interface import ResultFormat
from pqtriage.formats.labels import flags_text
from pqtriage.formats.notes import classical_text, fact_text
from pqtriage.model.inventory import IN_USE, CryptoUse, System
from pqtriage.model.verdict import SystemAssessment, TriageResult, UseAssessment
from pqtriage.sources.cbom_fields import (
    certification_level,
    key_asset,
    system_component_fields,
    system_properties,
    use_properties,
)

SPEC_VERSION = "1.6"
SCHEMA_URL = "http://cyclonedx.org/schema/bom-1.6.schema.json"
"""The $schema value the CycloneDX 1.6 specification's examples use."""
PREFIX = "pqtriage:"

PRIMITIVE: dict[str, str] = {
    "aead": "ae", "block-cipher": "block-cipher", "stream-cipher": "stream-cipher", "hash": "hash",
    "kem": "kem", "key-agreement": "key-agree", "mac": "mac", "public-key-encryption": "pke",
    "signature": "signature", "xof": "xof", "kdf": "kdf",
}
"""Catalog primitive -> CycloneDX 1.6 algorithmProperties.primitive (anything else: other)."""

_PROTOCOL_TYPE = {"tls": "tls", "ssh": "ssh", "ipsec": "ipsec", "ike": "ike"}


def _text(value: object) -> str:
    if isinstance(value, float):
        return f"{value:g}"
    return str(value)


def _properties(pairs: list[tuple[str, object]]) -> list[dict[str, str]]:
    return [{"name": PREFIX + name, "value": _text(value)} for name, value in pairs
            if value is not None and value != "" and value != ()]


def _exact(pairs: list[tuple[str, object]]) -> list[dict[str, str]]:
    """Facts written even when empty where the import would otherwise read a standard field
    (an empty ``pqtriage:key_size`` says "no key size", not "take parameterSetIdentifier")."""
    always = ("key_size", "curve", "parameter_set")
    return [{"name": PREFIX + name, "value": "" if value is None else _text(value)} for name, value in pairs
            if name in always or (value is not None and value != "")]


def _levels(spec: AlgorithmSpec | None) -> dict[str, Any]:
    if spec is None:
        return {"primitive": "unknown"}
    out: dict[str, Any] = {"primitive": PRIMITIVE.get(spec.primitive, "other")}
    if spec.classical_bits is not None:
        out["classicalSecurityLevel"] = spec.classical_bits
    if spec.nist_category is not None:
        out["nistQuantumSecurityLevel"] = spec.nist_category
    elif spec.quantum_attack == "shor":
        out["nistQuantumSecurityLevel"] = 0
    return out


def _algorithm_asset(ref: str, spec: AlgorithmSpec | None, name: str, parameter: str | None,
                     curve: str | None, properties: list[dict[str, str]], oid: str | None = None,
                     certification: list[str] | None = None) -> dict[str, Any]:
    algorithm = _levels(spec)
    if parameter:
        algorithm["parameterSetIdentifier"] = parameter
    if curve:
        algorithm["curve"] = curve
    if certification:
        algorithm["certificationLevel"] = certification
    crypto: dict[str, Any] = {"assetType": "algorithm", "algorithmProperties": algorithm}
    oid = oid or (spec.identifiers.get("oid") if spec is not None else None)
    if oid:
        crypto["oid"] = oid
    component: dict[str, Any] = {"type": "cryptographic-asset", "bom-ref": ref, "name": name,
                                 "cryptoProperties": crypto}
    if properties:
        component["properties"] = properties
    return component


class _Refs:
    """bom-refs unique in the whole BOM: system ids first, then each use and part ref, with a
    ``~<k>`` suffix when the natural ref is taken (system ``a`` use 1 and a system ``a#use-1``)."""

    def __init__(self, reserved: set[str]):
        self.taken = set(reserved)

    def claim(self, wanted: str) -> str:
        ref, k = wanted, 1
        while ref in self.taken:
            k += 1
            ref = f"{wanted}~{k}"
        self.taken.add(ref)
        return ref


def _use_facts(use: CryptoUse) -> list[tuple[str, object]]:
    """The use's own facts, exactly (read back first by the CBOM import)."""
    return [
        ("algorithm", use.algorithm), ("purpose", use.purpose.value),
        ("key_size", use.key_size), ("curve", use.curve), ("parameter_set", use.parameter_set),
        ("trust_years", use.trust_years),
        ("not_before", use.not_before.isoformat() if use.not_before else None),
        ("not_after", use.not_after.isoformat() if use.not_after else None),
        ("role", use.role if use.role != IN_USE else None),
        ("signature_role", use.signature_role.value if use.signature_role else None),
        ("protocol", use.protocol), ("notes", use.notes),
    ]


def _use_properties(system: System, item: UseAssessment) -> list[dict[str, str]]:
    spec = item.deciding or item.spec
    facts = _use_facts(item.use)
    return _properties([("system", system.id), *facts[:2]]) + _exact(facts[2:]) + _properties([
        ("verdict", item.verdict.value), ("reason", item.reason),
        ("exposure_probability", None if item.exposure_probability is None else round(item.exposure_probability, 4)),
        ("start_by", item.start_by.isoformat() if item.start_by else None),
        ("replacement", item.replacement),
        ("classical_status", item.classical.status if item.classical else None),
        ("classical_status_text", classical_text(item.classical) if item.classical else None),
        ("quantum_attack", spec.quantum_attack if spec else None),
        ("deciding_component", item.deciding.name if item.deciding else None),
        ("assumed", ",".join(item.use.assumed)),
        ("flags", flags_text(item.flags)),
        ("conflicts", "; ".join(c.describe(item.use.algorithm) for c in item.conflicts)),
        ("facts", "; ".join(fact_text(f) for f in item.facts)),
        *use_properties(item.use),
    ])


def _use_components(system: System, item: UseAssessment, ref: str,
                    refs_of: _Refs) -> tuple[list[dict[str, Any]], list[str]]:
    use, spec = item.use, item.spec
    parameter = use.parameter_set or (str(use.key_size) if use.key_size else None)
    properties = _use_properties(system, item)
    certification = certification_level(use, system)
    if spec is None or spec.primitive != "cipher-suite" or not spec.components:
        name = spec.name if spec else use.algorithm
        if use.key_storage is None:
            return [_algorithm_asset(ref, spec, name, parameter, use.curve, properties, use.oid, certification)], []
        # Where the key is kept is a key's securedBy: the key asset carries the use, its
        # algorithmRef the algorithm; both carry the use's facts (the import reads the algorithm's).
        algorithm_ref = f"{ref}.alg"
        inner = properties
        key = key_asset(ref, algorithm_ref, use, name)
        key["properties"] = properties
        return [key, _algorithm_asset(algorithm_ref, spec, name, parameter, use.curve, inner, use.oid, certification)], []
    parts, refs = [], []
    for index, component in enumerate(spec.components, start=1):
        part_ref = refs_of.claim(f"{ref}.{index}")
        part = component.spec
        curve = use.curve if part.shor_problem == "elliptic-curve-dlog" else None
        size = str(use.key_size) if use.key_size and part.shor_problem in ("factoring", "finite-field-dlog") else None
        parts.append(_algorithm_asset(part_ref, part, part.name, size, curve, _properties(
            [("purpose", component.purpose)])))
        refs.append(part_ref)
    label = (use.protocol or "").split()
    protocol: dict[str, Any] = {"type": _PROTOCOL_TYPE.get(label[0].lower(), "other") if label else (
        "tls" if spec.name.startswith("TLS_") else "other")}
    if use.protocol_version:
        protocol["version"] = use.protocol_version
    elif len(label) > 1:
        protocol["version"] = label[1]
    protocol["cipherSuites"] = [{"name": spec.name, "algorithms": refs}]
    suite = {"type": "cryptographic-asset", "bom-ref": ref, "name": use.protocol or spec.name,
             "cryptoProperties": {"assetType": "protocol", "protocolProperties": protocol},
             "properties": properties}
    return [suite, *parts], refs


def _system_component(item: SystemAssessment) -> dict[str, Any]:
    system = item.system
    component: dict[str, Any] = {"type": "application", "bom-ref": system.id, "name": system.name}
    component.update(system_component_fields(system))
    if system.description:
        component["description"] = system.description
    component["properties"] = _properties([
        ("verdict", item.verdict.value), ("rank", item.rank), ("reason", item.reason),
        ("rank_reason", item.rank_reason),
        ("priority_points", item.priority.points if item.priority else None),
        ("flags", flags_text(item.flags)),
        ("exposure_probability", None if item.exposure_probability is None else round(item.exposure_probability, 4)),
        ("margin_years", None if item.margin_years is None else round(item.margin_years, 2)),
        ("start_by", item.start_by.isoformat() if item.start_by else None),
        ("shelf_life_years", system.shelf_life_years), ("migration_years", system.migration_years),
        ("exposure", system.exposure.value), ("criticality", system.criticality.value),
        ("owner", system.owner), ("policy_category", system.policy_category),
        ("vendor_readiness", system.vendor_readiness), ("effort_person_weeks", system.effort_person_weeks),
        ("notes", system.notes), ("assumed", ",".join(system.assumed)),
        # The import appends a component's version to its name: the exact name, when it has one.
        ("name", system.name if system.version else None),
        *system_properties(system),
    ])
    return component


def cbom_dict(result: TriageResult) -> dict[str, Any]:
    """The CycloneDX 1.6 BOM as a JSON-ready dict."""
    components: list[dict[str, Any]] = []
    dependencies: list[dict[str, Any]] = []
    ids = {item.system.id for item in result.items}
    refs = _Refs(ids)
    for item in sorted(result.items, key=lambda i: i.rank):
        components.append(_system_component(item))
        use_refs: list[str] = []
        part_edges: list[dict[str, Any]] = []
        for index, use in enumerate(item.uses, start=1):
            ref = refs.claim(f"{item.system.id}#use-{index}")
            made, parts = _use_components(item.system, use, ref, refs)
            components += made
            use_refs.append(ref)
            if parts:
                part_edges.append({"ref": ref, "dependsOn": parts})
        depends = use_refs + [d for d in item.system.depends_on if d in ids]
        dependencies.append({"ref": item.system.id, "dependsOn": depends})
        dependencies += part_edges
    summary = result.summary
    metadata = {
        "timestamp": f"{result.as_of.isoformat()}T00:00:00Z",
        "tools": {"components": [{"type": "application", "name": "pqtriage", "version": __version__}]},
        "properties": _properties([
            ("organization", result.inventory.organization), ("as_of", result.as_of.isoformat()),
            ("profile", result.profile.name), ("risk_tolerance", result.profile.risk_tolerance),
            ("inventory_sha256", result.inventory.source_sha256),
            ("view", result.selection.describe() if result.selection else None),
        ] + [(f"count:{verdict.value}", n) for verdict, n in summary.counts.items()]),
    }
    body: dict[str, Any] = {"$schema": SCHEMA_URL, "bomFormat": "CycloneDX", "specVersion": SPEC_VERSION,
                            "serialNumber": "", "version": 1, "metadata": metadata,
                            "components": components, "dependencies": dependencies}
    seed = result.inventory.source_sha256 or hashlib.sha256(
        json.dumps(body, sort_keys=True).encode("utf-8")).hexdigest()
    name = f"pqtriage:{seed}:{result.as_of.isoformat()}:{result.profile.name}:{__version__}"
    body["serialNumber"] = f"urn:uuid:{uuid.uuid5(uuid.NAMESPACE_URL, name)}"
    return body


class CbomFormat(ResultFormat):
    """CycloneDX 1.6 JSON with cryptographic assets, security levels and verdicts."""

    name = "cbom"

    def render(self, result: TriageResult) -> str:
        return json.dumps(cbom_dict(result), indent=2, ensure_ascii=False) + "\n"
