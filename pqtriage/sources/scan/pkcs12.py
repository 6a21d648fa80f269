"""PKCS#12 bundles (RFC 7292): a private key with its certificate and CA certificates.

An unencrypted bundle is read whole. An encrypted one is reported as found with type
unknown, unless a password is given (``--password-file``). The password and the key bytes
never reach a finding or a message.
"""

from __future__ import annotations

from cryptography import x509
from cryptography.exceptions import UnsupportedAlgorithm
from cryptography.hazmat.primitives.serialization import pkcs12

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.certificates import describe_certificate, describe_key
from pqtriage.sources.scan.der import der_total_length
from pqtriage.sources.scan.findings import (
    Finding,
    FindingKind,
    ParseOutcome,
    ProblemKind,
    ScanProblem,
)

#: DER of the OID 1.2.840.113549.1.7.1 (PKCS #7 data), RFC 7292 section 4: authSafe content.
_PKCS7_DATA_OID = bytes.fromhex("06092a864886f70d010701")
#: DER of INTEGER 3: PFX version v3, RFC 7292 section 4.
_VERSION_3 = bytes.fromhex("020103")
_PARSE_ERRORS = (ValueError, TypeError, UnsupportedAlgorithm, x509.InvalidVersion)
#: DER of the OIDs that mark an encrypted part: 1.2.840.113549.1.7.6 (PKCS #7 encryptedData,
#: RFC 7292 section 4.1) and 1.2.840.113549.1.12.10.1.2 (pkcs8ShroudedKeyBag, section 4.2.2).
_ENCRYPTION_MARKERS = (
    bytes.fromhex("06092a864886f70d010706"),
    bytes.fromhex("060b2a864886f70d010c0a0102"),
)


def looks_like_pkcs12(data: bytes) -> bool:
    """True for a PFX structure: SEQUENCE { INTEGER 3, ContentInfo { pkcs7-data ... } ... }."""
    total = der_total_length(data)
    if total is None:
        return False
    header = 2 if data[1] < 0x80 else 2 + (data[1] & 0x7F)
    if data[header : header + 3] != _VERSION_3:
        return False
    return _PKCS7_DATA_OID in data[header + 3 : header + 3 + 24]


def parse_pkcs12(data: bytes, path: str, password: bytes | None) -> ParseOutcome:
    """Describe a PKCS#12 bundle: key (``#key``), certificate (``#cert``), CAs (``#ca1`` ...)."""
    total = der_total_length(data)
    if total is not None and total > len(data):
        problem = ScanProblem(
            path, ProblemKind.TRUNCATED, f"PKCS#12 announces {total} bytes, file has {len(data)}"
        )
        return ParseOutcome(problems=(problem,), recognised=True)
    try:
        bundle = pkcs12.load_pkcs12(data, None)
    except _PARSE_ERRORS:
        bundle = None
    note: tuple[str, ...] = ()
    if bundle is None and password is not None:
        try:
            bundle = pkcs12.load_pkcs12(data, password)
            note = ("encrypted; opened with the password",)
        except _PARSE_ERRORS:
            return ParseOutcome(
                findings=(_encrypted(path, "encrypted; the password did not open it"),),
                recognised=True,
            )
    if bundle is None and not any(marker in data for marker in _ENCRYPTION_MARKERS):
        # Nothing in it is encrypted, so no password can help: the bundle is damaged.
        reason = "PKCS#12 does not parse (nothing in it is encrypted, so no password would help)"
        problem = ScanProblem(path, ProblemKind.CORRUPT, reason)
        return ParseOutcome(problems=(problem,), recognised=True)
    if bundle is None:
        return ParseOutcome(
            findings=(_encrypted(path, "encrypted; type unknown (give --password-file)"),),
            recognised=True,
        )
    try:
        findings = _bundle_findings(bundle, path, note)
    except _PARSE_ERRORS:
        reason = "PKCS#12 holds a certificate whose names or dates do not parse"
        return ParseOutcome(
            problems=(ScanProblem(path, ProblemKind.CORRUPT, reason),), recognised=True
        )
    return ParseOutcome(findings=tuple(findings), recognised=True)


def _bundle_findings(
    bundle: pkcs12.PKCS12KeyAndCertificates, path: str, note: tuple[str, ...]
) -> list[Finding]:
    findings: list[Finding] = []
    if bundle.key is not None:
        findings.extend(describe_key(bundle.key, SourceRef(path, detail="key"), True, note))
    if bundle.cert is not None:
        findings.extend(
            describe_certificate(bundle.cert.certificate, SourceRef(path, detail="cert"))
        )
    for index, extra in enumerate(bundle.additional_certs, start=1):
        findings.extend(
            describe_certificate(extra.certificate, SourceRef(path, detail=f"ca{index}"))
        )
    return findings


def _encrypted(path: str, note: str) -> Finding:
    return Finding(
        source=SourceRef(path),
        kind=FindingKind.PKCS12_ENCRYPTED,
        algorithm="unknown",
        purpose=Purpose.AUTHENTICATION,
        notes=("PKCS#12 bundle", note),
    )
