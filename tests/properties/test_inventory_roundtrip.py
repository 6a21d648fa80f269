"""Inventory to YAML and back is lossless (positions aside)."""

from __future__ import annotations

import dataclasses
from pathlib import Path

from hypothesis import given, settings

from pqtriage.model.inventory import Inventory, SourceRef
from pqtriage.sources.loading import load_inventory
from pqtriage.sources.yaml_writer import inventory_to_yaml
from tests.properties.strategies import inventories


def _detail(ref: SourceRef | None) -> str | None:
    return ref.detail if ref else None


def comparable(inventory: Inventory) -> tuple:
    """Everything the inventory says, without where it was read from."""
    systems = []
    for system in inventory.systems:
        # A YAML use records each field's line and column as evidence: positions, left out here.
        uses = tuple(dataclasses.replace(u, source=None, evidence=()) for u in system.uses)
        details = tuple(_detail(u.source) for u in system.uses)
        systems.append((dataclasses.replace(system, uses=uses, source=None), details, _detail(system.source)))
    return (inventory.organization, inventory.version, inventory.policies, inventory.frameworks,
            tuple(systems))


@settings(max_examples=150, deadline=None)
@given(inventories())
def test_yaml_round_trip_is_lossless(tmp_path_factory: object, inventory: Inventory) -> None:
    folder: Path = tmp_path_factory.mktemp("roundtrip")  # type: ignore[attr-defined]
    path = folder / "inv.yaml"
    path.write_text(inventory_to_yaml(inventory), encoding="utf-8")
    again = load_inventory(str(path))
    assert comparable(again) == comparable(inventory)
    # And the writer is stable: writing what was read gives the same text.
    assert inventory_to_yaml(again) == inventory_to_yaml(inventory)
