"""Pick the right inventory source by content and read an inventory file."""

from __future__ import annotations

from pqtriage.errors import InventoryError, Place
from pqtriage.model.inventory import Inventory
from pqtriage.sources.interface import InventorySource, read_input
from pqtriage.sources.yaml_inventory import YamlInventorySource
from pqtriage.yamlio import MAX_FILE_BYTES, decode_text


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


def read_inventory_text(path: str) -> tuple[str, str]:
    """An inventory file's text and SHA-256: bounded read, size limit, UTF-8 checks."""
    data, sha256 = read_input(path, MAX_FILE_BYTES)
    if len(data) > MAX_FILE_BYTES:
        raise InventoryError(
            f"the file is larger than {MAX_FILE_BYTES // (1024 * 1024)} MiB",
            place=Place(path),
            hint="split the inventory into several files",
        )
    return decode_text(data, path, InventoryError), sha256


def load_inventory(path: str) -> Inventory:
    """Read an inventory file in any supported format (recognised by content, not name)."""
    text, sha256 = read_inventory_text(path)
    for source in registered_sources():
        if source.accepts(text):
            return source.parse(text, path, sha256)  # type: ignore[call-arg]
    raise InventoryError("no reader accepts this file", hint="give a pqtriage YAML inventory or a CycloneDX JSON file")  # pragma: no cover
