"""Write an Inventory as pqtriage YAML: the inverse of pqtriage.sources.yaml_inventory.

Reading the text back gives the same systems and uses (positions aside), which
the property tests check; CBOM import and scans use it to save what they found.
"""

from __future__ import annotations

from typing import Any

import yaml

from pqtriage.model.inventory import IN_USE, CryptoUse, Inventory, System

try:  # the C emitter when PyYAML has it
    from yaml import CSafeDumper as _Dumper
except ImportError:  # pragma: no cover - depends on how PyYAML was built
    from yaml import SafeDumper as _Dumper  # type: ignore[assignment]


def _put(out: dict[str, Any], key: str, value: object) -> None:
    """Set key when the value is not a default (None or an empty tuple)."""
    if value is None or value == ():
        return
    out[key] = list(value) if isinstance(value, tuple) else value


def _enum(value: Any) -> Any:
    return None if value is None else value.value


def _use(use: CryptoUse) -> dict[str, Any]:
    out: dict[str, Any] = {"purpose": use.purpose.value, "algorithm": use.algorithm}
    _put(out, "key_size", use.key_size)
    _put(out, "curve", use.curve)
    _put(out, "parameter_set", use.parameter_set)
    _put(out, "trust_years", use.trust_years)
    _put(out, "signature_role", use.signature_role.value if use.signature_role else None)
    if use.role != "in-use":
        out["role"] = use.role
    _put(out, "protocol", use.protocol)
    _put(out, "protocol_version", use.protocol_version)
    _put(out, "key_storage", _enum(use.key_storage))
    _put(out, "crypto_library", use.crypto_library)
    _put(out, "crypto_module", use.crypto_module)
    _put(out, "fips_140_certificate", use.fips_140_certificate)
    _put(out, "fips_140_level", use.fips_140_level)
    _put(out, "notes", use.notes)
    _put(out, "source", use.source.detail if use.source else None)
    _put(out, "assumed", use.assumed)
    if use.role != IN_USE:
        out["role"] = use.role
    _put(out, "not_before", use.not_before.isoformat() if use.not_before else None)
    _put(out, "not_after", use.not_after.isoformat() if use.not_after else None)
    _put(out, "oid", use.oid)
    return out


def _system(system: System) -> dict[str, Any]:
    out: dict[str, Any] = {"id": system.id}
    if system.name != system.id:
        out["name"] = system.name
    out["shelf_life_years"] = system.shelf_life_years
    out["migration_years"] = system.migration_years
    _put(out, "depends_on", system.depends_on)
    _put(out, "owner", system.owner)
    _put(out, "description", system.description)
    out["exposure"] = system.exposure.value
    out["criticality"] = system.criticality.value
    _put(out, "protocol", system.protocol)
    _put(out, "notes", system.notes)
    _put(out, "policy_category", system.policy_category)
    _put(out, "effort_person_weeks", system.effort_person_weeks)
    _put(out, "vendor_readiness", system.vendor_readiness)
    _put(out, "business_unit", system.business_unit)
    _put(out, "tags", system.tags)
    _put(out, "impact", _enum(system.impact))
    _put(out, "high_value_asset", system.high_value_asset)
    if system.data_classification is not None:
        classification: dict[str, Any] = {"label": system.data_classification.label}
        _put(classification, "rank", system.data_classification.rank)
        out["data_classification"] = classification
    if system.hosting is not None:
        hosting: dict[str, Any] = {"model": system.hosting.model.value}
        _put(hosting, "provider", system.hosting.provider)
        _put(hosting, "country", system.hosting.country)
        out["hosting"] = hosting
    for name in ("vendor", "product", "version", "protocol_version", "crypto_library", "crypto_module",
                 "fips_140_certificate", "fips_140_level"):
        _put(out, name, getattr(system, name))
    _put(out, "key_storage", _enum(system.key_storage))
    if system.frameworks is not None:
        out["frameworks"] = list(system.frameworks)
    if system.extra:
        out["extra"] = dict(system.extra)
    _put(out, "source", system.source.detail if system.source else None)
    _put(out, "assumed", system.assumed)
    out["uses"] = [_use(u) for u in system.uses]
    return out


def inventory_to_yaml(inventory: Inventory) -> str:
    """The inventory as a pqtriage YAML document (version 1), fields in the format's order."""
    document: dict[str, Any] = {"version": inventory.version, "organization": inventory.organization}
    _put(document, "policies", inventory.policies)
    _put(document, "frameworks", inventory.frameworks)
    document["systems"] = [_system(s) for s in inventory.systems]
    # No line folding (width), every character kept (allow_unicode, the emitter escapes what it must).
    return yaml.dump(document, Dumper=_Dumper, sort_keys=False, allow_unicode=True, width=2**31 - 1,
                     default_flow_style=False)
