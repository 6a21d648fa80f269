"""Property tests: parsers never raise on arbitrary bytes, and grouping loses nothing
(every finding is in exactly one system, with a unique source). Common practice, no source.
"""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.emit import inventory_dict
from pqtriage.sources.scan.findings import Finding, FindingKind
from pqtriage.sources.scan.grouping import GroupBy, group_findings
from pqtriage.sources.scan.scanner import classify

PREFIXES = [b"", b"-----BEGIN CERTIFICATE-----\n", b"\x30\x82\x01\x00", b"ssh-rsa ", b'{"kty":']


@settings(max_examples=150, deadline=None)
@given(st.sampled_from(PREFIXES), st.binary(max_size=300), st.sampled_from(["a.pem", "b.bin"]))
def test_classify_never_raises(prefix: bytes, tail: bytes, name: str) -> None:
    outcome = classify(prefix + tail, name)
    for problem in outcome.problems:
        assert "\n" not in problem.line()


names = st.text(alphabet="abcXYZ/._-", min_size=1, max_size=12)
findings = st.builds(
    Finding,
    source=st.builds(SourceRef, file=names, detail=st.one_of(st.none(), names)),
    kind=st.sampled_from(FindingKind),
    algorithm=st.sampled_from(["RSA", "ECDSA", "ML-DSA-65"]),
    purpose=st.sampled_from(Purpose),
    subject_name=st.one_of(st.none(), names),
    host=st.one_of(st.none(), names),
)


@given(st.lists(findings, max_size=25), st.sampled_from(GroupBy))
def test_grouping_keeps_every_finding_once(items: list[Finding], rule: GroupBy) -> None:
    groups = group_findings(items, rule)
    assert sorted(map(id, (f for g in groups for f in g.findings))) == sorted(map(id, items))
    document = inventory_dict(groups)
    uses = [use for system in document["systems"] for use in system["uses"]]
    assert len(uses) == len(items)
    ids = [system["id"] for system in document["systems"]]
    assert len(ids) == len(set(ids))


_JSON_SCALARS = st.one_of(st.none(), st.booleans(), st.integers(), st.text(max_size=8),
                          st.floats(allow_nan=False, allow_infinity=False))  # fmt: skip
_JSON_VALUES = st.recursive(_JSON_SCALARS, lambda inner: st.one_of(
    st.lists(inner, max_size=3), st.dictionaries(st.text(max_size=5), inner, max_size=3)),
    max_leaves=10)  # fmt: skip


@given(st.fixed_dictionaries({
    "version": st.just(1),
    "organization": st.text(max_size=10),
    "systems": st.lists(st.dictionaries(st.sampled_from(["id", "name", "uses", "assumed", "notes"]),
                                        _JSON_VALUES, max_size=5), max_size=4),
}))  # fmt: skip
def test_json_rendering_is_the_same_data(document: dict) -> None:  # type: ignore[type-arg]
    """The one-use-per-line JSON parses back to exactly the document (RFC 8259 data model)."""
    import json

    from pqtriage.sources.scan.emit import render_json

    assert json.loads(render_json(document)) == document


@given(st.fixed_dictionaries({
    "version": st.just(1),
    "organization": st.text(max_size=12),
    "systems": st.lists(st.fixed_dictionaries({
        "id": st.text(min_size=1, max_size=8),
        "notes": st.text(max_size=40),
        "uses": st.lists(st.fixed_dictionaries({
            "purpose": st.sampled_from(["encryption", "signature"]),
            "algorithm": st.text(min_size=1, max_size=12),
            "key_size": st.integers(1, 65536),
            "notes": st.text(max_size=120),
            "source": st.text(min_size=1, max_size=30),
        }), max_size=3),
    }), max_size=3),
}))  # fmt: skip
def test_yaml_rendering_is_the_same_data(document: dict) -> None:  # type: ignore[type-arg]
    """The scan's YAML (libyaml's safe emitter when present) loads back to exactly the document
    (YAML 1.1 safe loader), whatever the text: control characters, line breaks, long lines."""
    import yaml

    from pqtriage.sources.scan.emit import render

    assert yaml.safe_load(render(document, "yaml")) == document
