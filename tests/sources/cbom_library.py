"""CBOMs written by another producer: the official CycloneDX Python library (cyclonedx-python-lib).

The tests build each BOM with the library's model classes (``cyclonedx.model.*``) and its JSON
serializer (``cyclonedx.output.json.JsonV1Dot6``), not with pqtriage's exporter, so what is read
is what a third-party tool writes. The organisation and its systems are fictional.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Iterable
from typing import Any

from cyclonedx.model.bom import Bom
from cyclonedx.model.bom_ref import BomRef
from cyclonedx.model.component import Component, ComponentType
from cyclonedx.model.crypto import (
    AlgorithmProperties,
    CertificateProperties,
    CryptoAssetType,
    CryptoMode,
    CryptoPadding,
    CryptoPrimitive,
    CryptoProperties,
    Ikev2TransformTypes,
    ProtocolProperties,
    ProtocolPropertiesCipherSuite,
    ProtocolPropertiesType,
    RelatedCryptoMaterialProperties,
    RelatedCryptoMaterialType,
)
from cyclonedx.output.json import JsonV1Dot6

__all__ = ["CryptoMode", "CryptoPadding", "CryptoPrimitive", "Writer"]


def _utc(day: str) -> dt.datetime:
    return dt.datetime.fromisoformat(day).replace(tzinfo=dt.UTC)


class Writer:
    """Builds one BOM with the library: applications, and cryptographic assets of every type."""

    def __init__(self) -> None:
        self.bom = Bom()
        self.components: dict[str, Component] = {}

    def _add(self, component: Component) -> Component:
        self.bom.components.add(component)
        self.components[str(component.bom_ref)] = component
        return component

    def application(self, ref: str, name: str, uses: Iterable[str] = ()) -> Component:
        """An application that depends on the given assets."""
        app = self._add(Component(name=name, type=ComponentType.APPLICATION, bom_ref=ref))
        self.depends(ref, uses)
        return app

    def depends(self, ref: str, targets: Iterable[str]) -> None:
        """dependencies[ref].dependsOn += targets."""
        targets = list(targets)
        if targets:
            self.bom.register_dependency(self.components[ref], [self.components[t] for t in targets])

    def algorithm(self, ref: str, name: str, *, oid: str | None = None, primitive: CryptoPrimitive | None = None,
                  parameter_set: str | None = None, curve: str | None = None, mode: CryptoMode | None = None,
                  padding: CryptoPadding | None = None) -> Component:
        """An algorithm asset (assetType algorithm)."""
        props = AlgorithmProperties(primitive=primitive, parameter_set_identifier=parameter_set, curve=curve,
                                    mode=mode, padding=padding)
        crypto = CryptoProperties(asset_type=CryptoAssetType.ALGORITHM, algorithm_properties=props, oid=oid)
        return self._add(Component(name=name, type=ComponentType.CRYPTOGRAPHIC_ASSET, bom_ref=ref,
                                   crypto_properties=crypto))

    def key(self, ref: str, name: str, algorithm: str | None, size: int | None,
            kind: RelatedCryptoMaterialType = RelatedCryptoMaterialType.PUBLIC_KEY) -> Component:
        """A related-crypto-material asset (a key) with its size and algorithmRef."""
        props = RelatedCryptoMaterialProperties(type=kind, size=size,
                                                algorithm_ref=BomRef(algorithm) if algorithm else None)
        crypto = CryptoProperties(asset_type=CryptoAssetType.RELATED_CRYPTO_MATERIAL,
                                  related_crypto_material_properties=props)
        return self._add(Component(name=name, type=ComponentType.CRYPTOGRAPHIC_ASSET, bom_ref=ref,
                                   crypto_properties=crypto))

    def certificate(self, ref: str, subject: str, issuer: str, valid: tuple[str, str],
                    signature: str | None, key: str | None) -> Component:
        """A certificate asset with its validity, signatureAlgorithmRef and subjectPublicKeyRef."""
        props = CertificateProperties(
            subject_name=subject, issuer_name=issuer, not_valid_before=_utc(valid[0]), not_valid_after=_utc(valid[1]),
            signature_algorithm_ref=BomRef(signature) if signature else None,
            subject_public_key_ref=BomRef(key) if key else None, certificate_format="X.509")
        crypto = CryptoProperties(asset_type=CryptoAssetType.CERTIFICATE, certificate_properties=props)
        return self._add(Component(name=subject, type=ComponentType.CRYPTOGRAPHIC_ASSET, bom_ref=ref,
                                   crypto_properties=crypto))

    def protocol(self, ref: str, kind: ProtocolPropertiesType, version: str,
                 suites: Iterable[tuple[str | None, list[str]]] = (), certificates: Iterable[str] = (),
                 ike: dict[str, list[str]] | None = None) -> Component:
        """A protocol asset: cipher suites with their algorithms refs, cryptoRefArray, IKEv2 transforms."""
        cipher_suites = [ProtocolPropertiesCipherSuite(name=name, algorithms=[BomRef(r) for r in refs])
                         for name, refs in suites]
        transforms = None
        if ike is not None:
            transforms = Ikev2TransformTypes(**{k: [BomRef(r) for r in v] for k, v in ike.items()})
        props = ProtocolProperties(type=kind, version=version, cipher_suites=cipher_suites,
                                   crypto_refs=[BomRef(r) for r in certificates], ikev2_transform_types=transforms)
        crypto = CryptoProperties(asset_type=CryptoAssetType.PROTOCOL, protocol_properties=props)
        return self._add(Component(name=kind.value.upper(), type=ComponentType.CRYPTOGRAPHIC_ASSET, bom_ref=ref,
                                   crypto_properties=crypto))

    def json(self) -> str:
        """The BOM as the library writes it (CycloneDX 1.6 JSON)."""
        return JsonV1Dot6(self.bom).output_as_string(indent=2)


def uses_by_ref(inventory: Any) -> dict[str, Any]:
    """Every use of an inventory by the last bom-ref of its source (the asset it was read from)."""
    out: dict[str, Any] = {}
    for system in inventory.systems:
        for use in system.uses:
            out.setdefault(use.source.detail.split(" > ")[-1].removeprefix("bom-ref "), use)
    return out
