"""Ids that look alike: compared after Unicode normalisation and a confusable skeleton.

Two system ids that differ only by Unicode normalisation (``Å`` as one code point or as
``A`` plus a combining ring), by invisible characters, or by homoglyphs (a Cyrillic ``а``
for a Latin ``a``, fullwidth letters) look identical in every output, so a reader cannot
tell which system a row is about. The inventory readers refuse such pairs, naming both with
their escapes.

The skeleton follows Unicode Technical Standard #39 (Unicode Security Mechanisms), section 4:
NFD, each character replaced by its prototype, NFD again; with a shipped subset of the
confusables data (``pqtriage/data/confusables.yaml``), fullwidth and halfwidth forms folded
by their compatibility decomposition (Unicode Standard Annex #15), and default-ignorable
characters (format characters, variation selectors) dropped. A pair is refused only when
one of the two ids has a character outside ASCII: ``app1`` and ``appl`` share a skeleton but
are plain ASCII that every output shows as typed.
"""

from __future__ import annotations

import functools
import unicodedata
from collections.abc import Sequence
from importlib import resources
from typing import Any

import yaml

from pqtriage.errors import CatalogError

try:  # The C loader is much faster; fall back to the pure-Python safe loader.
    _Loader: Any = yaml.CSafeLoader
except AttributeError:  # pragma: no cover - PyYAML built without libyaml
    _Loader = yaml.SafeLoader


@functools.lru_cache(maxsize=1)
def prototypes() -> dict[str, str]:
    """The shipped confusables subset: character -> ASCII prototype (validated at load)."""
    text = (resources.files("pqtriage") / "data" / "confusables.yaml").read_text("utf-8")
    data = yaml.load(text, Loader=_Loader)  # noqa: S506 - a safe loader
    if not isinstance(data, dict) or not isinstance(data.get("characters"), list):
        raise CatalogError("confusables.yaml: expected a 'characters' list")
    table: dict[str, str] = {}
    for index, row in enumerate(data["characters"]):
        where = f"confusables.yaml: row {index + 1}"
        if not isinstance(row, dict) or set(row) != {"char", "looks_like", "name", "source"}:
            raise CatalogError(f"{where}: needs exactly char, looks_like, name and source")
        code = str(row["char"])
        if not code.startswith("U+"):
            raise CatalogError(f"{where}: char must be written U+XXXX")
        char = chr(int(code[2:], 16))
        target = str(row["looks_like"])
        if len(target) != 1 or not target.isascii():
            raise CatalogError(f"{where}: looks_like must be one ASCII character")
        if unicodedata.name(char, "") != row["name"]:
            raise CatalogError(f"{where}: {code} is not {row['name']}")
        if not str(row["source"]).strip():
            raise CatalogError(f"{where}: source is empty")
        if char in table:
            raise CatalogError(f"{where}: {code} appears twice")
        table[char] = target
    return table


def _ignorable(char: str) -> bool:
    """Default-ignorable for display: format characters, variation selectors, fillers."""
    return unicodedata.category(char) in ("Cf", "Cc") or 0xFE00 <= ord(char) <= 0xFE0F \
        or 0xE0100 <= ord(char) <= 0xE01EF or char in "\u034f\u115f\u1160\u3164\uffa0"


def _fold(char: str, table: dict[str, str]) -> str:
    found = table.get(char)
    if found is not None:
        return found
    decomposition = unicodedata.decomposition(char)
    if decomposition.startswith(("<wide>", "<narrow>")):
        folded = "".join(chr(int(part, 16)) for part in decomposition.split()[1:])
        return "".join(table.get(c, c) for c in folded)
    return char


def skeleton(text: str) -> str:
    """The look-alike skeleton of a text (UTS #39 section 4, with the subset described above)."""
    table = prototypes()
    if text.isascii():
        return "".join(table.get(c, c) for c in text if not _ignorable(c))
    decomposed = unicodedata.normalize("NFD", text)
    mapped = "".join(_fold(c, table) for c in decomposed if not _ignorable(c))
    return unicodedata.normalize("NFD", mapped)


def spelled_out(text: str) -> str:
    """Every character outside printable ASCII as its escape (``p\\u0430y``), for messages
    naming look-alike ids: the difference the eye cannot see becomes visible."""
    return "".join(c if c.isascii() and c.isprintable() else c.encode("ascii", "backslashreplace").decode("ascii")
                   if ord(c) > 0x7F else f"\\x{ord(c):02x}" for c in text)


def lookalike_key(ident: str) -> str:
    """What two ids are compared by: the skeleton (plain printable ASCII ids: themselves,
    with the three ASCII prototypes applied)."""
    if ident.isascii() and ident.isprintable():
        table = prototypes()
        return "".join(table.get(c, c) for c in ident)
    return skeleton(ident)


def _plain(ident: str) -> bool:
    return ident.isascii() and ident.isprintable()


def lookalike_pairs(ids: Sequence[str]) -> list[tuple[int, int]]:
    """Index pairs (first, later) of distinct ids that look alike, in input order.

    Exact duplicates are not reported here (the readers refuse them on their own).
    """
    first_by_key: dict[str, int] = {}
    pairs: list[tuple[int, int]] = []
    for index, ident in enumerate(ids):
        key = lookalike_key(ident)
        earlier = first_by_key.get(key)
        if earlier is None:
            first_by_key[key] = index
            continue
        other = ids[earlier]
        if other != ident and not (_plain(other) and _plain(ident)):
            pairs.append((earlier, index))
    return pairs


def looks_alike(a: str, b: str) -> bool:
    """Whether two different ids would be refused as look-alikes."""
    return a != b and not (_plain(a) and _plain(b)) and lookalike_key(a) == lookalike_key(b)
