"""The facets of one assessment: classical status and its flag, offered versus in use, the facts.

What-if profile: every Shor-attackable algorithm falls on 1 January 2035; as of 2026-01-01 that
is 9 years away, so x + y > 9 is exposed (Mosca, IEEE Security & Privacy 16(5), 2018; IACR ePrint
2015/1075). Classical statuses per NIST SP 800-131A Rev. 2 (2019): three-key TDEA may not encrypt
after 2023 (Table 1), DH below 2048 bits (80-bit strength) may not establish keys (§5).
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

from pqtriage.catalog import load_catalog
from pqtriage.model.arrival_model import SharedArrival
from pqtriage.model.inventory import CryptoUse, Fact, Inventory, Purpose, SourceRef, System
from pqtriage.model.sensitivity import sensitivity
from pqtriage.model.triage import triage
from pqtriage.model.verdict import TriageResult, Verdict
from pqtriage.sources.loading import load_inventory
from pqtriage.sources.profile_file import parse_profile

AS_OF = dt.date(2026, 1, 1)
WHAT_IF = parse_profile(b"crqc_year: 2035\n", "what-if.yaml")
KEX, ENC = Purpose.KEY_ESTABLISHMENT, Purpose.ENCRYPTION


def _run(*systems: System) -> TriageResult:
    return triage(Inventory("Facets", systems), load_catalog(), WHAT_IF, SharedArrival(), AS_OF)


def _system(ident: str, *uses: CryptoUse, shelf: float = 1, migration: float = 1) -> System:
    return System(id=ident, name=ident, shelf_life_years=shelf, migration_years=migration, uses=uses)


def test_3des_encryption_is_classically_broken_with_its_date_and_document() -> None:
    item = _run(_system("s", CryptoUse(ENC, "3DES"))).items[0]
    assert item.verdict is Verdict.CLASSICALLY_BROKEN
    use = item.uses[0]
    assert use.classical is not None and use.classical.status == "disallowed"
    assert use.classical.since == dt.date(2024, 1, 1)
    assert "NIST SP 800-131A Rev. 2" in use.reason and "2024-01-01" in use.reason


def test_legacy_is_a_flag_never_plain_resistant() -> None:
    # Blowfish: a 128-bit key (Grover only, beyond the horizon) but a 64-bit block, not approved.
    item = _run(_system("s", CryptoUse(ENC, "Blowfish"))).items[0]
    assert item.verdict is Verdict.QUANTUM_RESISTANT
    assert [f.kind for f in item.flags] == ["legacy"]
    assert item.flags[0].date == dt.date(2016, 8, 24) and "Blowfish" in item.flags[0].text
    assert item.uses[0].replacement is not None  # a flagged use says what replaces it


def test_3des_before_2024_is_deprecated_and_flagged() -> None:
    result = triage(Inventory("Facets", (_system("s", CryptoUse(ENC, "3DES")),)), load_catalog(), WHAT_IF,
                    SharedArrival(), dt.date(2023, 6, 1))
    item = result.items[0]
    assert item.verdict is not Verdict.CLASSICALLY_BROKEN  # 112-bit TDEA: Grover-attackable, within margin
    assert [f.kind for f in item.flags] == ["deprecated"]
    assert item.flags[0].date == dt.date(2023, 12, 31)
    assert item.flags[0].text == "deprecated through 2023-12-31 (NIST SP 800-131A Rev. 2): 3TDEA"
    assert item.uses[0].classical is not None and item.uses[0].classical.next_date == dt.date(2024, 1, 1)


def test_an_offered_classically_broken_method_breaks_the_system() -> None:
    item = _run(_system("s", CryptoUse(KEX, "ML-KEM-768"),
                        CryptoUse(KEX, "diffie-hellman-group1-sha1", role="offered"))).items[0]
    assert item.verdict is Verdict.CLASSICALLY_BROKEN
    assert item.reason.startswith("offered modp1024 is classically-broken and old clients will negotiate it")
    assert item.weakest is not None and item.weakest.offered


def test_the_quantum_verdict_rests_on_what_is_in_use() -> None:
    # In use: X25519MLKEM768 (no known quantum attack). Offered: X25519, x + y = 20 > 9: exposed.
    item = _run(_system("s", CryptoUse(KEX, "X25519MLKEM768"), CryptoUse(KEX, "X25519", role="offered"),
                        shelf=18, migration=2)).items[0]
    assert item.verdict is Verdict.QUANTUM_RESISTANT
    (flag,) = item.flags
    assert flag.kind == "downgrade" and flag.algorithm == "X25519"
    assert "offered for key-establishment (exposed, P 100%) beside X25519MLKEM768 in use" in flag.text
    assert item.uses[1].verdict is Verdict.EXPOSED  # the offered use keeps its own verdict


def test_an_offered_method_no_weaker_is_no_downgrade() -> None:
    item = _run(_system("s", CryptoUse(KEX, "X25519"), CryptoUse(KEX, "ML-KEM-768", role="offered"))).items[0]
    assert item.flags == () and item.verdict is Verdict.WITHIN_MARGIN


def test_only_offered_uses_decide_when_none_is_in_use() -> None:
    item = _run(_system("s", CryptoUse(KEX, "X25519", role="offered"), shelf=18, migration=2)).items[0]
    assert item.verdict is Verdict.EXPOSED and item.reason.startswith("no use is marked in use")


def test_sensitivity_follows_the_same_system_rule() -> None:
    # Offered X25519 exposed, in use ML-KEM-768: the system is resistant under every shift, so the
    # sensitivity table does not list it (the offered use alone must not move its verdict).
    result = _run(_system("s", CryptoUse(KEX, "ML-KEM-768"), CryptoUse(KEX, "X25519", role="offered"),
                          shelf=8, migration=1))
    found = sensitivity(result, result.inventory, load_catalog(), WHAT_IF, SharedArrival(), AS_OF)
    assert found.rows == () and found.unchanged == 1


def test_facts_come_with_their_place(tmp_path: Path) -> None:
    path = tmp_path / "inv.yaml"
    path.write_text(
        "version: 1\n"
        "organization: Facts Test\n"
        "systems:\n"
        "  - id: s\n"
        "    shelf_life_years: 5\n"
        "    migration_years: 1\n"
        "    uses:\n"
        "      - purpose: key-establishment\n"
        "        algorithm: RSA\n"
        "        key_size: 2048\n", encoding="utf-8")
    inventory = load_inventory(str(path))
    use = triage(inventory, load_catalog(), WHAT_IF, SharedArrival(), AS_OF).items[0].uses[0]
    facts = {fact.name: fact for fact in use.facts}
    assert (facts["key_size"].value, facts["key_size"].origin) == ("2048", "inventory")
    assert facts["key_size"].source == SourceRef(str(path), 10, 9, None)  # the key_size line
    assert facts["algorithm"].source is not None and facts["algorithm"].source.line == 9
    assert facts["shelf_life_years"].value == "5" and facts["shelf_life_years"].source.line == 4  # type: ignore[union-attr]
    assert facts["role"].origin == "default"


def test_a_source_can_record_where_a_fact_came_from() -> None:
    handshake = SourceRef("gate.example.invalid:443", detail="TLS 1.2 handshake")
    use = CryptoUse(KEX, "RSA", key_size=1024, evidence=(
        Fact("key_size", "1024", "handshake", handshake), Fact("not_after", "2031-05-01", "file")))
    item = _run(_system("s", use)).items[0]
    facts = item.uses[0].facts
    assert Fact("key_size", "1024", "handshake", handshake) in facts
    assert any(f.name == "not_after" for f in facts)  # a source's own facts are kept
    assert item.verdict is Verdict.CLASSICALLY_BROKEN


def test_conflicting_facts_are_unassessed_and_named() -> None:
    item = _run(_system("s", CryptoUse(KEX, "ML-KEM-768", parameter_set="512"))).items[0]
    assert item.verdict is Verdict.UNASSESSED
    use = item.uses[0]
    assert use.spec is None and use.conflicts and "768" in use.reason and "512" in use.reason
