"""Neutralise text from inputs so every output shows it literally: the one neutraliser.

Inventory text, file names, certificate subjects and SSH banners are untrusted: they may
carry terminal escape sequences (ECMA-48: C0 and C1 controls, ESC), rich markup, Markdown,
HTML, bidirectional controls (Unicode UAX #9: U+202A-202E, U+2066-2069, U+200E/200F,
U+061C), zero-width and other invisible characters (U+200B-200D, U+2060, U+FEFF, the tag
characters U+E0000-E007F, variation selectors), line and paragraph separators
(U+2028/2029), private-use, unassigned and surrogate code points. :func:`visible` is the
one function that turns all of them into visible escapes (``\x1b``, ``\u202e``,
``\U000e0041``); every medium (terminal, Markdown, CSV, SARIF, SVG, error messages on
stderr, scan and probe summaries) calls it first and then escapes what its own syntax needs.
"""

from __future__ import annotations

import re
import unicodedata
from xml.sax.saxutils import escape, quoteattr

_INVISIBLE = re.compile(
    "[\x00-\x08\x0b-\x1f\x7f-\x9f\u061c\u180e\u200b-\u200f\u2028-\u202e\u2060-\u206f"
    "\ufeff\ufff9-\ufffb\n\t\r]"
)
_ESCAPED_CATEGORIES = frozenset({"Cc", "Cf", "Cs", "Co", "Cn", "Zl", "Zp"})
"""Controls, format characters (bidi, zero-width, tags), surrogates, private use, unassigned,
line and paragraph separators (Unicode general categories, UAX #44 section 5.7.1)."""
_INVISIBLE_LETTERS = frozenset(
    "\u034f\u115f\u1160\u17b4\u17b5\u180b\u180c\u180d\u180f\u3164\uffa0"
    + "".join(chr(c) for c in range(0xFE00, 0xFE10))
    + "".join(chr(c) for c in range(0xE0100, 0xE01F0))
)
"""Characters that draw nothing although their category is a letter or mark: combining
grapheme joiner, Hangul fillers, Khmer inherent vowels, Mongolian variation selectors,
variation selectors 1-256 (common practice, no source)."""
_MD_SPECIAL = re.compile(r"([\\`*_{}\[\]()#+!|~>])")
_MD_IN_HTML = re.compile(r"[\\*_\[\]~]")
_MD_LEADING = re.compile(r"^(\s*)([-=:]|\d+[.)])")
_PLAN_MD_SPECIALS = re.compile(r"([\\`*_\[\]#!|~])")
_ESCAPE_TAIL = re.compile(r"\\(x[0-9a-f]{0,1}|u[0-9a-f]{0,3}|U[0-9a-f]{0,7})$")
_SPACES = re.compile(" {2,}")
_DECISIONS: dict[str, str] = {}
ELLIPSIS = "…"
MAX_CELL_CHARACTERS = 200
"""Longest input text drawn in one terminal table cell; the JSON output keeps all of it."""


def _escape_code(char: str) -> str:
    code = ord(char)
    if code < 0x100:
        return f"\\x{code:02x}"
    if code <= 0xFFFF:
        return f"\\u{code:04x}"
    return f"\\U{code:08x}"


def _visible(match: re.Match[str]) -> str:
    char = match.group(0)
    if char in "\n\t\r":
        return " "
    return _escape_code(char)


def _shown(char: str) -> str:
    """A non-ASCII character as displayed: itself, or its escape (decision cached)."""
    done = _DECISIONS.get(char)
    if done is None:
        hidden = unicodedata.category(char) in _ESCAPED_CATEGORIES or char in _INVISIBLE_LETTERS
        done = _escape_code(char) if hidden else char
        if len(_DECISIONS) < 65536:
            _DECISIONS[char] = done
    return done


def visible(text: object) -> str:
    """One line of text with control, format, bidi and invisible characters shown as escapes."""
    value = "" if text is None else str(text)
    value = _INVISIBLE.sub(_visible, value)
    if value.isascii():  # the common case: nothing else can hide or reorder text
        return value
    return "".join(c if c.isascii() else _shown(c) for c in value)


def shorten(text: str, limit: int) -> str:
    """Text cut to at most ``limit`` characters with an ellipsis, at a word boundary when one
    is near, and never inside an escape such as ``\\u202e``."""
    if len(text) <= limit:
        return text
    cut = text[: max(1, limit - 1)]
    space = cut.rfind(" ")
    if space >= max(1, len(cut) * 3 // 4):
        cut = cut[:space]
    partial = _ESCAPE_TAIL.search(cut)
    if partial:
        cut = cut[: partial.start()]
    return cut.rstrip() + ELLIPSIS


def one_line(text: object, limit: int | None = None) -> str:
    """:func:`visible` text with runs of spaces collapsed, cut to ``limit`` (for messages)."""
    value = _SPACES.sub(" ", visible(text)).strip()
    return shorten(value, limit) if limit is not None else value


def cell(text: object, limit: int) -> str:
    """Text for a terminal table cell: :func:`visible`, at most ``limit`` characters.

    The full value stays in the JSON output; a table that had to draw a 10 MB id would take
    minutes and hundreds of MB (docs/hardening.md).
    """
    value = "" if text is None else str(text)
    if len(value) > 4 * limit:  # neutralise only what can be shown
        value = value[: 4 * limit]
    return shorten(visible(value), limit)


def markdown_text(text: object) -> str:
    """Text for a Markdown paragraph or table cell: shown literally on a Git forge."""
    value = visible(text)
    value = value.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
    value = _MD_SPECIAL.sub(r"\\\1", value)
    # A leading list marker, setext underline or ordered-list number would change the layout.
    return _MD_LEADING.sub(_escape_leading, value)


def _escape_leading(match: re.Match[str]) -> str:
    marker = match.group(2)
    if marker[0].isdigit():  # "1." -> "1\." (a backslash before a digit is not an escape)
        return match.group(1) + marker[:-1] + "\\" + marker[-1]
    return match.group(1) + "\\" + marker


def markdown_code(text: object) -> str:
    """Text inside inline code: backticks cannot be escaped there, so use entities in HTML code."""
    value = visible(text).replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
    value = value.replace("|", "&#124;").replace("`", "&#96;")
    # Markdown inside an inline HTML element is still parsed (CommonMark 0.31, section 6.6):
    # emphasis, links and escapes must become character references too.
    value = _MD_IN_HTML.sub(lambda m: f"&#{ord(m.group(0))};", value)
    return f"<code>{value}</code>"


def csv_cell(text: object) -> str:
    """Spreadsheet-safe cell: a leading =, +, -, @, tab or CR cannot start a formula."""
    value = visible(text)
    if value and value[0] in "=+-@\t\r":
        return "'" + value
    return value


_NOT_IN_CELL = re.compile(
    "[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\u200b-\u200f\u202a-\u202e\u2060-\u2069\ufeff\ufffe\uffff\ud800-\udfff]"
)
FORMULA_STARTS = "=+-@\t\r"
"""First characters that make a spreadsheet treat a cell as a formula (OWASP, "CSV Injection")."""


def cell_text(text: object) -> str:
    """Text for a workbook cell, kept as typed except what a cell cannot show literally.

    Characters XML 1.0 forbids (most C0 controls) and invisible or bidirectional-override
    characters are shown as escapes (``\\x01``, ``\\u202e``), as in every other output; tabs
    and line breaks are kept (a cell may hold several lines). Formula starts are not changed
    here: the workbook writer stores such a cell as text with the quote-prefix style.
    """
    value = "" if text is None else str(text)
    if value.isascii() and value.isprintable():
        return value
    value = _NOT_IN_CELL.sub(_visible, value)
    return "".join(f"\\u{ord(c):04x}" if unicodedata.category(c) == "Cf" else c for c in value)


def starts_formula(text: str) -> bool:
    """Whether a spreadsheet would run this text as a formula."""
    return bool(text) and text[0] in FORMULA_STARTS


def control_escapes(text: str) -> str:
    """Text for the plan's terminal view: :func:`visible` (kept for callers of the old name)."""
    return visible(text)


def md_escape(text: str) -> str:
    """Escape text for Markdown (tables included): specials, HTML and line breaks (the plan section)."""
    text = " ".join(visible(text).split())
    text = text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
    return _PLAN_MD_SPECIALS.sub(r"\\\1", text)


def _xml_clean(text: str) -> str:
    # visible() escapes every character XML 1.0 forbids (controls, surrogates, U+FFFE/FFFF).
    return " ".join(visible(text).split())


def xml_text(text: str) -> str:
    """Text for an XML (SVG) element: escaped, one line, characters XML 1.0 forbids as ``\\xNN``."""
    return escape(_xml_clean(text))


def xml_attr(text: str) -> str:
    """A quoted XML (SVG) attribute value, cleaned like :func:`xml_text`."""
    return quoteattr(_xml_clean(text))
