"""Synthetic inventories for benchmarks: fictional systems, realistic algorithm mix.

Deterministic (seeded) so two runs measure the same input.
"""

from __future__ import annotations

import random
from pathlib import Path

USES_PER_SYSTEM = 4
"""Uses per generated system; a 100k-use inventory has 25k systems."""

_USES = (
    ("key-establishment", "RSA", "key_size: 2048"),
    ("key-establishment", "X25519", "protocol: TLS 1.3"),
    ("key-establishment", "X25519MLKEM768", "protocol: TLS 1.3"),
    ("key-establishment", "ECDH", "curve: P-384"),
    ("authentication", "ECDSA", "curve: P-256; key_size: 2048"),
    ("authentication", "ssh-ed25519", "protocol: SSH"),
    ("signature", "RSA-3072", "trust_years: 10"),
    ("signature", "ML-DSA-65", "trust_years: 20"),
    ("encryption", "AES-256-GCM", "notes: bulk data"),
    ("encryption", "AES-128-CBC", "notes: legacy mode"),
    ("encryption", "TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256", "curve: P-256; key_size: 2048"),
    ("integrity", "HMAC-SHA256", "trust_years: 1"),
    ("encryption", "3DES", "notes: partner link"),
    ("encryption", "Kuznyechik", "notes: not in the catalog, stays unassessed"),
)


def inventory_text(uses: int, seed: int = 7) -> str:
    """A valid pqtriage YAML inventory with exactly ``uses`` uses."""
    rng = random.Random(seed)
    systems = max(1, (uses + USES_PER_SYSTEM - 1) // USES_PER_SYSTEM)
    out = [
        "# Synthetic benchmark inventory of a fictional organisation.",
        "version: 1",
        "organization: Synthetic Benchmark Cooperative",
        "defaults:",
        "  exposure: internal",
        "  criticality: medium",
        "systems:",
    ]
    left = uses
    for index in range(systems):
        count = min(USES_PER_SYSTEM, left)
        left -= count
        out += [
            f"  - id: sys-{index:06d}",
            f"    name: Synthetic system {index}",
            f"    owner: Team {index % 97}",
            f"    shelf_life_years: {rng.choice((0, 1, 2, 5, 7, 10, 15, 25))}",
            f"    migration_years: {rng.choice((0.5, 1, 2, 3, 4))}",
            f"    exposure: {rng.choice(('internet', 'partner', 'internal', 'isolated'))}",
            "    uses:" if count else "    uses: []",
        ]
        for _ in range(count):
            purpose, algorithm, extra = rng.choice(_USES)
            out += [f"      - purpose: {purpose}", f"        algorithm: {algorithm}"]
            out += [f"        {field}" for field in extra.split("; ")]
    return "\n".join(out) + "\n"


def write_inventory(folder: Path, uses: int) -> Path:
    """Write (or reuse) the synthetic inventory of ``uses`` uses under folder."""
    path = folder / f"inventory-{uses}.yaml"
    if not path.exists():
        path.write_text(inventory_text(uses), encoding="utf-8")
    return path
