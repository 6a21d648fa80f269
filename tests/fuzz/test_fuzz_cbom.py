"""Fuzzing the CycloneDX CBOM reader (pqtriage.sources.cbom): arbitrary JSON and near-valid BOMs.

Documented outcome (docs/interop.md, "CBOM import"; pqtriage/errors.py): an Inventory that
triages and renders in every format, or an InventoryError / PqtriageError with a one-line
message. Any other exception is a bug. The near-valid documents are the hand-written
CycloneDX 1.6 example of tests/sources/cbom_example.py (after ECMA-424, 1st edition) with
keys dropped, values swapped for arbitrary JSON, bom-refs duplicated and the text cut.
"""

from __future__ import annotations

import copy
import json
from typing import Any

import pytest
from hypothesis import given
from hypothesis import strategies as st

from pqtriage.errors import PqtriageError
from pqtriage.model.inventory import Inventory
from pqtriage.sources.cbom import CycloneDxSource
from tests.fuzz.common import fuzz, save_crash
from tests.fuzz.test_fuzz_inventory import render_everything
from tests.sources.cbom_example import CBOM

pytestmark = pytest.mark.fuzz

SCALARS = (st.none() | st.booleans() | st.integers(-(2**70), 2**70)
           | st.floats(allow_nan=False, allow_infinity=False) | st.text(max_size=20)
           | st.sampled_from(["", "1.6", "1.7", "CycloneDX", "cryptographic-asset", "algorithm",
                              "protocol", "certificate", "related-crypto-material", "application",
                              "alg-rsa", "app-booking", "pqtriage:shelf_life_years", "-1", "1e400"]))
JSON = st.recursive(SCALARS, lambda inner: st.lists(inner, max_size=4)
                    | st.dictionaries(st.text(max_size=12) | st.sampled_from(
                        ["bom-ref", "type", "name", "cryptoProperties", "dependsOn", "ref", "components",
                         "properties", "value", "assetType", "algorithmProperties"]), inner, max_size=4),
                    max_leaves=20)


def parse(text: str) -> Inventory | None:
    """Read text as a CBOM: an Inventory, or None after a one-line PqtriageError."""
    source = CycloneDxSource()
    try:
        if not source.accepts(text):
            return None
        return source.parse(text, "fuzz.cdx.json")
    except PqtriageError as error:
        assert "\n" not in error.diagnostics()
        return None
    except Exception:
        save_crash("cbom", text.encode("utf-8", "surrogatepass"), ".json")
        raise


def check(text: str) -> None:
    """Parse, then triage and render whatever was read."""
    inventory = parse(text)
    if inventory is not None:
        render_everything(inventory)


@fuzz(200)
@given(JSON)
def test_arbitrary_json_inside_a_bom(value: Any) -> None:
    check(json.dumps({"bomFormat": "CycloneDX", "specVersion": "1.6", "components": value}))
    check(json.dumps({"bomFormat": "CycloneDX", "specVersion": "1.6", "components": [], "dependencies": value}))


@fuzz(100)
@given(JSON)
def test_arbitrary_json_documents(value: Any) -> None:
    check(json.dumps(value))


def _paths(node: Any, prefix: tuple[Any, ...] = ()) -> list[tuple[Any, ...]]:
    paths = [prefix]
    if isinstance(node, dict):
        for key, value in node.items():
            paths += _paths(value, prefix + (key,))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            paths += _paths(value, prefix + (index,))
    return paths


def _parent(document: Any, path: tuple[Any, ...]) -> Any:
    for step in path[:-1]:
        document = document[step]
    return document


ALL_PATHS = [p for p in _paths(CBOM) if p]
BOM_REFS = [c["bom-ref"] for c in CBOM["components"]]


@st.composite
def near_valid_boms(draw: st.DrawFn) -> str:
    """The example BOM with a few structural mutations, sometimes cut or spliced as text."""
    bom = copy.deepcopy(CBOM)
    for _ in range(draw(st.integers(1, 5))):
        path = draw(st.sampled_from(ALL_PATHS))
        try:
            parent = _parent(bom, path)
            key = path[-1]
            parent[key]  # the path may be gone after an earlier mutation
        except (KeyError, IndexError, TypeError):
            continue
        if not isinstance(parent, dict | list):
            continue
        action = draw(st.sampled_from(["delete", "replace", "ref", "duplicate"]))
        if action == "delete":
            del parent[key]
        elif action == "replace":
            parent[key] = draw(JSON)
        elif action == "ref":
            parent[key] = draw(st.sampled_from(BOM_REFS))  # duplicate refs, dangling edges, cycles
        elif isinstance(parent, list):
            parent.insert(key, copy.deepcopy(parent[key]))
    text = json.dumps(bom, indent=draw(st.sampled_from([None, 2])))
    if draw(st.booleans()):
        cut = draw(st.integers(0, len(text)))
        text = text[:cut] + draw(st.sampled_from(["", "}", "]", ",", '"', "\\u0000", "NaN", "1e999"])) + text[cut:]
    return text


@fuzz(250)
@given(near_valid_boms())
def test_near_valid_boms(text: str) -> None:
    check(text)


def test_the_unmutated_example_is_read() -> None:
    # The fuzzer's seed must itself be accepted, or the mutations test only the refusals.
    inventory = parse(json.dumps(CBOM))
    assert inventory is not None and len(inventory.systems) >= 2
