"""What a CycloneDX BOM cannot carry: shelf-life, migration time, exposure ... (the CBOM side file).

A CBOM lists cryptographic assets, not how long the data they protect must
stay confidential (Mosca's x) or how long migrating takes (Mosca's y). Those
values come, in this order, from:

1. the side file's entry for the system (by bom-ref or component name): a fact;
2. ``pqtriage:<field>`` properties on the component (as ``--format cbom`` writes them): a fact;
3. the side file's ``defaults`` section: flagged as assumed;
4. the built-in :data:`BUILTIN_DEFAULTS`: flagged as assumed.

The side file is YAML, validated against the same field definitions as the
inventory format (:mod:`pqtriage.sources.schema`)::

    organization: Kestrel Harbour Freight Cooperative   # optional
    policies: [nist-ir-8547]                             # optional
    defaults:                                            # optional, flagged as assumed
      shelf_life_years: 7
      migration_years: 2
    systems:                                             # optional, by bom-ref or name
      app-billing:
        shelf_life_years: 10
        exposure: internet
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from pqtriage.errors import InventoryError, Place
from pqtriage.sources.interface import read_input
from pqtriage.sources.schema import DEFAULTABLE, SYSTEM_FIELDS, TOP_FIELDS, FieldSpec
from pqtriage.sources.yaml_inventory import _Reader
from pqtriage.yamlio import MAX_FILE_BYTES, Node, decode_text, load_yaml

BUILTIN_DEFAULTS: dict[str, Any] = {
    "shelf_life_years": 10.0,
    "migration_years": 3.0,
}
"""Used when neither the BOM nor the side file gives a value; every use of them is flagged.

pqtriage's own cautious choice, no source: ten years of confidentiality covers most
business records, three years is a typical multi-team migration. Both err towards
"exposed" rather than "safe"; supply real values in a side file.
"""

SIDE_SYSTEM_FIELDS: tuple[FieldSpec, ...] = DEFAULTABLE + tuple(
    f for f in SYSTEM_FIELDS if f.name in ("name", "description", "notes")
)
"""Fields a side file may set per system: the defaultable ones plus the descriptive ones."""

_TOP: tuple[FieldSpec, ...] = tuple(f for f in TOP_FIELDS if f.name in ("organization", "policies")) + (
    FieldSpec("defaults", "defaults", "Values for every system of the BOM (flagged as assumed)."),
    FieldSpec("systems", "systems", "Values per system, keyed by bom-ref or component name."),
)


@dataclass(frozen=True)
class CbomSideFile:
    """Values a CycloneDX BOM cannot carry, supplied by the user."""

    path: str | None = None
    """Where the side file was read from (None: built-in defaults only)."""
    organization: str | None = None
    """Organisation name, when the BOM does not state it."""
    policies: tuple[str, ...] = ()
    """Policy timelines that apply."""
    defaults: dict[str, Any] = field(default_factory=dict)
    """Values for every system that has none of its own (flagged as assumed)."""
    systems: dict[str, dict[str, Any]] = field(default_factory=dict)
    """Values per system, keyed by bom-ref or component name (facts)."""

    def for_system(self, bom_ref: str | None, name: str) -> dict[str, Any] | None:
        """The side file's entry for a system: by bom-ref first, then by component name."""
        if bom_ref is not None and bom_ref in self.systems:
            return self.systems[bom_ref]
        return self.systems.get(name)


def parse_side_file(text: str, path: str) -> CbomSideFile:
    """Validate a side file's text; errors name file:line:column."""
    root = load_yaml(text, path, InventoryError)
    if root is None:
        return CbomSideFile(path=path)
    reader = _Reader(path)
    if not isinstance(root.value, dict):
        raise reader.fail(root, f"the CBOM side file must be a mapping of fields, got {type(root.value).__name__}")
    raw = reader.mapping(root, _TOP, "the CBOM side file")
    top = reader.fields(root, _TOP, "the CBOM side file", optional=True)
    defaults: dict[str, Any] = {}
    if "defaults" in raw:
        defaults = reader.fields(raw["defaults"], DEFAULTABLE, "defaults", optional=True)
    systems: dict[str, dict[str, Any]] = {}
    if "systems" in raw:
        node: Node = raw["systems"]
        if not isinstance(node.value, dict):
            raise reader.fail(node, "'systems' in the CBOM side file must be a mapping of bom-ref to fields",
                              "write 'systems:' then one 'bom-ref:' per system, indented")
        for key, entry in node.value.items():
            systems[key] = reader.fields(entry, SIDE_SYSTEM_FIELDS, f"side-file system '{key[:80]}'",
                                         optional=True)
    reader.finish()
    return CbomSideFile(
        path=path,
        organization=top.get("organization"),
        policies=tuple(top.get("policies", ())),
        defaults=defaults,
        systems=systems,
    )


def load_side_file(path: str) -> CbomSideFile:
    """Read and validate a CBOM side file (the one place it touches the disk)."""
    data, _ = read_input(path)
    if len(data) > MAX_FILE_BYTES:
        raise InventoryError(f"the file is larger than {MAX_FILE_BYTES // (1024 * 1024)} MiB",
                             place=Place(path), hint="a side file needs a few lines per system")
    return parse_side_file(decode_text(data, path, InventoryError), path)
