"""DER files: certificates, CSRs, public and private keys, PKCS#7 bundles.

Recognition rule: the file is one complete DER SEQUENCE (its outer length covers the file,
a trailing newline allowed; ITU-T X.690, section 8.1). A sequence whose length runs past the
end of a file with a key or certificate extension is reported as truncated.
"""

from __future__ import annotations

from cryptography import x509
from cryptography.exceptions import UnsupportedAlgorithm
from cryptography.hazmat.primitives import serialization
from cryptography.hazmat.primitives.serialization import pkcs7

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.certificates import describe_certificate, describe_csr, describe_key
from pqtriage.sources.scan.findings import (
    Finding,
    FindingKind,
    ParseOutcome,
    ProblemKind,
    ScanProblem,
)

#: File name endings that announce keys or certificates (common practice, no source).
MATERIAL_SUFFIXES = (
    ".der", ".cer", ".crt", ".cert", ".key", ".pub", ".pem", ".p7b", ".p7c", ".p8",
    ".pk8", ".csr", ".req", ".p12", ".pfx", ".jwk", ".jwks",
)  # fmt: skip

# x509.InvalidVersion is not a ValueError: a certificate version other than v1 or v3 raises it
# (found by fuzzing).
_PARSE_ERRORS = (ValueError, TypeError, UnsupportedAlgorithm, x509.InvalidVersion)


def der_total_length(data: bytes) -> int | None:
    """Return the length the outer DER SEQUENCE header announces (header included), or None.

    ITU-T X.690, section 8.1.3: short form below 128, else 0x80 | number of length octets.
    """
    if len(data) < 2 or data[0] != 0x30:
        return None
    first = data[1]
    if first < 0x80:
        return 2 + first
    count = first & 0x7F
    if count == 0 or count > 4 or len(data) < 2 + count:
        return None
    return 2 + count + int.from_bytes(data[2 : 2 + count], "big")


def looks_like_der(data: bytes) -> bool:
    """True when the bytes are exactly one DER SEQUENCE (a trailing newline allowed)."""
    total = der_total_length(data)
    if total is None or total > len(data):
        return False
    return data[total:].strip(b"\r\n") == b""


def parse_der_object(der: bytes, source: SourceRef, password: bytes | None) -> list[Finding] | None:
    """Try each DER structure in turn; return its findings, or None if none parses."""
    try:
        return describe_certificate(x509.load_der_x509_certificate(der), source)
    except _PARSE_ERRORS:
        pass
    try:
        return describe_csr(x509.load_der_x509_csr(der), source)
    except _PARSE_ERRORS:
        pass
    try:
        certificates = pkcs7.load_der_pkcs7_certificates(der)
    except _PARSE_ERRORS:
        certificates = None
    if certificates is not None:
        try:
            return pkcs7_findings(certificates, source)
        except _PARSE_ERRORS:
            return None  # a certificate's name or extension does not parse
    try:
        return describe_key(serialization.load_der_public_key(der), source, private=False)
    except _PARSE_ERRORS:
        pass
    return private_key_der(der, source, password)


def pkcs7_findings(certificates: list[x509.Certificate], source: SourceRef) -> list[Finding]:
    """Findings for each certificate of a PKCS#7 bundle, numbered ``cert1`` ...."""
    findings: list[Finding] = []
    for index, cert in enumerate(certificates, start=1):
        detail = f"{source.detail}.cert{index}" if source.detail else f"cert{index}"
        findings.extend(
            describe_certificate(cert, SourceRef(source.file, source.line, None, detail))
        )
    return findings


def private_key_der(der: bytes, source: SourceRef, password: bytes | None) -> list[Finding] | None:
    """Findings for a PKCS#8 private key (plain or encrypted), or None if it is not one.

    Messages and findings carry the key's type and size only, never its bytes.
    """
    try:
        key = serialization.load_der_private_key(der, None)
        return describe_key(key, source, private=True)
    except TypeError:
        pass  # encrypted: the library asks for a password
    except _PARSE_ERRORS:
        return None
    if password is None:
        return [encrypted_private_key(source, "encrypted PKCS#8; type unknown without a password")]
    try:
        key = serialization.load_der_private_key(der, password)
    except _PARSE_ERRORS:
        return [encrypted_private_key(source, "encrypted PKCS#8; the password did not open it")]
    return describe_key(key, source, private=True, notes=("encrypted; opened with the password",))


def encrypted_private_key(source: SourceRef, note: str, algorithm: str = "unknown") -> Finding:
    """A private key whose type or size cannot be read without its password."""
    return Finding(
        source=source,
        kind=FindingKind.PRIVATE_KEY,
        algorithm=algorithm,
        purpose=Purpose.AUTHENTICATION,
        notes=("private key in a plain file", note),
    )


def parse_der(data: bytes, path: str, password: bytes | None) -> ParseOutcome:
    """Parse a whole DER file; unrecognised DER-looking files are reported as corrupt."""
    source = SourceRef(path)
    total = der_total_length(data)
    if total is not None and total > len(data) and path.lower().endswith(MATERIAL_SUFFIXES):
        problem = ScanProblem(
            path,
            ProblemKind.TRUNCATED,
            f"DER structure announces {total} bytes but the file has {len(data)}",
        )
        return ParseOutcome(problems=(problem,), recognised=True)
    if not looks_like_der(data):
        return ParseOutcome()
    der = data[:total]
    findings = parse_der_object(der, source, password)
    if findings is None:
        if path.lower().endswith(MATERIAL_SUFFIXES):
            problem = ScanProblem(
                path,
                ProblemKind.CORRUPT,
                "DER structure is not a certificate, CSR, PKCS#7 bundle or key",
            )
            return ParseOutcome(problems=(problem,), recognised=True)
        return ParseOutcome()
    return ParseOutcome(findings=tuple(findings), recognised=True)
