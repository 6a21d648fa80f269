"""Shared fixture: the shipped catalog."""

from __future__ import annotations

import pytest

from pqtriage.catalog import Catalog, load_catalog


@pytest.fixture(scope="session")
def catalog() -> Catalog:
    """The shipped catalog."""
    return load_catalog()
