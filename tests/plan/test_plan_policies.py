"""The shipped policies.yaml: complete, sourced, validated at load; selection by id."""

from __future__ import annotations

import copy
from typing import Any

import pytest

from pqtriage.errors import EXIT_INTERNAL, CatalogError, UsageError
from pqtriage.plan.policies import (
    DEFAULT_POLICY_IDS,
    load_policies,
    parse_policies,
    select_policies,
)

ISSUE_IDS = {"nist-ir-8547", "cnsa2", "uk-ncsc", "eu-roadmap", "au-ism", "ca-roadmap", "bsi"}

# Flags as the verified reference gives them (section 6 and the 2025-2026 additions) (V primary text, V2 secondary).
STATUS = {
    "nist-ir-8547": "V",
    "nsm-10": "V",
    "cnsa2": "V2",
    "uk-ncsc": "V2",
    "eu-roadmap": "V2",
    "au-ism": "V",
    "ca-roadmap": "V",
    "bsi": "V2",
    "eo-14412": "V2",
    "omb-m-26-15": "V2",
    "eo-14306": "V2",
    "anssi": "V2",
}


def test_every_policy_of_the_issue_is_shipped_with_its_status() -> None:
    policies = {p.id: p for p in load_policies()}
    assert ISSUE_IDS <= set(policies)
    assert {i: p.flag for i, p in policies.items()} == STATUS


def test_every_row_names_its_source() -> None:
    for policy in load_policies():
        assert policy.source.strip()
        for milestone in policy.milestones:
            assert milestone.source.strip(), (policy.id, milestone.id)


def _document() -> dict[str, Any]:
    return {
        "policies": [
            {
                "id": "p1",
                "title": "T",
                "publisher": "P",
                "published": "2025-01",
                "source": "Doc 1",
                "flag": "V", "status": "final",
                "milestones": [
                    {"id": "m1", "kind": "migrate-by", "requires": "migrate", "date": "2030-12-31",
                     "source": "Doc 1 s.2"}
                ],
            }
        ]
    }


def test_a_valid_document_parses() -> None:
    (policy,) = parse_policies(_document(), "x.yaml")
    assert policy.milestones[0].date.isoformat() == "2030-12-31"


@pytest.mark.parametrize(
    ("mutate", "expected"),
    [
        (lambda d: d["policies"][0].pop("source"), "policy 'p1': missing or empty 'source'"),
        (
            lambda d: d["policies"][0]["milestones"][0].pop("source"),
            "policy 'p1' milestone 1: missing or empty 'source'",
        ),
        (lambda d: d["policies"][0].update(colour="red"), "policy 'p1': unknown key(s) colour"),
        (
            lambda d: d["policies"][0]["milestones"][0].update(scope={"region": "x"}),
            "policy 'p1' milestone 1 scope: unknown key(s) region",
        ),
        (
            lambda d: d["policies"][0]["milestones"][0].update(kind="soon"),
            "unknown kind 'soon'",
        ),
        (
            lambda d: d["policies"][0]["milestones"][0].update(date="2030"),
            "'date' must be a YYYY-MM-DD date",
        ),
        (
            lambda d: d["policies"][0]["milestones"][0].update(
                scope={"policy_categories": ["toasters"]}
            ),
            "unknown value(s) ['toasters']",
        ),
    ],
)
def test_malformed_rows_are_refused_naming_the_row(mutate: Any, expected: str) -> None:
    document = copy.deepcopy(_document())
    mutate(document)
    with pytest.raises(CatalogError) as caught:
        parse_policies(document, "x.yaml")
    assert expected in caught.value.diagnostics()
    assert caught.value.diagnostics().startswith("x.yaml: ")
    assert caught.value.exit_code == EXIT_INTERNAL


def test_select_by_ids_merges_command_line_and_inventory_in_order() -> None:
    chosen = select_policies(["CNSA2", "nist-ir-8547"], ["nist-ir-8547", "bsi"])
    assert [p.id for p in chosen] == ["cnsa2", "nist-ir-8547", "bsi"]


def test_no_selection_uses_the_documented_default() -> None:
    assert tuple(p.id for p in select_policies([])) == DEFAULT_POLICY_IDS


def test_unknown_id_lists_the_valid_ids() -> None:
    with pytest.raises(UsageError) as caught:
        select_policies(["nist-8547"])
    text = caught.value.diagnostics()
    assert "unknown policy 'nist-8547'" in text
    for policy_id in ISSUE_IDS:
        assert policy_id in text
    assert caught.value.exit_code == 2
