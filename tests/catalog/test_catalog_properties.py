"""Properties: resolve never raises, whatever the text and parameters."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.catalog import Resolution, load_catalog

CATALOG = load_catalog()
KNOWN = st.sampled_from(CATALOG.spellings())
TEXT = st.one_of(
    st.text(max_size=40), KNOWN, st.builds(lambda a, b: a + b, KNOWN, st.text(max_size=6))
)
PURPOSE = st.one_of(
    st.none(),
    st.sampled_from(
        ["key-establishment", "encryption", "signature", "authentication", "integrity", "other"]
    ),
)


@settings(max_examples=300, deadline=None)
@given(
    TEXT,
    st.one_of(st.none(), st.integers(-10, 70000)),
    st.one_of(st.none(), st.text(max_size=12), KNOWN),
    st.one_of(st.none(), st.text(max_size=8)),
    PURPOSE,
)
def test_resolve_never_raises(text, key_size, curve, parameter_set, purpose) -> None:
    result = CATALOG.resolve(
        text, key_size=key_size, curve=curve, parameter_set=parameter_set, purpose=purpose
    )
    assert isinstance(result, Resolution)
    assert (result.spec is None) == (result.reason is not None)


@settings(max_examples=100, deadline=None)
@given(KNOWN)
def test_every_spelling_is_known_in_any_case(spelling: str) -> None:
    upper = CATALOG.resolve(spelling.upper(), key_size=2048, curve="P-256", parameter_set="768")
    lower = CATALOG.resolve(spelling.lower(), key_size=2048, curve="P-256", parameter_set="768")
    assert upper == lower
    assert "not in the algorithm catalog" not in (upper.reason or "")
