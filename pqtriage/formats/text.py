"""Neutralise text from inputs so every output shows it literally.

Inventory text is untrusted: it may carry terminal escape codes, rich markup,
Markdown, HTML or bidirectional-override characters. Each output escapes it
for its own medium; the shared first step makes control characters visible.
"""

from __future__ import annotations

import re
import unicodedata
from xml.sax.saxutils import escape, quoteattr

_INVISIBLE = re.compile(
    "[\x00-\x08\x0b-\x1f\x7f-\x9f\u200b-\u200f\u202a-\u202e\u2060-\u2069\ufeff\n\t\r]"
)
_MD_SPECIAL = re.compile(r"([\\`*_{}\[\]()#+!|~>])")
_MD_IN_HTML = re.compile(r"[\\*_\[\]~]")
_MD_LEADING = re.compile(r"^(\s*)([-=:]|\d+[.)])")
_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f]")
_PLAN_MD_SPECIALS = re.compile(r"([\\`*_\[\]#!|~])")
_PLAN_MD_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f]")
_NOT_XML = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\ud800-\udfff\ufffe\uffff]")


def _visible(match: re.Match[str]) -> str:
    char = match.group(0)
    if char in "\n\t\r":
        return " "
    code = ord(char)
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def visible(text: object) -> str:
    """One line of text with control, format and bidi characters shown as escapes."""
    value = "" if text is None else str(text)
    value = _INVISIBLE.sub(_visible, value)
    if value.isascii():  # no format characters outside the controls handled above
        return value
    # Other format characters (category Cf) can reorder or hide text too.
    return "".join(
        f"\\u{ord(c):04x}" if unicodedata.category(c) == "Cf" else c for c in value
    )


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
    """C0 and C1 control characters shown as ``\\xNN`` (the plan's terminal view)."""
    return _CONTROL.sub(lambda m: f"\\x{ord(m.group()):02x}", text)


def md_escape(text: str) -> str:
    """Escape text for Markdown (tables included): specials, HTML and line breaks (the plan section)."""
    text = _PLAN_MD_CONTROL.sub(lambda m: f"\\x{ord(m.group()):02x}", text)
    text = " ".join(text.split())
    text = text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
    return _PLAN_MD_SPECIALS.sub(r"\\\1", text)


def _xml_clean(text: str) -> str:
    return _NOT_XML.sub(lambda m: f"\\x{ord(m.group()):02x}", " ".join(text.split()))


def xml_text(text: str) -> str:
    """Text for an XML (SVG) element: escaped, one line, characters XML 1.0 forbids as ``\\xNN``."""
    return escape(_xml_clean(text))


def xml_attr(text: str) -> str:
    """A quoted XML (SVG) attribute value, cleaned like :func:`xml_text`."""
    return quoteattr(_xml_clean(text))
