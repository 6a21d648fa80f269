"""The streamed inventory writer (pqtriage.sources.yaml_stream) read back by PyYAML's safe loader
(the reference YAML 1.1 reader, C and pure-Python), and the positioned JSON reader
(pqtriage.jsonio) against the standard library's parser (RFC 8259)."""

from __future__ import annotations

import json

import pytest
import yaml
from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage import jsonio
from pqtriage.errors import InventoryError
from pqtriage.sources.yaml_stream import dump_document, quote

TEXT = st.text(st.characters(blacklist_categories=["Cs"]), max_size=80)
SCALARS = st.one_of(TEXT, st.integers(-10**30, 10**30), st.booleans(), st.none(),
                    st.floats(allow_nan=False, allow_infinity=False))


@settings(max_examples=400, deadline=None)
@given(TEXT)
def test_any_text_reads_back_the_same(text: str) -> None:
    written = quote(text)
    assert yaml.load(f"value: {written}\n", Loader=yaml.CSafeLoader)["value"] == text
    assert "\x1b" not in written and "\u202e" not in written and "\u2028" not in written


@settings(max_examples=150, deadline=None)
@given(st.recursive(SCALARS, lambda inner: st.lists(inner, max_size=4)
                    | st.dictionaries(st.text(min_size=1, max_size=10), inner, max_size=4), max_leaves=20))
def test_any_document_reads_back_the_same(value: object) -> None:
    document = {"version": 1, "systems": [{"id": "a", "value": value}]}
    assert yaml.load(dump_document(document), Loader=yaml.CSafeLoader) == document


def test_undecodable_file_name_bytes_become_text() -> None:
    name = b"/srv/bad-\xff.pem".decode("utf-8", "surrogateescape")
    back = yaml.safe_load("v: " + quote(name))["v"]
    assert back == "/srv/bad-\\xff.pem"


@settings(max_examples=200, deadline=None)
@given(st.recursive(st.one_of(st.integers(), TEXT, st.booleans(), st.none()),
                    lambda inner: st.lists(inner, max_size=3) | st.dictionaries(TEXT, inner, max_size=3),
                    max_leaves=15))
def test_locate_finds_each_value_where_json_puts_it(value: object) -> None:
    """Every value's line:column, found by the iterative scanner, starts that value's JSON text."""
    text = json.dumps({"root": value}, indent=1)
    paths: list[tuple[list[str | int], object]] = []
    stack: list[tuple[list[str | int], object]] = [(["root"], value)]
    while stack:
        path, item = stack.pop()
        paths.append((path, item))
        if isinstance(item, list):
            stack += [(path + [i], v) for i, v in enumerate(item)]
        elif isinstance(item, dict):
            stack += [(path + [k], v) for k, v in item.items()]
    lines = text.splitlines()
    for path, item in paths:
        found = jsonio.locate(text, path)
        assert found is not None, path
        line, column = found
        rest = "\n".join([lines[line - 1][column - 1:], *lines[line:]])
        assert json.JSONDecoder().raw_decode(rest)[0] == item


@pytest.mark.parametrize("depth, refused", [(64, False), (65, True), (5000, True)])
def test_json_depth_is_bounded_before_parsing(depth: int, refused: bool) -> None:
    text = '{"a": "[[[[", "b": ' + "[" * (depth - 1) + "]" * (depth - 1) + "}"
    if refused:
        with pytest.raises(InventoryError, match="nested too deeply"):
            jsonio.load_json(text, "x.json", InventoryError)
    else:
        assert jsonio.load_json(text, "x.json", InventoryError)["a"] == "[[[["
