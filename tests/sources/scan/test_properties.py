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
