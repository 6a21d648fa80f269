"""Certificates carry all their facts: the signature's hash, the verified issuer, validity.

Certificates are generated here with the cryptography library (tests/sources/material.py);
MD5 and SHA-1 signatures through its hazmat RSA API, since the certificate builder refuses
those hashes. Outside references for the checks:
  - signature OIDs md5WithRSAEncryption 1.2.840.113549.1.1.4, sha1WithRSAEncryption .1.1.5,
    sha256WithRSAEncryption .1.1.11: RFC 8017 (PKCS #1 v2.2), Appendix C;
  - SHA-1 disallowed for signature generation: NIST SP 800-131A Rev. 2 (2019), section 9;
    MD5 collisions are practical: RFC 6151 (2011), section 2;
  - P-192 gives 80 bits, below the 112 bits SP 800-131A Rev. 2 requires: NIST SP 800-57
    Part 1 Rev. 5 (2020), Table 2 (ECC f = 160-223);
  - authority and subject key identifiers: RFC 5280 (2008), sections 4.2.1.1 and 4.2.1.2;
    the cryptography library verifies the signatures (the reference for "who signed").
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path
from typing import Any

import pytest
import yaml
from cryptography.hazmat.primitives.asymmetric import ec

from pqtriage.cli.scan import scan_command
from pqtriage.model.verdict import Verdict
from tests.sources import material as m
from tests.sources.routes import AS_OF, one_use_inventory, triage_text, uses_by_source

AS_OF_TIME = dt.datetime(AS_OF.year, AS_OF.month, AS_OF.day, tzinfo=dt.UTC)


def _scan(folder: Path, **options: Any) -> tuple[str, dict[str, dict[str, Any]]]:
    result = scan_command([str(folder)], as_of=AS_OF, group_by="file", **options)
    assert result.exit_code == 0, result.summary
    uses = {
        u["source"].split("/")[-1]: u
        for system in yaml.safe_load(result.text)["systems"]
        for u in system["uses"]
    }
    return result.text, uses


@pytest.mark.parametrize(
    ("hash_name", "oid_name", "digest", "broken"),
    [
        ("md5", "md5WithRSAEncryption", "MD5", True),  # RFC 8017 App. C; RFC 6151
        ("sha1", "sha1WithRSAEncryption", "SHA-1", True),  # RFC 8017 App. C; SP 800-131A r2 §9
        ("sha256", "sha256WithRSAEncryption", "SHA-256", False),  # RFC 8017 App. C
    ],
)
def test_signature_hash_is_its_own_use_rated_like_a_hand_written_one(
    tmp_path: Path, hash_name: str, oid_name: str, digest: str, broken: bool
) -> None:
    ca_key = m.rsa_key(2048)
    ca = m.certificate(ca_key, "Fictional Harbour Root", ca=True, not_before=AS_OF_TIME, days=3650)
    leaf = m.certificate(
        m.rsa_key(3072), "berth.example.test", ca_key, ca, hash_name=hash_name,
        not_before=AS_OF_TIME, days=365,
    )  # fmt: skip
    assert leaf.signature_algorithm_oid._name == oid_name  # the generated OID itself
    m.write(tmp_path / "certs" / "leaf.pem", m.cert_pem(leaf))
    m.write(tmp_path / "certs" / "root.pem", m.cert_pem(ca))
    text, uses = _scan(tmp_path / "certs")
    hash_use = uses["leaf.pem#block1.signature-hash"]
    assert (hash_use["algorithm"], hash_use["purpose"]) == (digest, "signature")
    assert hash_use["trust_years"] == 1.0  # the leaf's remaining validity
    # The RSA part of the signature is assessed on the issuer's key, found and verified.
    signature = uses["leaf.pem#block1.signature"]
    assert (signature["algorithm"], signature["key_size"]) == ("RSA", 2048)
    assert "found by authority key identifier, signature verified" in signature["notes"]

    scanned = uses_by_source(triage_text(text, tmp_path))
    hand = uses_by_source(triage_text(one_use_inventory(
        f"{{purpose: signature, algorithm: {digest}, trust_years: 1.0, source: hand}}"
    ), tmp_path, "hand.yaml"))["hand"]  # fmt: skip
    by_scan = next(u for key, u in scanned.items() if key.endswith("leaf.pem#block1.signature-hash"))
    # One fact, one answer: the scanned hash use and the hand-written one agree.
    assert by_scan.verdict == hand.verdict
    assert (by_scan.verdict == Verdict.CLASSICALLY_BROKEN) is broken
    system_verdicts = {u.verdict for key, u in scanned.items() if "leaf.pem" in key}
    assert (Verdict.CLASSICALLY_BROKEN in system_verdicts) is broken


def _two_cas_one_name(folder: Path, key_identifiers: bool) -> None:
    """Two CAs named alike, P-256 and P-192; the leaf is signed by the P-192 one.

    The P-256 CA comes first in walk order, so the first name match is the wrong one.
    """
    name = "Fictional Port Issuing CA"
    strong_key, weak_key = m.ec_key(ec.SECP256R1()), m.ec_key(ec.SECP192R1())
    strong = m.certificate(strong_key, name, ca=True, key_identifiers=key_identifiers)
    weak = m.certificate(weak_key, name, ca=True, key_identifiers=key_identifiers)
    leaf = m.certificate(
        m.ec_key(ec.SECP384R1()), "crane.example.test", weak_key, weak,
        key_identifiers=key_identifiers,
    )  # fmt: skip
    m.write(folder / "a-issuing-p256.pem", m.cert_pem(strong))
    m.write(folder / "b-issuing-p192.pem", m.cert_pem(weak))
    m.write(folder / "c-leaf.pem", m.cert_pem(leaf))


@pytest.mark.parametrize("key_identifiers", [True, False], ids=["by-key-id", "by-name"])
def test_issuer_is_the_key_that_verifies_not_the_first_name(
    tmp_path: Path, key_identifiers: bool
) -> None:
    _two_cas_one_name(tmp_path / "pki", key_identifiers)
    text, uses = _scan(tmp_path / "pki")
    signature = uses["c-leaf.pem#block1.signature"]
    assert (signature["algorithm"], signature["curve"], signature["key_size"]) == (
        "ECDSA", "P-192", 192,
    )  # fmt: skip
    expected = (
        "found by authority key identifier, signature verified"
        if key_identifiers
        else "found by issuer name, signature verified (no matching authority key identifier: "
        "name fallback)"
    )
    assert expected in signature["notes"] and "b-issuing-p192.pem#block1" in signature["notes"]
    # P-192 gives 80 bits (SP 800-57 Part 1 Rev. 5, Table 2): the leaf's signature is broken
    # today, the same verdict as a hand-written P-192 signature.
    scanned = uses_by_source(triage_text(text, tmp_path))
    by_scan = next(u for key, u in scanned.items() if key.endswith("c-leaf.pem#block1.signature"))
    hand = uses_by_source(triage_text(one_use_inventory(
        "{purpose: signature, algorithm: ECDSA, curve: P-192, source: hand}"
    ), tmp_path, "hand.yaml"))["hand"]  # fmt: skip
    assert by_scan.verdict == hand.verdict == Verdict.CLASSICALLY_BROKEN


def test_a_name_match_whose_key_does_not_verify_gives_no_facts(tmp_path: Path) -> None:
    # Only the P-256 CA is present: it has the issuer's name but did not sign the leaf.
    _two_cas_one_name(tmp_path / "pki", key_identifiers=False)
    (tmp_path / "pki" / "b-issuing-p192.pem").unlink()
    _, uses = _scan(tmp_path / "pki")
    signature = uses["c-leaf.pem#block1.signature"]
    assert signature.get("curve") is None
    assert "a-issuing-p256.pem#block1 do not verify this signature" in signature["notes"]
    # Without its issuer, the ECDSA signature still tells the issuer's group order size
    # (r, s < n: SEC 1 v2, section 4.1.3), so the use is assessed at 192 bits.
    assert signature["key_size"] == 192
    assert "group order of 192 bits read from the signature values" in signature["notes"]


def test_a_trust_anchors_self_signature_hash_is_a_note_not_a_use(tmp_path: Path) -> None:
    # Path validation takes a trust anchor as given and never checks its self-signature
    # (RFC 5280, section 6.1.1 (d)): a SHA-1 self-signed root is rated on its key, while a
    # SHA-1 signature made by that root on another certificate is a use, broken today.
    root_key = m.rsa_key(2048)
    root = m.certificate(root_key, "Fictional Legacy Root", ca=True, hash_name="sha1")
    leaf = m.certificate(m.rsa_key(3072), "quay.example.test", root_key, root, hash_name="sha1")
    m.write(tmp_path / "pki" / "root.pem", m.cert_pem(root))
    m.write(tmp_path / "pki" / "leaf.pem", m.cert_pem(leaf))
    _, uses = _scan(tmp_path / "pki")
    assert "root.pem#block1.signature-hash" not in uses
    notes = uses["root.pem#block1.signature"]["notes"]
    assert "hash=SHA-1 (in the self-signature: not rated on its own)" in notes
    assert "self-signed, signature verified with its own key" in notes
    assert uses["leaf.pem#block1.signature-hash"]["algorithm"] == "SHA-1"


def test_trust_years_are_the_remaining_validity(tmp_path: Path) -> None:
    twenty_years = 20 * 365 + 5  # 2026-12-02 to 2046-12-02
    root_key = m.rsa_key(4096)
    root = m.certificate(root_key, "Fictional Harbour Root", ca=True, not_before=AS_OF_TIME,
                         days=twenty_years)
    signer = m.certificate(m.rsa_key(3072), "Fictional Firmware Signer", root_key, root,
                           code_signing=True, not_before=AS_OF_TIME - dt.timedelta(days=365),
                           days=365 * 4)
    m.write(tmp_path / "pki" / "root.pem", m.cert_pem(root))
    m.write(tmp_path / "pki" / "signer.pem", m.cert_pem(signer))
    text, uses = _scan(tmp_path / "pki")
    for locator in ("root.pem#block1", "root.pem#block1.signature"):
        assert uses[locator]["trust_years"] == 20.0, locator  # a 20-year CA: 20 years
        assert (uses[locator]["not_before"], uses[locator]["not_after"]) == (
            "2026-12-02", "2046-12-02",
        )  # fmt: skip
    # The code-signing leaf's own key signs (purpose signature) for its 3 remaining years.
    assert uses["signer.pem#block1"]["purpose"] == "signature"
    assert uses["signer.pem#block1"]["trust_years"] == 3.0
    assert uses["signer.pem#block1.signature"]["trust_years"] == 3.0
    assert "trust_years: remaining validity on 2026-12-02" in uses["signer.pem#block1"]["notes"]
    # Triage takes x from these trust years (Mosca's x for a signature).
    assessed = uses_by_source(triage_text(text, tmp_path))
    root_signature = next(u for k, u in assessed.items() if k.endswith("root.pem#block1.signature"))
    assert root_signature.x_years == 20.0


def test_each_root_of_a_trust_store_has_its_own_remaining_validity(tmp_path: Path) -> None:
    # A system trust store: one PEM bundle of roots ending in different years.
    ends = {1: 2027, 2: 2031, 3: 2036, 4: 2041, 5: 2048, 6: 2020}
    bundle = b""
    for block, year in ends.items():
        start = dt.datetime(2015, 1, 1, tzinfo=dt.UTC)
        days = (dt.datetime(year, 1, 1, tzinfo=dt.UTC) - start).days
        root = m.certificate(m.rsa_key(2048), f"Fictional Root {block}", ca=True,
                             not_before=start, days=days)
        bundle += m.cert_pem(root)
    m.write(tmp_path / "store" / "ca-certificates.crt", bundle)
    text, uses = _scan(tmp_path / "store")
    trust = {block: uses[f"ca-certificates.crt#block{block}.signature"]["trust_years"]
             for block in ends}
    expected = {block: max(0.0, round((dt.date(year, 1, 1) - AS_OF).days / 365.25, 2))
                for block, year in ends.items()}
    assert trust == expected
    assert trust[6] == 0.0
    expired_note = uses["ca-certificates.crt#block6.signature"]["notes"]
    assert "certificate expired on 2020-01-01" in expired_note
    # Not all "in margin": roots that must stay trusted for decades are rated differently
    # from those that expire soon.
    assessed = uses_by_source(triage_text(text, tmp_path))
    verdicts = {block: next(u for k, u in assessed.items()
                            if k.endswith(f"ca-certificates.crt#block{block}.signature")).verdict
                for block in ends}
    assert len(set(verdicts.values())) > 1
    assert verdicts[5] == Verdict.EXPOSED and verdicts[6] != Verdict.EXPOSED


def test_validity_without_an_end_is_capped(tmp_path: Path) -> None:
    # RFC 5280, section 4.1.2.5: 99991231235959Z means "no well-defined expiration date".
    forever = dt.datetime(9999, 12, 31, 23, 59, 59, tzinfo=dt.UTC)
    days = (forever - AS_OF_TIME).days
    root = m.certificate(m.rsa_key(2048), "Fictional Everlasting Root", ca=True,
                         not_before=AS_OF_TIME, days=days)
    m.write(tmp_path / "r" / "root.pem", m.cert_pem(root))
    _, uses = _scan(tmp_path / "r")
    assert uses["root.pem#block1.signature"]["trust_years"] == 100.0
    assert "capped at 100 years" in uses["root.pem#block1.signature"]["notes"]


def test_merge_keeps_the_longer_trust_period(tmp_path: Path) -> None:
    root = m.certificate(m.rsa_key(2048), "Fictional Archive Root", ca=True,
                         not_before=AS_OF_TIME, days=365 * 5 + 1)
    m.write(tmp_path / "pki" / "root.pem", m.cert_pem(root))
    first = scan_command([str(tmp_path / "pki")], as_of=AS_OF)
    document = yaml.safe_load(first.text)
    signature = next(u for u in document["systems"][0]["uses"] if u["source"].endswith(".signature"))
    assert signature["trust_years"] == 5.0
    signature["trust_years"] = 30  # the owner: archived signatures must verify for 30 years
    (tmp_path / "inv.yaml").write_text(yaml.safe_dump(document), encoding="utf-8")
    again = scan_command([str(tmp_path / "pki")], as_of=AS_OF, merge=str(tmp_path / "inv.yaml"))
    merged = yaml.safe_load(again.text)
    kept = next(u for u in merged["systems"][0]["uses"] if u["source"].endswith(".signature"))
    assert kept["trust_years"] == 30
    # A renewed certificate that lasts longer than the owner's value lengthens it.
    renewed = m.certificate(m.rsa_key(2048), "Fictional Archive Root", ca=True,
                            not_before=AS_OF_TIME, days=365 * 40 + 10)
    m.write(tmp_path / "pki" / "root.pem", m.cert_pem(renewed))
    later = scan_command([str(tmp_path / "pki")], as_of=AS_OF, merge=str(tmp_path / "inv.yaml"))
    longer = next(u for u in yaml.safe_load(later.text)["systems"][0]["uses"]
                  if u["source"].endswith(".signature"))
    assert longer["trust_years"] == 40.0
    assert any("trust_years 30 -> 40.0" in line for line in later.summary)
