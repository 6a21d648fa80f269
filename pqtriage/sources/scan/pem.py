"""PEM files with any number of blocks (RFC 7468 textual encodings, RFC 1421 headers).

Each block is read on its own and sourced ``path#blockN`` (1-based, in file order), so one
corrupt block does not hide the others. A BEGIN line without its END line is reported as
truncated. Private key blocks give their type and size only; no message quotes their bytes.
"""

from __future__ import annotations

import base64
import binascii
import re

from cryptography import x509
from cryptography.exceptions import UnsupportedAlgorithm
from cryptography.hazmat.primitives import serialization
from cryptography.hazmat.primitives.serialization import pkcs7

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.certificates import (
    DH_PARAMETERS,
    describe_certificate,
    describe_csr,
    describe_key,
)
from pqtriage.sources.scan.der import (
    der_total_length,
    encrypted_private_key,
    pkcs7_findings,
    private_key_der,
)
from pqtriage.sources.scan.findings import (
    Finding,
    FindingKind,
    ParseOutcome,
    ProblemKind,
    ScanProblem,
)
from pqtriage.sources.scan.sshwire import WireError, parse_openssh_private_key

_BEGIN = re.compile(rb"^-----BEGIN ([A-Z0-9 #]{1,64})-----[ \t]*\r?$", re.MULTILINE)
# x509.InvalidVersion is not a ValueError: a certificate version other than v1 or v3 raises it
# (found by fuzzing).
_PARSE_ERRORS = (ValueError, TypeError, UnsupportedAlgorithm, x509.InvalidVersion)
_LEGACY_KEYS = {"RSA PRIVATE KEY": "RSA", "EC PRIVATE KEY": "ECDSA", "DSA PRIVATE KEY": "DSA"}
_IGNORED = {"X509 CRL", "EC PARAMETERS", "PGP SIGNATURE", "SIGNATURE"}


def has_pem(data: bytes) -> bool:
    """True when the bytes contain at least one PEM BEGIN line."""
    return _next_begin(data, 0) is not None


def _at_line_start(data: bytes, position: int) -> bool:
    return position == 0 or data[position - 1] == 0x0A  # as "^" in re.MULTILINE


def _next_begin(data: bytes, start: int) -> re.Match[bytes] | None:
    """The next BEGIN line at or after ``start``.

    bytes.find locates candidates; the regex only checks each one. A MULTILINE search for
    ``^-----BEGIN`` tries every position of the file and cost a fifth of a certificate scan.
    """
    position = data.find(b"-----BEGIN ", start)
    while position >= 0:
        if _at_line_start(data, position):
            match = _BEGIN.match(data, position)
            if match is not None:
                return match
        position = data.find(b"-----BEGIN ", position + 1)
    return None


def _end_line(data: bytes, label: bytes, start: int) -> tuple[int, int] | None:
    """(start, end) of the first ``-----END <label>-----`` at a line start after ``start``."""
    needle = b"-----END " + label + b"-----"
    position = data.find(needle, start)
    while position >= 0 and not _at_line_start(data, position):
        position = data.find(needle, position + 1)
    return None if position < 0 else (position, position + len(needle))


def parse_pem(data: bytes, path: str, password: bytes | None) -> ParseOutcome:
    """Describe every block of a PEM file."""
    findings: list[Finding] = []
    problems: list[ScanProblem] = []
    number = 0
    line, counted = 1, 0  # lines counted so far: one pass over the file, not one per block
    match = _next_begin(data, 0)
    while match is not None:
        number += 1
        if number > MAX_PEM_BLOCKS:
            line += data.count(b"\n", counted, match.start())
            findings.append(_rest_not_described(data, match.start(), path, line, number))
            problems.append(ScanProblem(
                f"{path}#block{number}", ProblemKind.SKIPPED,
                f"{findings[-1].notes[0]}; split the file to scan them",
            ))
            break
        label = match.group(1).decode("ascii")
        line += data.count(b"\n", counted, match.start())
        counted = match.start()
        source = SourceRef(path, line=line, detail=f"block{number}")
        place = f"{path}#block{number}"
        end = _end_line(data, match.group(1), match.end())
        next_begin = _next_begin(data, match.end())
        current, match = match, next_begin
        if end is None or (next_begin is not None and next_begin.start() < end[0]):
            problems.append(ScanProblem(place, ProblemKind.TRUNCATED, f"{label} has no END line"))
            continue
        body = data[current.end() : end[0]]
        block_text = data[current.start() : end[1]] + b"\n"
        try:
            outcome = _block(label, body, block_text, source, password)
        except _BlockError as error:
            problems.append(ScanProblem(place, error.kind, error.reason))
            continue
        findings.extend(outcome)
    return ParseOutcome(tuple(findings), tuple(problems), recognised=True)


MAX_PEM_BLOCKS = 10_000
"""Blocks described per PEM file. The inventory a scan writes must stay within what ``triage``
reads (16 MiB): one file of 39,000 certificates would describe 78,000 uses in about 20 MB. The
blocks past the limit stay in the inventory as one unassessed use that says how many they are."""


def _rest_not_described(data: bytes, start: int, path: str, line: int, number: int) -> Finding:
    rest = data.count(b"-----BEGIN ", start)
    return Finding(
        source=SourceRef(path, line=line, detail=f"block{number}"),
        kind=FindingKind.DAMAGED,
        algorithm="unknown",
        purpose=Purpose.AUTHENTICATION,
        notes=(f"{rest:,} more PEM blocks (block {number} on) not described: more than "
               f"{MAX_PEM_BLOCKS:,} blocks in one file",),
    )


class _BlockError(Exception):
    def __init__(self, kind: ProblemKind, reason: str) -> None:
        super().__init__(reason)
        self.kind = kind
        self.reason = reason


def _decode_body(body: bytes, label: str) -> tuple[bytes, dict[str, str]]:
    """Split RFC 1421 headers from the base64 body and decode it."""
    if b":" not in body:  # no headers: the common case, decoded without a per-line loop
        try:
            der = base64.b64decode(body.translate(None, b"\r\n"), validate=True)
        except (binascii.Error, ValueError):
            der = b""  # blanks or other bytes inside: the full path below says what is wrong
        if der:
            return _checked_length(der, label), {}
    headers: dict[str, str] = {}
    lines = body.strip().splitlines()
    text_lines: list[bytes] = []
    for raw in lines:
        stripped = raw.strip()
        if b":" in stripped and not text_lines:
            key, _, value = stripped.partition(b":")
            headers[key.decode("ascii", "replace").strip()] = value.decode("ascii", "replace")
            continue
        text_lines.append(stripped)
    try:
        der = base64.b64decode(b"".join(text_lines), validate=True)
    except (binascii.Error, ValueError) as error:
        raise _BlockError(ProblemKind.CORRUPT, f"{label} body is not valid base64") from error
    if not der:
        raise _BlockError(ProblemKind.CORRUPT, f"{label} body is empty")
    return _checked_length(der, label), headers


def _checked_length(der: bytes, label: str) -> bytes:
    total = der_total_length(der)
    if total is not None and total > len(der):
        raise _BlockError(
            ProblemKind.TRUNCATED, f"{label} announces {total} bytes but holds {len(der)}"
        )
    return der


def _block(
    label: str, body: bytes, block_text: bytes, source: SourceRef, password: bytes | None
) -> list[Finding]:
    if label in _IGNORED:
        return []
    der, headers = _decode_body(body, label)
    corrupt = _BlockError(ProblemKind.CORRUPT, f"{label} does not parse")
    if label in {"CERTIFICATE", "X509 CERTIFICATE", "TRUSTED CERTIFICATE"}:
        total = der_total_length(der)
        try:
            # TRUSTED CERTIFICATE (OpenSSL) appends trust settings after the certificate.
            cert = x509.load_der_x509_certificate(der[:total] if total else der)
            # Names and extensions are parsed on first use: they may fail here too.
            return describe_certificate(cert, source)
        except _PARSE_ERRORS:
            raise corrupt from None
    if label in {"CERTIFICATE REQUEST", "NEW CERTIFICATE REQUEST"}:
        try:
            return describe_csr(x509.load_der_x509_csr(der), source)
        except _PARSE_ERRORS:
            raise corrupt from None
    if label in {"PUBLIC KEY", "RSA PUBLIC KEY"}:
        try:
            key = serialization.load_pem_public_key(block_text)
        except _PARSE_ERRORS:
            raise corrupt from None
        return describe_key(key, source, private=False)
    if label in {"PKCS7", "CMS"}:
        try:
            return pkcs7_findings(pkcs7.load_der_pkcs7_certificates(der), source)
        except _PARSE_ERRORS:
            raise corrupt from None
    if label in {"PRIVATE KEY", "ENCRYPTED PRIVATE KEY"}:
        found = private_key_der(der, source, password)
        if found is None:
            raise _BlockError(ProblemKind.CORRUPT, f"{label} does not parse (key bytes withheld)")
        return found
    if label in _LEGACY_KEYS:
        return _legacy_private_key(label, block_text, headers, source, password)
    if label == "OPENSSH PRIVATE KEY":
        return _openssh_private_key(der, source)
    if label == "DH PARAMETERS":
        try:
            parameters = serialization.load_pem_parameters(block_text)
        except _PARSE_ERRORS:
            raise corrupt from None
        if not isinstance(parameters, DH_PARAMETERS):
            return []
        return [
            Finding(
                source=source,
                kind=FindingKind.PUBLIC_KEY,
                algorithm="DH",
                purpose=Purpose.KEY_ESTABLISHMENT,
                key_size=parameters.parameter_numbers().p.bit_length(),
                notes=("Diffie-Hellman parameters",),
            )
        ]
    return []


def _legacy_private_key(
    label: str,
    block_text: bytes,
    headers: dict[str, str],
    source: SourceRef,
    password: bytes | None,
) -> list[Finding]:
    """RFC 1421-style key blocks; Proc-Type 4,ENCRYPTED names its type in the label."""
    algorithm = _LEGACY_KEYS[label]
    encrypted = "ENCRYPTED" in headers.get("Proc-Type", "")
    if encrypted and password is None:
        return [
            encrypted_private_key(source, "encrypted; size unknown without a password", algorithm)
        ]
    try:
        key = serialization.load_pem_private_key(block_text, password if encrypted else None)
    except _PARSE_ERRORS:
        if encrypted:
            return [
                encrypted_private_key(source, "encrypted; the password did not open it", algorithm)
            ]
        raise _BlockError(
            ProblemKind.CORRUPT, f"{label} does not parse (key bytes withheld)"
        ) from None
    notes = ("encrypted; opened with the password",) if encrypted else ()
    return describe_key(key, source, private=True, notes=notes)


def _openssh_private_key(blob: bytes, source: SourceRef) -> list[Finding]:
    """OpenSSH's own private key format: type and size come from the clear public half."""
    try:
        facts = parse_openssh_private_key(blob)
    except WireError:
        raise _BlockError(
            ProblemKind.CORRUPT, "OPENSSH PRIVATE KEY does not parse (key bytes withheld)"
        ) from None
    findings = []
    for index, key in enumerate(facts.keys, start=1):
        detail = source.detail if len(facts.keys) == 1 else f"{source.detail}.key{index}"
        notes = ["private key in a plain file", f"ssh key type {key.key_type}"]
        if facts.cipher != "none":
            notes.append(f"encrypted ({facts.cipher})")
        findings.append(
            Finding(
                source=SourceRef(source.file, source.line, None, detail),
                kind=FindingKind.PRIVATE_KEY,
                algorithm=key.algorithm,
                purpose=Purpose.AUTHENTICATION,
                key_size=key.key_size,
                curve=key.curve,
                protocol="SSH",
                notes=tuple(notes),
            )
        )
    return findings
