"""OpenSSL configuration (openssl.cnf): the SSL configuration module's ``MinProtocol``,
``CipherString``, ``Ciphersuites``, ``Groups``/``Curves`` commands in any section
(config(5) and SSL_CONF_cmd(3) of OpenSSL 3.0). ``.include`` files are read too.
"""

from __future__ import annotations

import re

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

_SNIFF = re.compile(rb"^\s*(CipherString|Ciphersuites|MinProtocol|Groups|Curves)\s*=", re.M)
_KEYS = {"cipherstring": "ciphers", "ciphersuites": "ciphersuites", "groups": "groups",
         "curves": "groups", "minprotocol": "protocols"}  # fmt: skip


class OpensslConfFinder(Finder):
    """Reads OpenSSL configuration files."""

    name = "openssl config"

    def wants(self, path: str, head: bytes) -> bool:
        return path.lower().endswith(("openssl.cnf", ".cnf")) or bool(_SNIFF.search(head))

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        if not _SNIFF.search(data):
            return NOT_MINE
        sections: dict[str, TlsSettings] = {}
        references: list[Reference] = []
        section = "default"
        for number, raw in enumerate(data.decode("utf-8", "replace").splitlines(), 1):
            line = raw.split("#", 1)[0].strip()
            if line.startswith("[") and line.endswith("]"):
                section = line[1:-1].strip()
                continue
            if line.startswith(".include"):
                target = line.split(None, 1)[1].lstrip("= ").strip() if " " in line else ""
                if target:
                    references.append(Reference(
                        resolve_path(path, target), SourceRef(path, line=number, detail=f"line{number}"),
                        "include", self.name,
                    ))  # fmt: skip
                continue
            key, sep, value = line.partition("=")
            field = _KEYS.get(key.strip().lower())
            if not sep or field is None:
                continue
            block = sections.setdefault(section, TlsSettings(label=f"section [{section}]"))
            value = value.strip()
            if field == "protocols":
                value = f"{value}+"
            setattr(block, field, Setting(value, number, key.strip()))
        findings = []
        for block in sections.values():
            found, refs = settings_findings(path, block, context, pre_shared_keys=True)
            findings += found
            references += refs
        return FinderResult(claimed=True, findings=tuple(findings), references=tuple(references))
