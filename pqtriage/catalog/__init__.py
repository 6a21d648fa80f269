"""The algorithm catalog: names people write, resolved to what the algorithm is.

Public API (stable, used by the model and the formats):

- ``load_catalog(path=None) -> Catalog``: the shipped catalog (cached) or another file.
- ``Catalog.resolve(algorithm, *, key_size=None, curve=None, parameter_set=None,
  purpose=None, oid=None) -> Resolution``: by OID first when one is given, then by name
  (catalog spellings, then the Java, OpenSSL, Go and .NET names of ``algorithm_identifiers.yaml``)
- ``Catalog.suggest(name, limit=3) -> tuple[str, ...]``
- ``Catalog.specs() -> tuple[AlgorithmSpec, ...]``: every fixed-parameter entry.
- ``Catalog.spellings() -> tuple[str, ...]``: every known spelling.
- ``Catalog.classical_standing(spec, purpose, as_of) -> Standing``: classical status by date.
- ``Catalog.trust_default(role) -> TrustDefault``: default trust period of a signature role.
"""

from __future__ import annotations

import functools
from importlib import resources
from pathlib import Path

from pqtriage.catalog.loader import read_catalog
from pqtriage.catalog.resolve import Catalog
from pqtriage.catalog.spec import AlgorithmSpec, Component, Conflict, Resolution
from pqtriage.catalog.transitions import Standing, Transitions, read_transitions
from pqtriage.catalog.trust import TrustDefault, TrustDefaults, read_trust_defaults

__all__ = [
    "AlgorithmSpec", "Catalog", "Component", "Conflict", "Resolution", "Standing", "TrustDefault",
    "load_catalog", "shipped_path",
]


def shipped_path() -> Path:
    """Path of the catalog file shipped with the package."""
    return Path(str(resources.files("pqtriage") / "data" / "catalog.yaml"))


@functools.lru_cache(maxsize=1)
def _shipped() -> Catalog:
    from pqtriage.catalog.identifiers import read_identifiers, shipped_identifiers_path

    return Catalog(read_catalog(shipped_path()), read_identifiers(shipped_identifiers_path()),
                   transitions=_shipped_transitions(), trust=_shipped_trust())


@functools.lru_cache(maxsize=1)
def _shipped_transitions() -> Transitions:
    return read_transitions()


@functools.lru_cache(maxsize=1)
def _shipped_trust() -> TrustDefaults:
    return read_trust_defaults()


def load_catalog(path: Path | None = None) -> Catalog:
    """Load the shipped catalog (loaded once, then cached) or the catalog file at ``path``.

    The shipped catalog comes with the shipped identifier file (OIDs, names other tools write);
    a catalog file of your own resolves its own spellings only.

    Raises:
        CatalogError: the file is missing, not YAML, or a row is malformed (the message names it).
    """
    if path is None:
        return _shipped()
    return Catalog(read_catalog(Path(path)), transitions=_shipped_transitions(), trust=_shipped_trust())
