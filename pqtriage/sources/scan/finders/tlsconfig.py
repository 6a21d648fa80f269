"""TLS settings read from any server configuration, turned into uses the catalog decomposes.

nginx, Apache httpd, HAProxy, OpenSSL's configuration and OpenVPN all end in the same few
facts: protocol versions, an OpenSSL cipher string (TLS 1.2 and earlier), TLS 1.3 suites,
key-exchange groups, and certificate files. Each finder fills a :class:`TlsSettings` per
server block; :func:`settings_findings` turns it into findings with ``file#lineN:name``
sources, so every use points at the directive that enabled it.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.cipherstring import cipher_table, expand
from pqtriage.sources.scan.finders.interface import FinderContext, Reference
from pqtriage.sources.scan.findings import Finding, FindingKind

#: OpenSSL 3.0's default groups (ssl/t1_lib.c, supported_groups_default), from memory; used
#: only when a configuration names no groups, and said so in the note.
OPENSSL_DEFAULT_GROUPS = ("x25519", "secp256r1", "x448", "secp521r1", "secp384r1")


@dataclass(frozen=True)
class Setting:
    """One directive's value and the line it is on."""

    value: str
    """The directive's value as written."""
    line: int
    """1-based line."""
    directive: str
    """Directive name as written (ssl_ciphers, SSLCipherSuite ...)."""


@dataclass
class TlsSettings:
    """What one server block (or the whole file) configures for TLS."""

    label: str = ""
    """Block name shown in notes (``server example.test:443``); empty for a whole file."""
    protocols: Setting | None = None
    """Protocol versions enabled (space or colon separated: TLSv1.2 TLSv1.3 ...)."""
    ciphers: Setting | None = None
    """OpenSSL cipher string for TLS 1.2 and earlier."""
    ciphersuites: Setting | None = None
    """TLS 1.3 suites (colon separated)."""
    groups: Setting | None = None
    """Key-exchange groups / curves (colon or comma separated)."""
    certificates: list[Setting] = field(default_factory=list)
    """Certificate (and key) files named."""
    extra_notes: list[str] = field(default_factory=list)
    """Facts to keep beside every use of the block."""

    def empty(self) -> bool:
        """True when the block configures nothing TLS-related."""
        return not (self.protocols or self.ciphers or self.ciphersuites or self.groups) and not (
            self.certificates
        )


def split_list(text: str) -> list[str]:
    """Items of a colon, comma or space separated list, quotes removed."""
    cleaned = text.replace('"', " ").replace("'", " ")
    return [item for item in cleaned.replace(":", " ").replace(",", " ").split() if item]


def _use(
    path: str, setting: Setting, name: str, purpose: Purpose, protocol: str, notes: tuple[str, ...],
    curve: str | None = None,
) -> Finding:
    return Finding(
        source=SourceRef(path, line=setting.line, detail=f"line{setting.line}:{name}"),
        kind=FindingKind.CONFIG_SETTING,
        algorithm=name,
        purpose=purpose,
        curve=curve,
        protocol=protocol,
        notes=notes,
    )


def _protocol_text(settings: TlsSettings) -> str:
    if settings.protocols is None:
        return "TLS"
    versions = split_list(settings.protocols.value)
    return "TLS (" + " ".join(versions) + ")" if versions else "TLS"


def _allows_tls13(settings: TlsSettings) -> bool:
    if settings.protocols is None:
        return True
    text = settings.protocols.value.replace("v", "").replace("V", "").lower()
    return "1.3" in text and "-tls1.3" not in text and "!tls1.3" not in text


def settings_findings(
    path: str, settings: TlsSettings, context: FinderContext, finder: str
) -> tuple[list[Finding], list[Reference]]:
    """Findings for one block: each enabled suite, each group, and certificate references."""
    findings: list[Finding] = []
    protocol = _protocol_text(settings)
    base_notes = tuple(n for n in [settings.label, *settings.extra_notes] if n)
    groups = split_list(settings.groups.value) if settings.groups else []
    first_curve = groups[0] if groups else None
    if settings.ciphers is not None:
        expansion = expand(settings.ciphers.value, context.expand_cipher_string)
        how = (
            "expanded with the system's OpenSSL"
            if expansion.method == "openssl"
            else "expanded with the shipped OpenSSL 3.0 table"
        )
        notes = base_notes + (
            f"enabled by {settings.ciphers.directive} {settings.ciphers.value.strip()}", how,
        ) + expansion.notes  # fmt: skip
        table = cipher_table()
        for suite in expansion.suites:
            kx = str(table.suites.get(suite, {}).get("kx", ""))
            curve = first_curve if kx.startswith("ECDH") and first_curve else None
            findings.append(_use(path, settings.ciphers, suite, Purpose.ENCRYPTION, protocol,
                                 notes, curve))  # fmt: skip
        for token in expansion.unknown:
            findings.append(_use(path, settings.ciphers, token, Purpose.ENCRYPTION, protocol,
                                 notes + ("keyword unknown to OpenSSL 3.0; not expanded",)))  # fmt: skip
    if _allows_tls13(settings) and (settings.ciphersuites is not None or settings.ciphers):
        if settings.ciphersuites is not None:
            names, setting = split_list(settings.ciphersuites.value), settings.ciphersuites
            why = f"enabled by {setting.directive}"
        else:
            assert settings.ciphers is not None
            names, setting = list(cipher_table().tls13_default), settings.ciphers
            why = "TLS 1.3 suites OpenSSL enables by default (no TLS 1.3 suite setting)"
        for name in names:
            findings.append(_use(path, setting, name, Purpose.ENCRYPTION, "TLS 1.3",
                                 base_notes + (why,)))  # fmt: skip
    if settings.groups is not None:
        for name in groups:
            findings.append(_use(path, settings.groups, name, Purpose.KEY_ESTABLISHMENT, protocol,
                                 base_notes + (f"enabled by {settings.groups.directive}",)))  # fmt: skip
    references = [
        Reference(
            path=resolve_path(path, cert.value),
            referrer=SourceRef(path, line=cert.line, detail=f"line{cert.line}"),
            role=cert.directive,
        )
        for cert in settings.certificates
        if cert.value and not cert.value.startswith(("data:", "engine:", "store:", "$"))
    ]
    return findings, references


def resolve_path(config_path: str, named: str) -> str:
    """A path named in a configuration, made relative to the configuration's folder."""
    named = named.strip().strip('"').strip("'")
    if os.path.isabs(named):
        return named
    return os.path.join(os.path.dirname(config_path) or ".", named)
