"""OpenSSH text files: public keys, authorized_keys (with options), known_hosts.

Formats: the sshd(8) manual, sections AUTHORIZED_KEYS FILE FORMAT and SSH_KNOWN_HOSTS
FILE FORMAT (markers @cert-authority and @revoked, hashed host names ``|1|salt|hash``);
key blobs per RFC 4253 section 6.6 and OpenSSH PROTOCOL.certkeys. One finding per key line
(two for a certificate: its key and the CA's signature), sourced ``path#lineN``.
"""

from __future__ import annotations

import base64
import binascii
import datetime
import os

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.findings import (
    Finding,
    FindingKind,
    ParseOutcome,
    ProblemKind,
    ScanProblem,
)
from pqtriage.sources.scan.sshwire import (
    SshKeyFacts,
    WireError,
    looks_like_key_type,
    parse_key_blob,
)

_MAX_LINE = 16 * 1024


def split_fields(line: str) -> list[str]:
    """Split on blanks outside double quotes (sshd(8): options may quote blanks and commas)."""
    fields: list[str] = []
    current: list[str] = []
    quoted = False
    escaped = False
    for char in line:
        if escaped:
            current.append(char)
            escaped = False
        elif char == "\\" and quoted:
            current.append(char)
            escaped = True
        elif char == '"':
            current.append(char)
            quoted = not quoted
        elif char in " \t" and not quoted:
            if current:
                fields.append("".join(current))
                current = []
        else:
            current.append(char)
    if current:
        fields.append("".join(current))
    return fields


def _date(seconds: int | None) -> str | None:
    if seconds is None or seconds >= 2**63:
        return None  # 0xffff... means "forever" (PROTOCOL.certkeys)
    try:
        return datetime.datetime.fromtimestamp(seconds, datetime.UTC).date().isoformat()
    except (OverflowError, OSError, ValueError):
        return None


def _key_line_findings(
    facts: SshKeyFacts,
    source: SourceRef,
    purpose: Purpose,
    host: str | None,
    notes: tuple[str, ...],
) -> list[Finding]:
    notes = (f"ssh key type {facts.key_type}",) + notes
    if facts.security_key:
        notes += ("FIDO security key",)
    kind = FindingKind.SSH_CERTIFICATE if facts.certificate else FindingKind.SSH_KEY
    findings = [
        Finding(
            source=source,
            kind=kind,
            algorithm=facts.algorithm,
            purpose=purpose,
            key_size=facts.key_size,
            curve=facts.curve,
            host=host,
            protocol="SSH",
            subject=f"key id {facts.key_id}" if facts.certificate else None,
            subject_name=facts.key_id if facts.certificate else None,
            not_before=_date(facts.valid_after) if facts.certificate else None,
            not_after=_date(facts.valid_before) if facts.certificate else None,
            notes=notes
            + (
                (
                    f"{facts.certificate_type} certificate",
                    "principals=" + ",".join(facts.principals),
                )
                if facts.certificate
                else ()
            ),
        )
    ]
    if facts.certificate and facts.signer is not None:
        signer = facts.signer
        findings.append(
            Finding(
                source=SourceRef(source.file, source.line, None, f"{source.detail}.signature"),
                kind=FindingKind.SSH_CERTIFICATE,
                algorithm=signer.algorithm,
                purpose=Purpose.SIGNATURE,
                key_size=signer.key_size,
                curve=signer.curve,
                host=host,
                protocol="SSH",
                subject=f"key id {facts.key_id}",
                subject_name=facts.key_id,
                not_before=_date(facts.valid_after),
                not_after=_date(facts.valid_before),
                notes=(f"certificate authority key type {signer.key_type}",),
            )
        )
    return findings


def _file_style(path: str) -> str:
    name = os.path.basename(path).lower()
    if "known_hosts" in name:
        return "known_hosts"
    if "authorized_keys" in name:
        return "authorized_keys"
    return "unknown"


def _decode(token: str) -> bytes | None:
    try:
        return base64.b64decode(token, validate=True)
    except (binascii.Error, ValueError):
        return None


def parse_openssh_text(text: str, path: str) -> ParseOutcome:
    """Parse a text file of OpenSSH key lines; unrecognised files give an empty outcome."""
    style = _file_style(path)
    findings: list[Finding] = []
    problems: list[ScanProblem] = []
    key_lines = 0
    for number, raw in enumerate(text.splitlines(), start=1):
        line = raw.strip()
        if not line or line.startswith("#") or len(line) > _MAX_LINE:
            continue
        fields = split_fields(line)
        index = next((i for i, field in enumerate(fields) if looks_like_key_type(field)), None)
        if index is None or index + 1 >= len(fields):
            continue
        key_type, blob_text = fields[index], fields[index + 1]
        source = SourceRef(path, line=number, detail=f"line{number}")
        place = f"{path}#line{number}"
        blob = _decode(blob_text)
        if blob is None:
            if style != "unknown" or index == 0:
                problems.append(ScanProblem(place, ProblemKind.CORRUPT, "key is not valid base64"))
            continue
        try:
            facts = parse_key_blob(blob)
        except WireError as error:
            kind = ProblemKind.TRUNCATED if "past the end" in str(error) else ProblemKind.CORRUPT
            problems.append(ScanProblem(place, kind, f"{key_type} key blob: {error}"))
            continue
        if facts.key_type != key_type:
            problems.append(
                ScanProblem(
                    place, ProblemKind.CORRUPT, f"line says {key_type}, blob says {facts.key_type}"
                )
            )
            continue
        key_lines += 1
        prefix = fields[:index]
        comment = " ".join(fields[index + 2 :])
        notes: tuple[str, ...] = (f"comment={comment}",) if comment else ()
        findings.extend(_classify(facts, source, prefix, style, notes))
    return ParseOutcome(tuple(findings), tuple(problems), recognised=bool(key_lines or problems))


def _classify(
    facts: SshKeyFacts, source: SourceRef, prefix: list[str], style: str, notes: tuple[str, ...]
) -> list[Finding]:
    """Tell known_hosts, authorized_keys and plain public key lines apart."""
    marker = prefix[0] if prefix and prefix[0].startswith("@") else None
    hosts_field = prefix[1] if marker and len(prefix) > 1 else (prefix[0] if prefix else None)
    is_known_hosts = (
        style == "known_hosts"
        or marker is not None
        or (
            style == "unknown"
            and len(prefix) == 1
            and "=" not in prefix[0]
            and not prefix[0].startswith(("no-", "restrict", "cert-authority"))
        )
    )
    if is_known_hosts and hosts_field is not None:
        host = hosts_field.split(",")[0]
        extra: tuple[str, ...] = ("known_hosts entry",)
        if hosts_field.startswith("|1|"):
            extra += ("hashed host name",)
        if marker == "@cert-authority":
            extra += ("@cert-authority: signs host certificates",)
            purpose = Purpose.SIGNATURE
        elif marker == "@revoked":
            extra += ("@revoked: this key is refused",)
            purpose = Purpose.AUTHENTICATION
        else:
            purpose = Purpose.AUTHENTICATION
        return _key_line_findings(facts, source, purpose, host, extra + notes)
    if prefix:
        options = " ".join(prefix)
        purpose = Purpose.SIGNATURE if "cert-authority" in options else Purpose.AUTHENTICATION
        return _key_line_findings(
            facts, source, purpose, None, ("authorized_keys entry", f"options={options}") + notes
        )
    extra = ("authorized_keys entry",) if style == "authorized_keys" else ("public key",)
    return _key_line_findings(facts, source, Purpose.AUTHENTICATION, None, extra + notes)
