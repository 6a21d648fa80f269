"""The fuzz marker (select with -m fuzz, skip with -m 'not fuzz')."""

from __future__ import annotations

import pytest


def pytest_configure(config: pytest.Config) -> None:
    config.addinivalue_line("markers", "fuzz: bounded-time fuzzing (hypothesis); under 60 s in total")
