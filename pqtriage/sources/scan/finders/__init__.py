"""Finders: one small module per kind of file the scan reads, behind one interface.

:func:`default_finders` lists them in the order they are tried; every finder whose
``wants`` test accepts a file reads it (see ``dispatch``).
"""

from __future__ import annotations

from pqtriage.sources.scan.finders.interface import Finder


def default_finders() -> list[Finder]:
    """Every finder, key material first (its tally also takes files named like key material)."""
    from pqtriage.sources.scan.finders.key_material import KeyMaterialFinder
    from pqtriage.sources.scan.finders.nginx import NginxFinder
    from pqtriage.sources.scan.finders.openssh_config import OpensshConfigFinder

    return [KeyMaterialFinder(), NginxFinder(), OpensshConfigFinder()]
