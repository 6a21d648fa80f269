"""Load the published check values kept in tests/vectors/ (provenance: tests/vectors/README.md)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import yaml

VECTORS = Path(__file__).resolve().parent.parent / "vectors"


def vectors(name: str) -> Any:
    """Load a vector file from tests/vectors/."""
    return yaml.safe_load((VECTORS / name).read_text(encoding="utf-8"))
