"""Pick the right inventory source by content and read an inventory file."""

from __future__ import annotations

from pqtriage.errors import InventoryError, UsageError
from pqtriage.model.inventory import Inventory
from pqtriage.sources.interface import InventorySource, read_inventory_text
from pqtriage.sources.yaml_inventory import YamlInventorySource


def registered_sources() -> list[InventorySource]:
    """Sources in the order they are tried; the YAML format is the fallback."""
    sources: list[InventorySource] = []
    try:
        from pqtriage.sources.cbom import CycloneDxSource
    except ImportError:
        pass
    else:
        sources.append(CycloneDxSource())
    sources.append(YamlInventorySource())
    return sources


def load_inventory(path: str) -> Inventory:
    """Read an inventory file in any supported format (recognised by content, not name)."""
    text, sha256 = read_inventory_text(path)
    for source in registered_sources():
        if source.accepts(text):
            return source.parse(text, path, sha256)  # type: ignore[call-arg]
    raise InventoryError("no reader accepts this file", hint="give a pqtriage YAML inventory or a CycloneDX JSON file")  # pragma: no cover


def load_inventory_with_side_file(path: str, side_file: str | None) -> Inventory:
    """Read an inventory; a CycloneDX one gets the side file's values (``--cbom-defaults FILE``)."""
    if side_file is None:
        return load_inventory(path)
    from pqtriage.sources.cbom import CycloneDxSource
    from pqtriage.sources.cbom_side import load_side_file

    side = load_side_file(side_file)
    text, sha256 = read_inventory_text(path)
    source = CycloneDxSource(side)
    if not source.accepts(text):
        raise UsageError(f"{path} is not a CycloneDX BOM, so a CBOM side file does not apply to it",
                         hint="drop --cbom-defaults, or give the CycloneDX JSON file")
    return source.parse(text, path, sha256)
