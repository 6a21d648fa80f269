"""Shared fuzzing conventions: bounded settings, and saving a crashing input for replay.

``PQTRIAGE_FUZZ_SCALE=20`` runs every fuzz test twenty times longer; ``PQTRIAGE_FUZZ_SAVE=1``
writes each crashing input into tests/fuzz/regressions/ (see its README).
"""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

from hypothesis import HealthCheck, settings

REGRESSIONS = Path(__file__).parent / "regressions"
PARSER_REGRESSIONS = REGRESSIONS / "parsers"
"""Crashes of the discovery and CBOM parsers: ``<target>-<what>.<ext>``, replayed per target."""


def fuzz(examples: int) -> settings:
    """Bounded fuzzing: a fixed number of examples, no per-example deadline (CI machines vary)."""
    scale = float(os.environ.get("PQTRIAGE_FUZZ_SCALE", "1"))
    return settings(max_examples=max(1, int(examples * scale)), deadline=None,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                           HealthCheck.function_scoped_fixture,
                                           HealthCheck.filter_too_much])


def save_crash(target: str, data: bytes, suffix: str) -> None:
    """Keep a crashing input as parsers/<target>-crash-<sha256 prefix><suffix> when saving is on."""
    if os.environ.get("PQTRIAGE_FUZZ_SAVE"):
        PARSER_REGRESSIONS.mkdir(parents=True, exist_ok=True)
        name = f"{target}-crash-{hashlib.sha256(data).hexdigest()[:16]}{suffix}"
        (PARSER_REGRESSIONS / name).write_bytes(data)
