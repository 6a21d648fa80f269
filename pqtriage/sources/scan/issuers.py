"""Find the key that made each certificate signature, and prove it by the signature itself.

A certificate names its issuer twice: by distinguished name and, usually, by the authority
key identifier, which equals the subject key identifier of the issuing CA certificate
(RFC 5280, sections 4.2.1.1 and 4.2.1.2). Neither is proof: two CAs may share a name, and
identifiers are only hints. The proof is the signature: a candidate is the issuer when its
public key verifies the certificate's signature over the to-be-signed bytes (RFC 5280,
section 4.1.1.3), checked with the cryptography library.

Order of the search for each certificate signature:
  1. certificates whose subject key identifier equals the authority key identifier;
  2. otherwise certificates whose subject name equals the issuer name (the fallback, and the
     use's notes say so);
  3. a candidate is accepted only when its key verifies the signature. When the library
     cannot verify the algorithm at all, a single name match is used and the notes say that
     the signature was not verified.
The accepted issuer's key gives the signature the facts it lacks (an ECDSA curve, an RSA
size). A self-signature that verifies with the certificate's own key is a trust anchor's (or
a pinned certificate's): path validation takes the anchor as given and never relies on that
signature (RFC 5280, section 6.1.1 (d)), so the hash inside it is kept as a note and not
rated as a use of its own; every other signature hash stays a use. When no issuer is found, an ECDSA signature still tells the size of the issuer's
group order: r and s are integers below the order n (SEC 1 v2, section 4.1.3; FIPS 186-5,
section 6.4.1), so the longer of the two has the bit length of n with overwhelming
probability (a shorter length by b bits has probability about 2^-2b).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Iterable

from cryptography import x509
from cryptography.exceptions import InvalidSignature, UnsupportedAlgorithm
from cryptography.hazmat.primitives.asymmetric import dsa, ec, ed448, ed25519, padding, rsa
from cryptography.hazmat.primitives.asymmetric.utils import decode_dss_signature

from pqtriage.sources.scan.findings import Finding, FindingKind

_RSASSA_PSS = "1.2.840.113549.1.1.10"  # RFC 4055, section 3.1
SELF_SIGNED = "self-signed, signature verified with its own key"

#: Group order sizes of the curves a certificate may name (SEC 2 v2; NIST SP 800-186; RFC 5639).
_ORDER_SIZES = (160, 192, 224, 256, 320, 384, 512, 521)


def verify_signature(cert: x509.Certificate, issuer: x509.Certificate) -> bool | None:
    """True when the issuer's public key verifies cert's signature, False when it does not,
    None when the library cannot check this algorithm (never raises).

    The public key's own ``verify`` is used rather than ``verify_directly_issued_by``: that
    helper refuses MD5 and SHA-1 signatures, which are exactly the ones a triage must see,
    and it also demands equal names, which the identifier route does not need.
    """
    try:
        key = issuer.public_key()
        signature, data = cert.signature, cert.tbs_certificate_bytes
        if isinstance(key, rsa.RSAPublicKey):
            scheme = cert.signature_algorithm_parameters
            digest = cert.signature_hash_algorithm
            if scheme is None and cert.signature_algorithm_oid.dotted_string != _RSASSA_PSS:
                scheme = padding.PKCS1v15()  # the library names no parameters for MD5 and SHA-1
            if not isinstance(scheme, padding.PKCS1v15 | padding.PSS) or digest is None:
                return None
            key.verify(signature, data, scheme, digest)
        elif isinstance(key, ec.EllipticCurvePublicKey):
            scheme = cert.signature_algorithm_parameters
            if not isinstance(scheme, ec.ECDSA):
                return False
            key.verify(signature, data, scheme)
        elif isinstance(key, dsa.DSAPublicKey):
            digest = cert.signature_hash_algorithm
            if digest is None:
                return None
            key.verify(signature, data, digest)
        elif isinstance(key, ed25519.Ed25519PublicKey | ed448.Ed448PublicKey):
            key.verify(signature, data)
        else:  # ML-DSA, SLH-DSA ...: the library's own path issuer check
            cert.verify_directly_issued_by(issuer)
    except InvalidSignature:
        return False
    except (UnsupportedAlgorithm, ValueError, TypeError):
        return None
    return True


def ecdsa_order_bits(cert: x509.Certificate) -> int | None:
    """Bit length of the signing curve's group order, read from the ECDSA signature values."""
    try:
        r, s = decode_dss_signature(cert.signature)
    except ValueError:
        return None
    longest = max(r.bit_length(), s.bit_length())
    return next((size for size in _ORDER_SIZES if size >= longest), None)


MAX_ISSUER_CANDIDATES = 16
"""Signatures verified per certificate at most. 10,000 certificates sharing one subject name
(or one copied 10,000 times) would otherwise verify each against all: 10^8 checks."""


def _index(findings: Iterable[Finding]) -> tuple[dict[str, list[Finding]], dict[str, list[Finding]]]:
    """Candidates by subject key identifier and by subject name, each certificate once per key
    (indexed once here, so the search per signature does not walk duplicates)."""
    by_key_id: dict[str, dict[bytes, Finding]] = {}
    by_name: dict[str, dict[bytes, Finding]] = {}
    for finding in findings:
        if finding.kind is not FindingKind.CERTIFICATE_KEY or finding.certificate is None:
            continue
        fingerprint = finding.certificate.tbs_certificate_bytes
        if finding.subject_key_id:
            by_key_id.setdefault(finding.subject_key_id, {}).setdefault(fingerprint, finding)
        if finding.subject is not None:
            by_name.setdefault(finding.subject, {}).setdefault(fingerprint, finding)
    return ({k: list(v.values()) for k, v in by_key_id.items()},
            {k: list(v.values()) for k, v in by_name.items()})


def _own_first(candidates: list[Finding], own: bytes) -> list[Finding]:
    """The certificate itself first among its candidates (a self-signature is checked at once)."""
    for index, candidate in enumerate(candidates):
        if candidate.certificate is not None and candidate.certificate.tbs_certificate_bytes == own:
            return [candidate, *candidates[:index], *candidates[index + 1:]] if index else candidates
    return candidates


def find_issuer(
    signature: Finding,
    by_key_id: dict[str, list[Finding]],
    by_name: dict[str, list[Finding]],
) -> tuple[Finding | None, str]:
    """The key finding of the certificate that made this signature, and how it was found."""
    cert = signature.certificate
    assert cert is not None
    own_bytes = cert.tbs_certificate_bytes
    by_id = _own_first(by_key_id.get(signature.authority_key_id or "", []), own_bytes)
    taken = {c.certificate.tbs_certificate_bytes for c in by_id if c.certificate is not None}
    named = _own_first([c for c in by_name.get(signature.issuer or "", [])
                        if c.certificate is not None and c.certificate.tbs_certificate_bytes not in taken],
                       own_bytes)
    unverifiable: list[Finding] = []
    refused: list[Finding] = []
    budget = MAX_ISSUER_CANDIDATES
    for route, candidates in (("authority key identifier", by_id), ("issuer name", named)):
        for candidate in candidates:
            if budget <= 0:
                break
            budget -= 1
            assert candidate.certificate is not None
            verdict = verify_signature(cert, candidate.certificate)
            if verdict:
                own = candidate.certificate.tbs_certificate_bytes == cert.tbs_certificate_bytes
                if own:
                    return candidate, SELF_SIGNED
                how = f"found by {route}, signature verified"
                if route == "issuer name":
                    how += " (no matching authority key identifier: name fallback)"
                return candidate, how
            (unverifiable if verdict is None else refused).append(candidate)
    if len(unverifiable) == 1 and not refused:
        only = unverifiable[0]
        return only, "matched by issuer name only; the signature could not be verified (name fallback)"
    if refused:
        places = ", ".join(c.locator() for c in refused[:3])
        return None, f"issuer candidates {places} do not verify this signature: their keys are not used"
    return None, ""


def link_issuers(findings: list[Finding]) -> list[Finding]:
    """Give each certificate signature the facts of the key that made it (see module doc).

    Only facts the signature lacks are filled, each fill says where it came from, and a
    certificate's own findings are otherwise unchanged. Order and count are kept.
    """
    by_key_id, by_name = _index(findings)
    linked = []
    anchors: set[bytes] = set()
    for finding in findings:
        if finding.kind is FindingKind.CERTIFICATE_SIGNATURE and finding.certificate is not None:
            finding = _linked(finding, by_key_id, by_name)
            if SELF_SIGNED in finding.notes[-1:] and finding.certificate is not None:
                anchors.add(finding.certificate.tbs_certificate_bytes)
        linked.append(finding)
    return [
        finding
        for finding in linked
        if not (
            finding.kind is FindingKind.CERTIFICATE_SIGNATURE_HASH
            and finding.certificate is not None
            and finding.certificate.tbs_certificate_bytes in anchors
        )
    ]


def _linked(
    finding: Finding, by_key_id: dict[str, list[Finding]], by_name: dict[str, list[Finding]]
) -> Finding:
    issuer, how = find_issuer(finding, by_key_id, by_name)
    notes = list(finding.notes)
    if issuer is not None and issuer.algorithm == finding.algorithm:
        key_size = finding.key_size or issuer.key_size
        curve = finding.curve or issuer.curve
        if how == SELF_SIGNED:
            notes = [
                f"{note} (in the self-signature: not rated on its own)"
                if note.startswith("hash=") else note
                for note in notes
                if note != "self-signed"
            ]
            notes.append(how)  # last: link_issuers looks for it there
        else:
            notes.append(f"issuer key {issuer.locator()}: {how}")
        return dataclasses.replace(finding, key_size=key_size, curve=curve, notes=tuple(notes))
    if how:
        notes.append(how)
    if finding.algorithm == "ECDSA" and finding.curve is None and finding.key_size is None:
        assert finding.certificate is not None
        bits = ecdsa_order_bits(finding.certificate)
        if bits is not None:
            notes.append(
                f"issuer certificate not found: group order of {bits} bits read from the "
                "signature values r and s (curve not known)"
            )
            return dataclasses.replace(finding, key_size=bits, notes=tuple(notes))
    if issuer is None and not how:
        notes.append("issuer certificate not found")
    return dataclasses.replace(finding, notes=tuple(notes))
