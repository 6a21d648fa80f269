"""Classical status by date against the transition documents, for every catalog row.

The expected statuses are in tests/vectors/sp800_131a.yaml, written from NIST SP 800-131A Rev. 2
(2019), the DRAFT Rev. 3 (October 2024), FIPS 186-5 (2023), RFC 6151 (2011) and the other documents
each check names; a check flagged M is from memory (the vector file says so per check).
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest
import yaml

from pqtriage.catalog import Catalog
from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.catalog.transitions import parse_transitions, read_transitions
from pqtriage.catalog.trust import parse_trust_defaults, read_trust_defaults
from pqtriage.errors import CatalogError
from pqtriage.model.inventory import SignatureRole

VECTORS = yaml.safe_load((Path(__file__).parent.parent / "vectors" / "sp800_131a.yaml").read_text(encoding="utf-8"))
CHECKS = [(check, name) for check in VECTORS["checks"] for name in check["names"]]
TODAY = dt.date(2026, 12, 1)


def _spec(catalog: Catalog, name: str, sized: int | None) -> AlgorithmSpec:
    by_name = {spec.name: spec for spec in catalog.specs()}
    if name in by_name and sized is None:
        return by_name[name]
    found = catalog.resolve(name, key_size=sized)
    assert found.spec is not None, (name, found.reason)
    return found.spec


@pytest.mark.parametrize(("check", "name"), CHECKS, ids=[f"{c['date']}-{c['purpose']}-{n}" for c, n in CHECKS])
def test_status_matches_the_document(catalog: Catalog, check: dict, name: str) -> None:
    # Source and flag of each check: the `source` and `flag` beside it in sp800_131a.yaml
    # (flag M: from memory, not checked against the document's text).
    spec = _spec(catalog, name, check.get("sized"))
    standing = catalog.classical_standing(spec, check["purpose"], check["date"])
    assert standing.status == check["status"], (name, check["source"], standing)


def test_every_catalog_row_is_checked_on_today(catalog: Catalog) -> None:
    checked = {name for check, name in CHECKS if check["date"] == TODAY}
    missing = sorted(spec.name for spec in catalog.specs() if spec.name not in checked)
    assert missing == [], "add these rows to tests/vectors/sp800_131a.yaml with their document"


def test_draft_rules_are_labelled_draft(catalog: Catalog) -> None:
    # DRAFT NIST SP 800-131A Rev. 3 (October 2024): RSA-2048 signatures deprecated after 2030.
    rsa = _spec(catalog, "RSA-2048", None)
    today = catalog.classical_standing(rsa, "signature", TODAY)
    assert (today.status, today.draft) == ("acceptable", False)
    assert today.next_status == "deprecated" and today.next_date == dt.date(2031, 1, 1)
    assert today.next_document is not None and today.next_document.startswith("DRAFT ")
    assert today.next_label() == "deprecated from 2031-01-01 (DRAFT NIST SP 800-131A Rev. 3 ipd)"
    later = catalog.classical_standing(rsa, "signature", dt.date(2031, 6, 1))
    assert later.draft and later.document.startswith("DRAFT ") and later.label().startswith(
        "deprecated since 2031-01-01 (DRAFT ")


def test_tdea_dates_and_document(catalog: Catalog) -> None:
    # NIST SP 800-131A Rev. 2 (2019), Table 1: TDEA encryption disallowed after 31 December 2023 (V).
    tdea = _spec(catalog, "3TDEA", None)
    last_day = catalog.classical_standing(tdea, "encryption", dt.date(2023, 12, 31))
    first_day = catalog.classical_standing(tdea, "encryption", dt.date(2024, 1, 1))
    assert (last_day.status, first_day.status) == ("deprecated", "disallowed")
    assert first_day.since == dt.date(2024, 1, 1) and first_day.not_acceptable
    assert first_day.document.startswith("NIST SP 800-131A Rev. 2")
    assert last_day.next_status == "disallowed" and last_day.next_date == dt.date(2024, 1, 1)


def test_a_row_without_a_rule_is_acceptable_and_broken_rows_cite_their_own_source(catalog: Catalog) -> None:
    des = _spec(catalog, "DES", None)
    standing = catalog.classical_standing(des, "encryption", TODAY)
    assert standing.status == "broken" and standing.flag == "row"
    assert standing.document.startswith("FIPS 46-3")  # the catalog row's own first source


def _minimal(rules: list[dict]) -> dict:
    return {"version": 1, "documents": {"d": {"short": "D", "title": "Doc (2020)", "draft": False}},
            "rules": rules}


RULE = {"id": "r", "document": "d", "section": "s", "flag": "V", "match": {}, "status": "acceptable", "note": "n"}


@pytest.mark.parametrize(("change", "message"), [
    ({"status": "fine"}, "status 'fine'"),
    ({"flag": "X"}, "flag 'X'"),
    ({"document": "nope"}, "unknown document"),
    ({"match": {"colour": ["red"]}}, "unknown match key"),
    ({"match": {"bits": "112"}}, "must be a number"),
    ({"from": "soon"}, "must be a date"),
    ({"from": dt.date(2030, 1, 1), "until": dt.date(2029, 1, 1)}, "before 'from'"),
    ({"note": " "}, "non-empty"),
])
def test_transition_rows_are_validated(change: dict, message: str) -> None:
    with pytest.raises(CatalogError, match=message):
        parse_transitions(_minimal([{**RULE, **change}]), "t.yaml")


def test_transition_ids_are_unique() -> None:
    with pytest.raises(CatalogError, match="id used twice"):
        parse_transitions(_minimal([RULE, RULE]), "t.yaml")


def test_shipped_files_load() -> None:
    rules = read_transitions().rules
    assert rules[-1].match == {} and rules[-1].status == "acceptable"  # the catch-all is last
    assert all(rule.flag in ("V", "V2", "M", "row") for rule in rules)
    trust = read_trust_defaults()
    assert set(trust.rows) == {role.value for role in SignatureRole} | {"unspecified"}


def test_trust_defaults_are_cautious_where_the_brief_says() -> None:
    # Long for roots of trust, CAs, firmware and documents; 0 for live authentication
    # (common practice, no source: the figures are judgements, stated in trust_defaults.yaml).
    trust = read_trust_defaults()
    for role in ("root-of-trust", "certificate-authority", "firmware-signing", "document-signing"):
        assert trust.for_role(role).years >= 10, role
    assert trust.for_role("live-authentication").years == 0
    assert trust.for_role(None).years > 0  # role not given: not 0
    assert all(row.source.strip() for row in trust.rows.values())


def test_trust_defaults_need_every_role() -> None:
    data = {"version": 1, "roles": [{"role": "root-of-trust", "years": 25, "why": "w", "source": "s"}],
            "unspecified": {"years": 10, "why": "w", "source": "s"}}
    with pytest.raises(CatalogError, match="no row for"):
        parse_trust_defaults(data, "t.yaml")
