"""Describe cryptography-library certificates and keys as findings.

Facts only: subject, issuer, validity, key algorithm with size, curve or parameter set,
signature algorithm and its hash, key identifiers, CA flag, key usage. For a private key,
only its type and size.

Purpose rule for a certificate's own key (documented in docs/discovery.md):
  - a CA certificate (basicConstraints cA true, or keyUsage keyCertSign / cRLSign) -> signature;
  - extended key usage only for code signing, e-mail protection or time stamping -> signature;
  - keyUsage with keyEncipherment or keyAgreement but without digitalSignature -> key-establishment;
  - otherwise (a TLS server or client leaf) -> authentication.
The certificate's signature algorithm (the issuer's signature) is always purpose signature.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

from cryptography import x509
from cryptography.exceptions import UnsupportedAlgorithm
from cryptography.hazmat.primitives.asymmetric import (
    dh,
    dsa,
    ec,
    ed448,
    ed25519,
    mldsa,
    mlkem,
    rsa,
    x448,
    x25519,
)
from cryptography.x509.oid import ExtendedKeyUsageOID

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.findings import Finding, FindingKind
from pqtriage.sources.scan.identifiers import identifiers

with warnings.catch_warnings():
    # Naming the classes is not using FFDH; the library warns on first access.
    warnings.simplefilter("ignore")
    _DH_KEYS = (dh.DHPublicKey, dh.DHPrivateKey)
    DH_PARAMETERS = dh.DHParameters

#: cryptography's curve names (SEC 2) -> the NIST names of FIPS 186-5 where they exist.
_CURVES = {
    "secp256r1": "P-256",
    "secp384r1": "P-384",
    "secp521r1": "P-521",
    "secp224r1": "P-224",
    "secp192r1": "P-192",
}


@dataclass(frozen=True)
class KeyFacts:
    """Algorithm facts of one key, never its bytes."""

    algorithm: str
    """Catalog spelling."""
    key_size: int | None = None
    """Bits, for RSA, DSA, DH and elliptic-curve keys."""
    curve: str | None = None
    """Curve name for elliptic-curve keys."""
    parameter_set: str | None = None
    """Parameter set for ML-DSA, ML-KEM, SLH-DSA."""


def curve_name(curve: ec.EllipticCurve) -> str:
    """Return the NIST name of a curve (P-256 ...) or its SEC 2 name otherwise."""
    return _CURVES.get(curve.name, curve.name)


def key_facts(key: object) -> KeyFacts | None:
    """Return algorithm facts for a public or private key object, None if unknown."""
    if isinstance(key, rsa.RSAPublicKey | rsa.RSAPrivateKey):
        return KeyFacts("RSA", key_size=key.key_size)
    if isinstance(key, ec.EllipticCurvePublicKey | ec.EllipticCurvePrivateKey):
        return KeyFacts("ECDSA", key_size=key.curve.key_size, curve=curve_name(key.curve))
    if isinstance(key, dsa.DSAPublicKey | dsa.DSAPrivateKey):
        return KeyFacts("DSA", key_size=key.key_size)
    if isinstance(key, _DH_KEYS):
        return KeyFacts("DH", key_size=key.key_size)
    if isinstance(key, ed25519.Ed25519PublicKey | ed25519.Ed25519PrivateKey):
        return KeyFacts("Ed25519")
    if isinstance(key, ed448.Ed448PublicKey | ed448.Ed448PrivateKey):
        return KeyFacts("Ed448")
    if isinstance(key, x25519.X25519PublicKey | x25519.X25519PrivateKey):
        return KeyFacts("X25519")
    if isinstance(key, x448.X448PublicKey | x448.X448PrivateKey):
        return KeyFacts("X448")
    for size, public, private in (
        ("44", mldsa.MLDSA44PublicKey, mldsa.MLDSA44PrivateKey),
        ("65", mldsa.MLDSA65PublicKey, mldsa.MLDSA65PrivateKey),
        ("87", mldsa.MLDSA87PublicKey, mldsa.MLDSA87PrivateKey),
    ):
        if isinstance(key, public | private):
            return KeyFacts(f"ML-DSA-{size}", parameter_set=size)
    for size, kem_public, kem_private in (
        ("768", mlkem.MLKEM768PublicKey, mlkem.MLKEM768PrivateKey),
        ("1024", mlkem.MLKEM1024PublicKey, mlkem.MLKEM1024PrivateKey),
    ):
        if isinstance(key, kem_public | kem_private):
            return KeyFacts(f"ML-KEM-{size}", parameter_set=size)
    return None


def oid_key_facts(oid: x509.ObjectIdentifier) -> KeyFacts | None:
    """Key facts from a subject public key algorithm OID alone (for keys the library lacks)."""
    entry = identifiers().public_key_algorithms.get(oid.dotted_string)
    if entry is None:
        return None
    return KeyFacts(entry.algorithm, parameter_set=entry.parameter_set)


def key_purpose(facts: KeyFacts) -> Purpose:
    """Purpose of a bare key found on its own: what its algorithm can do."""
    if facts.algorithm in {"X25519", "X448", "DH"} or facts.algorithm.startswith("ML-KEM"):
        return Purpose.KEY_ESTABLISHMENT
    return Purpose.AUTHENTICATION


def _name(name: x509.Name) -> str:
    return name.rfc4514_string()


def _common_name(subject: x509.Name) -> str | None:
    values = subject.get_attributes_for_oid(x509.NameOID.COMMON_NAME)
    if values:
        value = values[0].value
        return value if isinstance(value, str) else value.decode("utf-8", "replace")
    return None


def _extension_values(cert: x509.Certificate) -> tuple[dict[type, object], tuple[str, ...]]:
    """Extension values by class, read in one pass; a note when they do not parse.

    The library parses extensions on first access and raises ValueError for malformed ones
    (found by fuzzing); the certificate's key and signature are still worth reporting.
    """
    try:
        return {type(extension.value): extension.value for extension in cert.extensions}, ()
    except ValueError:
        return {}, ("extensions do not parse (ignored)",)


def _dns_names(values: dict[type, object]) -> list[str]:
    san = values.get(x509.SubjectAlternativeName)
    if not isinstance(san, x509.SubjectAlternativeName):
        return []
    return san.get_values_for_type(x509.DNSName)


_USAGE_ATTRIBUTES = (
    "digital_signature",
    "content_commitment",
    "key_encipherment",
    "data_encipherment",
    "key_agreement",
    "key_cert_sign",
    "crl_sign",
)
_SIGNING_EKU = frozenset(
    {
        ExtendedKeyUsageOID.CODE_SIGNING,
        ExtendedKeyUsageOID.EMAIL_PROTECTION,
        ExtendedKeyUsageOID.TIME_STAMPING,
    }
)
_TLS_EKU = frozenset({ExtendedKeyUsageOID.SERVER_AUTH, ExtendedKeyUsageOID.CLIENT_AUTH})


def _key_usage(values: dict[type, object]) -> tuple[tuple[str, ...], bool, bool]:
    """Return (usage names, CA flag, has code/e-mail/time-stamp-only EKU)."""
    names: list[str] = []
    constraints = values.get(x509.BasicConstraints)
    ca = isinstance(constraints, x509.BasicConstraints) and constraints.ca
    usage = values.get(x509.KeyUsage)
    if isinstance(usage, x509.KeyUsage):
        names.extend(attribute for attribute in _USAGE_ATTRIBUTES if getattr(usage, attribute))
    signing_only_eku = False
    extended = values.get(x509.ExtendedKeyUsage)
    if isinstance(extended, x509.ExtendedKeyUsage):
        eku = set(extended)
        names.extend(oid._name for oid in extended)
        signing_only_eku = bool(eku & _SIGNING_EKU) and not eku & _TLS_EKU
    return tuple(names), ca, signing_only_eku


def certificate_purpose(ca: bool, usage: tuple[str, ...], signing_only_eku: bool) -> Purpose:
    """Purpose of a certificate's own key, by the rule in this module's docstring."""
    if ca or "key_cert_sign" in usage or "crl_sign" in usage or signing_only_eku:
        return Purpose.SIGNATURE
    if "digital_signature" not in usage and (
        "key_encipherment" in usage or "key_agreement" in usage
    ):
        return Purpose.KEY_ESTABLISHMENT
    return Purpose.AUTHENTICATION


def _certificate_key(cert: x509.Certificate) -> KeyFacts:
    try:
        facts = key_facts(cert.public_key())
    except (UnsupportedAlgorithm, ValueError):
        facts = None
    if facts is None:
        facts = oid_key_facts(cert.public_key_algorithm_oid)
    return facts or KeyFacts(f"unknown ({cert.public_key_algorithm_oid.dotted_string})")


#: The cryptography library's hash names -> catalog spellings (FIPS 180-4, FIPS 202, RFC 1321).
_HASH_NAMES = {
    "md5": "MD5",
    "sha1": "SHA-1",
    "sha224": "SHA-224",
    "sha256": "SHA-256",
    "sha384": "SHA-384",
    "sha512": "SHA-512",
    "sha3-224": "SHA3-224",
    "sha3-256": "SHA3-256",
    "sha3-384": "SHA3-384",
    "sha3-512": "SHA3-512",
}


def signature_hash(cert: x509.Certificate, table_hash: str | None) -> str | None:
    """The hash inside the certificate's signature, in catalog spelling, or None (EdDSA,
    ML-DSA and SLH-DSA hash internally: no separate hash).

    The identifier table names the hash of each signature OID; RSASSA-PSS carries its hash
    in the algorithm parameters (RFC 4055, section 3.1), which the library reads.
    """
    if table_hash and table_hash in _HASH_NAMES.values():
        return table_hash
    try:
        algorithm = cert.signature_hash_algorithm
    except (UnsupportedAlgorithm, ValueError):
        return None
    return _HASH_NAMES.get(algorithm.name) if algorithm is not None else None


def signature_facts(cert: x509.Certificate) -> tuple[KeyFacts, str | None, tuple[str, ...]]:
    """Facts of the issuer's signature on a certificate: key facts, hash, notes.

    For RSA the signature is as long as the issuer's modulus (RFC 8017, section 8.2.1:
    the signature is an octet string of length k, the modulus length in octets), so the
    issuer's key size is known even without the issuer's certificate.
    """
    oid = cert.signature_algorithm_oid.dotted_string
    entry = identifiers().signature_algorithms.get(oid)
    if entry is None:
        return (
            KeyFacts(f"unknown ({oid})"),
            None,
            ("signature algorithm not in the identifier table",),
        )
    digest = signature_hash(cert, entry.hash)
    notes = []
    if digest:
        notes.append(f"hash={digest}")
    if entry.notes:
        notes.append(entry.notes)
    key_size = len(cert.signature) * 8 if entry.algorithm == "RSA" else None
    facts = KeyFacts(entry.algorithm, key_size=key_size, parameter_set=entry.parameter_set)
    return facts, digest, tuple(notes)


def _key_identifiers(values: dict[type, object]) -> tuple[str | None, str | None]:
    """(subject key identifier, authority key identifier) as hex (RFC 5280, 4.2.1.1-2)."""
    subject = values.get(x509.SubjectKeyIdentifier)
    authority = values.get(x509.AuthorityKeyIdentifier)
    ski = subject.digest.hex() if isinstance(subject, x509.SubjectKeyIdentifier) else None
    aki = (
        authority.key_identifier.hex()
        if isinstance(authority, x509.AuthorityKeyIdentifier) and authority.key_identifier
        else None
    )
    return ski, aki


def describe_certificate(
    cert: x509.Certificate, source: SourceRef, protocol: str | None = None
) -> list[Finding]:
    """Return the findings of a certificate: its own key, the issuer's signature on it and,
    when the signature algorithm has one, the hash inside that signature (its own use, so a
    SHA-1 or MD5 signed certificate is rated like any other SHA-1 or MD5 signature).

    The issuer's key facts (an ECDSA curve ...) are filled in later by
    :func:`pqtriage.sources.scan.issuers.link_issuers`, once every certificate is known.
    Raises ValueError when the subject, issuer or validity does not parse (the library parses
    them on first use, not at load); extensions that do not parse are noted and ignored.
    """
    # The library builds a new Name object on every access: read each once.
    subject, issuer = cert.subject, cert.issuer
    subject_text = _name(subject)
    values, extension_note = _extension_values(cert)
    usage, ca, signing_only_eku = _key_usage(values)
    facts = _certificate_key(cert)
    dns = _dns_names(values)
    ski, aki = _key_identifiers(values)
    common = {
        "subject": subject_text,
        "subject_name": _common_name(subject) or (dns[0] if dns else None) or subject_text,
        "issuer": _name(issuer),
        "not_before": cert.not_valid_before_utc.date().isoformat(),
        "not_after": cert.not_valid_after_utc.date().isoformat(),
        "ca": ca,
        "key_usage": usage,
        "host": dns[0] if dns else None,
        "protocol": protocol,
        "subject_key_id": ski,
        "authority_key_id": aki,
        "certificate": cert,
    }
    key = Finding(
        source=source,
        kind=FindingKind.CERTIFICATE_KEY,
        algorithm=facts.algorithm,
        purpose=certificate_purpose(ca, usage, signing_only_eku),
        key_size=facts.key_size,
        curve=facts.curve,
        parameter_set=facts.parameter_set,
        notes=extension_note,
        **common,  # type: ignore[arg-type]
    )
    signature, digest, notes = signature_facts(cert)
    self_signed = issuer == subject
    marker = ("self-signed",) if self_signed else ()
    signed = Finding(
        source=_with_suffix(source, "signature"),
        kind=FindingKind.CERTIFICATE_SIGNATURE,
        algorithm=signature.algorithm,
        purpose=Purpose.SIGNATURE,
        key_size=signature.key_size,
        curve=signature.curve,
        parameter_set=signature.parameter_set,
        notes=notes + marker + extension_note,
        **common,  # type: ignore[arg-type]
    )
    found = [key, signed]
    if digest:
        found.append(
            Finding(
                source=_with_suffix(source, "signature-hash"),
                kind=FindingKind.CERTIFICATE_SIGNATURE_HASH,
                algorithm=digest,
                purpose=Purpose.SIGNATURE,
                notes=(
                    f"hash of the {signature.algorithm} signature "
                    f"({cert.signature_algorithm_oid._name or cert.signature_algorithm_oid.dotted_string})",
                )
                + marker,
                **common,  # type: ignore[arg-type]
            )
        )
    return found


def describe_csr(csr: x509.CertificateSigningRequest, source: SourceRef) -> list[Finding]:
    """Return one finding for the key a certificate signing request asks to certify."""
    try:
        facts = key_facts(csr.public_key())
    except (UnsupportedAlgorithm, ValueError):
        facts = None
    facts = facts or KeyFacts("unknown")
    return [
        Finding(
            source=source,
            kind=FindingKind.CSR_KEY,
            algorithm=facts.algorithm,
            purpose=Purpose.AUTHENTICATION,
            key_size=facts.key_size,
            curve=facts.curve,
            parameter_set=facts.parameter_set,
            subject=_name(csr.subject),
            subject_name=_common_name(csr.subject),
            notes=("certificate signing request",),
        )
    ]


def describe_key(
    key: object, source: SourceRef, private: bool, notes: tuple[str, ...] = ()
) -> list[Finding]:
    """Return one finding for a bare public or private key: type and size only."""
    facts = key_facts(key) or KeyFacts("unknown")
    return [
        Finding(
            source=source,
            kind=FindingKind.PRIVATE_KEY if private else FindingKind.PUBLIC_KEY,
            algorithm=facts.algorithm,
            purpose=key_purpose(facts),
            key_size=facts.key_size,
            curve=facts.curve,
            parameter_set=facts.parameter_set,
            notes=(("private key in a plain file",) if private else ()) + notes,
        )
    ]


def _with_suffix(source: SourceRef, role: str) -> SourceRef:
    detail = f"{source.detail}.{role}" if source.detail else role
    return SourceRef(source.file, source.line, source.column, detail)
