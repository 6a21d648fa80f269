"""A CBOM written by the official CycloneDX Python library (cyclonedx-python-lib), for the benchmarks.

Ten components per application, every asset type: the application, a TLS 1.2 protocol (a suite
with four algorithm refs and the server certificate in cryptoRefArray), the certificate, its key,
and six algorithms named as source scanners name them (Java standard names, OIDs, CycloneDX
properties). Fictional systems. The library builds slowly (tens of seconds at 10k components),
so the file is kept in the benchmark work folder and reused.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

COMPONENTS_PER_APPLICATION = 10


def write_cbom(folder: Path, components: int) -> Path:
    """Write (once) a library-made CBOM with about ``components`` components; return its path."""
    path = folder / f"library-cbom-{components}.cdx.json"
    if path.exists():
        return path
    from cyclonedx.model.bom import Bom
    from cyclonedx.model.bom_ref import BomRef
    from cyclonedx.model.component import Component, ComponentType
    from cyclonedx.model.crypto import (
        AlgorithmProperties,
        CertificateProperties,
        CryptoAssetType,
        CryptoMode,
        CryptoPrimitive,
        CryptoProperties,
        ProtocolProperties,
        ProtocolPropertiesCipherSuite,
        ProtocolPropertiesType,
        RelatedCryptoMaterialProperties,
        RelatedCryptoMaterialType,
    )
    from cyclonedx.output.json import JsonV1Dot6

    def asset(ref: str, name: str, crypto: CryptoProperties) -> Component:
        return Component(name=name, type=ComponentType.CRYPTOGRAPHIC_ASSET, bom_ref=ref, crypto_properties=crypto)

    def algorithm(ref: str, name: str, primitive: CryptoPrimitive, oid: str | None = None,
                  parameter: str | None = None, mode: CryptoMode | None = None) -> Component:
        return asset(ref, name, CryptoProperties(
            asset_type=CryptoAssetType.ALGORITHM, oid=oid, algorithm_properties=AlgorithmProperties(
                primitive=primitive, parameter_set_identifier=parameter, mode=mode)))

    bom = Bom()
    made: list[Component] = []
    edges: list[tuple[Component, list[Component]]] = []
    start = dt.datetime(2026, 1, 1, tzinfo=dt.UTC)
    for index in range(max(1, components // COMPONENTS_PER_APPLICATION)):
        p = f"s{index:05d}"
        x25519 = algorithm(f"{p}-x25519", "X25519", CryptoPrimitive.KEY_AGREE, "1.3.101.110")
        rsa = algorithm(f"{p}-rsa", "RSA", CryptoPrimitive.PKE, "1.2.840.113549.1.1.1")
        aes = algorithm(f"{p}-aes", "AES", CryptoPrimitive.AE, parameter="128", mode=CryptoMode.GCM)
        signature = algorithm(f"{p}-sig", "SHA256withRSA", CryptoPrimitive.SIGNATURE, "1.2.840.113549.1.1.11")
        data = algorithm(f"{p}-data", "AES/GCM/NoPadding", CryptoPrimitive.AE, parameter="256")
        kem = algorithm(f"{p}-kem", "ML-KEM", CryptoPrimitive.KEM, "2.16.840.1.101.3.4.4.2", parameter="768")
        key = asset(f"{p}-key", f"service {index} key", CryptoProperties(
            asset_type=CryptoAssetType.RELATED_CRYPTO_MATERIAL,
            related_crypto_material_properties=RelatedCryptoMaterialProperties(
                type=RelatedCryptoMaterialType.PUBLIC_KEY, size=2048 + 1024 * (index % 2),
                algorithm_ref=rsa.bom_ref)))
        certificate = asset(f"{p}-cert", f"CN=service-{index}.tidal.example", CryptoProperties(
            asset_type=CryptoAssetType.CERTIFICATE, certificate_properties=CertificateProperties(
                subject_name=f"CN=service-{index}.tidal.example", issuer_name=f"CN=service-{index}.tidal.example",
                not_valid_before=start, not_valid_after=start + dt.timedelta(days=365 * (1 + index % 5)),
                signature_algorithm_ref=signature.bom_ref, subject_public_key_ref=key.bom_ref)))
        protocol = asset(f"{p}-tls", "TLS", CryptoProperties(
            asset_type=CryptoAssetType.PROTOCOL, protocol_properties=ProtocolProperties(
                type=ProtocolPropertiesType.TLS, version="1.2",
                cipher_suites=[ProtocolPropertiesCipherSuite(
                    name="TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256",
                    algorithms=[BomRef(f"{p}-x25519"), BomRef(f"{p}-key"), BomRef(f"{p}-aes")])],
                crypto_refs=[BomRef(f"{p}-cert")])))
        app = Component(name=f"tide-service-{index}", type=ComponentType.APPLICATION, bom_ref=f"{p}-app")
        made += [app, protocol, certificate, key, x25519, rsa, aes, signature, data, kem]
        edges.append((app, [protocol, certificate, data, kem]))
    for component in made:
        bom.components.add(component)
    for app, targets in edges:
        bom.register_dependency(app, targets)
    text = JsonV1Dot6(bom).output_as_string(indent=2)
    path.write_text(text, encoding="utf-8")
    return path
