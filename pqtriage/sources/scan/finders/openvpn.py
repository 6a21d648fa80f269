"""OpenVPN: control channel (``tls-cipher`` OpenSSL cipher string, ``tls-ciphersuites``,
``tls-groups``, ``ecdh-curve``, ``tls-version-min``), data channel (``data-ciphers``,
``data-ciphers-fallback``, ``cipher``, ``auth``), static-key mode (``secret``) and the files
named by ``ca``, ``cert``, ``key``, ``dh`` (openvpn(8) manual of OpenVPN 2.6). Inline blocks
(``<ca>...</ca>``) are read by the key and certificate finder from the same file.
"""

from __future__ import annotations

import re

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.interface import NOT_MINE, Finder, FinderContext, FinderResult
from pqtriage.sources.scan.finders.tlsconfig import (
    Setting,
    TlsSettings,
    settings_findings,
    split_list,
)
from pqtriage.sources.scan.findings import Finding, FindingKind

_SNIFF = re.compile(
    rb"^\s*(client|remote|dev\s+tun|dev\s+tap|tls-cipher|data-ciphers|tls-auth|tls-crypt)\b", re.M
)
_FILES = ("ca", "cert", "dh", "extra-certs")
_DEVICE = re.compile(rb"^\s*dev\s+(tun|tap)\w*\s*$", re.M)
_ROLE = re.compile(rb"^\s*(client|remote\s|server\s|tls-server|tls-client|secret\s)", re.M)


class OpenvpnFinder(Finder):
    """Reads OpenVPN configuration files (``.ovpn``, ``/openvpn/*.conf``)."""

    name = "openvpn"

    def wants(self, path: str, head: bytes) -> bool:
        lower = path.lower()
        if lower.endswith(".ovpn") or "/openvpn/" in lower and lower.endswith(".conf"):
            return True
        # Elsewhere: a tunnel device and a peer or TLS role, as every OpenVPN file has.
        return bool(_DEVICE.search(head)) and bool(_ROLE.search(head))

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        text = data.decode("utf-8", "replace")
        if not _SNIFF.search(data):
            return NOT_MINE
        tls = TlsSettings(label="control channel")
        findings: list[Finding] = []
        inline = False
        for number, raw in enumerate(text.splitlines(), 1):
            line = raw.strip()
            if line.startswith("</"):
                inline = False
                continue
            if line.startswith("<") and line.endswith(">"):
                inline = True
                continue
            if inline or not line or line[0] in "#;":
                continue
            words = line.split()
            key, value = words[0], " ".join(words[1:])
            if key == "tls-cipher":
                tls.ciphers = Setting(value, number, key)
            elif key == "tls-ciphersuites":
                tls.ciphersuites = Setting(value, number, key)
            elif key in ("tls-groups", "ecdh-curve"):
                tls.groups = Setting(value, number, key)
            elif key == "tls-version-min" and words[1:]:
                tls.protocols = Setting(f"TLSv{words[1]}+", number, key)
            elif key in ("data-ciphers", "ncp-ciphers", "data-ciphers-fallback", "cipher"):
                findings += [_use(path, number, name, Purpose.ENCRYPTION, key)
                             for name in split_list(value)]  # fmt: skip
            elif key == "auth" and words[1:] and words[1].lower() != "none":
                findings.append(_use(path, number, f"HMAC-{words[1]}", Purpose.INTEGRITY, key))
            elif key == "secret":
                findings.append(Finding(
                    source=SourceRef(path, line=number, detail=f"line{number}:secret"),
                    kind=FindingKind.CONFIG_SETTING, algorithm="unknown",
                    purpose=Purpose.ENCRYPTION, protocol="OpenVPN static key",
                    notes=("static-key mode (pre-shared key, no TLS): the cipher follows "
                           "'cipher' (default BF-CBC before OpenVPN 2.6)",),
                ))  # fmt: skip
            elif key in _FILES and words[1:] and words[1] != "[inline]" and value != "none":
                tls.certificates.append(Setting(words[1], number, "cert" if key == "cert" else key))
        found, references = settings_findings(path, tls, context) if not tls.empty() else ([], [])
        return FinderResult(
            claimed=True, findings=tuple(findings + found), references=tuple(references)
        )


def _use(path: str, line: int, name: str, purpose: Purpose, directive: str) -> Finding:
    return Finding(
        source=SourceRef(path, line=line, detail=f"line{line}:{name}"),
        kind=FindingKind.CONFIG_SETTING,
        algorithm=name,
        purpose=purpose,
        protocol="OpenVPN data channel",
        notes=(f"enabled by {directive}",),
    )
