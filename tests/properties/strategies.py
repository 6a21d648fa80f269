"""Hypothesis strategies: valid inventories of fictional systems."""

from __future__ import annotations

import datetime as dt

from hypothesis import strategies as st

from pqtriage.model.inventory import (
    USE_ROLES,
    Criticality,
    CryptoUse,
    Exposure,
    Inventory,
    Purpose,
    SourceRef,
    System,
)

ALGORITHMS = ("RSA-2048", "RSA-3072", "ECDSA P-256", "X25519", "ML-KEM-768", "ML-DSA-65", "AES-128-GCM",
              "AES-256-GCM", "SHA-256", "3DES", "Kuznyechik", "TLS_AES_128_GCM_SHA256")
"""A mix of Shor-attackable, Grover-only, quantum-resistant, broken and unknown names."""

# Any text a person could type: no surrogates (not encodable), no NUL (refused by the reader).
TEXT = st.text(st.characters(blacklist_categories=["Cs"], blacklist_characters="\x00"),
               min_size=1, max_size=24).filter(lambda s: s.strip() != "")
YEARS = st.one_of(st.integers(0, 50).map(float), st.floats(0, 50, allow_nan=False).map(lambda v: round(v, 3)))


@st.composite
def uses(draw: st.DrawFn) -> CryptoUse:
    """One cryptographic use."""
    return CryptoUse(
        purpose=draw(st.sampled_from(list(Purpose))),
        algorithm=draw(st.one_of(st.sampled_from(ALGORITHMS), TEXT)),
        key_size=draw(st.none() | st.integers(1, 65536)),
        curve=draw(st.none() | TEXT),
        trust_years=draw(st.none() | st.integers(0, 100)),
        protocol=draw(st.none() | TEXT),
        notes=draw(st.none() | TEXT),
        source=SourceRef("inv.yaml", None, None, draw(st.none() | TEXT)),
        role=draw(st.sampled_from(USE_ROLES)),
        not_before=draw(st.none() | st.dates(dt.date(1970, 1, 1), dt.date(9999, 12, 31))),
        not_after=draw(st.none() | st.dates(dt.date(1970, 1, 1), dt.date(9999, 12, 31))),
    )


@st.composite
def inventories(draw: st.DrawFn, max_systems: int = 6, text_ids: bool = True) -> Inventory:
    """An inventory with unique system ids (plain ones when text_ids is False)."""
    count = draw(st.integers(0, max_systems))
    if text_ids:
        ids = draw(st.lists(TEXT, min_size=count, max_size=count, unique=True))
    else:
        ids = [f"sys{index:03d}q" for index in range(count)]
    systems = []
    for ident in ids:
        systems.append(System(
            id=ident,
            name=draw(st.just(ident) | TEXT),
            shelf_life_years=draw(YEARS),
            migration_years=draw(YEARS),
            uses=tuple(draw(st.lists(uses(), max_size=3))),
            owner=draw(st.none() | TEXT),
            description=draw(st.none() | TEXT),
            exposure=draw(st.sampled_from(list(Exposure))),
            criticality=draw(st.sampled_from(list(Criticality))),
            notes=draw(st.none() | TEXT),
            source=SourceRef("inv.yaml", None, None, draw(st.none() | TEXT)),
        ))
    return Inventory(organization=draw(TEXT), systems=tuple(systems))
