"""Following a CBOM's own references: what a referenced key or algorithm tells about sizes.

CycloneDX 1.6 assets point at each other by bom-ref (``signatureAlgorithmRef``,
``subjectPublicKeyRef``, ``algorithmRef``, a cipher suite's ``algorithms``, a protocol's
``cryptoRefArray``). A use often needs a fact that sits one or two references away: the size of
the RSA key behind a TLS 1.2 suite, the curve of its key exchange, the key that signed a
certificate. :class:`References` answers those questions; every answer names the bom-refs it
came through, and a reference that is missing or points nowhere is said, never guessed.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from typing import Any

_KEY_EXCHANGE_PRIMITIVES = ("key-agree", "kem")
_AUTH_PRIMITIVES = ("signature", "pke")
_CURVE_NAMES = ("x25519", "x448", "curve25519", "curve448", "ed25519", "ed448")
_CURVE_PREFIXES = ("secp", "prime", "p-", "brainpool", "nist", "ffdhe", "modp")
_KEY_EXCHANGE_WORDS = ("ecdh", "x25519", "x448", "diffie", "dh", "ffdhe", "modp", "kem", "xdh")
_AUTH_WORDS = ("rsa", "ecdsa", "dsa", "ed25519", "ed448", "eddsa", "ml-dsa", "slh-dsa")


def _mapping(value: object) -> dict[str, Any]:
    return value if isinstance(value, dict) else {}


def _text(value: object) -> str | None:
    return value if isinstance(value, str) and value.strip() else None


def _size(value: object) -> int | None:
    """A plausible key size from a number or a numeric parameterSetIdentifier."""
    if isinstance(value, bool):
        return None
    if isinstance(value, int):
        return value if 0 < value <= 65536 else None
    if isinstance(value, str) and value.strip().isascii() and value.strip().isdigit() and len(value.strip()) < 6:
        return int(value)
    return None


def date_of(value: object) -> dt.date | None:
    """The date of an ISO 8601 timestamp (``2028-01-01T00:00:00Z``), or None."""
    if not isinstance(value, str):
        return None
    try:
        return dt.datetime.fromisoformat(value.strip()).date()  # 3.11+ reads a "Z" suffix
    except ValueError:
        try:
            return dt.date.fromisoformat(value.strip()[:10])
        except ValueError:
            return None


@dataclass(frozen=True)
class KeyFacts:
    """What one referenced asset says about an algorithm and its parameters."""

    algorithm: str
    """Algorithm name as the BOM writes it."""
    path: tuple[str, ...]
    """bom-refs followed to get here (certificate > key > algorithm)."""
    primitive: str | None = None
    """CycloneDX primitive of the algorithm, when given."""
    key_size: int | None = None
    """Key size (a material's ``size`` or a numeric ``parameterSetIdentifier``)."""
    curve: str | None = None
    """Curve or named group."""
    oid: str | None = None
    """The algorithm's ``cryptoProperties.oid``."""
    problem: str | None = None
    """Why the facts are incomplete (a dangling or missing reference), or None."""

    @property
    def role(self) -> str | None:
        """``key-exchange``, ``authentication`` or None (a cipher, a hash) inside a cipher suite."""
        if self.primitive in _KEY_EXCHANGE_PRIMITIVES:
            return "key-exchange"
        if self.primitive in _AUTH_PRIMITIVES:
            return "authentication"
        if self.primitive is not None:
            return None
        name = self.algorithm.casefold()
        if any(word in name for word in _AUTH_WORDS):
            return "authentication"
        if any(word in name for word in _KEY_EXCHANGE_WORDS):
            return "key-exchange"
        return None


class References:
    """Reference lookups over the crypto assets of one BOM (``assets`` maps bom-ref to component)."""

    def __init__(self, assets: dict[str, dict[str, Any]]):
        self.assets = assets
        self.material_sizes: dict[str, set[int]] = {}
        """Algorithm bom-ref -> sizes of the keys (related material) that refer to it."""
        self._subjects: dict[str, list[str]] = {}
        self._described: dict[str, KeyFacts] = {}
        for ref, component in assets.items():
            crypto = component.get("cryptoProperties")
            if not isinstance(crypto, dict):
                continue
            material = crypto.get("relatedCryptoMaterialProperties")
            if isinstance(material, dict):
                target, size = _text(material.get("algorithmRef")), _size(material.get("size"))
                if target and size:
                    self.material_sizes.setdefault(target, set()).add(size)
            certificate = crypto.get("certificateProperties")
            subject = _text(certificate.get("subjectName")) if isinstance(certificate, dict) else None
            if subject:
                self._subjects.setdefault(_dn(subject), []).append(ref)

    def material_size(self, ref: str) -> tuple[int | None, str | None]:
        """The size keys give an algorithm that has none of its own: (size, note)."""
        sizes = self.material_sizes.get(ref, set())
        if len(sizes) == 1:
            (size,) = sizes
            return size, f"key size {size} from the related crypto material that refers to '{ref}'"
        if len(sizes) > 1:
            listed = ", ".join(str(s) for s in sorted(sizes))
            return None, f"keys of sizes {listed} refer to '{ref}': which one this use has is not said"
        return None, None

    def describe(self, ref: str) -> KeyFacts:
        """Facts of the algorithm a bom-ref stands for (through keys and certificates); each
        bom-ref is described once per BOM."""
        found = self._described.get(ref)
        if found is None:
            found = self._described[ref] = self._describe(ref, (), 0)
        return found

    def _describe(self, ref: str, path: tuple[str, ...], depth: int) -> KeyFacts:
        path = (*path, ref)
        component = self.assets.get(ref)
        if component is None:
            return KeyFacts(ref, path, problem=f"bom-ref '{ref}' is not in the BOM")
        crypto = _mapping(component.get("cryptoProperties"))
        kind = crypto.get("assetType")
        name = _text(component.get("name")) or ref
        if depth > 8:
            return KeyFacts(name, path, problem="reference loop in the BOM")
        if kind == "certificate":
            key = _text(_mapping(crypto.get("certificateProperties")).get("subjectPublicKeyRef"))
            if key is None:
                return KeyFacts(name, path, problem=f"certificate '{ref}' names no subjectPublicKeyRef")
            return self._describe(key, path, depth + 1)
        if kind == "related-crypto-material":
            props = _mapping(crypto.get("relatedCryptoMaterialProperties"))
            target = _text(props.get("algorithmRef"))
            if target is None:
                return KeyFacts(name, path, key_size=_size(props.get("size")),
                                problem=f"key '{ref}' names no algorithmRef")
            inner = self._describe(target, path, depth + 1)
            size = _size(props.get("size"))
            return KeyFacts(inner.algorithm, inner.path, inner.primitive, size or inner.key_size, inner.curve,
                            inner.oid, inner.problem)
        props = _mapping(crypto.get("algorithmProperties"))
        size = _size(props.get("parameterSetIdentifier"))
        curve = _text(props.get("curve")) or _text(props.get("ellipticCurve"))
        if curve is None and (name.casefold() in _CURVE_NAMES or name.casefold().startswith(_CURVE_PREFIXES)):
            curve = name
        if size is None and curve is None:
            size, _ = self.material_size(ref)
        primitive = _text(props.get("primitive"))
        return KeyFacts(name, path, primitive if primitive not in ("unknown", "other") else None,
                        None if curve else size, curve, _text(crypto.get("oid")))

    def issuer_key(self, certificate: str) -> tuple[KeyFacts | None, str]:
        """The key that signed a certificate: its own (self-signed) or its issuer's, when the
        issuer's certificate is in the BOM; else None and the reason."""
        props = _mapping(_mapping(self.assets[certificate].get("cryptoProperties")).get("certificateProperties"))
        subject, issuer = _text(props.get("subjectName")), _text(props.get("issuerName"))
        if issuer is None:
            return None, f"certificate '{certificate}' names no issuerName: the signing key is unknown"
        if subject is not None and _dn(subject) == _dn(issuer):
            facts = self.describe(certificate)
            return facts, f"self-signed ({issuer[:120]}): signed with its own key"
        candidates = self._subjects.get(_dn(issuer), [])
        # At most two candidates are looked at: more than that is ambiguous whatever they are
        # (a BOM with thousands of certificates of one subject stays linear).
        found = [r for r in candidates[:3] if r != certificate] if len(candidates) <= 2 else candidates
        if len(found) == 1:
            return self.describe(found[0]), f"signed by the key of certificate '{found[0]}' ({issuer[:120]})"
        if found:
            return None, (f"{len(found)} certificates in the BOM have the subject {issuer[:120]}:"
                          " which key signed it is not said")
        return None, (f"issued by {issuer[:120]}, whose certificate is not in the BOM:"
                      " the signing key's size is unknown")


def _dn(name: str) -> str:
    """A distinguished name compared loosely (case and spaces around '=' and ',')."""
    parts = [p.strip() for p in name.replace(";", ",").split(",")]
    return ",".join(" = ".join(x.strip() for x in p.split("=", 1)) for p in parts if p).casefold()
