"""The 2025-2026 timelines: dates, scopes, requirements and source status, each check naming
its document by title and identifier with its flag (V primary text, V2 several secondary
restatements)."""

from __future__ import annotations

import dataclasses
import datetime

import pytest
from plan_helpers import (
    ECDH_P256,
    ECDSA_P256,
    RSA_2048_KEY_TRANSPORT,
    RSA_2048_SIGNATURE,
    candidate,
)

from pqtriage.plan.deadlines import organisation_milestones, system_deadlines
from pqtriage.plan.inputs import PlanCandidate
from pqtriage.plan.policies import load_policies, select_policies

D = datetime.date


def _system(**fields: object) -> PlanCandidate:
    return dataclasses.replace(candidate("s", uses=(RSA_2048_KEY_TRANSPORT, ECDSA_P256)), **fields)


def _found(system: PlanCandidate, *policy_ids: str) -> set[tuple[str, str, str, datetime.date]]:
    found = system_deadlines(system, select_policies(list(policy_ids)))
    return {(d.policy, d.milestone, d.requires, d.date) for d in found.deadlines}


def _milestone(policy_id: str, milestone_id: str):  # noqa: ANN202 - test helper
    policy = next(p for p in load_policies() if p.id == policy_id)
    return policy, next(m for m in policy.milestones if m.id == milestone_id)


@pytest.mark.parametrize("fields", [{"high_value_asset": True}, {"impact": "high"}])
def test_eo_14412_key_establishment_2030_signatures_2031_for_hva_and_high_impact(
    fields: dict[str, object],
) -> None:
    # US Executive Order 14412, "Securing the Nation Against Advanced Cryptographic Attacks"
    # (22 Jun 2026; 91 FR 38483), V2: high-value assets (OMB M-19-03) and high-impact systems
    # (FIPS 199 high): post-quantum key establishment by 31 Dec 2030, signatures by 31 Dec 2031.
    assert _found(_system(**fields), "eo-14412") == {
        ("eo-14412", "key-establishment", "migrate-key-establishment", D(2030, 12, 31)),
        ("eo-14412", "signatures", "migrate-signatures", D(2031, 12, 31)),
    }


@pytest.mark.parametrize(
    "fields", [{}, {"impact": "moderate"}, {"high_value_asset": False, "impact": "low"}]
)
def test_eo_14412_does_not_bind_other_systems(fields: dict[str, object]) -> None:
    # EO 14412 (2026), V2: scoped to high-value assets and high-impact systems only; an unstated
    # designation does not put a system in scope.
    assert _found(_system(**fields), "eo-14412") == set()


def test_eo_14412_organisation_milestones_and_the_proposed_procurement_rule() -> None:
    # EO 14412 (2026), V2: NIST pilot migration by 31 Dec 2027; a PROPOSED procurement rule for
    # contractors to meet the PQC FIPS by 31 Dec 2030 (announced, not in force).
    rows = {(d.milestone, d.date, d.status) for d in organisation_milestones(select_policies(["eo-14412"]))}
    assert rows == {
        ("nist-pilot", D(2027, 12, 31), "final"),
        ("contractor-procurement", D(2030, 12, 31), "announced"),
    }


def test_omb_m_26_15_phases_as_organisation_milestones() -> None:
    # OMB M-26-15, "Execution of the Migration to Post-Quantum Cryptography" (24 Jun 2026), V2:
    # agency plans within 120 days (24 Jun 2026 + 120 days = 22 Oct 2026, our arithmetic);
    # phases 2026-27 inventory and strategy, 2027-28 pilots.
    assert D(2026, 6, 24) + datetime.timedelta(days=120) == D(2026, 10, 22)
    rows = {(d.milestone, d.date) for d in organisation_milestones(select_policies(["omb-m-26-15"]))}
    assert rows == {
        ("migration-plans", D(2026, 10, 22)),
        ("phase-inventory-strategy", D(2027, 12, 31)),
        ("phase-pilots", D(2028, 12, 31)),
    }
    assert _found(_system(high_value_asset=True), "omb-m-26-15") == set()


def test_eo_14306_tls_1_3_support_by_2_jan_2030_is_a_checkpoint_for_tls_systems() -> None:
    # US Executive Order 14306 (6 Jun 2025), V2: agencies support TLS 1.3 or a successor no later
    # than 2 Jan 2030.
    policy, milestone = _milestone("eo-14306", "tls-1-3")
    assert (milestone.date, milestone.requires, milestone.checkpoint) == (D(2030, 1, 2), "support", True)
    assert _found(_system(protocol="TLS"), "eo-14306") == {
        ("eo-14306", "tls-1-3", "support", D(2030, 1, 2))
    }
    assert _found(_system(protocol="ssh"), "eo-14306") == set()


def test_bsi_classical_only_signatures_until_end_2035() -> None:
    # BSI TR-02102-1 (2026-01), V2: classical-only signatures recommended only until end of 2035.
    assert ("bsi", "classical-signatures", "stop-using", D(2035, 12, 31)) in _found(
        candidate("s", uses=(RSA_2048_SIGNATURE,)), "bsi"
    )
    assert ("bsi", "classical-signatures", "stop-using", D(2035, 12, 31)) not in _found(
        candidate("s", uses=(ECDH_P256,)), "bsi"
    )


def test_anssi_2027_and_2030_procurement_dates_are_announced() -> None:
    # ANSSI (Oct 2025 announcement), V2: from 2027 no security product qualified without PQC;
    # from 2030 public and critical entities stop acquiring products without PQC.
    rows = {(d.milestone, d.date, d.requires, d.status, d.label)
            for d in organisation_milestones(select_policies(["anssi"]))}  # fmt: skip
    assert rows == {
        ("qualification", D(2027, 1, 1), "procure-only-compliant", "announced", "anssi (announced)"),
        ("public-critical-acquisitions", D(2030, 1, 1), "procure-only-compliant", "announced",
         "anssi (announced)"),
    }


def test_source_status_of_every_policy() -> None:
    # NIST status (Sep 2026), V2: IR 8547 is still an initial public draft. ANSSI's dates are
    # an announcement (Oct 2025). The others are published documents.
    status = {p.id: p.status for p in load_policies()}
    assert status.pop("nist-ir-8547") == "draft"
    assert status.pop("anssi") == "announced"
    assert set(status.values()) == {"final"}


def test_flags_of_the_new_policies() -> None:
    # Flags as the reference gives them: EO 14412, OMB M-26-15, EO 14306, BSI TR-02102-1
    # (2026-01) and the ANSSI announcement are all V2.
    flags = {p.id: p.flag for p in load_policies()}
    assert {k: flags[k] for k in ("eo-14412", "omb-m-26-15", "eo-14306", "anssi", "bsi")} == {
        k: "V2" for k in ("eo-14412", "omb-m-26-15", "eo-14306", "anssi", "bsi")
    }


def test_every_milestone_says_what_it_requires() -> None:
    for policy in load_policies():
        for milestone in policy.milestones:
            assert milestone.requires, (policy.id, milestone.id)


def test_worked_example_frameworks_decide_which_policies_judge_a_system() -> None:
    # EO 14412 (2026), V2: a high-value asset with RSA key establishment gets 31 Dec 2030 when
    # it follows US federal rules; the same system under the EU framework only is not judged by
    # US dates, but by the EU roadmap ("A Coordinated Implementation Roadmap for the transition
    # to Post-Quantum Cryptography", Jun 2025, V2: high-risk use cases by end of 2030, the rest
    # by end of 2035 as far as feasible).
    hva = dataclasses.replace(
        candidate("s", uses=(RSA_2048_KEY_TRANSPORT,)), high_value_asset=True
    )
    us = dataclasses.replace(hva, frameworks=("us-federal",))
    eu = dataclasses.replace(hva, frameworks=("eu",))
    key_establishment = ("eo-14412", "key-establishment", "migrate-key-establishment", D(2030, 12, 31))
    assert key_establishment in _found(us, "eo-14412", "eu-roadmap")
    found_eu = _found(eu, "eo-14412", "eu-roadmap")
    assert {row[0] for row in found_eu} == {"eu-roadmap"}
    assert ("eu-roadmap", "medium-risk", "migrate", D(2035, 12, 31)) in found_eu
