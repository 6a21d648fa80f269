"""nginx: ``ssl_protocols``, ``ssl_ciphers``, ``ssl_conf_command Ciphersuites``,
``ssl_ecdh_curve``, ``ssl_certificate`` per ``server`` block (nginx ngx_http_ssl_module and
ngx_stream_ssl_module documentation).

Directives set in ``http`` or ``stream`` are inherited by the servers that do not set them,
as nginx does. Only servers that switch TLS on (``listen ... ssl``, ``ssl on``) are reported;
one without ``ssl_ciphers`` has nginx's default, ``HIGH:!aNULL:!MD5``, said so. ``include`` names fragments that the scan reads too (loops are cut by the
dispatcher). Certificate paths are followed into the certificate reader; relative paths are
taken from nginx's prefix, the nearest folder named ``nginx`` above the file (``/etc/nginx``),
else from the file's folder.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, replace

from pqtriage.model.inventory import SourceRef
from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
    Reference,
    not_understood,
)
from pqtriage.sources.scan.finders.tlsconfig import (
    Setting,
    TlsSettings,
    resolve_path,
    settings_findings,
)

_SNIFF = re.compile(
    rb"^\s*(ssl_certificate|ssl_ciphers|ssl_protocols|ssl_ecdh_curve|listen\s+[^;]*\bssl\b)",
    re.MULTILINE,
)
_BLOCKS = ("http", "stream", "server", "mail")
ROOTS = ("nginx",)
"""Folder names of nginx's prefix: relative paths are taken from it."""
DEFAULT_CIPHERS = "HIGH:!aNULL:!MD5"
"""nginx's ssl_ciphers when a TLS server sets none (ngx_http_ssl_module documentation)."""


@dataclass(frozen=True)
class Token:
    """A word of an nginx file with its line."""

    text: str
    line: int


def tokenize(text: str) -> list[Token]:
    """Words, quoted strings, ``;``, ``{`` and ``}`` with their lines (comments dropped)."""
    tokens: list[Token] = []
    line, index, size = 1, 0, len(text)
    while index < size:
        char = text[index]
        if char == "\n":
            line += 1
            index += 1
        elif char.isspace():
            index += 1
        elif char == "#":
            end = text.find("\n", index)
            index = size if end < 0 else end
        elif char in ";{}":
            tokens.append(Token(char, line))
            index += 1
        elif char in "\"'":
            end = text.find(char, index + 1)
            if end < 0:
                raise ValueError(f"line {line}: unterminated quoted string")
            value = text[index + 1 : end]
            tokens.append(Token(value, line))
            line += value.count("\n")
            index = end + 1
        else:
            start = index
            while index < size and not text[index].isspace() and text[index] not in ";{}\"'":
                index += 1
            tokens.append(Token(text[start:index], line))
    return tokens


class NginxFinder(Finder):
    """Reads nginx configuration files and fragments."""

    name = "nginx"

    def wants(self, path: str, head: bytes) -> bool:
        lower = path.lower()
        return (
            lower.endswith("nginx.conf")
            or "/nginx/" in lower
            and (lower.endswith(".conf") or "/sites-" in lower)
            or bool(_SNIFF.search(head))
        )

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        if not _SNIFF.search(data) and b"include" not in data and not path.endswith("nginx.conf"):
            return NOT_MINE
        try:
            tokens = tokenize(data.decode("utf-8", "replace"))
            blocks, includes = _walk(tokens, path)
        except ValueError as error:
            return not_understood(path, f"nginx syntax: {error}")
        findings, references = [], list(includes)
        for block in blocks:
            found, refs = settings_findings(path, block, context, roots=ROOTS)
            findings += found
            references += refs
        return FinderResult(claimed=True, findings=tuple(findings), references=tuple(references))


_DIRECTIVES = {
    "ssl_protocols": "protocols",
    "ssl_ciphers": "ciphers",
    "ssl_ecdh_curve": "groups",
    "proxy_ssl_protocols": None,
}


def _walk(tokens: list[Token], path: str) -> tuple[list[TlsSettings], list[Reference]]:
    """Server blocks with inherited settings, and include references."""
    stack: list[tuple[str, TlsSettings]] = [("main", TlsSettings())]
    done: list[TlsSettings] = []
    includes: list[Reference] = []
    statement: list[Token] = []
    for token in tokens:
        if token.text == "{":
            name = statement[0].text if statement else ""
            parent = stack[-1][1]
            child = replace(parent, certificates=list(parent.certificates), extra_notes=[],
                            enabled=False)  # fmt: skip
            if name == "server":
                child.label = f"server block at line {token.line}"
            stack.append((name, child))
            statement = []
        elif token.text == "}":
            if len(stack) == 1:
                raise ValueError(f"line {token.line}: '}}' without an open block")
            name, settings = stack.pop()
            if name == "server" and settings.enabled:
                if settings.ciphers is None:
                    line = int(settings.label.rsplit(" ", 1)[-1])
                    settings.ciphers = Setting(DEFAULT_CIPHERS, line, "ssl_ciphers (not set: nginx default)")
                done.append(settings)
            statement = []
        elif token.text == ";":
            if statement:
                _apply(statement, stack[-1][1], includes, path)
            statement = []
        else:
            statement.append(token)
    if len(stack) != 1:
        raise ValueError("a block is not closed at the end of the file")
    if not done:  # a fragment (or a file without server blocks): its own settings count
        top = stack[0][1]
        if not top.empty():
            done.append(top)
    return done, includes


def _apply(statement: list[Token], settings: TlsSettings, includes: list[Reference], path: str) -> None:
    name, args = statement[0].text, statement[1:]
    line = statement[0].line
    value = " ".join(token.text for token in args)
    if name == "listen" and any(t.text in ("ssl", "quic") for t in args) or (
        name == "ssl" and value == "on"
    ):
        settings.enabled = True
    elif name == "ssl_protocols":
        settings.protocols = Setting(value, line, name)
    elif name == "ssl_ciphers":
        settings.ciphers = Setting(value, line, name)
    elif name == "ssl_ecdh_curve" and value != "auto":
        settings.groups = Setting(value, line, name)
    elif name == "ssl_conf_command" and len(args) >= 2:
        command, rest = args[0].text.lower(), " ".join(t.text for t in args[1:])
        if command == "ciphersuites":
            settings.ciphersuites = Setting(rest, line, "ssl_conf_command Ciphersuites")
        elif command in ("groups", "curves"):
            settings.groups = Setting(rest, line, f"ssl_conf_command {args[0].text}")
        elif command == "minprotocol":
            settings.extra_notes.append(f"MinProtocol {rest}")
    elif name in ("ssl_certificate", "ssl_trusted_certificate", "ssl_client_certificate") and args:
        settings.certificates.append(Setting(args[0].text, line, name))
    elif name == "ssl_dhparam" and args:
        settings.certificates.append(Setting(args[0].text, line, name))
    elif name == "include" and args:
        target = args[0].text
        includes.append(
            Reference(
                resolve_path(path, target, ROOTS),
                SourceRef(path, line=line, detail=f"line{line}"),
                "include",
                "nginx",
            )
        )
