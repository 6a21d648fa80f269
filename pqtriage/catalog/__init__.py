"""The algorithm catalog: names people write, resolved to what the algorithm is.

Public API (stable, used by the model and the formats):

- ``load_catalog(path=None) -> Catalog``: the shipped catalog (cached) or another file.
- ``Catalog.resolve(algorithm, *, key_size=None, curve=None, parameter_set=None,
  purpose=None) -> Resolution``
- ``Catalog.suggest(name, limit=3) -> tuple[str, ...]``
- ``Catalog.specs() -> tuple[AlgorithmSpec, ...]``: every fixed-parameter entry.
"""
