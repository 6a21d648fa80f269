"""JSON Web Keys and Key Sets (RFC 7517), key types of RFC 7518 section 6 and RFC 8037.

A JWK with private members (``d`` and friends) is a private key finding: type and size only.
Each key is sourced ``path#key{N}`` (1-based position in ``keys``) or ``path`` for a lone JWK.
"""

from __future__ import annotations

import base64
import binascii
import json
from typing import Any

from pqtriage.jsonio import MAX_JSON_DEPTH, too_deep
from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.findings import (
    Finding,
    FindingKind,
    ParseOutcome,
    ProblemKind,
    ScanProblem,
)

_EC_CURVES = {"P-256": 256, "P-384": 384, "P-521": 521}
_OKP_CURVES = {"Ed25519", "Ed448", "X25519", "X448"}


def _bits(value: Any) -> int | None:
    if not isinstance(value, str):
        return None
    try:
        raw = base64.urlsafe_b64decode(value + "=" * (-len(value) % 4))
    except (binascii.Error, ValueError):
        return None
    return int.from_bytes(raw, "big").bit_length()


def _jwk(key: dict[str, Any], source: SourceRef) -> Finding | ScanProblem:
    kty = key.get("kty")
    private = "d" in key or "priv" in key
    size: int | None = None
    curve: str | None = None
    parameter_set: str | None = None
    if kty == "RSA":
        algorithm, size = "RSA", _bits(key.get("n"))
    elif kty == "EC":
        curve = str(key.get("crv"))
        algorithm, size = "ECDSA", _EC_CURVES.get(curve)
    elif kty == "OKP" and key.get("crv") in _OKP_CURVES:
        algorithm = str(key["crv"])
    elif kty == "AKP" and isinstance(key.get("alg"), str):
        # Post-quantum "AKP" keys name their algorithm in alg (draft-ietf-cose-dilithium).
        algorithm = str(key["alg"])
        parameter_set = algorithm.rsplit("-", 1)[-1] if algorithm.startswith("ML-DSA-") else None
    elif kty == "oct":
        return Finding(
            source=source,
            kind=FindingKind.JWK,
            algorithm=str(key.get("alg") or "symmetric key"),
            purpose=Purpose.INTEGRITY,
            key_size=_bits(key.get("k")),
            notes=("symmetric JWK",),
        )
    else:
        return ScanProblem(f"{source.file}#{source.detail}", ProblemKind.CORRUPT, "unknown kty")
    use = key.get("use")
    if algorithm in {"X25519", "X448"} or use == "enc":
        purpose = Purpose.KEY_ESTABLISHMENT
    elif use == "sig":
        purpose = Purpose.SIGNATURE
    else:
        purpose = Purpose.AUTHENTICATION
    notes = ["JWK"]
    if "kid" in key:
        notes.append(f"kid={key['kid']}")
    if private:
        notes.append("private key in a plain file")
    return Finding(
        source=source,
        kind=FindingKind.PRIVATE_KEY if private else FindingKind.JWK,
        algorithm=algorithm,
        purpose=purpose,
        key_size=size,
        curve=curve,
        parameter_set=parameter_set,
        notes=tuple(notes),
    )


def looks_like_jwk(data: bytes) -> bool:
    """Cheap test before JSON parsing: a JSON object mentioning ``kty``."""
    head = data.lstrip()[:1]
    return head == b"{" and b'"kty"' in data


def parse_jwks(data: bytes, path: str) -> ParseOutcome:
    """Describe a JWK Set (``{"keys": [...]}``) or a single JWK."""
    if too_deep(data):  # json.loads would recurse once per level: refuse deep files first
        problem = ScanProblem(path, ProblemKind.CORRUPT, f"JSON nested deeper than {MAX_JSON_DEPTH} levels")
        return ParseOutcome(problems=(problem,), recognised=True)
    try:
        document = json.loads(data)
    except (ValueError, UnicodeDecodeError, RecursionError):
        return ParseOutcome()
    if isinstance(document, dict) and isinstance(document.get("keys"), list):
        entries: list[tuple[str | None, Any]] = [
            (f"key{i}", k) for i, k in enumerate(document["keys"], start=1)
        ]
    elif isinstance(document, dict) and "kty" in document:
        entries = [(None, document)]
    else:
        return ParseOutcome()
    findings: list[Finding] = []
    problems: list[ScanProblem] = []
    for detail, key in entries:
        source = SourceRef(path, detail=detail)
        if not isinstance(key, dict):
            problems.append(ScanProblem(f"{path}#{detail}", ProblemKind.CORRUPT, "not an object"))
            continue
        result = _jwk(key, source)
        (findings if isinstance(result, Finding) else problems).append(result)  # type: ignore[arg-type]
    return ParseOutcome(tuple(findings), tuple(problems), recognised=True)
