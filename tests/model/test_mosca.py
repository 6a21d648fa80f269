"""Mosca's inequality worked by hand with a fixed CRQC year.

Source of the rule: "Cybersecurity in an era with quantum computers: will we be ready?"
(IEEE Security & Privacy 16(5), 2018; IACR ePrint 2015/1075): exposed when x + y > z.
"""

from __future__ import annotations

import datetime as dt

import pytest

from pqtriage.model.arrival_model import SharedArrival
from pqtriage.model.inventory import CryptoUse, Inventory, Purpose, System
from pqtriage.model.triage import triage
from pqtriage.model.verdict import Verdict
from pqtriage.sources.profile_file import parse_profile
from tests.fakes import FakeCatalog

AS_OF = dt.date(2026, 1, 1)  # decimal year 2026.0
PROFILE = parse_profile(b"crqc_year: 2035\n", "what-if.yaml")  # z = 2035.0, so z - today = 9 years


def _system(sid: str, x: float, y: float, *uses: CryptoUse) -> System:
    return System(id=sid, name=sid, shelf_life_years=x, migration_years=y, uses=uses)


def _run(*systems: System):
    return triage(Inventory("Test", tuple(systems)), FakeCatalog(), PROFILE, SharedArrival(), AS_OF)


def kex(name: str) -> CryptoUse:
    return CryptoUse(Purpose.KEY_ESTABLISHMENT, name)


def test_exactly_on_the_boundary_is_within_margin() -> None:
    # x = 7, y = 2: x + y = 9 = z - today (2035 - 2026). 9 > 9 is false: not exposed, margin 0,
    # start by 2035 - 9 = 2026.0 = 1 January 2026.
    item = _run(_system("a", 7, 2, kex("RSA-2048"))).items[0]
    assert item.verdict == Verdict.WITHIN_MARGIN
    assert item.margin_years == pytest.approx(0.0)
    assert item.start_by == dt.date(2026, 1, 1)
    assert item.exposure_probability == 0.0


def test_one_year_over_is_exposed() -> None:
    # x = 8, y = 2: 10 > 9, exposed; margin 9 - 10 = -1; start by 2035 - 10 = 2025-01-01 (overdue).
    result = _run(_system("a", 8, 2, kex("RSA-2048")))
    item = result.items[0]
    assert item.verdict == Verdict.EXPOSED
    assert item.margin_years == pytest.approx(-1.0)
    assert item.start_by == dt.date(2025, 1, 1)
    assert item.exposure_probability == 1.0
    assert result.summary.overdue == ("a",)


def test_purpose_sets_x() -> None:
    # Signature with trust_years 10, y = 2: x + y = 12 > 9, margin -3.
    signature = CryptoUse(Purpose.SIGNATURE, "ECDSA P-256", trust_years=10)
    # Live authentication: x = 0, y = 2: margin 9 - 2 = 7, start by 2035 - 2 = 2033-01-01.
    auth = CryptoUse(Purpose.AUTHENTICATION, "ECDSA P-256")
    result = _run(_system("s", 30, 2, signature), _system("t", 30, 2, auth))
    by_id = {i.system.id: i for i in result.items}
    assert by_id["s"].verdict == Verdict.EXPOSED and by_id["s"].margin_years == pytest.approx(-3)
    assert by_id["s"].uses[0].x_years == 10
    assert by_id["t"].verdict == Verdict.WITHIN_MARGIN and by_id["t"].margin_years == pytest.approx(7)
    assert by_id["t"].start_by == dt.date(2033, 1, 1)


def test_signature_without_trust_years_takes_the_cautious_default_and_says_so() -> None:
    # The fake trust table (tests/fakes.py): unknown role 5 years, every role 20, live
    # authentication 0. x = 5, y = 2: 7 < 9, within margin (margin 2).
    item = _run(_system("s", 30, 2, CryptoUse(Purpose.SIGNATURE, "ECDSA P-256"))).items[0]
    assert item.uses[0].x_years == 5
    assert item.margin_years == pytest.approx(2)
    assert any("no trust_years: x = 5 years" in a and "role is not given" in a for a in item.uses[0].assumptions)
    assert any(f.name == "trust_years" and f.value == "5" and f.origin == "default" for f in item.uses[0].facts)


def test_the_signature_role_sets_the_default_x() -> None:
    from pqtriage.model.inventory import SignatureRole

    # Root of trust: x = 20 (fake table), y = 2: 22 > 9, exposed, margin 9 - 22 = -13.
    root = CryptoUse(Purpose.SIGNATURE, "ECDSA P-256", signature_role=SignatureRole.ROOT_OF_TRUST)
    # Live authentication: x = 0, y = 2: margin 7.
    live = CryptoUse(Purpose.SIGNATURE, "ECDSA P-256", signature_role=SignatureRole.LIVE_AUTHENTICATION)
    # No role, but the system is in the CNSA 2.0 software-firmware-signing category: firmware
    # signing, x = 20; an explicit trust_years always wins (x = 1, margin 6).
    firmware = System(id="f", name="f", shelf_life_years=0, migration_years=2, policy_category="software-firmware-signing",
                      uses=(CryptoUse(Purpose.SIGNATURE, "ECDSA P-256"),))
    stated = CryptoUse(Purpose.SIGNATURE, "ECDSA P-256", trust_years=1, signature_role=SignatureRole.ROOT_OF_TRUST)
    result = _run(_system("root", 0, 2, root), _system("live", 0, 2, live), firmware, _system("stated", 0, 2, stated))
    by_id = {i.system.id: i for i in result.items}
    assert (by_id["root"].verdict, by_id["root"].margin_years) == (Verdict.EXPOSED, pytest.approx(-13))
    assert "a root-of-trust signature" in by_id["root"].uses[0].assumptions[0]
    assert by_id["live"].margin_years == pytest.approx(7)
    assert by_id["f"].uses[0].x_years == 20
    assert "from the system's policy_category" in by_id["f"].uses[0].assumptions[0]
    assert by_id["stated"].uses[0].x_years == 1 and by_id["stated"].uses[0].assumptions == ()


def test_weakest_use_decides_and_ranking_order() -> None:
    result = _run(
        _system("resistant", 50, 1, kex("ML-KEM-768"), CryptoUse(Purpose.ENCRYPTION, "AES-128-GCM")),
        _system("within", 1, 1, kex("RSA-2048")),
        _system("unknown", 1, 1, kex("Kuznyechik"), kex("ML-KEM-768")),
        _system("exposed", 20, 2, kex("RSA-2048"), kex("ML-KEM-768")),
        _system("broken", 0, 1, kex("RSA-1024")),
        _system("empty", 1, 1),
    )
    order = [(i.system.id, i.verdict) for i in result.items]
    assert order == [
        ("broken", Verdict.CLASSICALLY_BROKEN),
        ("exposed", Verdict.EXPOSED),
        ("empty", Verdict.UNASSESSED),
        ("unknown", Verdict.UNASSESSED),
        ("within", Verdict.WITHIN_MARGIN),
        ("resistant", Verdict.QUANTUM_RESISTANT),
    ]
    assert [i.rank for i in result.items] == [1, 2, 3, 4, 5, 6]
    unknown = next(i for i in result.items if i.system.id == "unknown")
    assert unknown.uses[0].suggestions == ("RSA-2048",)
    assert "not in the catalog" in unknown.reason
    assert result.summary.counts[Verdict.UNASSESSED] == 2
    assert result.summary.use_counts[Verdict.UNASSESSED] == 1


def test_cipher_suite_is_decided_by_its_weakest_part() -> None:
    # Suite parts: ECDHE P-256 key exchange (x = shelf-life 8), RSA authentication (x = 0),
    # AES-128 (Grover only). Key exchange: 8 + 2 = 10 > 9, exposed, margin -1.
    item = _run(_system("tls", 8, 2, CryptoUse(Purpose.ENCRYPTION, "TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256"))).items[0]
    assert item.verdict == Verdict.EXPOSED
    assert item.weakest is not None and item.weakest.deciding is not None
    assert item.weakest.deciding.name == "ECDSA P-256"
    assert item.margin_years == pytest.approx(-1)


def test_ties_break_by_criticality_then_exposure_then_id() -> None:
    from pqtriage.model.inventory import Criticality, Exposure

    base = dict(shelf_life_years=8.0, migration_years=2.0, uses=(kex("RSA-2048"),))
    systems = [
        System(id="b", name="b", criticality=Criticality.LOW, **base),
        System(id="a", name="a", criticality=Criticality.LOW, **base),
        System(id="c", name="c", criticality=Criticality.CRITICAL, exposure=Exposure.ISOLATED, **base),
        System(id="d", name="d", criticality=Criticality.CRITICAL, exposure=Exposure.INTERNET, **base),
    ]
    result = _run(*systems)
    assert [i.system.id for i in result.items] == ["d", "c", "a", "b"]


def test_the_certificate_validity_comes_before_the_role_default() -> None:
    from pqtriage.model.inventory import SignatureRole

    # Valid until 2031-01-01, as of 2026-01-01: 1826 days / 365.25 = 5.0 years (model/validity.py);
    # x = 5, y = 2: 7 < 9, within margin; the root-of-trust default (20 in the fake table) is not used.
    use = CryptoUse(Purpose.SIGNATURE, "ECDSA P-256", not_after=dt.date(2031, 1, 1),
                    signature_role=SignatureRole.ROOT_OF_TRUST)
    item = _run(_system("s", 0, 2, use)).items[0]
    assert item.uses[0].x_years == 5.0 and item.verdict == Verdict.WITHIN_MARGIN
    assert "remaining validity" in item.uses[0].assumptions[0]
