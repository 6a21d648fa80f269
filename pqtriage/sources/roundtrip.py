"""Edits that keep a hand-maintained YAML inventory as its owner wrote it.

``scan --merge`` and ``probe --merge`` write into files people maintain by hand: comments, key
order, flow or block style, quoting and blank lines must survive, so the git diff shows only what
changed. ruamel.yaml's round-trip mode keeps all of them (measured for issue 12: a merge into a
commented file changes only the merged lines; a patcher of our own would have to re-implement
YAML's layout rules to insert a use into a flow list or under a comment).

The file is first read by pqtriage's own bounded reader (:func:`pqtriage.yamlio.load_yaml`): size,
alias bombs, nesting, duplicate keys and merge keys are refused there with the usual one-line
error, before the round-trip parser sees it. Indentation is taken from the file itself.
"""

from __future__ import annotations

import io
from typing import Any

from pqtriage.errors import InventoryError, Place
from pqtriage.yamlio import load_yaml


def _yaml(text: str) -> Any:
    from ruamel.yaml import YAML
    from ruamel.yaml.util import load_yaml_guess_indent

    try:
        _, indent, offset = load_yaml_guess_indent(text)
    except Exception:  # the real parse below reports the problem with its place
        indent, offset = 2, 0
    handler = YAML(typ="rt", pure=True)
    handler.preserve_quotes = True
    handler.width = 2**31 - 1  # never fold a long line the owner wrote on one
    handler.indent(mapping=2, sequence=indent or 2, offset=offset or 0)
    return handler


def load_round_trip(text: str, path: str) -> Any:
    """The document with its comments and layout (None for an empty file)."""
    from ruamel.yaml.error import MarkedYAMLError, YAMLError

    load_yaml(text, path, InventoryError)  # bounded, safe first pass: refuses hostile files
    handler = _yaml(text)
    try:
        document = handler.load(text)
    except MarkedYAMLError as exc:
        mark = exc.problem_mark
        place = Place(path, mark.line + 1, mark.column + 1) if mark else Place(path)
        raise InventoryError(f"invalid YAML: {exc.problem or 'cannot read'}", place=place) from exc
    except YAMLError as exc:
        raise InventoryError(f"invalid YAML: {' '.join(str(exc).split())[:200]}", place=Place(path)) from exc
    if document is not None:
        document._pqtriage_text = text  # remembered for dump_round_trip's indentation
    return document


def dump_round_trip(document: Any, original: str | None = None) -> str:
    """The document as YAML, keeping what the round-trip load kept."""
    text = original if original is not None else getattr(document, "_pqtriage_text", "")
    buffer = io.StringIO()
    _yaml(text).dump(document, buffer)
    return buffer.getvalue()


def is_round_trip(document: Any) -> bool:
    """Whether a document came from :func:`load_round_trip` (and should be dumped by it)."""
    return type(document).__module__.startswith("ruamel.")
