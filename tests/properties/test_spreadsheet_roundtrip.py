"""YAML -> workbook -> inventory gives the same inventory (positions aside): nothing lost.

Text is any text a cell can hold literally: control and invisible format characters are shown
as escapes in every output (tests/formats/test_xlsx.py), and list entries cannot contain the
separators (comma, semicolon, line break) the readers split lists on.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.formats.xlsx.inventory import inventory_workbook
from pqtriage.model.inventory import Inventory
from pqtriage.sources.loading import load_inventory
from pqtriage.sources.yaml_writer import inventory_to_yaml
from tests.properties.strategies import inventories
from tests.properties.test_inventory_roundtrip import comparable

CELL_TEXT = st.text(st.characters(blacklist_categories=["Cs", "Cc", "Cf", "Zl", "Zp"],
                                  blacklist_characters="\ufffe\uffff"),
                    min_size=1, max_size=24).filter(lambda s: s.strip() != "")
LIST_ITEM = CELL_TEXT.filter(lambda s: not any(c in s for c in ",;") and s == s.strip())


def _sorted_extra(inventory: Inventory) -> Inventory:
    return dataclasses.replace(inventory, systems=tuple(
        dataclasses.replace(s, extra=tuple(sorted(s.extra))) for s in inventory.systems))


@settings(max_examples=60, deadline=None)
@given(st.data())
def test_yaml_to_workbook_and_back_is_lossless(tmp_path_factory: object, data: st.DataObject) -> None:
    inventory: Inventory = data.draw(inventories(max_systems=5, text=CELL_TEXT))
    tags = [tuple(data.draw(st.lists(LIST_ITEM, max_size=3))) for _ in inventory.systems]
    inventory = dataclasses.replace(inventory, systems=tuple(
        dataclasses.replace(s, tags=t, depends_on=()) for s, t in zip(inventory.systems, tags, strict=True)))
    folder: Path = tmp_path_factory.mktemp("workbook")  # type: ignore[attr-defined]
    yaml_path = folder / "inv.yaml"
    yaml_path.write_text(inventory_to_yaml(inventory), encoding="utf-8")
    from_yaml = load_inventory(str(yaml_path))
    book = folder / "inv.xlsx"
    book.write_bytes(inventory_workbook(from_yaml))
    again = load_inventory(str(book))
    # One column per extra key: the sheet's column order is the order every system reads them in.
    assert comparable(_sorted_extra(again)) == comparable(_sorted_extra(from_yaml))
    assert again.warnings == ()
