"""TLS probe: complete one handshake with pyOpenSSL and record what was negotiated.

pyOpenSSL runs on the OpenSSL that the cryptography library bundles, whose default groups
offer the hybrid X25519MLKEM768 (draft-ietf-tls-ecdhe-mlkem) beside x25519 and the NIST
curves; ``Connection.get_group_name()`` reports the group the server chose. The certificate
chain is not verified: the probe inventories what is offered, it does not decide trust.
"""

from __future__ import annotations

import dataclasses
import select
import socket
import time

from cryptography import x509
from OpenSSL import SSL

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.probe.connect import connect
from pqtriage.sources.probe.outcome import ProbeFailure, ProbeOutcome
from pqtriage.sources.probe.targets import Target
from pqtriage.sources.scan.certificates import describe_certificate
from pqtriage.sources.scan.findings import Finding, FindingKind
from pqtriage.sources.scan.identifiers import identifiers

_VERSIONS = {"TLSv1.3": "TLS 1.3", "TLSv1.2": "TLS 1.2", "TLSv1.1": "TLS 1.1", "TLSv1": "TLS 1.0"}


def _handshake(connection: SSL.Connection, sock: socket.socket, deadline: float) -> None:
    """Drive a non-blocking handshake until done or the deadline passes."""
    while True:
        try:
            connection.do_handshake()
            return
        except SSL.WantReadError:
            wait_read = True
        except SSL.WantWriteError:
            wait_read = False
        remaining = deadline - time.monotonic()
        if remaining <= 0:
            raise ProbeFailure("timed out during the TLS handshake")
        readable, writable, _ = select.select(
            [sock] if wait_read else [], [] if wait_read else [sock], [], remaining
        )
        if not readable and not writable:
            raise ProbeFailure("timed out during the TLS handshake")


def _reason(error: Exception) -> str:
    if isinstance(error, SSL.SysCallError):
        return "connection closed during the handshake"
    if isinstance(error, SSL.ZeroReturnError):
        return "connection closed during the handshake"
    details = getattr(error, "args", ())
    if details and isinstance(details[0], list) and details[0]:
        last = details[0][-1]
        if isinstance(last, tuple) and last:
            return str(last[-1])
    return type(error).__name__


def probe_tls(target: Target, timeout: float) -> ProbeOutcome:
    """Probe one TLS endpoint; failures come back as data with one clear line."""
    deadline = time.monotonic() + timeout
    try:
        sock = connect(target.host, target.port, timeout)
    except ProbeFailure as failure:
        return ProbeOutcome(target.text, failure=str(failure))
    try:
        context = SSL.Context(SSL.TLS_CLIENT_METHOD)
        context.set_verify(SSL.VERIFY_NONE, None)
        connection = SSL.Connection(context, sock)
        sock.setblocking(False)
        if not _is_address(target.host):
            connection.set_tlsext_host_name(target.host.encode("idna"))
        connection.set_connect_state()
        try:
            _handshake(connection, sock, deadline)
        except ProbeFailure as failure:
            return ProbeOutcome(target.text, failure=str(failure))
        except SSL.Error as error:
            return ProbeOutcome(
                target.text, failure=f"not TLS (handshake failed: {_reason(error)})"
            )
        return _describe(target, connection)
    finally:
        sock.close()


def _is_address(host: str) -> bool:
    try:
        socket.inet_pton(socket.AF_INET6 if ":" in host else socket.AF_INET, host)
    except OSError:
        return False
    return True


def _describe(target: Target, connection: SSL.Connection) -> ProbeOutcome:
    version_name = connection.get_protocol_version_name()
    protocol = _VERSIONS.get(version_name, version_name)
    group = connection.get_group_name()
    cipher = connection.get_cipher_name() or "unknown"
    table = identifiers()
    hybrid = group in table.tls_hybrid_groups
    post_quantum_only = group in table.tls_post_quantum_groups
    findings: list[Finding] = []
    verdict = (
        "hybrid post-quantum group accepted"
        if hybrid
        else "post-quantum group accepted"
        if post_quantum_only
        else "no post-quantum group accepted"
    )
    findings.append(
        Finding(
            source=SourceRef(target.text, detail="group"),
            kind=FindingKind.TLS_GROUP,
            algorithm=group or "unknown",
            purpose=Purpose.KEY_ESTABLISHMENT,
            host=target.text,
            protocol=protocol,
            notes=(f"negotiated key exchange group; {verdict}",)
            if group
            else ("no group reported (static RSA key transport or an old protocol)",),
        )
    )
    findings.append(
        Finding(
            source=SourceRef(target.text, detail="cipher"),
            kind=FindingKind.TLS_CIPHER,
            algorithm=cipher,
            purpose=Purpose.ENCRYPTION,
            host=target.text,
            protocol=protocol,
            notes=("negotiated cipher suite (OpenSSL's name; TLS 1.3 names are IANA's)",),
        )
    )
    chain = connection.get_peer_cert_chain(as_cryptography=True) or []
    unreadable = []
    for index, cert in enumerate(chain):
        try:
            described = describe_certificate(
                cert, SourceRef(target.text, detail=f"chain{index}"), protocol=protocol
            )
        except (ValueError, x509.InvalidVersion):  # names or dates the library cannot parse
            unreadable.append(f"chain{index}")
            continue
        # The probe target is the host these certificates serve.
        findings.extend(_at_target(finding, target.text) for finding in described)
    summary = f"{target.text}: {protocol}, {cipher}, group {group or 'none'}: {verdict}"
    if unreadable:
        summary += f" (certificate {', '.join(unreadable)} does not parse)"
    return ProbeOutcome(target.text, tuple(findings), protocol, summary)


def _at_target(finding: Finding, target: str) -> Finding:
    return dataclasses.replace(finding, host=target)
