"""HAProxy: ``ssl-default-bind-*`` / ``ssl-default-server-*`` in ``global`` and the ``ciphers``,
``ciphersuites``, ``curves``, ``ssl-min-ver`` and ``crt`` arguments of each ``bind`` and
``server`` line (HAProxy 2.6 Configuration Manual, sections 3.1 and 5).

A ``bind`` or ``server`` line without its own values takes the global defaults, as HAProxy
does.
"""

from __future__ import annotations

import re
from dataclasses import replace

from pqtriage.sources.scan.finders.interface import NOT_MINE, Finder, FinderContext, FinderResult
from pqtriage.sources.scan.finders.tlsconfig import Setting, TlsSettings, settings_findings

_SNIFF = re.compile(rb"^\s*(ssl-default-(bind|server)-\w+|bind\s.*\bssl\b)", re.MULTILINE)
_SECTIONS = ("global", "defaults", "frontend", "backend", "listen", "peers", "resolvers")
_ARGS = {"ciphers": "ciphers", "ciphersuites": "ciphersuites", "curves": "groups"}


class HaproxyFinder(Finder):
    """Reads haproxy.cfg."""

    name = "haproxy"

    def wants(self, path: str, head: bytes) -> bool:
        return path.lower().endswith(("haproxy.cfg", ".haproxy")) or bool(_SNIFF.search(head))

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        if not _SNIFF.search(data) and not path.lower().endswith("haproxy.cfg"):
            return NOT_MINE
        defaults = {"bind": TlsSettings(), "server": TlsSettings()}
        blocks: list[TlsSettings] = []
        section = ""
        for number, raw in enumerate(data.decode("utf-8", "replace").splitlines(), 1):
            words = raw.split("#", 1)[0].split()
            if not words:
                continue
            if words[0] in _SECTIONS:
                section = " ".join(words)
                continue
            if words[0].startswith("ssl-default-"):
                side = "bind" if words[0].startswith("ssl-default-bind-") else "server"
                what = words[0].rsplit("-", 1)[-1]
                value = " ".join(words[1:])
                if what in _ARGS:
                    setattr(defaults[side], _ARGS[what], Setting(value, number, words[0]))
                elif what == "options":
                    minimum = _option(words[1:], "ssl-min-ver")
                    if minimum:
                        defaults[side].protocols = Setting(f"{minimum}+", number, words[0])
                continue
            if words[0] in ("bind", "server") and "ssl" in words:
                blocks.append(_line(words, number, defaults[words[0]], section))
        findings, references = [], []
        for block in blocks:
            found, refs = settings_findings(path, block, context)
            findings += found
            references += refs
        return FinderResult(claimed=True, findings=tuple(findings), references=tuple(references))


def _option(words: list[str], name: str) -> str | None:
    return words[words.index(name) + 1] if name in words[:-1] else None


def _line(words: list[str], number: int, default: TlsSettings, section: str) -> TlsSettings:
    block = replace(default, certificates=[], extra_notes=[])
    block.label = f"{words[0]} {words[1] if len(words) > 1 else ''} in {section} (line {number})"
    for index, word in enumerate(words[:-1]):
        value = words[index + 1]
        if word in _ARGS:
            setattr(block, _ARGS[word], Setting(value, number, word))
        elif word == "ssl-min-ver":
            block.protocols = Setting(f"{value}+", number, word)
        elif word in ("crt", "ca-file"):
            block.certificates.append(Setting(value, number, word))
    return block
