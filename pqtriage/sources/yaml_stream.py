"""Stream an inventory document (plain dicts, lists and scalars) as block-style YAML text.

The scan and probe write inventories of tens of thousands of uses. PyYAML's dumper builds a
node graph of the whole document and emits it in pure Python (60 % of a 10,000-block scan);
this writer emits line by line in one pass, with the same block layout (keys in order, lists
as ``- item``), and quotes every scalar it is not sure a YAML 1.1 reader takes back as the
same text.

Scalars (YAML 1.1, sections 5.7 and 9.1.1 on double-quoted escapes):

- text is written plain only when it is made of letters, digits, single spaces and
  ``_ . / @ + - ( )`` (starting with a letter, ``_`` or ``/``) and is
  not a word YAML 1.1 resolves to another type (``yes``, ``null``, ``1.5``, ``2025-01-01``);
  anything else is double-quoted;
- inside double quotes, ``"`` and ``\\`` are escaped, and so is every character a terminal or
  editor could hide or act on (controls, bidi, zero-width, line separators, private use):
  the file shows them as ``\\x1b``, ``\\u202e``; reading it back gives the original text;
- bytes of a file name that are not UTF-8 (kept by Python as lone surrogates) are written as
  the text ``\\xNN``, so the file is valid UTF-8 and every reader can take it.
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterator, Mapping
from typing import Any

_PLAIN = re.compile(r"[A-Za-z_/][A-Za-z0-9_./@+-]*(?: [A-Za-z0-9_./@+()-]+)*")
_RESOLVES = re.compile(
    r"(?i:y|n|yes|no|true|false|on|off|null|~)"  # bools and null (YAML 1.1 types)
    r"|[-+]?(\d[\d_]*)?\.?[\d_]*([eE][-+]?\d+)?"  # numbers
    r"|[-+]?\.(inf|nan)|\d{4}-\d\d?-\d\d?.*"  # infinities, timestamps
)
_NEEDS_ESCAPE = re.compile("[\x00-\x1f\"\\\\\x7f-\x9f\u061c\u180e\u200b-\u200f\u2028-\u202e\u2060-\u206f\ufeff\ufff9-\uffff]")
_ESCAPES = {"\"": "\\\"", "\\": "\\\\", "\n": "\\n", "\t": "\\t", "\r": "\\r", "\x00": "\\0"}
_HIDDEN = frozenset({"Cc", "Cf", "Cs", "Co", "Cn", "Zl", "Zp"})


def _escape(char: str) -> str:
    known = _ESCAPES.get(char)
    if known is not None:
        return known
    code = ord(char)
    if code < 0x100:
        return f"\\x{code:02x}"
    if code <= 0xFFFF:
        return f"\\u{code:04x}"
    return f"\\U{code:08x}"


def _selector(char: str) -> bool:
    """Variation selectors (VS1-16 and VS17-256): they draw nothing."""
    return 0xFE00 <= ord(char) <= 0xFE0F or 0xE0100 <= ord(char) <= 0xE01EF


def quote(text: str) -> str:
    """A YAML scalar for a string: plain when safe, else double-quoted with escapes."""
    if not text.isascii():
        try:
            text.encode("utf-8")
        except UnicodeEncodeError:  # lone surrogates: undecodable bytes of a file name
            text = text.encode("utf-8", "surrogateescape").decode("utf-8", "backslashreplace")
    elif _PLAIN.fullmatch(text) and not _RESOLVES.fullmatch(text):
        return text
    body = _NEEDS_ESCAPE.sub(lambda m: _escape(m.group(0)), text)
    if not body.isascii():
        body = "".join(
            _escape(c) if not c.isascii() and (unicodedata.category(c) in _HIDDEN or _selector(c)) else c
            for c in body
        )
    return f'"{body}"'


def scalar(value: object) -> str:
    """A YAML scalar for any value of an inventory document."""
    if value is None:
        return "null"
    if value is True:
        return "true"
    if value is False:
        return "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        text = repr(value)
        if "e" in text and "." not in text:  # YAML 1.1 floats need the dot: 1.0e-05, not 1e-05
            mantissa, exponent = text.split("e")
            text = f"{mantissa}.0e{exponent}"
        return text
    return quote(str(value))


def _lines(value: Any, indent: str) -> Iterator[str]:
    """Block lines of a mapping or list at an indentation (lists of mappings in '- ' style)."""
    if isinstance(value, Mapping):
        for key, item in value.items():
            yield from _entry(quote(str(key)), item, indent)
    else:
        for item in value:
            if isinstance(item, Mapping) and item:
                first = True
                for key, child in item.items():
                    prefix = indent + "- " if first else indent + "  "
                    first = False
                    yield from _entry(quote(str(key)), child, prefix, indent + "  ")
            elif isinstance(item, (list, tuple)) and item:
                yield f"{indent}-"
                yield from _lines(item, indent + "  ")
            else:
                yield f"{indent}- {_flow(item)}"


def _entry(key: str, value: Any, prefix: str, indent: str | None = None) -> Iterator[str]:
    """``key: value`` at ``prefix``; nested blocks indented below ``indent`` (default: prefix)."""
    inner = indent if indent is not None else prefix
    if isinstance(value, Mapping) and value:
        yield f"{prefix}{key}:"
        yield from _lines(value, inner + "  ")
    elif isinstance(value, (list, tuple)) and value:
        yield f"{prefix}{key}:"
        yield from _lines(value, inner)
    else:
        yield f"{prefix}{key}: {_flow(value)}"


def _flow(value: Any) -> str:
    if isinstance(value, Mapping):
        return "{}" if not value else "{" + ", ".join(f"{quote(str(k))}: {_flow(v)}" for k, v in value.items()) + "}"
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_flow(v) for v in value) + "]"
    return scalar(value)


def dump_document(document: Mapping[str, Any]) -> str:
    """The document as block-style YAML text, in one pass."""
    return "\n".join(_lines(document, "")) + "\n"
