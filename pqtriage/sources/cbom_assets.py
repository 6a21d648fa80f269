"""CycloneDX cryptographic assets turned into uses: one carrier asset gives one or more CryptoUses.

Mapping (CycloneDX 1.6, ``cryptoProperties``; 1.7 additions tolerated):

- ``algorithm``: one use; ``name`` is the algorithm, ``parameterSetIdentifier`` the parameter
  set (and the key size when it is a number), ``curve`` (1.7: ``ellipticCurve``) the curve; the
  purpose follows ``primitive``, else ``cryptoFunctions``, else key-establishment, flagged.
- ``certificate``: one authentication use for ``signatureAlgorithmRef`` and one for
  ``subjectPublicKeyRef`` (a key, with its ``size`` and ``algorithmRef``); the validity period
  (``notValidBefore`` to ``notValidAfter``) becomes trust_years.
- ``protocol``: one use per cipher suite (its name, with curve and key size taken from the
  suite's ``algorithms``; an unnamed suite gives one use per algorithm), one per
  ``ikev2TransformTypes`` and ``cryptoRefArray`` reference, and (1.7) per ``tlsGroups`` and
  ``tlsSignatureSchemes`` entry. The protocol's type and version label each use.
- ``related-crypto-material``: one use of its ``algorithmRef`` algorithm with ``size`` as key size.

An asset that names no algorithm, or a reference to a bom-ref absent from the BOM, gives a use
whose algorithm the catalog does not know: it is triaged as unassessed, never dropped.
"""

from __future__ import annotations

import bisect
import datetime as dt
import json
import re
from dataclasses import dataclass, replace
from typing import Any

from pqtriage.model.inventory import CryptoUse, Purpose, SourceRef

PRIMITIVE_PURPOSE: dict[str, Purpose] = {
    "signature": Purpose.SIGNATURE,
    "kem": Purpose.KEY_ESTABLISHMENT,
    "key-agree": Purpose.KEY_ESTABLISHMENT,
    "pke": Purpose.KEY_ESTABLISHMENT,
    "kdf": Purpose.KEY_ESTABLISHMENT,
    "drbg": Purpose.KEY_ESTABLISHMENT,
    "combiner": Purpose.KEY_ESTABLISHMENT,
    "ae": Purpose.ENCRYPTION,
    "block-cipher": Purpose.ENCRYPTION,
    "stream-cipher": Purpose.ENCRYPTION,
    "mac": Purpose.INTEGRITY,
    "hash": Purpose.INTEGRITY,
    "xof": Purpose.INTEGRITY,
}
"""CycloneDX 1.6 algorithmProperties.primitive -> purpose of the use."""

FUNCTION_PURPOSE: tuple[tuple[frozenset[str], Purpose], ...] = (
    (frozenset({"sign", "verify"}), Purpose.SIGNATURE),
    (frozenset({"encapsulate", "decapsulate", "keygen", "keyderive"}), Purpose.KEY_ESTABLISHMENT),
    (frozenset({"encrypt", "decrypt"}), Purpose.ENCRYPTION),
    (frozenset({"digest", "tag"}), Purpose.INTEGRITY),
)
"""cryptoFunctions -> purpose, tried in this order when the primitive says nothing."""

MATERIAL_PURPOSE: dict[str, Purpose] = {
    "secret-key": Purpose.ENCRYPTION,
    "shared-secret": Purpose.KEY_ESTABLISHMENT,
    "signature": Purpose.SIGNATURE,
    "digest": Purpose.INTEGRITY,
    "tag": Purpose.INTEGRITY,
    "password": Purpose.AUTHENTICATION,
    "credential": Purpose.AUTHENTICATION,
    "token": Purpose.AUTHENTICATION,
}
"""relatedCryptoMaterialProperties.type -> purpose, when the algorithm's primitive says nothing."""

IKE_PURPOSE: dict[str, Purpose] = {
    "ke": Purpose.KEY_ESTABLISHMENT,
    "encr": Purpose.ENCRYPTION,
    "integ": Purpose.INTEGRITY,
    "prf": Purpose.INTEGRITY,
    "auth": Purpose.AUTHENTICATION,
}
"""ikev2TransformTypes member -> purpose (RFC 7296 section 3.3.2 transform types)."""

PROTOCOL_LABEL = {"tls": "TLS", "ssh": "SSH", "ipsec": "IPsec", "ike": "IKE", "sstp": "SSTP", "wpa": "WPA"}
"""protocolProperties.type -> display name."""

_BOM_REF = re.compile(r'"bom-ref"\s*:\s*("(?:[^"\\]|\\.)*")')
_ASYMMETRIC = ("signature", "pke", "key-agree", "kem")
_DAYS_PER_YEAR = 365.25  # Julian year, common practice


def text_of(value: object) -> str | None:
    """A non-empty string value, else None (wrong types are ignored, not guessed)."""
    return value if isinstance(value, str) and value.strip() else None


def mapping_of(value: object) -> dict[str, Any]:
    """A JSON object, else an empty one."""
    return value if isinstance(value, dict) else {}


def refs_of(value: object) -> list[str]:
    """A list of bom-ref strings (non-strings skipped)."""
    return [v for v in value if isinstance(v, str)] if isinstance(value, list) else []


def properties_of(component: dict[str, Any]) -> dict[str, str]:
    """CycloneDX ``properties`` (name/value pairs) as a dict; the first value of a name wins."""
    out: dict[str, str] = {}
    for item in component.get("properties", []) if isinstance(component.get("properties"), list) else []:
        if isinstance(item, dict) and isinstance(item.get("name"), str) and isinstance(item.get("value"), str):
            out.setdefault(item["name"], item["value"])
    return out


class Positions:
    """Line and column of each bom-ref in the JSON text (json.loads keeps no positions)."""

    def __init__(self, text: str):
        self._starts = [0] + [m.end() for m in re.finditer("\n", text)]
        self._found: dict[str, tuple[int, int]] = {}
        for match in _BOM_REF.finditer(text):
            try:
                ref = json.loads(match.group(1))
            except ValueError:
                continue
            self._found.setdefault(ref, self._place(match.start()))

    def _place(self, offset: int) -> tuple[int, int]:
        line = bisect.bisect_right(self._starts, offset)
        return line, offset - self._starts[line - 1] + 1

    def of(self, ref: str | None) -> tuple[int | None, int | None]:
        """(line, column) of the ``"bom-ref"`` key of this ref, or (None, None)."""
        if ref is None or ref not in self._found:
            return None, None
        return self._found[ref]


@dataclass(frozen=True)
class _Context:
    """What a carrier passes to the parts it refers to."""

    carrier: str
    """bom-ref of the asset the system depends on (the use's source)."""
    protocol: str | None = None
    """Protocol label (TLS 1.3 ...), when the use sits in a protocol."""
    purpose: Purpose | None = None
    """Purpose fixed by the context (a certificate's signature, an IKE transform type)."""
    key_size: int | None = None
    """Key size fixed by the context (a key's size)."""
    trust_years: float | None = None
    """Trust period fixed by the context (a certificate's validity)."""
    via: tuple[str, ...] = ()
    """bom-refs between the carrier and the asset being expanded."""

    def into(self, ref: str, **changes: Any) -> _Context:
        """The context for a part this asset refers to."""
        last = self.via[-1] if self.via else self.carrier
        via = self.via if ref == last else (*self.via, ref)
        return replace(self, via=via, **changes)


class UseBuilder:
    """Expands carrier assets into uses; ``assets`` maps bom-ref to the component."""

    def __init__(self, path: str, assets: dict[str, dict[str, Any]], positions: Positions,
                 children: dict[str, tuple[str, ...]]):
        self.path = path
        self.assets = assets
        self.positions = positions
        self.children = children
        """dependsOn edges of crypto assets, used when an asset's properties name no algorithm."""
        self.warnings: list[str] = []

    def source(self, context: _Context, part: str | None) -> SourceRef:
        line, column = self.positions.of(context.carrier)
        chain = [context.carrier, *context.via]
        if part is not None and part != chain[-1]:
            chain.append(part)
        detail = "bom-ref " + " > ".join(chain)
        return SourceRef(self.path, line, column, detail)

    def uses_of(self, carrier: str) -> list[CryptoUse]:
        """Every use a carrier asset stands for (at least one)."""
        return self._expand(carrier, _Context(carrier), depth=0)

    def _unknown(self, context: _Context, name: str, note: str, part: str | None = None,
                 purpose: Purpose | None = None) -> CryptoUse:
        purpose = purpose or context.purpose
        return CryptoUse(
            purpose=purpose or Purpose.KEY_ESTABLISHMENT, algorithm=name, protocol=context.protocol,
            notes=note, source=self.source(context, part), assumed=() if purpose else ("purpose",),
        )

    def _expand(self, ref: str, context: _Context, depth: int) -> list[CryptoUse]:
        component = self.assets.get(ref)
        if component is None:
            self.warnings.append(f"{self.source(context, ref)}: refers to bom-ref '{ref}', which is not in"
                                 " the BOM; its use is unassessed")
            return [self._unknown(context, ref, "reference to a bom-ref not in the BOM", ref)]
        if depth > 8:  # refs only go certificate > key > algorithm; deeper is a loop
            return [self._unknown(context, str(component.get("name", ref)), "reference loop in the BOM", ref)]
        crypto = mapping_of(component.get("cryptoProperties"))
        kind = crypto.get("assetType")
        if kind == "certificate":
            return self._certificate(ref, component, crypto, context, depth)
        if kind == "protocol":
            return self._protocol(ref, component, crypto, context, depth)
        if kind == "related-crypto-material":
            return self._material(ref, component, crypto, context, depth)
        return [self._algorithm(ref, component, crypto, context)]

    def _algorithm(self, ref: str, component: dict[str, Any], crypto: dict[str, Any],
                   context: _Context) -> CryptoUse:
        props = mapping_of(crypto.get("algorithmProperties"))
        name = text_of(component.get("name")) or ref
        parameter_set = text_of(props.get("parameterSetIdentifier"))
        key_size = context.key_size
        if key_size is None and parameter_set and parameter_set.isdigit() and len(parameter_set) < 6:
            key_size = int(parameter_set)
        curve = text_of(props.get("curve")) or text_of(props.get("ellipticCurve"))
        own = properties_of(component)
        purpose = context.purpose
        assumed: tuple[str, ...] = ()
        if own.get("pqtriage:purpose") in {p.value for p in Purpose}:
            purpose = Purpose(own["pqtriage:purpose"])
        if purpose is None:
            purpose = algorithm_purpose(props)
        if purpose is None:
            purpose, assumed = Purpose.KEY_ESTABLISHMENT, ("purpose",)
        trust = context.trust_years
        if trust is None and _number(own.get("pqtriage:trust_years")) is not None:
            trust = _number(own.get("pqtriage:trust_years"))
        family = text_of(props.get("algorithmFamily"))
        return CryptoUse(
            purpose=purpose, algorithm=name, key_size=key_size, curve=curve, parameter_set=parameter_set,
            trust_years=trust, protocol=context.protocol,
            notes=f"algorithm family {family} (CycloneDX 1.7)" if family else None,
            source=self.source(context, ref), assumed=assumed,
        )

    def _certificate(self, ref: str, component: dict[str, Any], crypto: dict[str, Any],
                     context: _Context, depth: int) -> list[CryptoUse]:
        props = mapping_of(crypto.get("certificateProperties"))
        trust = context.trust_years if context.trust_years is not None else validity_years(props)
        inner = context.into(ref, purpose=Purpose.AUTHENTICATION, key_size=None, trust_years=trust)
        uses: list[CryptoUse] = []
        for key in ("signatureAlgorithmRef", "subjectPublicKeyRef"):
            target = text_of(props.get(key))
            if target:
                uses += self._expand(target, inner, depth + 1)
        if not uses:
            uses += self._children(ref, inner, depth)
        name = text_of(component.get("name")) or ref
        return uses or [self._unknown(inner, name, "certificate that names no signature algorithm or key", ref)]

    def _protocol(self, ref: str, component: dict[str, Any], crypto: dict[str, Any],
                  context: _Context, depth: int) -> list[CryptoUse]:
        props = mapping_of(crypto.get("protocolProperties"))
        kind = text_of(props.get("type"))
        label = " ".join(x for x in (PROTOCOL_LABEL.get(kind or "", kind), text_of(props.get("version"))) if x)
        label = label or text_of(component.get("name")) or ref
        own = properties_of(component).get("pqtriage:purpose")
        purpose = Purpose(own) if own in {p.value for p in Purpose} else context.purpose
        inner = context.into(ref, protocol=label, key_size=None, purpose=purpose)
        uses: list[CryptoUse] = []
        for suite in props.get("cipherSuites", []) if isinstance(props.get("cipherSuites"), list) else []:
            uses += self._suite(ref, mapping_of(suite), inner, depth)
        for member, purpose in IKE_PURPOSE.items():
            for target in refs_of(mapping_of(props.get("ikev2TransformTypes")).get(member)):
                uses += self._expand(target, inner.into(ref, purpose=purpose), depth + 1)
        for target in refs_of(props.get("cryptoRefArray")):
            uses += self._expand(target, inner, depth + 1)
        for group in props.get("tlsGroups", []) if isinstance(props.get("tlsGroups"), list) else []:
            if text_of(group):
                uses.append(CryptoUse(Purpose.KEY_ESTABLISHMENT, group, protocol=label,
                                      source=self.source(inner, ref)))
        schemes = props.get("tlsSignatureSchemes")
        for scheme in schemes if isinstance(schemes, list) else []:
            if text_of(scheme):
                uses.append(CryptoUse(Purpose.AUTHENTICATION, scheme, protocol=label,
                                      source=self.source(inner, ref)))
        if not uses:
            uses += self._children(ref, inner, depth)
        name = text_of(component.get("name")) or ref
        return uses or [self._unknown(inner, label or name, "protocol that names no cipher suite or algorithm",
                                      ref, Purpose.KEY_ESTABLISHMENT)]

    def _suite(self, ref: str, suite: dict[str, Any], context: _Context, depth: int) -> list[CryptoUse]:
        parts = refs_of(suite.get("algorithms"))
        name = text_of(suite.get("name"))
        if not name:
            uses: list[CryptoUse] = []
            for target in parts:
                uses += self._expand(target, context, depth + 1)
            return uses
        # A named suite is assessed whole (the catalog splits it); its parts supply curve and size.
        curve, key_size = None, None
        for target in parts:
            props = mapping_of(mapping_of(self.assets.get(target, {}).get("cryptoProperties"))
                               .get("algorithmProperties"))
            curve = curve or text_of(props.get("curve")) or text_of(props.get("ellipticCurve"))
            param = text_of(props.get("parameterSetIdentifier"))
            if key_size is None and props.get("primitive") in _ASYMMETRIC and param and param.isdigit() \
                    and len(param) < 6 and not text_of(props.get("curve")):
                key_size = int(param)
        return [CryptoUse(context.purpose or Purpose.KEY_ESTABLISHMENT, name, key_size=key_size, curve=curve,
                          protocol=context.protocol, source=self.source(context, ref))]

    def _material(self, ref: str, component: dict[str, Any], crypto: dict[str, Any],
                  context: _Context, depth: int) -> list[CryptoUse]:
        props = mapping_of(crypto.get("relatedCryptoMaterialProperties"))
        size = props.get("size") if isinstance(props.get("size"), int) and not isinstance(props.get("size"), bool) \
            else None
        purpose = context.purpose
        if purpose is None:
            algorithm = self.assets.get(text_of(props.get("algorithmRef")) or "", {})
            primitive_purpose = algorithm_purpose(mapping_of(
                mapping_of(algorithm.get("cryptoProperties")).get("algorithmProperties")))
            purpose = primitive_purpose or MATERIAL_PURPOSE.get(str(props.get("type")))
        inner = context.into(ref, purpose=purpose, key_size=size or context.key_size)
        target = text_of(props.get("algorithmRef"))
        if target:
            return self._expand(target, inner, depth + 1)
        uses = self._children(ref, inner, depth)
        name = text_of(component.get("name")) or ref
        return uses or [self._unknown(inner, name, "key or other material that names no algorithm", ref)]

    def _children(self, ref: str, context: _Context, depth: int) -> list[CryptoUse]:
        """Crypto assets the asset itself dependsOn, when its properties name none."""
        uses: list[CryptoUse] = []
        for target in self.children.get(ref, ()):
            if target in self.assets:
                uses += self._expand(target, context, depth + 1)
        return uses


def algorithm_purpose(props: dict[str, Any]) -> Purpose | None:
    """Purpose from algorithmProperties: primitive first, then cryptoFunctions, else None."""
    primitive = props.get("primitive")
    functions = set(refs_of(props.get("cryptoFunctions")))
    if primitive == "pke" and functions and functions <= {"sign", "verify"}:
        return Purpose.SIGNATURE
    if isinstance(primitive, str) and primitive in PRIMITIVE_PURPOSE:
        return PRIMITIVE_PURPOSE[primitive]
    for names, purpose in FUNCTION_PURPOSE:
        if functions & names:
            return purpose
    return None


def validity_years(props: dict[str, Any]) -> float | None:
    """Length of a certificate's validity in years, from notValidBefore and notValidAfter."""
    try:
        start = dt.datetime.fromisoformat(str(props["notValidBefore"]))  # 3.11+ reads a "Z" suffix
        end = dt.datetime.fromisoformat(str(props["notValidAfter"]))
    except (KeyError, ValueError):
        return None
    if start.tzinfo is None or end.tzinfo is None:
        start, end = start.replace(tzinfo=None), end.replace(tzinfo=None)
    years = (end - start).days / _DAYS_PER_YEAR
    return round(years, 2) if 0 <= years <= 100 else None


def _number(text: str | None) -> float | None:
    try:
        value = float(text) if text is not None else None
    except ValueError:
        return None
    return value if value is not None and 0 <= value <= 100 else None
