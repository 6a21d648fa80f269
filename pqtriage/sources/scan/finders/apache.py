"""Apache httpd with mod_ssl: ``SSLProtocol``, ``SSLCipherSuite`` (with its optional protocol
word, ``TLSv1.3`` for TLS 1.3 suites), ``SSLOpenSSLConfCmd Curves|Groups|Ciphersuites``,
``SSLCertificateFile`` per ``<VirtualHost>`` (Apache mod_ssl documentation).

Settings outside a virtual host apply to the hosts that do not set them. ``Include`` and
``IncludeOptional`` fragments are read too (relative paths from the file's folder; Apache
takes them from ServerRoot). Lines continued with a backslash are joined.
"""

from __future__ import annotations

import re
from dataclasses import replace

from pqtriage.model.inventory import SourceRef
from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
    Reference,
)
from pqtriage.sources.scan.finders.tlsconfig import (
    Setting,
    TlsSettings,
    resolve_path,
    settings_findings,
)

_SNIFF = re.compile(
    rb"^\s*(SSLCipherSuite|SSLProtocol|SSLCertificateFile|SSLEngine|SSLOpenSSLConfCmd)\b",
    re.MULTILINE | re.IGNORECASE,
)


ROOTS = ("apache2", "httpd")
"""Folder names of Apache's ServerRoot: relative paths are taken from it."""


def logical_lines(text: str) -> list[tuple[int, str]]:
    """(first line number, text) with backslash continuations joined and comments dropped."""
    lines: list[tuple[int, str]] = []
    pending, start = "", 0
    for number, raw in enumerate(text.splitlines(), 1):
        if not pending:
            start = number
        if raw.rstrip().endswith("\\"):
            pending += raw.rstrip()[:-1] + " "
            continue
        line = (pending + raw).strip()
        pending = ""
        if line and not line.startswith("#"):
            lines.append((start, line))
    return lines


class ApacheFinder(Finder):
    """Reads Apache httpd configuration files."""

    name = "apache httpd"

    def wants(self, path: str, head: bytes) -> bool:
        lower = path.lower()
        return (
            lower.endswith(("httpd.conf", "apache2.conf", "ssl.conf"))
            or "/apache2/" in lower
            or "/httpd/" in lower
            or bool(_SNIFF.search(head))
        )

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        if not _SNIFF.search(data) and not re.search(rb"^\s*Include", data, re.M | re.I):
            return NOT_MINE
        top = TlsSettings()
        hosts: list[TlsSettings] = []
        current: TlsSettings | None = None
        references: list[Reference] = []
        for number, line in logical_lines(data.decode("utf-8", "replace")):
            lower = line.lower()
            if lower.startswith("<virtualhost"):
                current = replace(top, certificates=list(top.certificates), extra_notes=[])
                current.label = f"virtual host {line[12:].rstrip('>').strip()} (line {number})"
                continue
            if lower.startswith("</virtualhost"):
                if current is not None and not current.empty():
                    hosts.append(current)
                current = None
                continue
            target = current if current is not None else top
            parts = line.split(None, 1)
            name, value = parts[0], parts[1] if len(parts) > 1 else ""
            _apply(name, value, number, target, references, path)
        if not hosts and not top.empty():
            hosts.append(top)
        findings, refs = [], list(references)
        for host in hosts:
            found, more = settings_findings(path, host, context, roots=ROOTS)
            findings += found
            refs += more
        return FinderResult(claimed=True, findings=tuple(findings), references=tuple(refs))


def _apply(
    name: str, value: str, number: int, target: TlsSettings, references: list[Reference], path: str
) -> None:
    key = name.lower()
    if key == "sslprotocol":
        target.protocols = Setting(value, number, name)
    elif key == "sslciphersuite":
        words = value.split(None, 1)
        if len(words) == 2 and words[0].upper().startswith(("TLSV1.3", "SSL")):
            if words[0].upper() == "TLSV1.3":
                target.ciphersuites = Setting(words[1], number, f"{name} TLSv1.3")
            else:
                target.ciphers = Setting(words[1], number, name)
        else:
            target.ciphers = Setting(value, number, name)
    elif key == "sslopensslconfcmd":
        words = value.split(None, 1)
        if len(words) == 2:
            command = words[0].lower()
            if command in ("curves", "groups", "ecdhparameters"):
                target.groups = Setting(words[1], number, f"{name} {words[0]}")
            elif command == "ciphersuites":
                target.ciphersuites = Setting(words[1], number, f"{name} {words[0]}")
    elif key in ("sslcertificatefile", "sslcacertificatefile", "sslcertificatechainfile") and value:
        directive = "SSLCertificateFile" if key == "sslcertificatefile" else name
        target.certificates.append(Setting(value.strip('"'), number, directive))
    elif key in ("include", "includeoptional") and value:
        references.append(Reference(
            resolve_path(path, value.strip('"'), ROOTS), SourceRef(path, line=number, detail=f"line{number}"),
            "include", ApacheFinder.name,
        ))  # fmt: skip
