"""The inventory fields official guidance asks for, to and from CycloneDX 1.6 (ECMA-424).

Both directions live here so the export and the import cannot drift apart:

- a system's ``version`` is the component's ``version``, its ``vendor`` the component's
  ``manufacturer.name``, its ``tags`` the component's ``tags``; every other field is a
  ``pqtriage:<field>`` property (``pqtriage:hosting.model``, ``pqtriage:extra.<key>`` ...);
- a use's FIPS 140 level is the algorithm's ``algorithmProperties.certificationLevel`` (CycloneDX
  spells the levels ``fips140-3-l2`` as pqtriage does); where its key is kept is the
  ``securedBy.mechanism`` of a ``related-crypto-material`` key asset whose ``algorithmRef`` is the
  algorithm (HSM, TPM, Software, KMS; the CycloneDX 1.6 examples' spellings); a protocol's version
  is ``protocolProperties.version``; the use's library, module and certificate are properties.

Values that do not validate on import are left out with a warning, never guessed.
"""

from __future__ import annotations

import re
from dataclasses import replace
from typing import Any

from pqtriage.model.inventory import (
    CryptoUse,
    DataClassification,
    Hosting,
    HostingModel,
    Impact,
    KeyStorage,
    System,
)
from pqtriage.sources.schema import (
    COUNTRY,
    EXTRA_KEY,
    FIPS_140_LEVELS,
    IDENTIFIER,
    MAX_SENSITIVITY_RANK,
)

PREFIX = "pqtriage:"
MECHANISM: dict[KeyStorage, str] = {
    KeyStorage.HSM: "HSM", KeyStorage.TPM: "TPM", KeyStorage.SOFTWARE: "Software",
    KeyStorage.CLOUD_KMS: "KMS", KeyStorage.UNKNOWN: "Unknown",
}
"""key_storage -> securedBy.mechanism (CycloneDX 1.6 gives HSM, TPM, SGX, Software, None as examples)."""
_MECHANISM_BACK = {"hsm": KeyStorage.HSM, "tpm": KeyStorage.TPM, "software": KeyStorage.SOFTWARE,
                   "kms": KeyStorage.CLOUD_KMS, "cloud-kms": KeyStorage.CLOUD_KMS, "unknown": KeyStorage.UNKNOWN}
_TEXT_FIELDS = ("business_unit", "product", "protocol", "protocol_version", "crypto_library", "crypto_module",
                "fips_140_certificate")
_USE_TEXT_FIELDS = ("crypto_library", "crypto_module", "fips_140_certificate", "protocol_version")


def _enum(value: Any) -> Any:
    return None if value is None else getattr(value, "value", value)


def system_properties(system: System) -> list[tuple[str, object]]:
    """(field, value) pairs a system carries as ``pqtriage:`` properties (None values dropped later)."""
    pairs: list[tuple[str, object]] = [(name, getattr(system, name)) for name in _TEXT_FIELDS]
    pairs += [("impact", _enum(system.impact)), ("key_storage", _enum(system.key_storage)),
              ("fips_140_level", system.fips_140_level)]
    if system.high_value_asset is not None:
        pairs.append(("high_value_asset", "true" if system.high_value_asset else "false"))
    if system.data_classification is not None:
        pairs += [("data_classification.label", system.data_classification.label),
                  ("data_classification.rank", system.data_classification.rank)]
    if system.hosting is not None:
        pairs += [("hosting.model", system.hosting.model.value), ("hosting.provider", system.hosting.provider),
                  ("hosting.country", system.hosting.country)]
    if system.frameworks is not None:
        pairs.append(("frameworks", ",".join(system.frameworks) or "-"))
    pairs += [(f"extra.{key}", value if not isinstance(value, bool) else str(value).lower())
              for key, value in system.extra]
    return pairs


def system_component_fields(system: System) -> dict[str, Any]:
    """Component members (version, manufacturer, tags) a system fills."""
    out: dict[str, Any] = {}
    if system.version:
        out["version"] = system.version
    if system.vendor:
        out["manufacturer"] = {"name": system.vendor}
    if system.tags:
        out["tags"] = list(system.tags)
    return out


def use_properties(use: CryptoUse) -> list[tuple[str, object]]:
    """(field, value) pairs a use carries as properties on its asset."""
    return [(name, getattr(use, name)) for name in _USE_TEXT_FIELDS] + [
        ("key_storage", _enum(use.key_storage)), ("fips_140_level", use.fips_140_level)]


def certification_level(use: CryptoUse, system: System) -> list[str] | None:
    """algorithmProperties.certificationLevel for a use (its own level, else its system's)."""
    level = use.fips_140_level or system.fips_140_level
    return [level] if level else None


def key_asset(ref: str, algorithm_ref: str, use: CryptoUse, name: str) -> dict[str, Any]:
    """The related-crypto-material key asset whose securedBy says where the use's key is kept."""
    assert use.key_storage is not None
    material: dict[str, Any] = {"type": "key", "algorithmRef": algorithm_ref,
                                "securedBy": {"mechanism": MECHANISM[use.key_storage], "algorithmRef": algorithm_ref}}
    if use.key_size:
        material["size"] = use.key_size
    return {"type": "cryptographic-asset", "bom-ref": ref, "name": f"key of {name}",
            "cryptoProperties": {"assetType": "related-crypto-material",
                                 "relatedCryptoMaterialProperties": material}}


# -- import --------------------------------------------------------------------------------
def _props(component: dict[str, Any]) -> dict[str, str]:
    out: dict[str, str] = {}
    items = component.get("properties")
    for item in items if isinstance(items, list) else []:
        if isinstance(item, dict) and isinstance(item.get("name"), str) and isinstance(item.get("value"), str):
            if item["name"].startswith(PREFIX):
                out.setdefault(item["name"][len(PREFIX):], item["value"])
    return out


def system_fields(component: dict[str, Any], side: dict[str, Any], where: str,
                  warnings: list[str]) -> dict[str, Any]:
    """Keyword changes for the System read from a component (the side file's values first)."""
    own = _props(component)
    changes: dict[str, Any] = {}

    def text(name: str) -> str | None:
        value = own.get(name)
        return value if value is not None and value.strip() else None

    def bad(name: str, value: str) -> None:
        warnings.append(f"{where}: pqtriage:{name} {value[:60]!r} is not a valid value; left out")

    for name in _TEXT_FIELDS:
        if text(name):
            changes[name] = text(name)
    if changes.get("fips_140_certificate") and not re.match(r"^#?[0-9]{1,6}$", changes["fips_140_certificate"]):
        bad("fips_140_certificate", changes.pop("fips_140_certificate"))
    if isinstance(component.get("version"), str) and component["version"].strip():
        changes["version"] = component["version"]
    manufacturer = component.get("manufacturer")
    if isinstance(manufacturer, dict) and isinstance(manufacturer.get("name"), str) and manufacturer["name"].strip():
        changes["vendor"] = manufacturer["name"]
    tags = component.get("tags")
    if isinstance(tags, list):
        changes["tags"] = tuple(t for t in tags if isinstance(t, str) and t.strip())
    for name, enum in (("impact", Impact), ("key_storage", KeyStorage)):
        value = text(name)
        if value is not None:
            try:
                changes[name] = enum(value)
            except ValueError:
                bad(name, value)
    level = text("fips_140_level")
    if level is not None:
        if level in FIPS_140_LEVELS:
            changes["fips_140_level"] = level
        else:
            bad("fips_140_level", level)
    hva = text("high_value_asset")
    if hva is not None:
        if hva in ("true", "false"):
            changes["high_value_asset"] = hva == "true"
        else:
            bad("high_value_asset", hva)
    label = text("data_classification.label")
    if label is not None:
        rank_text = text("data_classification.rank")
        rank = int(rank_text) if rank_text and rank_text.isdigit() and int(rank_text) <= MAX_SENSITIVITY_RANK else None
        if rank_text and rank is None:
            bad("data_classification.rank", rank_text)
        changes["data_classification"] = DataClassification(label, rank)
    model = text("hosting.model")
    if model is not None:
        country = text("hosting.country")
        if country and not re.match(COUNTRY, country):
            bad("hosting.country", country)
            country = None
        try:
            changes["hosting"] = Hosting(HostingModel(model), text("hosting.provider"), country)
        except ValueError:
            bad("hosting.model", model)
    frameworks = own.get("frameworks")
    if frameworks is not None:
        names = tuple(f for f in frameworks.split(",") if f and f != "-")
        if all(re.match(IDENTIFIER, f) for f in names):
            changes["frameworks"] = names
        else:
            bad("frameworks", frameworks)
    extra = [(k[6:], v) for k, v in own.items() if k.startswith("extra.") and re.match(EXTRA_KEY, k[6:])]
    if extra:
        changes["extra"] = tuple(extra)
    # The side file's validated values win over what the BOM says.
    for name in ("business_unit", "high_value_asset"):
        if name in side:
            changes[name] = side[name]
    for name, enum in (("impact", Impact), ("key_storage", KeyStorage)):
        if name in side:
            changes[name] = enum(side[name])
    if "data_classification" in side:
        changes["data_classification"] = DataClassification(side["data_classification"]["label"],
                                                            side["data_classification"].get("rank"))
    if "hosting" in side:
        hosting = side["hosting"]
        changes["hosting"] = Hosting(HostingModel(hosting["model"]), hosting.get("provider"), hosting.get("country"))
    return changes


def apply_system_fields(system: System, component: dict[str, Any], side: dict[str, Any],
                        warnings: list[str]) -> System:
    """The System with the fields its component (and the side file) give."""
    changes = system_fields(component, side, f"bom-ref {system.id}", warnings)
    return replace(system, **changes) if changes else system


def use_fields(carrier: dict[str, Any], assets: dict[str, dict[str, Any]]) -> dict[str, Any]:
    """Keyword changes for the uses read from one carrier asset (properties, securedBy, level)."""
    own = _props(carrier)
    changes: dict[str, Any] = {name: own[name] for name in _USE_TEXT_FIELDS if own.get(name, "").strip()}
    if changes.get("fips_140_certificate") and not re.match(r"^#?[0-9]{1,6}$", changes["fips_140_certificate"]):
        changes.pop("fips_140_certificate")
    crypto = carrier.get("cryptoProperties") if isinstance(carrier.get("cryptoProperties"), dict) else {}
    material = crypto.get("relatedCryptoMaterialProperties") if isinstance(crypto, dict) else None
    algorithm: dict[str, Any] = carrier
    if isinstance(material, dict):
        secured = material.get("securedBy")
        if isinstance(secured, dict) and isinstance(secured.get("mechanism"), str):
            storage = _MECHANISM_BACK.get(secured["mechanism"].strip().lower())
            if storage is not None:
                changes["key_storage"] = storage
        target = material.get("algorithmRef")
        if isinstance(target, str) and target in assets:
            algorithm = assets[target]
    if "key_storage" not in changes and own.get("key_storage") in {k.value for k in KeyStorage}:
        changes["key_storage"] = KeyStorage(own["key_storage"])
    props = (algorithm.get("cryptoProperties") or {}).get("algorithmProperties") if isinstance(
        algorithm.get("cryptoProperties"), dict) else None
    levels = props.get("certificationLevel") if isinstance(props, dict) else None
    fips = [level for level in levels if level in FIPS_140_LEVELS] if isinstance(levels, list) else []
    if fips:
        changes["fips_140_level"] = fips[0]
    elif own.get("fips_140_level") in FIPS_140_LEVELS:
        changes["fips_140_level"] = own["fips_140_level"]
    return changes
