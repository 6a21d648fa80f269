"""Hypothesis strategies: valid inventories of fictional systems."""

from __future__ import annotations

import datetime as dt

from hypothesis import strategies as st

from pqtriage.model.inventory import (
    USE_ROLES,
    Criticality,
    CryptoUse,
    DataClassification,
    Exposure,
    Hosting,
    HostingModel,
    Impact,
    Inventory,
    KeyStorage,
    Purpose,
    SignatureRole,
    SourceRef,
    System,
)
from pqtriage.sources.lookalike import lookalike_key
from pqtriage.sources.schema import FIPS_140_LEVELS

ALGORITHMS = ("RSA-2048", "RSA-3072", "ECDSA P-256", "X25519", "ML-KEM-768", "ML-DSA-65", "AES-128-GCM",
              "AES-256-GCM", "SHA-256", "3DES", "Kuznyechik", "TLS_AES_128_GCM_SHA256")
"""A mix of Shor-attackable, Grover-only, quantum-resistant, broken and unknown names."""

PARAMETER_SETS = ("768", "65", "128", "2048", "SHA2-128s")
OIDS = ("1.2.840.113549.1.1.11", "1.2.840.113549.1.1.5", "1.2.840.10045.2.1", "2.16.840.1.101.3.4.4.2",
        "1.3.132.0.34", "2.16.840.1.101.3.4.1.6", "1.2.3.4.5")
"""Known OIDs of several kinds (sha256WithRSAEncryption, sha1WithRSAEncryption, id-ecPublicKey,
ML-KEM-768, secp384r1, AES-128-GCM) and one pqtriage does not know."""

# Any text a person could type: no surrogates (not encodable), no NUL (refused by the reader).
TEXT = st.text(st.characters(blacklist_categories=["Cs"], blacklist_characters="\x00"),
               min_size=1, max_size=24).filter(lambda s: s.strip() != "")
# Text YAML 1.1 would read as something else: ids and versions must stay as typed.
LOOKALIKES = st.sampled_from(["010", "2.10", "true", "no", "1e3", "0x1F", "1:30", "2026-12-02", "~", "null"])
TEXT_OR_LOOKALIKE = st.one_of(TEXT, LOOKALIKES)
IDENTIFIERS = st.from_regex(r"\A[a-z0-9][a-z0-9._-]{0,12}\Z")
EXTRA_KEYS = st.from_regex(r"\A[A-Za-z][A-Za-z0-9_-]{0,12}\Z")
EXTRA_VALUES = st.one_of(TEXT_OR_LOOKALIKE, st.integers(-10**6, 10**6), st.booleans(),
                         st.floats(-1e6, 1e6, allow_nan=False).map(lambda v: round(v, 3)))
YEARS = st.one_of(st.integers(0, 50).map(float), st.floats(0, 50, allow_nan=False).map(lambda v: round(v, 3)))
MIGRATION_YEARS = YEARS.filter(lambda y: y > 0)
"""migration_years must be more than 0 (the inventory format; a plan needs a duration)."""


def _lookalike(text: st.SearchStrategy[str]) -> st.SearchStrategy[str]:
    return st.one_of(text, LOOKALIKES)


def _extra_values(text: st.SearchStrategy[str]) -> st.SearchStrategy[object]:
    return st.one_of(_lookalike(text), st.integers(-10**6, 10**6), st.booleans(),
                     st.floats(-1e6, 1e6, allow_nan=False).map(lambda v: round(v, 3)))


@st.composite
def uses(draw: st.DrawFn, text: st.SearchStrategy[str] = TEXT) -> CryptoUse:
    """One cryptographic use."""
    TEXT = text  # noqa: N806 - the text strategy this draw uses
    TEXT_OR_LOOKALIKE = _lookalike(text)  # noqa: N806
    return CryptoUse(
        purpose=draw(st.sampled_from(list(Purpose))),
        algorithm=draw(st.one_of(st.sampled_from(ALGORITHMS), TEXT)),
        key_size=draw(st.none() | st.integers(1, 65536)),
        curve=draw(st.none() | TEXT),
        trust_years=draw(st.none() | st.integers(0, 100)),
        signature_role=draw(st.none() | st.sampled_from(list(SignatureRole))),
        protocol=draw(st.none() | TEXT),
        protocol_version=draw(st.none() | TEXT_OR_LOOKALIKE),
        key_storage=draw(st.none() | st.sampled_from(list(KeyStorage))),
        crypto_library=draw(st.none() | TEXT),
        crypto_module=draw(st.none() | TEXT),
        fips_140_certificate=draw(st.none() | st.from_regex(r"\A#?[0-9]{1,6}\Z")),
        fips_140_level=draw(st.none() | st.sampled_from(FIPS_140_LEVELS)),
        notes=draw(st.none() | TEXT),
        source=SourceRef("inv.yaml", None, None, draw(st.none() | TEXT)),
        role=draw(st.sampled_from(USE_ROLES)),
        not_before=draw(st.none() | st.dates(dt.date(1970, 1, 1), dt.date(9999, 12, 31))),
        not_after=draw(st.none() | st.dates(dt.date(1970, 1, 1), dt.date(9999, 12, 31))),
        parameter_set=draw(st.none() | st.sampled_from(PARAMETER_SETS) | TEXT),
        oid=draw(st.none() | st.sampled_from(OIDS)),
    )


@st.composite
def inventories(draw: st.DrawFn, max_systems: int = 6, text_ids: bool = True,
                text: st.SearchStrategy[str] = TEXT) -> Inventory:
    """An inventory with unique system ids (plain ones when text_ids is False); ``text`` draws
    every free text."""
    TEXT = text  # noqa: N806 - the text strategy this draw uses
    TEXT_OR_LOOKALIKE = _lookalike(text)  # noqa: N806
    EXTRA_VALUES = _extra_values(text)  # noqa: N806
    count = draw(st.integers(0, max_systems))
    if text_ids:
        # Unique and not look-alikes: the readers refuse two ids every output would show the
        # same (UTS #39 skeletons, pqtriage.sources.lookalike), a rule tested on its own.
        ids = draw(st.lists(TEXT, min_size=count, max_size=count, unique_by=lookalike_key))
    else:
        ids = [f"sys{index:03d}q" for index in range(count)]
    systems = []
    for ident in ids:
        systems.append(System(
            id=ident,
            name=draw(st.just(ident) | TEXT),
            shelf_life_years=draw(YEARS),
            migration_years=draw(MIGRATION_YEARS),
            uses=tuple(draw(st.lists(uses(text), max_size=3))),
            owner=draw(st.none() | TEXT),
            description=draw(st.none() | TEXT),
            exposure=draw(st.sampled_from(list(Exposure))),
            criticality=draw(st.sampled_from(list(Criticality))),
            notes=draw(st.none() | TEXT),
            business_unit=draw(st.none() | TEXT),
            tags=tuple(draw(st.lists(TEXT_OR_LOOKALIKE, max_size=3))),
            impact=draw(st.none() | st.sampled_from(list(Impact))),
            high_value_asset=draw(st.none() | st.booleans()),
            data_classification=draw(st.none() | st.builds(
                DataClassification, TEXT_OR_LOOKALIKE, st.none() | st.integers(0, 10))),
            hosting=draw(st.none() | st.builds(
                Hosting, st.sampled_from(list(HostingModel)), st.none() | TEXT,
                st.none() | st.from_regex(r"\A[A-Z]{2}\Z"))),
            vendor=draw(st.none() | TEXT),
            product=draw(st.none() | TEXT),
            version=draw(st.none() | TEXT_OR_LOOKALIKE),
            crypto_library=draw(st.none() | TEXT),
            key_storage=draw(st.none() | st.sampled_from(list(KeyStorage))),
            frameworks=draw(st.none() | st.lists(IDENTIFIERS, max_size=3).map(tuple)),
            extra=tuple(draw(st.dictionaries(EXTRA_KEYS, EXTRA_VALUES, max_size=3)).items()),
            source=SourceRef("inv.yaml", None, None, draw(st.none() | TEXT)),
        ))
    frameworks = tuple(draw(st.lists(IDENTIFIERS, max_size=3)))
    return Inventory(organization=draw(TEXT), systems=tuple(systems), frameworks=frameworks)
