"""Strict JSON reading with bounded depth, and the line:column of any value by its path.

The fast path is the standard library's C parser (``json.loads``); positions are found only
when a message needs one: :func:`locate` walks the text to the value a JSON path names
(``components[3].cryptoProperties``) with an iterative scanner, so neither reading nor
locating recurses on the document's depth. Depth is checked before parsing by a pass over
the brackets alone (C-speed ``bytes.translate``), so a file of 5,000 nested arrays gets a
one-line error instead of a RecursionError (RFC 8259 section 9 lets a parser limit nesting).
"""

from __future__ import annotations

import json
import re
from collections.abc import Callable
from typing import Any

from pqtriage.errors import Place, PqtriageError, quoted

MAX_JSON_DEPTH = 64
"""Deepest nesting accepted (a CycloneDX BOM needs about 10 levels, a JWK Set 4)."""

ErrorFactory = Callable[..., PqtriageError]

_KEEP = b'"\\[]{}'
_DELETE = bytes(b for b in range(256) if b not in _KEEP)
_REDUCED_STRING = re.compile(rb'"(?:[^"\\]|\\.)*"', re.DOTALL)
_WHITESPACE = re.compile(r"[ \t\n\r]*")
_PATH_PART = re.compile(r"\.?([^.\[\]]+)|\[(\d+)\]")
_BARE = re.compile(r"[^\s,:\[\]{}\"]+")


class _DuplicateKey(ValueError):
    pass


def _pairs(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    out = dict(pairs)  # built in C; only a duplicate key makes it shorter than the pairs
    if len(out) != len(pairs):
        seen: set[str] = set()
        for key, _ in pairs:
            if key in seen:
                raise _DuplicateKey(key)
            seen.add(key)
    return out


def _constant(name: str) -> None:
    raise ValueError(f"{name} is not a JSON number")


def too_deep(data: bytes, limit: int = MAX_JSON_DEPTH) -> bool:
    """Whether brackets nest deeper than ``limit`` (brackets inside strings do not count)."""
    reduced = _REDUCED_STRING.sub(b"", data.translate(None, _DELETE))
    if reduced.count(b"[") + reduced.count(b"{") <= limit:
        return False
    depth = 0
    for byte in reduced:
        if byte in (0x5B, 0x7B):
            depth += 1
            if depth > limit:
                return True
        elif byte in (0x5D, 0x7D):
            depth -= 1
    return False


def _line_column(text: str, offset: int) -> tuple[int, int]:
    line = text.count("\n", 0, offset) + 1
    return line, offset - (text.rfind("\n", 0, offset) + 1) + 1


def depth_position(text: str, limit: int = MAX_JSON_DEPTH) -> tuple[int, int] | None:
    """Line and column of the first bracket that goes deeper than ``limit`` (the slow,
    positioned counterpart of :func:`too_deep`, run only to report the error)."""
    depth = 0
    index = 0
    size = len(text)
    while index < size:
        char = text[index]
        if char == '"':
            index = _string_end(text, index)
            continue
        if char in "[{":
            depth += 1
            if depth > limit:
                return _line_column(text, index)
        elif char in "]}":
            depth -= 1
        index += 1
    return None


def _string_end(text: str, start: int) -> int:
    """Index just after the string that starts at ``start`` (an opening quote)."""
    index = start + 1
    while True:
        quote = text.find('"', index)
        if quote < 0:
            return len(text)
        backslashes = 0
        back = quote - 1
        while back > start and text[back] == "\\":
            backslashes += 1
            back -= 1
        if backslashes % 2 == 0:
            return quote + 1
        index = quote + 1


def load_json(text: str, path: str, error: ErrorFactory) -> Any:
    """Parse JSON strictly: duplicate keys, NaN and infinities refused, depth bounded.

    Errors name file:line:column and are raised as ``error`` (the calling layer's class).
    """
    if too_deep(text.encode("utf-8", "surrogatepass")):
        line, column = depth_position(text) or (None, None)
        raise error(f"JSON nested too deeply (more than {MAX_JSON_DEPTH} levels)", place=Place(path, line, column),
                    hint="flatten the document")
    try:
        return json.loads(text, object_pairs_hook=_pairs, parse_constant=_constant)
    except json.JSONDecodeError as exc:
        raise error(f"invalid JSON: {exc.msg}", place=Place(path, exc.lineno, exc.colno),
                    hint="check commas, quotes and brackets") from exc
    except RecursionError as exc:  # pragma: no cover - the depth check comes first
        raise error("JSON nested too deeply", place=Place(path), hint="flatten the document") from exc
    except _DuplicateKey as exc:
        where = duplicate_key_position(text, str(exc))
        raise error(f"duplicate key {quoted(exc, 80)} in a JSON object",
                    place=Place(path, *where) if where else Place(path), hint="keep one of them") from exc
    except ValueError as exc:
        raise error(f"cannot read a JSON value: {quoted(exc, 120)}", place=Place(path)) from exc


def parse_path(where: str) -> list[str | int]:
    """``components[3].cryptoProperties`` -> ``["components", 3, "cryptoProperties"]``."""
    parts: list[str | int] = []
    for match in _PATH_PART.finditer(where):
        parts.append(match.group(1) if match.group(1) is not None else int(match.group(2)))
    return parts


class _Scanner:
    """Walks JSON text token by token without recursion (positions only; values not built)."""

    def __init__(self, text: str):
        self.text = text
        self.index = 0

    def skip_space(self) -> None:
        match = _WHITESPACE.match(self.text, self.index)
        self.index = match.end() if match else self.index

    def peek(self) -> str:
        self.skip_space()
        return self.text[self.index] if self.index < len(self.text) else ""

    def string(self) -> str:
        value, self.index = json.decoder.scanstring(self.text, self.index + 1)  # type: ignore[attr-defined]
        return str(value)

    def skip_value(self) -> None:
        """Skip one value, however deep, with a counter instead of recursion."""
        depth = 0
        while True:
            char = self.peek()
            if not char:
                return
            if char == '"':
                self.index = _string_end(self.text, self.index)
            elif char in "[{":
                depth += 1
                self.index += 1
            elif char in "]}":
                depth -= 1
                self.index += 1
            elif char in ",:":
                self.index += 1
            else:
                match = _BARE.match(self.text, self.index)
                self.index = match.end() if match else self.index + 1
            if depth <= 0 and char not in ",:":
                return

    def expect(self, char: str) -> bool:
        if self.peek() == char:
            self.index += 1
            return True
        return False


def locate(text: str, parts: list[str | int]) -> tuple[int, int] | None:
    """Line and column of the value at a JSON path, or None if the path is not in the text."""
    scanner = _Scanner(text)
    for part in parts:
        if isinstance(part, int):
            if not scanner.expect("["):
                return None
            for _ in range(part):
                scanner.skip_value()
                if not scanner.expect(","):
                    return None
            if scanner.peek() in ("]", ""):
                return None
        else:
            if not scanner.expect("{"):
                return None
            while True:
                if scanner.peek() != '"':
                    return None
                key = scanner.string()
                if not scanner.expect(":"):
                    return None
                if key == part:
                    break
                scanner.skip_value()
                if not scanner.expect(","):
                    return None
    scanner.skip_space()
    return _line_column(text, scanner.index)


def duplicate_key_position(text: str, key: str) -> tuple[int, int] | None:
    """Line and column where ``key`` appears a second time in one object (iterative scan)."""
    scanner = _Scanner(text)
    objects: list[set[str] | None] = []  # keys seen per open object; None for an array
    expecting_key = False
    while True:
        char = scanner.peek()
        if not char:
            return None
        if char == "{":
            objects.append(set())
            expecting_key = True
            scanner.index += 1
        elif char == "[":
            objects.append(None)
            scanner.index += 1
        elif char in "]}":
            if objects:
                objects.pop()
            scanner.index += 1
            expecting_key = False
        elif char == ",":
            expecting_key = bool(objects) and objects[-1] is not None
            scanner.index += 1
        elif char == ":":
            expecting_key = False
            scanner.index += 1
        elif char == '"':
            start = scanner.index
            name = scanner.string()
            keys = objects[-1] if objects else None
            if expecting_key and keys is not None:
                if name == key and name in keys:
                    return _line_column(text, start)
                keys.add(name)
            expecting_key = False
        else:
            match = _BARE.match(text, scanner.index)
            scanner.index = match.end() if match else scanner.index + 1


class JsonPositions:
    """Positions in one JSON text, computed on demand for messages."""

    def __init__(self, text: str):
        self.text = text

    def at(self, where: str) -> tuple[int | None, int | None]:
        """(line, column) of the value at a JSON path such as ``components[3].type``."""
        found = locate(self.text, parse_path(where))
        return found if found is not None else (None, None)
