"""The key and certificate readers in their recognition order, without the finders around them.

Order (first match wins): PKCS#12 structure, PEM BEGIN line, one DER SEQUENCE, JSON Web Key
(Set), OpenSSH key lines. A file named like key material that none of them recognises is
reported corrupt by :func:`material_name_fallback`.
"""

from __future__ import annotations

from pqtriage.sources.scan.der import MATERIAL_SUFFIXES, parse_der
from pqtriage.sources.scan.findings import ParseOutcome, ProblemKind, ScanProblem
from pqtriage.sources.scan.jwks import looks_like_jwk, parse_jwks
from pqtriage.sources.scan.openssh import parse_openssh_text
from pqtriage.sources.scan.pem import has_pem, parse_pem
from pqtriage.sources.scan.pkcs12 import looks_like_pkcs12, parse_pkcs12

_SSH_HINTS = (b"ssh-", b"ecdsa-sha2-", b"sk-")


def material_name_fallback(data: bytes, path: str) -> ParseOutcome:
    """A file named like key material (``.key``, ``.pem`` ...) that no reader recognised."""
    if data and path.lower().endswith(MATERIAL_SUFFIXES):
        problem = ScanProblem(path, ProblemKind.CORRUPT, "no recognised key or certificate")
        return ParseOutcome(problems=(problem,), recognised=True)
    return ParseOutcome()


def recognise(data: bytes, path: str, password: bytes | None = None) -> ParseOutcome:
    """The key and certificate readers in order; not recognised when none applies."""
    if looks_like_pkcs12(data):
        return parse_pkcs12(data, path, password)
    if has_pem(data):
        return parse_pem(data, path, password)
    if data[:1] == b"\x30":
        outcome = parse_der(data, path, password)
        if outcome.recognised:
            return outcome
    if looks_like_jwk(data):
        outcome = parse_jwks(data, path)
        if outcome.recognised:
            return outcome
    if any(hint in data for hint in _SSH_HINTS):
        outcome = parse_openssh_text(data.decode("utf-8", "replace"), path)
        if outcome.recognised:
            return outcome
    return ParseOutcome()
