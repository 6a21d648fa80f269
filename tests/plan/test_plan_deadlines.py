"""Deadlines per the published tables, each check naming its source.

Check values come from /work/shared/reference/published-figures.md section 6 (and 2 for
IR 8547): V = checked against the primary text, V2 = several secondary sources.
"After 2030" / "by 2030" are encoded as the last allowed day, 2030-12-31.
"""

from __future__ import annotations

import datetime

import pytest
from plan_helpers import (
    AES_128_GCM,
    AES_256_GCM,
    ECDH_P256,
    ECDSA_P256,
    ML_KEM_768,
    ML_KEM_1024,
    RSA_2048_KEY_TRANSPORT,
    RSA_2048_SIGNATURE,
    RSA_3072_SIGNATURE,
    UNKNOWN,
    candidate,
)

from pqtriage.plan.deadlines import organisation_milestones, system_deadlines, use_deadlines
from pqtriage.plan.inputs import PlanUse
from pqtriage.plan.policies import select_policies

D = datetime.date


def dates(system, policy_id: str) -> set[tuple[str, datetime.date]]:
    found = system_deadlines(system, select_policies([policy_id]))
    return {(d.kind, d.date) for d in found.deadlines}


# --- NIST IR 8547 ipd (Nov 2024), Tables 2 and 4 (V) -------------------------------------


@pytest.mark.parametrize("use", [RSA_2048_SIGNATURE, RSA_2048_KEY_TRANSPORT])
def test_ir8547_112_bit_deprecated_after_2030_disallowed_after_2035(use: PlanUse) -> None:
    # NIST IR 8547 ipd (2024) Table 2 (signatures) / Table 4 (key establishment):
    # 112-bit quantum-vulnerable: deprecated after 2030, disallowed after 2035.
    assert dates(candidate("s", uses=(use,)), "nist-ir-8547") == {
        ("deprecated", D(2030, 12, 31)),
        ("disallowed", D(2035, 12, 31)),
    }


@pytest.mark.parametrize("use", [RSA_3072_SIGNATURE, ECDSA_P256, ECDH_P256])
def test_ir8547_128_bit_and_more_disallowed_after_2035_only(use: PlanUse) -> None:
    # NIST IR 8547 ipd (2024) Tables 2 and 4: 128 bits or more: disallowed after 2035.
    assert dates(candidate("s", uses=(use,)), "nist-ir-8547") == {("disallowed", D(2035, 12, 31))}


def test_ir8547_keeps_the_purpose_table() -> None:
    # NIST IR 8547 ipd (2024): Table 2 is for signatures, Table 4 for key establishment.
    policies = select_policies(["nist-ir-8547"])
    sig = use_deadlines(RSA_2048_SIGNATURE, candidate("s"), policies)
    kex = use_deadlines(RSA_2048_KEY_TRANSPORT, candidate("s"), policies)
    assert all(d.milestone.startswith("signature-") for d in sig.deadlines)
    assert all(d.milestone.startswith("key-establishment-") for d in kex.deadlines)
    assert all("Table 2" in d.source for d in sig.deadlines)
    assert all("Table 4" in d.source for d in kex.deadlines)


@pytest.mark.parametrize("use", [AES_128_GCM, AES_256_GCM, ML_KEM_1024])
def test_ir8547_does_not_date_symmetric_or_post_quantum_uses(use: PlanUse) -> None:
    # NIST IR 8547 ipd (2024): the transition tables cover quantum-vulnerable public-key
    # algorithms; AES with >= 128-bit keys meets at least category 1.
    assert dates(candidate("s", uses=(use,)), "nist-ir-8547") == set()


def test_unknown_strength_of_a_quantum_vulnerable_use_takes_the_weakest_rows() -> None:
    use = PlanUse("signature", "RSA", None, "shor", "signature", True)
    found = use_deadlines(use, candidate("s"), select_policies(["nist-ir-8547"]))
    assert D(2030, 12, 31) in {d.date for d in found.deadlines}
    assert found.note and "weakest" in found.note


# --- CNSA 2.0 (NSA 2022, FAQ 2024) per system category (V2) -------------------------------

CNSA_TABLE = {
    # category: (support-and-prefer by, exclusive use / replace by)
    "software-firmware-signing": (D(2025, 12, 31), D(2030, 12, 31)),
    "web-cloud": (D(2025, 12, 31), D(2033, 12, 31)),
    "networking": (D(2026, 12, 31), D(2030, 12, 31)),
    "operating-system": (D(2027, 12, 31), D(2033, 12, 31)),
    "niche": (D(2030, 12, 31), D(2033, 12, 31)),
}


@pytest.mark.parametrize("category", sorted(CNSA_TABLE))
def test_cnsa2_dates_per_category(category: str) -> None:
    # CNSA 2.0 (NSA, 2022; FAQ 2024), per published-figures.md section 6 (V2).
    prefer, exclusive = CNSA_TABLE[category]
    system = candidate("s", category=category, uses=(ECDSA_P256,))
    assert dates(system, "cnsa2") == {("support-and-prefer", prefer), ("exclusive-use", exclusive)}


def test_cnsa2_headline_checks() -> None:
    # CNSA 2.0: firmware signing exclusive by 2030, networking by 2030, web and cloud by 2033.
    def exclusive(category: str) -> datetime.date:
        found = system_deadlines(
            candidate("s", category=category, uses=(ECDH_P256,)), select_policies(["cnsa2"])
        )
        return next(d.date for d in found.deadlines if d.kind == "exclusive-use")

    assert exclusive("software-firmware-signing") == D(2030, 12, 31)
    assert exclusive("networking") == D(2030, 12, 31)
    assert exclusive("web-cloud") == D(2033, 12, 31)


def test_cnsa2_custom_legacy_update_or_replace_by_2033_and_acquisitions_2027() -> None:
    # CNSA 2.0: custom and legacy, update or replace by 2033; new acquisitions from 1 Jan 2027.
    system = candidate("s", category="custom-legacy", uses=(RSA_2048_SIGNATURE,))
    assert dates(system, "cnsa2") == {("replace-by", D(2033, 12, 31))}
    acquisitions = organisation_milestones(select_policies(["cnsa2"]))
    assert [(d.kind, d.date) for d in acquisitions] == [("acquisitions-from", D(2027, 1, 1))]


def test_cnsa2_without_a_category_is_stated_not_skipped() -> None:
    found = system_deadlines(candidate("s", category=None), select_policies(["cnsa2"]))
    assert found.deadlines == ()
    assert any("policy_category" in reason for reason in found.undetermined)


# --- National timelines (published-figures.md section 6) ----------------------------------


def test_uk_ncsc_2031_for_high_priority_2035_for_all() -> None:
    # UK NCSC, Timelines for migration to post-quantum cryptography (Mar 2025), V2.
    high = candidate("s", criticality="critical")
    low = candidate("s", criticality="low")
    assert dates(high, "uk-ncsc") == {
        ("migrate-by", D(2031, 12, 31)),
        ("migrate-by", D(2035, 12, 31)),
    }
    assert dates(low, "uk-ncsc") == {("migrate-by", D(2035, 12, 31))}
    plan_by = organisation_milestones(select_policies(["uk-ncsc"]))
    assert [(d.kind, d.date) for d in plan_by] == [("plan-by", D(2028, 12, 31))]


def test_eu_roadmap_2030_for_high_risk() -> None:
    # EU, A Coordinated Implementation Roadmap for the transition to PQC (Jun 2025), V2.
    assert ("migrate-by", D(2030, 12, 31)) in dates(
        candidate("s", criticality="high"), "eu-roadmap"
    )
    assert dates(candidate("s", criticality="medium"), "eu-roadmap") == {
        ("migrate-by", D(2035, 12, 31))
    }
    assert organisation_milestones(select_policies(["eu-roadmap"]))[0].date == D(2026, 12, 31)


def test_canada_2031_high_priority_2035_rest_and_april_2026_plans() -> None:
    # Canadian Centre for Cyber Security, ITSM.40.001 roadmap (Jun 2025), V.
    assert dates(candidate("s", criticality="high"), "ca-roadmap") == {
        ("migrate-by", D(2031, 12, 31)),
        ("migrate-by", D(2035, 12, 31)),
    }
    plans = organisation_milestones(select_policies(["ca-roadmap"]))
    assert (plans[0].date.year, plans[0].date.month) == (2026, 4)


@pytest.mark.parametrize(
    ("use", "expected"),
    [
        (RSA_2048_SIGNATURE, True),  # traditional asymmetric: not approved beyond 2030
        (ECDH_P256, True),
        (ML_KEM_768, True),  # ML-KEM-768 also not beyond 2030
        (AES_128_GCM, True),  # AES-128 also not beyond 2030
        (ML_KEM_1024, False),
        (AES_256_GCM, False),
    ],
)
def test_australia_ism_not_approved_beyond_2030(use: PlanUse, expected: bool) -> None:
    # ASD Information Security Manual (Dec 2025), Guidelines for Cryptography, V.
    found = dates(candidate("s", uses=(use,)), "au-ism")
    assert (("not-approved-beyond", D(2030, 12, 31)) in found) is expected


def test_bsi_classical_key_agreement_until_2031_signatures_until_2035() -> None:
    # BSI TR-02102-1 (2026-01), V2: classical-only key agreement recommended until end of 2031;
    # very high protection needs by end of 2030; classical-only signatures recommended only until
    # end of 2035 (the 2026-01 addition).
    assert dates(candidate("s", uses=(ECDH_P256,)), "bsi") == {
        ("not-recommended-beyond", D(2031, 12, 31))
    }
    assert ("not-recommended-beyond", D(2030, 12, 31)) in dates(
        candidate("s", uses=(ECDH_P256,), criticality="critical"), "bsi"
    )
    assert dates(candidate("s", uses=(ECDSA_P256,)), "bsi") == {
        ("not-recommended-beyond", D(2035, 12, 31))
    }


def test_nsm10_mitigate_by_2035() -> None:
    # NSM-10 (US, May 2022), V: mitigate as much quantum risk as feasible by 2035.
    assert dates(candidate("s"), "nsm-10") == {("mitigate-by", D(2035, 12, 31))}


# --- Per use and per system -------------------------------------------------------------


def test_unassessed_use_says_no_deadline_could_be_determined() -> None:
    system = candidate("s", uses=(RSA_2048_SIGNATURE, UNKNOWN))
    found = system_deadlines(system, select_policies(["nist-ir-8547"]))
    assert found.uses[1].deadlines == ()
    assert "no deadline could be determined" in (found.uses[1].undetermined or "")
    assert "unknown algorithm name" in found.undetermined[0]
    # The assessed use still has its deadlines; the earliest binds the system.
    assert found.earliest is not None and found.earliest.date == D(2030, 12, 31)


def test_system_merges_uses_and_orders_earliest_first() -> None:
    system = candidate("s", uses=(ECDH_P256, RSA_2048_SIGNATURE, RSA_2048_SIGNATURE))
    found = system_deadlines(system, select_policies(["nist-ir-8547"]))
    assert [d.date for d in found.deadlines] == sorted(d.date for d in found.deadlines)
    keys = [(d.policy, d.milestone) for d in found.deadlines]
    assert len(keys) == len(set(keys))
    assert keys[0] == ("nist-ir-8547", "signature-112-deprecated")
