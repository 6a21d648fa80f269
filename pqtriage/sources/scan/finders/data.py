"""Loading the finders' shipped tables (``pqtriage/data/discovery/*.yaml``), checked at load.

Safe YAML only (the C loader when PyYAML has it). A table that is missing a required section,
or whose rows lack a ``source``, is a packaging bug and raises :class:`CatalogError`.
"""

from __future__ import annotations

from collections.abc import Iterable
from importlib import resources
from typing import Any

import yaml

from pqtriage.errors import CatalogError, Place

try:  # The C loader is much faster; both are safe loaders.
    _Loader: Any = yaml.CSafeLoader
except AttributeError:  # pragma: no cover - depends on how PyYAML was built
    _Loader = yaml.SafeLoader


def load_data(name: str, sections: Iterable[str]) -> dict[str, Any]:
    """Read ``pqtriage/data/discovery/<name>`` and check that every section is present."""
    place = Place(f"pqtriage/data/discovery/{name}")
    text = resources.files("pqtriage").joinpath("data", "discovery", name).read_text("utf-8")
    document = yaml.load(text, Loader=_Loader)  # noqa: S506 - a safe loader
    if not isinstance(document, dict):
        raise CatalogError("a discovery table must be a mapping", place=place)
    for section in sections:
        if section not in document:
            raise CatalogError(f"missing section {section!r}", place=place)
    return document


def require_sources(rows: Iterable[Any], name: str, section: str) -> None:
    """Every row of a section must be a mapping with a non-empty ``source``."""
    for index, row in enumerate(rows, 1):
        if not isinstance(row, dict) or not str(row.get("source", "")).strip():
            raise CatalogError(
                f"{section} row {index} has no source",
                place=Place(f"pqtriage/data/discovery/{name}"),
            )
