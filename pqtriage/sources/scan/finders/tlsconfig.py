"""TLS settings read from any server configuration, turned into uses the catalog decomposes.

nginx, Apache httpd, HAProxy, OpenSSL's configuration and OpenVPN all end in the same few
facts: protocol versions, an OpenSSL cipher string (TLS 1.2 and earlier), TLS 1.3 suites,
key-exchange groups, and certificate files. Each finder fills a :class:`TlsSettings` per
server block; :func:`settings_findings` turns it into findings with ``file#lineN:name``
sources, so every use points at the directive that enabled it.
"""

from __future__ import annotations

import dataclasses
import os
from dataclasses import dataclass, field

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.cipherstring import LEGACY_NOTE, cipher_table, expand
from pqtriage.sources.scan.finders.interface import FinderContext, Reference
from pqtriage.sources.scan.findings import Finding, FindingKind

#: Directives naming the server's own certificate: its key sizes the RSA parts of the suites.
SERVER_CERTIFICATE_DIRECTIVES = frozenset(
    {"ssl_certificate", "SSLCertificateFile", "crt", "cert", "Certificate", "certs"}
)
SERVER_CERTIFICATE = "server certificate"
"""Role of a reference to the server's own certificate."""

#: OpenSSL 3.0's default groups, in its order, as OpenSSL 3.0's s_client offers them (checked
#: against a captured ClientHello in tests/sources/scan/finders/test_traffic.py). Used only
#: when a configuration names no groups, and said so in the note.
OPENSSL_DEFAULT_GROUPS = ("x25519", "secp256r1", "x448", "secp521r1", "secp384r1")
DEFAULT_GROUPS_NOTE = "no groups configured: OpenSSL 3.0's default groups assumed"


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
    enabled: bool = False
    """TLS is switched on in the block (``listen ... ssl``), where the program says so."""

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
    if "-tls1.3" in text or "!tls1.3" in text:
        return False
    # "TLSv1.2+" is a minimum version (MinProtocol, ssl-min-ver); Apache's "all" includes 1.3.
    return "1.3" in text or text.rstrip().endswith("+") or text.split()[:1] == ["all"]


def settings_findings(
    path: str, settings: TlsSettings, context: FinderContext, pre_shared_keys: bool = False,
    roots: tuple[str, ...] = (),
) -> tuple[list[Finding], list[Reference]]:
    """Findings for one block: each enabled suite, each group, and certificate references.

    PSK and SRP suites are listed only for programs that can be given pre-shared keys or SRP
    verifiers (``pre_shared_keys``): a web server or proxy without them never negotiates one
    (OpenSSL offers them only with a PSK or SRP callback, SSL_CTX_set_psk_server_callback(3)).
    """
    findings: list[Finding] = []
    protocol = _protocol_text(settings)
    base_notes = tuple(n for n in [settings.label, *settings.extra_notes] if n)
    groups = split_list(settings.groups.value) if settings.groups else []
    first_curve = groups[0] if groups else None
    assumed_groups = settings.groups is None and settings.ciphers is not None
    if assumed_groups:
        first_curve = OPENSSL_DEFAULT_GROUPS[0]
    if settings.ciphers is not None:
        expansion = expand(settings.ciphers.value, context.expand_cipher_string)
        how = "system OpenSSL" if expansion.method == "openssl" else "OpenSSL 3.0 table"
        notes = base_notes + (
            f"enabled by {settings.ciphers.directive} at line {settings.ciphers.line} "
            f"(expanded by the {how})",
        ) + tuple(n for n in expansion.notes if not n.startswith(LEGACY_NOTE))  # fmt: skip
        table = cipher_table()
        suites = list(expansion.suites)
        if not pre_shared_keys:
            kept = [n for n in suites if not _shared_secret(table.suites.get(n, {}))]
            if len(kept) < len(suites):
                notes += (f"{len(suites) - len(kept)} PSK/SRP suites not listed: this program "
                          "has no pre-shared keys or SRP verifiers",)  # fmt: skip
            suites = kept
        for suite in suites:
            kx = str(table.suites.get(suite, {}).get("kx", ""))
            curve = first_curve if kx.startswith("ECDH") and first_curve else None
            suite_notes = notes + ((DEFAULT_GROUPS_NOTE,) if curve and assumed_groups else ())
            if suite in table.legacy:
                suite_notes += ("OpenSSL 3.0 no longer builds this suite: kept as the file names it",)
            findings.append(_use(path, settings.ciphers, suite, Purpose.ENCRYPTION, protocol,
                                 suite_notes, curve))  # fmt: skip
        for token in expansion.unknown:
            bare = token.lstrip("!-+")
            if token != bare:
                continue  # a removal of something unknown removes nothing we list
            if bare.upper().startswith(("TLS-", "TLS_")) and "WITH" in bare.upper():
                # IANA spelling (OpenVPN writes TLS-ECDHE-RSA-WITH-AES-256-GCM-SHA384).
                iana = bare.replace("-", "_").upper()
                findings.append(_use(path, settings.ciphers, iana, Purpose.ENCRYPTION, protocol,
                                     notes + ("named in IANA spelling",)))  # fmt: skip
                continue
            findings.append(_use(path, settings.ciphers, bare, Purpose.ENCRYPTION, protocol,
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
    elif assumed_groups and settings.ciphers is not None:
        for name in OPENSSL_DEFAULT_GROUPS:
            finding = _use(path, settings.ciphers, name, Purpose.KEY_ESTABLISHMENT, protocol,
                           base_notes + (DEFAULT_GROUPS_NOTE,))  # fmt: skip
            line = settings.ciphers.line
            findings.append(dataclasses.replace(
                finding, source=SourceRef(path, line=line, detail=f"line{line}:default-group:{name}")
            ))  # fmt: skip
    references = [
        Reference(
            path=resolve_path(path, cert.value, roots),
            referrer=SourceRef(path, line=cert.line, detail=f"line{cert.line}"),
            role=SERVER_CERTIFICATE
            if cert.directive in SERVER_CERTIFICATE_DIRECTIVES
            else cert.directive,
        )
        for cert in settings.certificates
        if cert.value and not cert.value.startswith(("data:", "engine:", "store:", "$"))
    ]
    return findings, references


def resolve_path(config_path: str, named: str, roots: tuple[str, ...] = ()) -> str:
    """A path named in a configuration. A relative one is taken from the program's own folder
    when the configuration lies under a folder of one of the ``roots`` names (nginx takes
    relative paths from its prefix, ``/etc/nginx``; sshd from ``/etc/ssh``; Apache from its
    ServerRoot), otherwise from the configuration's folder."""
    named = named.strip().strip('"').strip("'")
    if os.path.isabs(named):
        return named
    folder = os.path.dirname(config_path) or "."
    if roots:
        parts = folder.split(os.sep)
        for index in range(len(parts), 0, -1):
            if parts[index - 1] in roots:
                return os.path.join(os.sep.join(parts[:index]) or os.sep, named)
    return os.path.join(folder, named)


_SSH_RSA = ("ssh-rsa", "rsa-sha2-")
_SHARED_SECRET = frozenset({"PSK", "SRP"})
#: Certificate key algorithm -> the suite authentication (``Au=``) it can serve, per
#: openssl-ciphers(1): EdDSA certificates serve the aECDSA suites.
_SERVES = {"RSA": "RSA", "ECDSA": "ECDSA", "DSA": "DSS", "Ed25519": "ECDSA", "Ed448": "ECDSA"}


def _shared_secret(facts: dict[str, object]) -> bool:
    """A PSK or SRP suite (``Au=PSK``, ``Kx=RSAPSK``, ``Kx=SRP`` ...)."""
    return str(facts.get("au")) in _SHARED_SECRET or any(
        word in str(facts.get("kx", "")) for word in _SHARED_SECRET
    )


def fill_from_certificates(findings: list[Finding], links: dict[str, list[str]]) -> list[Finding]:
    """Give RSA-authenticated suites of a configuration the key size of its server certificate.

    ``links`` maps a configuration file to the real paths of the certificates it names as the
    server's own. Only suites whose authentication is RSA (per the cipher table) and whose size
    is missing are filled; the fill is noted, so the fact's origin stays visible.
    """
    if not links:
        return findings
    key_types: dict[str, set[str]] = {}
    for finding in findings:
        if finding.kind is FindingKind.CERTIFICATE_KEY and finding.algorithm in _SERVES:
            key_types.setdefault(os.path.realpath(finding.source.file), set()).add(finding.algorithm)
    findings = _only_servable(findings, links, key_types)
    rsa_sizes: dict[str, tuple[int, str]] = {}
    key_kinds = (FindingKind.CERTIFICATE_KEY, FindingKind.PRIVATE_KEY, FindingKind.SSH_KEY,
                 FindingKind.PUBLIC_KEY)  # fmt: skip
    for finding in findings:
        if finding.kind in key_kinds and finding.algorithm in ("RSA", "ssh-rsa"):
            real = os.path.realpath(finding.source.file)
            if finding.key_size is not None:
                rsa_sizes.setdefault(real, (finding.key_size, finding.locator()))
    table = cipher_table()
    result = []
    for finding in findings:
        certificates = links.get(finding.source.file)
        if (
            certificates
            and finding.kind is FindingKind.CONFIG_SETTING
            and finding.key_size is None
            and (
                str(table.suites.get(finding.algorithm, {}).get("au", "")) == "RSA"
                or finding.algorithm.startswith("TLS_")
                and ("_RSA_WITH_" in finding.algorithm or finding.algorithm.startswith("TLS_RSA_"))
                or finding.protocol == "SSH"
                and finding.algorithm.startswith(_SSH_RSA)
                and ":HostKeyAlgorithms:" in f":{finding.source.detail}"
            )
        ):
            found = next((rsa_sizes[c] for c in certificates if c in rsa_sizes), None)
            if found is not None:
                size, where = found
                finding = replace_finding(finding, size, f"RSA key size from {where}")
        result.append(finding)
    return result


def replace_finding(finding: Finding, key_size: int, note: str) -> Finding:
    """The finding with a key size and a note saying where it came from."""
    import dataclasses

    return dataclasses.replace(finding, key_size=key_size, notes=finding.notes + (note,))


def _only_servable(
    findings: list[Finding], links: dict[str, list[str]], key_types: dict[str, set[str]]
) -> list[Finding]:
    """Drop TLS 1.2 suites whose authentication no certificate of the configuration serves.

    A server with only an RSA certificate never negotiates an ECDSA or DSS suite; the suites
    kept say so. Configurations whose certificates could not all be read keep every suite.
    """
    serves: dict[str, set[str]] = {}
    for config, certificates in links.items():
        if certificates and all(c in key_types for c in certificates):
            serves[config] = {_SERVES[a] for c in certificates for a in key_types[c]}
    if not serves:
        return findings
    table = cipher_table()
    result = []
    for finding in findings:
        allowed = serves.get(finding.source.file)
        au = str(table.suites.get(finding.algorithm, {}).get("au", ""))
        if allowed is not None and finding.kind is FindingKind.CONFIG_SETTING and au:
            if au in ("RSA", "ECDSA", "DSS") and au not in allowed:
                continue
            if au in ("RSA", "ECDSA", "DSS"):
                finding = dataclasses.replace(finding, notes=finding.notes + (
                    "suites for other certificate types not listed (certificates: "
                    + ", ".join(sorted(allowed)) + ")",))  # fmt: skip
        result.append(finding)
    return result
