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
from pqtriage.sources.scan.issuers import link_issuers

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


def suite_key_exchange(cipher: str, protocol: str) -> str | None:
    """Key exchange of a negotiated suite by OpenSSL's name (ECDH, FFDH, RSA, PSK, SRP), or
    None for TLS 1.3, whose suites carry none (the group decides)."""
    if protocol == "TLS 1.3" or cipher.upper().startswith("TLS_"):
        return None
    prefixes = identifiers().tls_key_exchange_prefixes
    tokens = cipher.upper().split("-")
    for length in (2, 1):
        prefix = "-".join(tokens[:length])
        if prefix in prefixes:
            return prefixes[prefix]
    return "RSA"  # openssl-ciphers(1): a TLS 1.2 name without a key exchange prefix


def _group_finding(target: Target, protocol: str, group: str | None, cipher: str,
                   key_exchange: str | None, leaf: Finding | None, verdict: str) -> Finding:
    """The key establishment of the handshake: the negotiated group or, for RSA key
    transport, the certificate's RSA key that decrypts the premaster secret."""
    if group:
        return Finding(
            source=SourceRef(target.text, detail="group"), kind=FindingKind.TLS_GROUP,
            algorithm=group, purpose=Purpose.KEY_ESTABLISHMENT, host=target.text,
            protocol=protocol, notes=(f"negotiated key exchange group; {verdict}",),
        )  # fmt: skip
    if key_exchange == "RSA":
        rsa_leaf = leaf if leaf is not None and leaf.algorithm == "RSA" else None
        return Finding(
            source=SourceRef(target.text, detail="key-exchange"), kind=FindingKind.TLS_GROUP,
            algorithm="RSA", purpose=Purpose.KEY_ESTABLISHMENT, host=target.text, protocol=protocol,
            key_size=rsa_leaf.key_size if rsa_leaf else None,
            notes=(f"RSA key transport ({protocol} suite {cipher}): the server certificate's key "
                   "(chain0) decrypts the premaster secret, so recorded traffic falls with that "
                   "key (no forward secrecy)",),
        )  # fmt: skip
    algorithm = "DH" if key_exchange == "FFDH" else "unknown"
    return Finding(
        source=SourceRef(target.text, detail="group"), kind=FindingKind.TLS_GROUP,
        algorithm=algorithm, purpose=Purpose.KEY_ESTABLISHMENT, host=target.text, protocol=protocol,
        notes=(f"no group reported for {cipher} (the library does not tell the size of a "
               "Diffie-Hellman group outside RFC 7919)" if algorithm == "DH"
               else "no group reported (a pre-shared key or an old protocol)",),
    )  # fmt: skip


def _suite_parameters(key_exchange: str | None, group: str | None,
                      leaf: Finding | None) -> tuple[int | None, str | None, tuple[str, ...]]:
    """key_size and curve for a TLS 1.2 suite's parts, from the same handshake: the
    certificate (chain0) sizes RSA, the negotiated group names the (EC)DHE group."""
    if key_exchange is None:
        return None, None, ()
    rsa_size = leaf.key_size if leaf is not None and leaf.algorithm == "RSA" else None
    if key_exchange == "RSA":
        return rsa_size, None, ("key_size from the certificate of the same handshake (chain0)",)
    if key_exchange in ("ECDH", "FFDH") and group:
        notes = [f"curve is the negotiated group {group}"]
        if rsa_size:
            notes.append("key_size from the certificate of the same handshake (chain0)")
        if leaf is not None and leaf.algorithm == "ECDSA" and leaf.curve:
            notes.append(f"the certificate's own key (chain0) is ECDSA {leaf.curve}")
        return rsa_size, group, tuple(notes)
    return None, None, ()


def _describe(target: Target, connection: SSL.Connection) -> ProbeOutcome:
    version_name = connection.get_protocol_version_name()
    protocol = _VERSIONS.get(version_name, version_name)
    group = connection.get_group_name()
    cipher = connection.get_cipher_name() or "unknown"
    table = identifiers()
    hybrid = group in table.tls_hybrid_groups
    post_quantum_only = group in table.tls_post_quantum_groups
    verdict = (
        "hybrid post-quantum group accepted"
        if hybrid
        else "post-quantum group accepted"
        if post_quantum_only
        else "no post-quantum group accepted"
    )
    chain = connection.get_peer_cert_chain(as_cryptography=True) or []
    unreadable = []
    described_chain: list[Finding] = []
    for index, cert in enumerate(chain):
        try:
            described = describe_certificate(
                cert, SourceRef(target.text, detail=f"chain{index}"), protocol=protocol
            )
        except (ValueError, x509.InvalidVersion):  # names or dates the library cannot parse
            unreadable.append(f"chain{index}")
            continue
        # The probe target is the host these certificates serve.
        described_chain.extend(_at_target(finding, target.text) for finding in described)
    # The chain's signatures are uses, assessed on the key that made each (verified).
    described_chain = link_issuers(described_chain)
    leaf = next((f for f in described_chain if f.kind is FindingKind.CERTIFICATE_KEY
                 and f.source.detail == "chain0"), None)
    key_exchange = suite_key_exchange(cipher, protocol)
    key_size, curve, suite_notes = _suite_parameters(key_exchange, group, leaf)
    findings = [
        _group_finding(target, protocol, group, cipher, key_exchange, leaf, verdict),
        Finding(
            source=SourceRef(target.text, detail="cipher"),
            kind=FindingKind.TLS_CIPHER,
            algorithm=cipher,
            purpose=Purpose.ENCRYPTION,
            host=target.text,
            protocol=protocol,
            key_size=key_size,
            curve=curve,
            notes=("negotiated cipher suite (OpenSSL's name; TLS 1.3 names are IANA's)",)
            + suite_notes,
        ),
        *described_chain,
    ]
    summary = f"{target.text}: {protocol}, {cipher}, group {group or 'none'}: {verdict}"
    if unreadable:
        summary += f" (certificate {', '.join(unreadable)} does not parse)"
    return ProbeOutcome(target.text, tuple(findings), protocol, summary)


def _at_target(finding: Finding, target: str) -> Finding:
    return dataclasses.replace(finding, host=target)
