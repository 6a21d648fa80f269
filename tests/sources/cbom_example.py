"""A CBOM written by hand after the examples of the CycloneDX 1.6 specification (our own scenario).

Source of the shapes: CycloneDX Bill of Materials Standard, version 1.6 (ECMA-424, 1st edition,
June 2024), "cryptoProperties" and its examples for each assetType (algorithm, certificate,
protocol with cipherSuites and ikev2TransformTypes, related-crypto-material), and the
"dependencies" graph with dependsOn and provides. The organisation and its systems are fictional.
"""

from __future__ import annotations

import json
from typing import Any


def _algorithm(ref: str, name: str, **props: Any) -> dict[str, Any]:
    return {"type": "cryptographic-asset", "bom-ref": ref, "name": name,
            "cryptoProperties": {"assetType": "algorithm", "algorithmProperties": props}}


COMPONENTS: list[dict[str, Any]] = [
    {"type": "application", "bom-ref": "app-ticket-api", "name": "ticket-api", "version": "4.2.0"},
    {"type": "library", "bom-ref": "lib-cryptokit", "name": "cryptokit", "version": "3.1.4"},
    _algorithm("alg-rsa", "RSA", primitive="pke", executionEnvironment="software-plain-ram",
               implementationPlatform="x86_64", certificationLevel=["none"], padding="pkcs1v15",
               cryptoFunctions=["encrypt", "decrypt"]),
    _algorithm("alg-rsa-2048", "RSA-2048", primitive="pke", parameterSetIdentifier="2048",
               cryptoFunctions=["encrypt", "decrypt"], classicalSecurityLevel=112,
               nistQuantumSecurityLevel=0),
    _algorithm("alg-sha256-rsa", "sha256WithRSAEncryption", primitive="signature",
               cryptoFunctions=["sign", "verify"]),
    _algorithm("alg-aes-128-gcm", "AES-128-GCM", primitive="ae", parameterSetIdentifier="128",
               mode="gcm", cryptoFunctions=["keygen", "encrypt", "decrypt", "tag"],
               classicalSecurityLevel=128, nistQuantumSecurityLevel=1),
    _algorithm("alg-aes", "AES", primitive="block-cipher", mode="cbc"),
    _algorithm("alg-ecdh-p256", "ECDH", primitive="key-agree", curve="secp256r1",
               cryptoFunctions=["keygen"]),
    _algorithm("alg-sha-256", "SHA-256", primitive="hash", parameterSetIdentifier="256",
               cryptoFunctions=["digest"]),
    _algorithm("alg-mlkem768", "ML-KEM", primitive="kem", parameterSetIdentifier="768",
               cryptoFunctions=["encapsulate", "decapsulate"], nistQuantumSecurityLevel=3),
    _algorithm("alg-kuznyechik", "Kuznyechik", primitive="block-cipher"),
    _algorithm("alg-chacha", "ChaCha20-Poly1305", primitive="ae"),
    {"type": "cryptographic-asset", "bom-ref": "cert-booking", "name": "booking.larkspur-tide.example",
     "cryptoProperties": {"assetType": "certificate", "certificateProperties": {
         "subjectName": "CN = booking.larkspur-tide.example",
         "issuerName": "CN = Larkspur Tide Issuing CA",
         "notValidBefore": "2026-01-01T00:00:00Z", "notValidAfter": "2028-01-01T00:00:00Z",
         "signatureAlgorithmRef": "alg-sha256-rsa", "subjectPublicKeyRef": "key-booking",
         "certificateFormat": "X.509", "certificateExtension": "crt"}}},
    {"type": "cryptographic-asset", "bom-ref": "key-booking", "name": "booking RSA public key",
     "cryptoProperties": {"assetType": "related-crypto-material", "relatedCryptoMaterialProperties": {
         "type": "public-key", "id": "2e9ef09e-dfac-4526-96b4-d02f31af1b22", "state": "active",
         "algorithmRef": "alg-rsa", "size": 3072, "format": "PEM"}}},
    {"type": "cryptographic-asset", "bom-ref": "key-session", "name": "ticket session key",
     "cryptoProperties": {"assetType": "related-crypto-material", "relatedCryptoMaterialProperties": {
         "type": "secret-key", "algorithmRef": "alg-aes", "size": 256}}},
    {"type": "cryptographic-asset", "bom-ref": "proto-tls12", "name": "TLS",
     "cryptoProperties": {"assetType": "protocol", "protocolProperties": {
         "type": "tls", "version": "1.2",
         "cipherSuites": [{"name": "TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256",
                           "algorithms": ["alg-ecdh-p256", "alg-rsa-2048", "alg-aes-128-gcm", "alg-sha-256"],
                           "identifiers": ["0xC0", "0x2F"]}]},
         "oid": "1.3.18.0.2.32.104"}},
    {"type": "cryptographic-asset", "bom-ref": "proto-ike", "name": "IKEv2",
     "cryptoProperties": {"assetType": "protocol", "protocolProperties": {
         "type": "ike", "version": "2",
         "ikev2TransformTypes": {"encr": ["alg-aes-128-gcm"], "ke": ["alg-mlkem768"]}}}},
]

CBOM: dict[str, Any] = {
    "$schema": "http://cyclonedx.org/schema/bom-1.6.schema.json",
    "bomFormat": "CycloneDX",
    "specVersion": "1.6",
    "serialNumber": "urn:uuid:3e671687-395b-41f5-a30f-a58921a69b79",
    "version": 1,
    "metadata": {
        "timestamp": "2026-11-02T09:00:00Z",
        "supplier": {"name": "Larkspur Tide Ferries"},
        "component": {"type": "application", "bom-ref": "app-booking", "name": "ferry-booking",
                      "version": "2.0.1"},
    },
    "components": COMPONENTS,
    "dependencies": [
        {"ref": "app-booking", "dependsOn": ["app-ticket-api", "proto-tls12", "cert-booking"]},
        {"ref": "app-ticket-api", "dependsOn": ["lib-cryptokit", "proto-ike", "alg-kuznyechik",
                                                "key-session"]},
        {"ref": "lib-cryptokit", "provides": ["alg-chacha"]},
        {"ref": "proto-tls12", "dependsOn": ["alg-ecdh-p256", "alg-rsa-2048", "alg-aes-128-gcm",
                                             "alg-sha-256"]},
        {"ref": "cert-booking", "dependsOn": ["alg-sha256-rsa", "key-booking"]},
        {"ref": "key-booking", "dependsOn": ["alg-rsa"]},
    ],
}
"""Every assetType, nesting through the dependency graph, a provided asset, an unknown algorithm."""


def cbom_text(bom: dict[str, Any] | None = None) -> str:
    """The BOM as a tool would write it: indented JSON, one key per line."""
    return json.dumps(CBOM if bom is None else bom, indent=2) + "\n"


def line_of_bom_ref(text: str, ref: str) -> int:
    """1-based line of the '"bom-ref": "<ref>"' entry, found by plain text search."""
    needle = f'"bom-ref": "{ref}"'
    for number, line in enumerate(text.splitlines(), start=1):
        if needle in line:
            return number
    raise AssertionError(ref)
