"""Safe YAML reading with positions: every value keeps its file:line:column.

Only the safe loader is used (PyYAML's C loader when present). Inputs are
untrusted: files over a size limit, alias bombs, deep nesting, duplicate keys,
invalid UTF-8 and NUL bytes are refused with a one-line error naming the place.
"""

from __future__ import annotations

import gc
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from typing import Any

import yaml

from pqtriage.errors import Place, PqtriageError

try:  # The C loader is much faster; fall back to the pure-Python safe loader.
    from yaml import CSafeLoader as _Loader
except ImportError:  # pragma: no cover - depends on how PyYAML was built
    from yaml import SafeLoader as _Loader  # type: ignore[assignment]

MAX_FILE_BYTES = 16 * 1024 * 1024
"""Largest input accepted (16 MiB): a 100k-use inventory is about 12 MiB; larger files
cannot be triaged within bounded time and memory (see docs/hardening.md)."""
MAX_DEPTH = 64
"""Deepest nesting accepted; the inventory format needs 5 levels."""
_STR_TAG = "tag:yaml.org,2002:str"
_INT_TAG = "tag:yaml.org,2002:int"

MAX_NODES = 1_000_000
"""Most values one document may expand to, aliases included (stops alias bombs and
flow-list floods while parsing; a 100k-use inventory has about 600k)."""


@dataclass(frozen=True)
class Node:
    """A YAML value with its position: a scalar, a list of Nodes or a dict of str -> Node."""

    value: object
    """Python scalar (str, int, float, bool, None), list[Node] or dict[str, Node]."""
    line: int
    """1-based line of the value's start."""
    column: int
    """1-based column of the value's start."""
    key_line: int | None = None
    """For a mapping entry: 1-based line of its key."""
    key_column: int | None = None
    """For a mapping entry: 1-based column of its key."""
    tag: str = ""
    """Resolved YAML tag (tag:yaml.org,2002:int ...)."""
    text: str | None = None
    """For a scalar that did not resolve to text (a number, a boolean, a date): the text as
    written, so text fields keep ``010`` or ``2.10`` as typed instead of YAML 1.1's reading."""
    alias_of: int | None = None
    """For an alias (``*name``): the line of its anchor; ``line`` and ``column`` are the alias's."""


ErrorFactory = Callable[..., PqtriageError]


def decode_text(data: bytes, path: str, error: ErrorFactory) -> str:
    """Decode file bytes as UTF-8 (a BOM allowed), refusing NUL bytes with the place."""
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        column = exc.start - (data.rfind(b"\n", 0, exc.start) + 1) + 1
        raise error(
            "the file is not valid UTF-8",
            place=Place(path, line, column),
            hint="save it as UTF-8",
        ) from exc
    nul = text.find("\x00")
    if nul >= 0:
        line = text.count("\n", 0, nul) + 1
        column = nul - (text.rfind("\n", 0, nul) + 1) + 1
        raise error("the file contains a NUL byte", place=Place(path, line, column), hint="remove it")
    return text


@contextmanager
def paused_gc() -> Iterator[None]:
    """Pause the cyclic garbage collector while building large acyclic trees.

    Its full collections rescan every live object, so building 600k nodes with it
    running costs time that grows faster than the input (common practice, no source).
    """
    enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()


def load_yaml(text: str, path: str, error: ErrorFactory) -> Node | None:
    """Parse one YAML document into positioned Nodes (None for an empty document).

    Nodes are built straight from the parser's events, so memory and time stay
    bounded by MAX_NODES and MAX_DEPTH while parsing, before any alias is expanded.

    Args:
        text: the document.
        path: file name for messages.
        error: the PqtriageError subclass of the calling layer.
    """
    if len(text) > MAX_FILE_BYTES:
        raise error(
            f"the file is larger than {MAX_FILE_BYTES // (1024 * 1024)} MiB",
            place=Place(path),
            hint="split the inventory into several files",
        )
    try:
        with paused_gc():
            return _Builder(path, error).build(yaml.parse(text, Loader=_Loader))
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        place = Place(path, mark.line + 1, mark.column + 1) if mark else Place(path)
        problem = exc.problem or exc.context or "invalid YAML"
        if "nesting depth" in problem:  # newer libyaml builds stop deep documents themselves
            raise error(f"nesting deeper than the YAML parser allows (pqtriage's own limit is {MAX_DEPTH} levels)",
                        place=place, hint="flatten the document") from exc
        raise error(f"invalid YAML: {problem}", place=place, hint="check indentation and quoting") from exc
    except yaml.YAMLError as exc:
        raise error(f"invalid YAML: {' '.join(str(exc).split())}", place=Place(path)) from exc


def _position(event: Any) -> tuple[int, int]:
    """1-based line and column where an event starts."""
    mark = event.start_mark
    return (mark.line + 1, mark.column + 1) if mark is not None else (1, 1)


class _Open:
    """A sequence or mapping whose end event has not come yet."""

    __slots__ = (
        "anchor",
        "column",
        "height",
        "items",
        "key_column",
        "key_line",
        "line",
        "mapping",
        "pending_key",
        "size",
        "tag",
    )

    def __init__(self, mapping: bool, event: yaml.Event, tag: str, key: tuple[int | None, int | None]):
        self.mapping = mapping
        self.items: list[Node] | dict[str, Node] = {} if mapping else []
        self.pending_key: tuple[str, int, int] | None = None
        self.line, self.column = _position(event)
        self.tag = tag
        self.anchor: str | None = getattr(event, "anchor", None)
        self.size = 1
        self.height = 0
        self.key_line, self.key_column = key


class _Builder:
    """Turns parser events into Nodes, enforcing size, depth, unique keys and no merge keys."""

    def __init__(self, path: str, error: ErrorFactory):
        self.path = path
        self.error = error
        self.count = 0
        self.constructor = yaml.constructor.SafeConstructor()
        self.resolver = yaml.resolver.Resolver()
        self.anchors: dict[str, tuple[Node, int, int]] = {}  # node, size, height
        self.open_anchors: set[str] = set()

    def place(self, event: yaml.Event) -> Place:
        return Place(self.path, *_position(event))

    def too_many(self, event: yaml.Event) -> PqtriageError:
        if isinstance(event, yaml.AliasEvent):
            return self.error(
                f"the document expands to more than {MAX_NODES:,} values (an alias bomb?)",
                place=self.place(event),
                hint="remove repeated aliases (*name)",
            )
        return self.error(f"the document has more than {MAX_NODES:,} values", place=self.place(event),
                          hint="split the inventory into several files")

    def too_deep(self, event: yaml.Event, alias: bool = False) -> PqtriageError:
        return self.error(
            f"nesting deeper than {MAX_DEPTH} levels",
            place=self.place(event),
            hint="flatten the document" + (" (or remove a self-referencing alias)" if alias else ""),
        )

    def scalar(self, event: yaml.ScalarEvent, key: tuple[int | None, int | None]) -> Node:
        tag = event.tag
        if tag is None or tag == "!":
            tag = self.resolver.resolve(yaml.ScalarNode, event.value, event.implicit)
        line, column = _position(event)
        if tag == _STR_TAG:  # the common case: the constructor would return the text itself
            return Node(event.value, line, column, key[0], key[1], tag)
        text = event.value
        if tag == _INT_TAG and text.isascii() and text.isdigit() and (text[0] != "0" or text == "0"):
            try:  # plain decimal: the constructor's answer without its cost (a flood is millions)
                return Node(int(text), line, column, key[0], key[1], tag, text)
            except ValueError as exc:  # more digits than Python converts
                raise self.error(f"cannot read value {text[:40]!r}", place=self.place(event)) from exc
        marks: Any = (event.start_mark, event.end_mark)
        node = yaml.ScalarNode(tag, event.value, marks[0], marks[1], event.style)
        construct = self.constructor.yaml_constructors.get(tag)
        if construct is None:  # an unknown or unsafe tag (!!python/...): never constructed
            raise self.error(f"cannot read value {event.value[:40]!r}: tag {tag[:60]!r} is not supported",
                             place=self.place(event), hint="remove the tag")
        try:
            # Called directly: construct_object would keep every node in a cache for the whole file.
            value = construct(self.constructor, node)
            # PyYAML's int constructor raises IndexError on an empty "!!int" value (fuzz regression).
        except (yaml.YAMLError, ValueError, OverflowError, IndexError, TypeError) as exc:
            raise self.error(f"cannot read value {event.value[:40]!r}", place=self.place(event)) from exc
        if isinstance(value, (bytes, bytearray)) or not isinstance(value, (str, int, float, bool, type(None))):
            value = str(event.value)  # dates, binary, timestamps: keep the text as written
        return Node(value, line, column, key[0], key[1], tag, event.value)

    def build(self, events: object) -> Node | None:
        stack: list[_Open] = []
        root: Node | None = None
        documents = 0
        for event in events:  # type: ignore[attr-defined]
            if isinstance(event, yaml.DocumentStartEvent):
                documents += 1
                if documents > 1:
                    raise self.error("invalid YAML: expected a single document in the stream",
                                     place=self.place(event), hint="remove the second '---' document")
                continue
            if not isinstance(event, (yaml.NodeEvent, yaml.CollectionEndEvent)):
                continue  # stream and document boundaries
            parent = stack[-1] if stack else None
            key: tuple[int | None, int | None] = (None, None)
            if parent is not None and parent.mapping and parent.pending_key is not None:
                key = parent.pending_key[1], parent.pending_key[2]
            if isinstance(event, yaml.CollectionEndEvent):
                done = stack.pop()
                node = Node(done.items, done.line, done.column, done.key_line, done.key_column, done.tag)
                if done.anchor is not None:
                    self.anchors[done.anchor] = (node, done.size, done.height)
                    self.open_anchors.discard(done.anchor)
                size, height = done.size, done.height
                parent = stack[-1] if stack else None
                if parent is not None and parent.mapping:
                    assert parent.pending_key is not None
                    key = parent.pending_key[1], parent.pending_key[2]
            elif isinstance(event, yaml.CollectionStartEvent):
                self.count += 1
                if self.count > MAX_NODES:
                    raise self.too_many(event)
                if len(stack) >= MAX_DEPTH:
                    raise self.too_deep(event)
                mapping = isinstance(event, yaml.MappingStartEvent)
                tag = event.tag
                if tag is None or tag == "!":
                    kind = yaml.MappingNode if mapping else yaml.SequenceNode
                    tag = self.resolver.resolve(kind, None, event.implicit)
                if parent is not None and parent.mapping and parent.pending_key is None:
                    raise self.error("a key must be plain text", place=self.place(event))
                opened = _Open(mapping, event, tag, key)
                if opened.anchor is not None:
                    self.open_anchors.add(opened.anchor)
                stack.append(opened)
                continue
            elif isinstance(event, yaml.AliasEvent):
                if event.anchor in self.open_anchors:
                    raise self.too_deep(event, alias=True)
                if event.anchor not in self.anchors:
                    raise self.error(f"invalid YAML: found undefined alias {event.anchor!r}",
                                     place=self.place(event), hint="define the anchor (&name) first")
                if parent is not None and parent.mapping and parent.pending_key is None:
                    raise self.error("a key must be plain text", place=self.place(event))
                target, size, height = self.anchors[event.anchor]
                self.count += size
                if self.count > MAX_NODES:
                    raise self.too_many(event)
                if len(stack) + height > MAX_DEPTH:
                    raise self.too_deep(event, alias=True)
                # The alias's own place: an error about this value is reported where it is used.
                line, column = _position(event)
                node = Node(target.value, line, column, key[0], key[1], target.tag, target.text, target.line)
            else:
                assert isinstance(event, yaml.ScalarEvent)
                if parent is not None and parent.mapping and parent.pending_key is None:
                    name = event.value
                    tag = event.tag
                    if tag is None or tag == "!":
                        tag = self.resolver.resolve(yaml.ScalarNode, name, event.implicit)
                    if tag == "tag:yaml.org,2002:merge":
                        raise self.error("merge keys (<<) are not supported", place=self.place(event),
                                         hint="write the fields out, or use the file's defaults section")
                    items = parent.items
                    assert isinstance(items, dict)
                    if name in items:
                        raise self.error(f"duplicate key '{name}' (first at line {items[name].key_line})",
                                         place=self.place(event), hint="keep one of them")
                    parent.pending_key = (name, *_position(event))
                    continue  # keys are not counted: each comes with a value that is
                self.count += 1
                if self.count > MAX_NODES:
                    raise self.too_many(event)
                node = self.scalar(event, key)
                if event.anchor is not None:
                    self.anchors[event.anchor] = (node, 1, 0)
                size, height = 1, 0
            if parent is None:
                root = node
                continue
            parent.size += size
            parent.height = max(parent.height, height + 1)
            if parent.mapping:
                assert parent.pending_key is not None and isinstance(parent.items, dict)
                parent.items[parent.pending_key[0]] = node
                parent.pending_key = None
            else:
                assert isinstance(parent.items, list)
                parent.items.append(node)
        return root


def plain(node: Node | None) -> object:
    """Strip positions: return plain Python lists, dicts and scalars."""
    if node is None:
        return None
    if isinstance(node.value, list):
        return [plain(item) for item in node.value]
    if isinstance(node.value, dict):
        return {key: plain(value) for key, value in node.value.items()}
    return node.value
