"""OpenSSL cipher strings (``HIGH:!aNULL:!MD5``, ``ECDHE+AESGCM``) expanded into suite names.

Two ways, same answer where both apply: the system's ``openssl ciphers`` (passed in by the
caller, since running a program is I/O) or our own table, generated from OpenSSL 3.0 by
``scripts/openssl_cipher_table.py`` and shipped as data. The grammar is the one of the
openssl-ciphers(1) manual: items separated by ``:``, ``,`` or spaces; ``!`` removes for good,
``-`` removes, ``+`` moves to the end; ``A+B`` is the suites in both; ``@STRENGTH`` sorts,
``@SECLEVEL=n`` is noted. Suites that current OpenSSL no longer builds (RC4, 3DES, DES, IDEA,
SEED) are kept when the string names them or their cipher keyword: the server reading the
configuration may run an older OpenSSL, and an inventory must not drop them.

The cipher string governs TLS 1.2 and earlier; TLS 1.3 suites are set apart (``Ciphersuites``).
"""

from __future__ import annotations

import functools
import re
from dataclasses import dataclass
from typing import Any

from pqtriage.errors import CatalogError
from pqtriage.sources.scan.finders.data import load_data

_SEPARATORS = re.compile(r"[:, ]+")
LEGACY_NOTE = "suites OpenSSL 3.0 no longer builds, kept as named: "


@dataclass(frozen=True)
class Expansion:
    """The suites a cipher string enables, in order, and what could not be expanded."""

    suites: tuple[str, ...]
    """OpenSSL suite names (TLS 1.2 and earlier)."""
    unknown: tuple[str, ...] = ()
    """Keywords or names neither the table nor the system's OpenSSL knows."""
    method: str = "table"
    """``openssl`` (the system's OpenSSL) or ``table`` (our shipped table)."""
    notes: tuple[str, ...] = ()
    """Facts worth keeping (``@SECLEVEL=0``, suites kept that OpenSSL 3.0 no longer builds)."""


@dataclass(frozen=True)
class CipherTable:
    """The shipped table: every suite with its facts, and the suites of every keyword."""

    suites: dict[str, dict[str, Any]]
    """Suite name -> facts (id, protocol, kx, au, enc, mac)."""
    keywords: dict[str, tuple[str, ...]]
    """Keyword -> suite names, in OpenSSL's order."""
    legacy: frozenset[str]
    """Suites OpenSSL 3.0 no longer builds (kept from the hand-written section)."""
    tls13_default: tuple[str, ...]
    """TLS 1.3 suites OpenSSL enables by default."""
    source: str
    """Where the table comes from."""

    def bits(self, name: str) -> int:
        """Cipher key bits from the ``enc`` fact (``AESGCM(256)`` -> 256), 0 when none."""
        match = re.search(r"\((\d+)\)", str(self.suites.get(name, {}).get("enc", "")))
        return int(match.group(1)) if match else 0


@functools.lru_cache(maxsize=1)
def cipher_table() -> CipherTable:
    """Load and check the shipped table once."""
    raw = load_data("openssl_ciphers.yaml", ("source", "suites", "keywords", "legacy"))
    suites: dict[str, dict[str, Any]] = {}
    for row in raw["suites"]:
        suites[str(row["name"])] = dict(row)
    keywords: dict[str, list[str]] = {
        str(key).upper(): [str(n) for n in names] for key, names in raw["keywords"].items()
    }
    legacy = set()
    for row in raw["legacy"]:
        if not row.get("source"):
            raise CatalogError(f"openssl_ciphers.yaml: legacy row {row.get('name')} has no source")
        suites[str(row["name"])] = dict(row)
        legacy.add(str(row["name"]))
        for keyword in row.get("keywords", []):
            keywords.setdefault(str(keyword).upper(), []).append(str(row["name"]))
    for key, names in keywords.items():
        for name in names:
            if name not in suites:
                raise CatalogError(f"openssl_ciphers.yaml: keyword {key} names unknown suite {name}")
    return CipherTable(
        suites=suites,
        keywords={key: tuple(names) for key, names in keywords.items()},
        legacy=frozenset(legacy),
        tls13_default=tuple(raw.get("tls13_default", ())),
        source=str(raw["source"]),
    )


def _select(body: str, table: CipherTable) -> tuple[list[str], bool]:
    """Suites an item body selects (``A+B`` intersects), and whether every part was known."""
    selected: list[str] | None = None
    known = True
    for part in body.split("+"):
        if part in table.suites:
            names = [part]
        elif part.upper() in table.keywords:
            names = list(table.keywords[part.upper()])
        else:
            names, known = [], False
        selected = names if selected is None else [n for n in selected if n in names]
    return selected or [], known


def expand_with_table(text: str, table: CipherTable | None = None) -> Expansion:
    """Expand a cipher string with the shipped table (openssl-ciphers(1) grammar)."""
    table = table or cipher_table()
    order: list[str] = []
    killed: set[str] = set()
    unknown: list[str] = []
    notes: list[str] = []
    for item in (i for i in _SEPARATORS.split(text.strip()) if i):
        if item.startswith("@"):
            if item.upper() == "@STRENGTH":
                order.sort(key=table.bits, reverse=True)
            else:
                notes.append(f"cipher string sets {item}")
            continue
        prefix = item[0] if item[0] in "!-+" else ""
        names, known = _select(item[len(prefix) :], table)
        if not known:
            unknown.append(item)
        if prefix == "!":
            killed.update(names)
            order = [n for n in order if n not in killed]
        elif prefix == "-":
            order = [n for n in order if n not in names]
        elif prefix == "+":
            moved = [n for n in order if n in names]
            order = [n for n in order if n not in names] + moved
        else:
            order += [n for n in names if n not in killed and n not in order]
    kept_legacy = [n for n in order if n in table.legacy]
    if kept_legacy:
        notes.append(LEGACY_NOTE + ", ".join(kept_legacy))
    return Expansion(tuple(order), tuple(unknown), "table", tuple(notes))


def expand(text: str, system: Any = None) -> Expansion:
    """Expand with the system's OpenSSL when given (a callable string -> names or None);
    the same string in many files is expanded once per expander."""
    return _expand(text, system)


@functools.lru_cache(maxsize=1024)
def _expand(text: str, system: Any) -> Expansion:
    """Expand with the system's OpenSSL when given (a callable string -> names or None).

    Suites OpenSSL 3.0 no longer builds, named in the string, are added from the table
    (the system's OpenSSL drops them silently); a string the system rejects falls back to
    the table.
    """
    ours = expand_with_table(text)
    if system is None:
        return ours
    names = system(text)
    if names is None:
        return Expansion(ours.suites, ours.unknown, "table", ours.notes + (
            "the system's OpenSSL rejected this string; expanded with the shipped table",
        ))  # fmt: skip
    legacy = [n for n in ours.suites if n in cipher_table().legacy and n not in names]
    return Expansion(tuple(names) + tuple(legacy), ours.unknown, "openssl", ours.notes)
