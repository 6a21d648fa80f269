"""Safe YAML reading with positions: every value keeps its file:line:column.

Only the safe loader is used (PyYAML's C loader when present). Inputs are
untrusted: files over a size limit, alias bombs, deep nesting, duplicate keys,
invalid UTF-8 and NUL bytes are refused with a one-line error naming the place.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import yaml

from pqtriage.errors import Place, PqtriageError

try:  # The C loader is much faster; fall back to the pure-Python safe loader.
    from yaml import CSafeLoader as _Loader
except ImportError:  # pragma: no cover - depends on how PyYAML was built
    from yaml import SafeLoader as _Loader  # type: ignore[assignment]

MAX_FILE_BYTES = 64 * 1024 * 1024
"""Largest input accepted (64 MiB): far above a 100k-use inventory, far below memory trouble."""
MAX_DEPTH = 64
"""Deepest nesting accepted; the inventory format needs 5 levels."""
_STR_TAG = "tag:yaml.org,2002:str"

MAX_NODES = 5_000_000
"""Most values one document may expand to, aliases included (stops alias bombs)."""


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


def load_yaml(text: str, path: str, error: ErrorFactory) -> Node | None:
    """Parse one YAML document into positioned Nodes (None for an empty document).

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
        root = yaml.compose(text, Loader=_Loader)
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        place = Place(path, mark.line + 1, mark.column + 1) if mark else Place(path)
        problem = exc.problem or exc.context or "invalid YAML"
        raise error(f"invalid YAML: {problem}", place=place, hint="check indentation and quoting") from exc
    except yaml.YAMLError as exc:
        raise error(f"invalid YAML: {exc}", place=Place(path)) from exc
    except RecursionError as exc:
        raise error(
            f"nesting deeper than {MAX_DEPTH} levels", place=Place(path), hint="flatten the document"
        ) from exc
    if root is None:
        return None
    converter = _Converter(path, error)
    if "&" in text:  # without an anchor there is no alias, so nothing can expand
        converter.check_size(root)
    return converter.convert(root)


class _Converter:
    """Turns composed yaml nodes into Nodes, enforcing depth, size and unique keys."""

    def __init__(self, path: str, error: ErrorFactory):
        self.path = path
        self.error = error
        self.count = 0
        self.constructor = yaml.constructor.SafeConstructor()

    def check_size(self, root: yaml.Node) -> None:
        """Refuse documents whose aliases expand beyond MAX_NODES, before expanding them."""
        sizes: dict[int, int] = {}

        def size(node: yaml.Node, depth: int) -> int:
            known = sizes.get(id(node))
            if known is not None:
                return known
            if depth > MAX_DEPTH:
                raise self.error(
                    f"nesting deeper than {MAX_DEPTH} levels",
                    place=self.place(node),
                    hint="flatten the document (or remove a self-referencing alias)",
                )
            total = 1
            if isinstance(node, yaml.SequenceNode):
                total += sum(size(item, depth + 1) for item in node.value)
            elif isinstance(node, yaml.MappingNode):
                total += sum(size(k, depth + 1) + size(v, depth + 1) for k, v in node.value)
            if total > MAX_NODES:
                raise self.error(
                    f"the document expands to more than {MAX_NODES:,} values (an alias bomb?)",
                    place=self.place(node),
                    hint="remove repeated aliases (*name)",
                )
            sizes[id(node)] = total
            return total

        size(root, 0)

    def place(self, node: yaml.Node) -> Place:
        return Place(self.path, node.start_mark.line + 1, node.start_mark.column + 1)

    def convert(
        self, node: yaml.Node, depth: int = 0, key_line: int | None = None, key_column: int | None = None
    ) -> Node:
        self.count += 1
        if self.count > MAX_NODES:
            raise self.error(
                f"the document expands to more than {MAX_NODES:,} values (an alias bomb?)",
                place=self.place(node),
                hint="remove repeated aliases (*name)",
            )
        if depth > MAX_DEPTH:
            raise self.error(
                f"nesting deeper than {MAX_DEPTH} levels",
                place=self.place(node),
                hint="flatten the document",
            )
        line, column = node.start_mark.line + 1, node.start_mark.column + 1
        if isinstance(node, yaml.ScalarNode):
            if node.tag == _STR_TAG:  # the common case: the constructor would return node.value
                return Node(node.value, line, column, key_line, key_column, _STR_TAG)
            try:
                value = self.constructor.construct_object(node)
            except (yaml.YAMLError, ValueError, OverflowError) as exc:
                raise self.error(
                    f"cannot read value {node.value[:40]!r}", place=self.place(node)
                ) from exc
            if isinstance(value, (bytes, bytearray)) or not isinstance(
                value, (str, int, float, bool, type(None))
            ):
                value = str(node.value)  # dates, binary, timestamps: keep the text as written
            return Node(value, line, column, key_line, key_column, node.tag)
        if isinstance(node, yaml.SequenceNode):
            items = [self.convert(item, depth + 1) for item in node.value]
            return Node(items, line, column, key_line, key_column, node.tag)
        if isinstance(node, yaml.MappingNode):
            result: dict[str, Node] = {}
            for key_node, value_node in node.value:
                if key_node.tag == "tag:yaml.org,2002:merge":
                    raise self.error(
                        "merge keys (<<) are not supported",
                        place=self.place(key_node),
                        hint="write the fields out, or use the file's defaults section",
                    )
                if not isinstance(key_node, yaml.ScalarNode):
                    raise self.error("a key must be plain text", place=self.place(key_node))
                key = str(key_node.value)
                if key in result:
                    first = result[key]
                    raise self.error(
                        f"duplicate key '{key}' (first at line {first.key_line})",
                        place=self.place(key_node),
                        hint="keep one of them",
                    )
                key_mark = key_node.start_mark
                result[key] = self.convert(value_node, depth + 1, key_mark.line + 1, key_mark.column + 1)
            return Node(result, line, column, key_line, key_column, node.tag)
        raise self.error("unsupported YAML node", place=self.place(node))  # pragma: no cover


def plain(node: Node | None) -> object:
    """Strip positions: return plain Python lists, dicts and scalars."""
    if node is None:
        return None
    if isinstance(node.value, list):
        return [plain(item) for item in node.value]
    if isinstance(node.value, dict):
        return {key: plain(value) for key, value in node.value.items()}
    return node.value
