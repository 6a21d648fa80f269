"""Java ``java.security``: what the JDK refuses (``jdk.tls.disabledAlgorithms``,
``jdk.certpath.disabledAlgorithms``, ``jdk.jar.disabledAlgorithms``) and what it keeps for
compatibility (``jdk.tls.legacyAlgorithms``), per the comments of the JDK's own file.

A configuration is a list of refusals, so the findings are what it still allows: each
algorithm of a shipped list of weak ones that the file's disabled list does not name (an
allowed RC4, SSLv3, 3DES, DH under 2048 bits ...), each key-size floor lower than 2048 bits
for RSA, DSA and DH (``RSA keySize < 1024`` allows 1024), and each legacy algorithm named.
"""

from __future__ import annotations

import re

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.interface import NOT_MINE, Finder, FinderContext, FinderResult
from pqtriage.sources.scan.findings import Finding, FindingKind

_LISTS = ("jdk.tls.disabledalgorithms", "jdk.certpath.disabledalgorithms",
          "jdk.jar.disabledalgorithms")  # fmt: skip
#: Weak algorithms a TLS configuration should refuse (name in java.security, catalog name,
#: purpose). Common practice, no source; the names are the JDK's (JDK 17 java.security).
WEAK_TLS = (
    ("RC4", "RC4", Purpose.ENCRYPTION),
    ("DES", "DES", Purpose.ENCRYPTION),
    ("3DES_EDE_CBC", "3TDEA-CBC", Purpose.ENCRYPTION),
    ("MD5", "MD5", Purpose.INTEGRITY),
    ("MD5withRSA", "MD5", Purpose.SIGNATURE),
)
_SIZE = re.compile(r"^(RSA|DSA|DH|EC)\s+keySize\s*<\s*(\d+)$", re.IGNORECASE)
_FAMILY = {"RSA": "RSA", "DSA": "DSA", "DH": "DH", "EC": "ECDH"}


def properties(text: str) -> dict[str, tuple[str, int]]:
    """Java properties (lower-case key -> (value, line)), backslash continuations joined."""
    found: dict[str, tuple[str, int]] = {}
    pending, start = "", 0
    for number, raw in enumerate(text.splitlines(), 1):
        line = raw.strip()
        if not pending and (not line or line[0] in "#!"):
            continue
        if not pending:
            start = number
        if line.endswith("\\"):
            pending += line[:-1] + " "
            continue
        line, pending = pending + line, ""
        key, _, value = line.partition("=")
        found[key.strip().lower()] = (" ".join(value.split()), start)
    return found


class JavaSecurityFinder(Finder):
    """Reads java.security (and files overriding it, ``-Djava.security.properties``)."""

    name = "java.security"

    def wants(self, path: str, head: bytes) -> bool:
        return path.endswith("java.security") or b"jdk.tls.disabledAlgorithms" in head

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        props = properties(data.decode("utf-8", "replace"))
        if not any(key in props for key in (*_LISTS, "jdk.tls.legacyalgorithms")):
            return NOT_MINE
        findings: list[Finding] = []
        names: set[str] = set()
        if "jdk.tls.disabledalgorithms" in props:
            value, line = props["jdk.tls.disabledalgorithms"]
            items = [item.strip() for item in value.split(",") if item.strip()]
            names = {item.split()[0].upper() for item in items}
            for written, algorithm, purpose in WEAK_TLS:
                if written.upper() not in names:
                    findings.append(_use(path, line, "jdk.tls.disabledAlgorithms", written,
                                         algorithm, purpose,
                                         f"{written} is not in jdk.tls.disabledAlgorithms: TLS may use it"))  # fmt: skip
            for version in ("SSLv3", "TLSv1", "TLSv1.1"):
                if version.upper() not in names:
                    findings.append(_use(path, line, "jdk.tls.disabledAlgorithms", version,
                                         "unknown", Purpose.ENCRYPTION,
                                         f"protocol {version} is not disabled", protocol=version))  # fmt: skip
        for key in _LISTS:
            if key not in props:
                continue
            value, line = props[key]
            for item in (i.strip() for i in value.split(",")):
                match = _SIZE.match(item)
                if match and int(match.group(2)) < 2048 and match.group(1).upper() != "EC":
                    family = _FAMILY[match.group(1).upper()]
                    findings.append(Finding(
                        source=SourceRef(path, line=line, detail=f"line{line}:{key}:{item}"),
                        kind=FindingKind.CONFIG_SETTING, algorithm=family,
                        key_size=int(match.group(2)),
                        purpose=Purpose.KEY_ESTABLISHMENT if family == "DH" else Purpose.SIGNATURE,
                        protocol="TLS" if "tls" in key else None,
                        notes=(f"{item} in {key}: keys of {match.group(2)} bits are still accepted",),
                    ))  # fmt: skip
        if "jdk.tls.legacyalgorithms" in props:
            value, line = props["jdk.tls.legacyalgorithms"]
            for item in (i.strip() for i in value.split(",") if i.strip()):
                if any(name in item.upper() for name in names):
                    continue  # disabled wins over legacy (java.security comments)
                findings.append(_use(path, line, "jdk.tls.legacyAlgorithms", item, item,
                                     Purpose.ENCRYPTION, "kept for compatibility (legacy list)"))  # fmt: skip
        return FinderResult(claimed=True, findings=tuple(findings))


def _use(
    path: str, line: int, key: str, written: str, algorithm: str, purpose: Purpose, note: str,
    protocol: str | None = "TLS",
) -> Finding:
    return Finding(
        source=SourceRef(path, line=line, detail=f"line{line}:{key}:{written}"),
        kind=FindingKind.CONFIG_SETTING,
        algorithm=algorithm,
        purpose=purpose,
        protocol=protocol,
        notes=(note,),
    )
