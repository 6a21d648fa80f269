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

import datetime as dt
import json
import re
from dataclasses import dataclass, field, replace
from typing import Any

from pqtriage.model.inventory import USE_ROLES, CryptoUse, Purpose, SignatureRole, SourceRef
from pqtriage.sources.cbom_refs import KeyFacts, References, date_of

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
MODES_IN_NAME = ("gcm", "ccm", "cbc", "ctr", "ecb")
"""CycloneDX algorithmProperties.mode values the catalog rates as part of the name (AES + gcm ->
AES-GCM); other modes (cfb, ofb) leave the cipher to be rated alone (NIST SP 800-38A)."""
RSA_NAMES = ("rsa", "rsaencryption")
"""Names a CycloneDX padding turns into an RSA scheme (padding oaep -> RSA-OAEP)."""
USE_PROPERTIES = ("algorithm", "key_size", "curve", "parameter_set", "purpose", "trust_years", "not_before",
                  "not_after", "role", "signature_role", "protocol", "notes", "assumed")
"""``pqtriage:<field>`` properties of a cryptographic asset that ``--format cbom`` writes: the
use's facts exactly as they were, read back in preference to what the standard fields say."""


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
        self._found: dict[str, tuple[int, int]] = {}
        line, last, offset = 1, 0, text.find('"bom-ref"')
        while offset >= 0:  # in document order: count the newlines in between (str.find is C-fast)
            match = _BOM_REF.match(text, offset)
            if match is not None:
                line += text.count("\n", last, offset)
                last = offset
                quoted = match.group(1)
                ref: str | None = quoted[1:-1]
                if "\\" in quoted:
                    try:
                        ref = json.loads(quoted)
                    except ValueError:
                        ref = None
                if isinstance(ref, str) and ref not in self._found:
                    self._found[ref] = (line, offset - text.rfind("\n", 0, offset))
            offset = text.find('"bom-ref"', offset + 9)

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
    """Key size fixed by the context (a key's size, the key that signed a certificate)."""
    curve: str | None = None
    """Curve fixed by the context (the key that signed a certificate)."""
    not_before: dt.date | None = None
    """Start of validity of the certificate the use rests on."""
    not_after: dt.date | None = None
    """End of validity of the certificate the use rests on."""
    notes: tuple[str, ...] = ()
    """What the references said along the way (where a size came from, what is missing)."""
    via: tuple[str, ...] = ()
    """bom-refs between the carrier and the asset being expanded."""

    def into(self, ref: str, **changes: Any) -> _Context:
        """The context for a part this asset refers to."""
        last = self.via[-1] if self.via else self.carrier
        fields = dict(self.__dict__)  # faster than dataclasses.replace on this hot path
        fields["via"] = self.via if ref == last else (*self.via, ref)
        fields.update(changes)
        return _Context(**fields)

    def noting(self, *notes: str | None) -> _Context:
        """The same context with more notes."""
        fields = dict(self.__dict__)
        fields["notes"] = (*self.notes, *(n for n in notes if n))
        return _Context(**fields)


def _notes(*parts: str | None) -> str | None:
    kept: list[str] = []
    for part in parts:
        if part and part not in kept:
            kept.append(part)
    return "; ".join(kept) or None


@dataclass
class UseBuilder:
    """Expands carrier assets into uses; ``assets`` maps bom-ref to the component."""

    path: str
    assets: dict[str, dict[str, Any]]
    positions: Positions
    children: dict[str, tuple[str, ...]]
    """dependsOn edges of crypto assets, used when an asset's properties name no algorithm."""
    warnings: list[str] = field(default_factory=list)

    def __post_init__(self) -> None:
        self.refs = References(self.assets)

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
            notes=_notes(*context.notes, note), source=self.source(context, part),
            assumed=() if purpose else ("purpose",), not_before=context.not_before, not_after=context.not_after,
        )

    def _dangling(self, context: _Context, field_name: str, ref: str) -> CryptoUse:
        self.warnings.append(f"{self.source(context, None)}: {field_name} refers to bom-ref '{ref}', which is"
                             " not in the BOM; its use is unassessed")
        return self._unknown(context, ref, f"{field_name} refers to bom-ref '{ref}', which is not in the BOM")

    def _expand(self, ref: str, context: _Context, depth: int) -> list[CryptoUse]:
        component = self.assets.get(ref)
        if component is None:
            return [self._dangling(context, "a reference", ref)]
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

    # -- algorithms ---------------------------------------------------------------------------
    def _algorithm(self, ref: str, component: dict[str, Any], crypto: dict[str, Any],
                   context: _Context) -> CryptoUse:
        props = mapping_of(crypto.get("algorithmProperties"))
        written = text_of(component.get("name")) or ref
        name, composed = compose_name(written, props)
        parameter_set = text_of(props.get("parameterSetIdentifier"))
        key_size = context.key_size
        if key_size is None and parameter_set and parameter_set.isascii() and parameter_set.isdigit() and len(parameter_set) < 6:
            key_size = int(parameter_set)
        curve = text_of(props.get("curve")) or text_of(props.get("ellipticCurve")) or context.curve
        size_note = None
        if key_size is None and curve is None:
            key_size, size_note = self.refs.material_size(ref)
        purpose = context.purpose
        assumed: tuple[str, ...] = ()
        if purpose is None:
            purpose = algorithm_purpose(props)
        if purpose is None:
            purpose, assumed = Purpose.KEY_ESTABLISHMENT, ("purpose",)
        family = text_of(props.get("algorithmFamily"))
        use = CryptoUse(
            purpose=purpose, algorithm=name, key_size=key_size, curve=curve, parameter_set=parameter_set,
            protocol=context.protocol, oid=text_of(crypto.get("oid")),
            notes=_notes(*context.notes, composed, size_note, f"algorithm family {family} (CycloneDX 1.7)" if family
                         else None),
            source=self.source(context, ref), assumed=assumed, not_before=context.not_before,
            not_after=context.not_after,
        )
        return exact_facts(use, component)

    # -- certificates -------------------------------------------------------------------------
    def _certificate(self, ref: str, component: dict[str, Any], crypto: dict[str, Any],
                     context: _Context, depth: int) -> list[CryptoUse]:
        props = mapping_of(crypto.get("certificateProperties"))
        dated = context.into(ref, not_before=date_of(props.get("notValidBefore")) or context.not_before,
                             not_after=date_of(props.get("notValidAfter")) or context.not_after,
                             key_size=None, curve=None)
        signature, key = text_of(props.get("signatureAlgorithmRef")), text_of(props.get("subjectPublicKeyRef"))
        if signature is None and key is None:
            listed = self._children(ref, dated.into(ref, purpose=Purpose.AUTHENTICATION), depth)
            name = text_of(component.get("name")) or ref
            return listed or [self._unknown(dated, name, f"certificate '{ref}' names no signatureAlgorithmRef and no"
                                          " subjectPublicKeyRef", ref, Purpose.AUTHENTICATION)]
        uses: list[CryptoUse] = []
        # The signature on the certificate is made with the issuer's key and must hold while the
        # certificate is trusted: a signature use, its trust period from the validity.
        signed = dated.into(ref, purpose=Purpose.SIGNATURE)
        if signature is None:
            uses.append(self._unknown(signed, f"{text_of(component.get('name')) or ref} signature",
                                      f"certificate '{ref}' names no signatureAlgorithmRef", ref))
        elif signature not in self.assets:
            uses.append(self._dangling(signed, f"certificate '{ref}' signatureAlgorithmRef", signature))
        else:
            signer, how = self.refs.issuer_key(ref)
            if signer is not None and signer.problem is None:
                signed = signed.into(ref, key_size=signer.key_size, curve=signer.curve)
            signed = signed.noting(how if signer is None or signer.problem is None else
                                   f"{how}, but {signer.problem}")
            uses += self._expand(signature, signed, depth + 1)
        served = dated.into(ref, purpose=Purpose.AUTHENTICATION)
        if key is None:
            uses.append(self._unknown(served, f"{text_of(component.get('name')) or ref} key",
                                      f"certificate '{ref}' names no subjectPublicKeyRef", ref))
        elif key not in self.assets:
            uses.append(self._dangling(served, f"certificate '{ref}' subjectPublicKeyRef", key))
        else:
            uses += self._expand(key, served, depth + 1)
        return uses

    # -- protocols ------------------------------------------------------------------------------
    def _protocol(self, ref: str, component: dict[str, Any], crypto: dict[str, Any],
                  context: _Context, depth: int) -> list[CryptoUse]:
        props = mapping_of(crypto.get("protocolProperties"))
        kind = text_of(props.get("type"))
        label = " ".join(x for x in (PROTOCOL_LABEL.get(kind or "", kind), text_of(props.get("version"))) if x)
        label = label or text_of(component.get("name")) or ref
        own = properties_of(component).get("pqtriage:purpose")
        purpose = Purpose(own) if own in {p.value for p in Purpose} else context.purpose
        inner = context.into(ref, protocol=label, key_size=None, curve=None, purpose=purpose)
        certificates = refs_of(props.get("cryptoRefArray"))
        server_keys = [(c, self.refs.describe(c)) for c in certificates
                       if mapping_of(mapping_of(self.assets.get(c, {})).get("cryptoProperties")).get("assetType")
                       == "certificate"]
        uses: list[CryptoUse] = []
        suites = [mapping_of(s) for s in props.get("cipherSuites", []) if isinstance(props.get("cipherSuites"), list)]
        for suite in suites:
            uses += self._suite(ref, suite, inner, depth, server_keys)
        if len(suites) == 1 and text_of(suites[0].get("name")) and uses:
            uses[0] = exact_facts(uses[0], component)  # our own export: the suite's facts as they were
        for member, member_purpose in IKE_PURPOSE.items():
            for target in refs_of(mapping_of(props.get("ikev2TransformTypes")).get(member)):
                uses += self._expand(target, inner.into(ref, purpose=member_purpose), depth + 1)
        for target in certificates:
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

    def _suite(self, ref: str, suite: dict[str, Any], context: _Context, depth: int,
               server_keys: list[tuple[str, KeyFacts]]) -> list[CryptoUse]:
        parts = refs_of(suite.get("algorithms"))
        name = text_of(suite.get("name"))
        if not name:
            uses: list[CryptoUse] = []
            for target in parts:
                uses += self._expand(target, context, depth + 1)
            return uses
        # A named suite is assessed whole (the catalog splits it); its parts give the key
        # exchange's curve or group and the authentication key's size or curve.
        exchange: KeyFacts | None = None
        auth: KeyFacts | None = None
        notes: list[str] = []
        for target in parts:
            facts = self.refs.describe(target)
            if facts.problem is not None:
                notes.append(f"suite {name}: {facts.problem}")
                continue
            if facts.role == "key-exchange" and exchange is None:
                exchange = facts
            elif facts.role == "authentication" and auth is None:
                auth = facts
        if (auth is None or (auth.key_size is None and auth.curve is None)) and server_keys:
            certificate, key = server_keys[0]
            if key.problem is None and (key.key_size or key.curve):
                auth = key
                notes.append(f"authentication key {key.algorithm} from certificate '{certificate}' of the protocol")
        extra: list[CryptoUse] = []
        curve = exchange.curve if exchange else None
        sizes = [f.key_size for f in (auth, exchange) if f is not None and f.key_size]
        key_size = min(sizes) if sizes else None
        if len(set(sizes)) > 1:
            notes.append(f"key exchange and authentication sizes differ ({', '.join(map(str, sizes))}):"
                         " the smaller is rated")
        if auth is not None and auth.curve:
            if curve is None:
                curve = auth.curve
            elif auth.curve.casefold() != curve.casefold():  # the suite name gives one curve: rate the key apart
                extra.append(CryptoUse(Purpose.AUTHENTICATION, auth.algorithm, curve=auth.curve, oid=auth.oid,
                                       protocol=context.protocol, source=self.source(context, auth.path[-1]),
                                       notes=f"authentication key of {name} (curve {auth.curve}, the key exchange"
                                             f" uses {curve})"))
        for found in (exchange, auth):
            if found is not None and (found.key_size or found.curve):
                notes.append(f"{'key exchange' if found is exchange else 'authentication'} from"
                             f" {' > '.join(found.path)}")
        use = CryptoUse(context.purpose or Purpose.KEY_ESTABLISHMENT, name, key_size=key_size, curve=curve,
                        protocol=context.protocol, source=self.source(context, ref), notes=_notes(*notes))
        return [use, *extra]

    # -- keys and other material ----------------------------------------------------------------
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
            if target not in self.assets:
                return [self._dangling(inner, f"key '{ref}' algorithmRef", target)]
            return self._expand(target, inner, depth + 1)
        uses = self._children(ref, inner, depth)
        name = text_of(component.get("name")) or ref
        return uses or [self._unknown(inner, name, f"key '{ref}' names no algorithmRef", ref)]

    def _children(self, ref: str, context: _Context, depth: int) -> list[CryptoUse]:
        """Crypto assets the asset itself dependsOn, when its properties name none."""
        uses: list[CryptoUse] = []
        for target in self.children.get(ref, ()):
            if target in self.assets:
                uses += self._expand(target, context, depth + 1)
        return uses


def compose_name(name: str, props: dict[str, Any]) -> tuple[str, str | None]:
    """The algorithm name with the mode or padding the CycloneDX properties add, and a note.

    ``AES`` with ``mode: gcm`` is ``AES-GCM`` (the key size then picks AES-128-GCM ...);
    ``RSA`` with ``padding: oaep`` is ``RSA-OAEP``. A name that already says it stays as it is.
    """
    if "mode" not in props and "padding" not in props:
        return name, None
    loose = re.sub(r"[-_/\s]+", "", name).casefold()
    mode = text_of(props.get("mode"))
    if mode and mode.casefold() in MODES_IN_NAME and mode.casefold() not in loose:
        return f"{name}-{mode.upper()}", f"CycloneDX name '{name}' with mode {mode}"
    padding = text_of(props.get("padding"))
    if padding and padding.casefold() == "oaep" and loose in RSA_NAMES:
        return "RSA-OAEP", f"CycloneDX name '{name}' with padding {padding}"
    return name, None


def exact_facts(use: CryptoUse, component: dict[str, Any]) -> CryptoUse:
    """A use with the ``pqtriage:`` facts our own export wrote on its asset, where present."""
    if "properties" not in component:
        return use
    own = properties_of(component)
    if not any(f"pqtriage:{name}" in own for name in USE_PROPERTIES):
        return use
    changes: dict[str, Any] = {}
    text = {name: own.get(f"pqtriage:{name}") for name in USE_PROPERTIES}
    if text["algorithm"]:
        changes["algorithm"] = text["algorithm"]
    for name in ("curve", "parameter_set", "protocol", "notes"):  # written even when empty: "" is none
        if f"pqtriage:{name}" in own:
            changes[name] = text[name] or None
    if "pqtriage:key_size" in own:
        size = text["key_size"] or ""
        changes["key_size"] = int(size) if size.isascii() and size.isdigit() and len(size) < 7 else None
    if text["purpose"] in {p.value for p in Purpose}:
        changes["purpose"] = Purpose(text["purpose"])
    if _number(text["trust_years"]) is not None:
        changes["trust_years"] = _number(text["trust_years"])
    for name in ("not_before", "not_after"):
        if text[name] is not None:
            changes[name] = date_of(text[name])
    if text["role"] in USE_ROLES:
        changes["role"] = text["role"]
    if text["signature_role"] in {r.value for r in SignatureRole}:
        changes["signature_role"] = SignatureRole(text["signature_role"])
    if text["assumed"] is not None:
        changes["assumed"] = tuple(a for a in text["assumed"].split(",") if a)
    return replace(use, **changes)


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


def _number(text: str | None) -> float | None:
    try:
        value = float(text) if text is not None else None
    except ValueError:
        return None
    return value if value is not None and 0 <= value <= 100 else None


__all__ = ["Positions", "UseBuilder", "algorithm_purpose", "compose_name", "exact_facts",
           "mapping_of", "properties_of", "refs_of", "text_of"]
