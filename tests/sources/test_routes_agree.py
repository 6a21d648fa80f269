"""No route rates the same fact differently: scan, probe and a hand-written inventory.

One certificate fact, three routes: the certificate in a file (scan), the same certificate
served by a TLS server on loopback (probe), and the fact written by hand. Each gives the same
verdict. References: signature OIDs, RFC 8017 (PKCS #1 v2.2), Appendix C; SHA-1 disallowed
for signature generation, NIST SP 800-131A Rev. 2 (2019), section 9; MD5 collisions, RFC 6151
(2011); P-192 at 80 bits, NIST SP 800-57 Part 1 Rev. 5 (2020), Table 2.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path
from typing import Any

import pytest
from cryptography.hazmat.primitives.asymmetric import ec

from pqtriage.cli.probe import probe_command
from pqtriage.cli.scan import scan_command
from pqtriage.model.verdict import UseAssessment, Verdict
from tests.sources import material as m
from tests.sources.probe import servers
from tests.sources.routes import AS_OF, triage_text, uses_by_source

pytestmark = pytest.mark.network

START = dt.datetime(AS_OF.year, AS_OF.month, AS_OF.day, tzinfo=dt.UTC)


def _scanned(folder: Path, work: Path, name: str) -> dict[str, UseAssessment]:
    result = scan_command([str(folder)], as_of=AS_OF, group_by="file")
    assert result.exit_code == 0, result.summary
    found = uses_by_source(triage_text(result.text, work, "scanned.yaml"))
    return {key.rsplit("/", 1)[-1].replace(f"{name}#block1", "leaf"): use
            for key, use in found.items() if f"/{name}#" in key}


def _probed(chain: list[Any], key: Any, work: Path) -> dict[str, UseAssessment]:
    with servers.tls_server(work / "server", chain, key) as port:
        result = probe_command([f"127.0.0.1:{port}"], timeout=5, as_of=AS_OF)
    assert result.exit_code == 0, result.summary
    found = uses_by_source(triage_text(result.text, work, "probed.yaml"))
    return {key.split("#", 1)[1].replace("chain0", "leaf"): use for key, use in found.items()}


def _hand(uses: dict[str, str], work: Path) -> dict[str, UseAssessment]:
    lines = "".join(f"      - {{{text}, source: {name}}}\n" for name, text in uses.items())
    text = ("version: 1\norganization: Fictional Harbour Authority\nsystems:\n"
            "  - id: by-hand\n    shelf_life_years: 5\n    migration_years: 2\n"
            f"    uses:\n{lines}")
    return uses_by_source(triage_text(text, work, "hand.yaml"))


@pytest.mark.parametrize(("hash_name", "digest"), [("md5", "MD5"), ("sha1", "SHA-1"), ("sha256", "SHA-256")])
def test_a_signed_certificate_gets_one_verdict_by_every_route(
    tmp_path: Path, hash_name: str, digest: str
) -> None:
    ca_key = m.rsa_key(2048)
    ca = m.certificate(ca_key, "Fictional Harbour Root", ca=True, not_before=START, days=3653)
    leaf_key = m.rsa_key(3072)
    leaf = m.certificate(leaf_key, "localhost", ca_key, ca, dns=("localhost",),
                         hash_name=hash_name, not_before=START, days=730)
    m.write(tmp_path / "files" / "leaf.pem", m.cert_pem(leaf))
    m.write(tmp_path / "files" / "root.pem", m.cert_pem(ca))
    scanned = _scanned(tmp_path / "files", tmp_path, "leaf.pem")
    probed = _probed([leaf, ca], leaf_key, tmp_path)
    trust = 2.0  # the leaf's remaining validity at the assessment date
    hand = _hand({
        "leaf.signature": f"purpose: signature, algorithm: RSA, key_size: 2048, trust_years: {trust}",
        "leaf.signature-hash": f"purpose: signature, algorithm: {digest}, trust_years: {trust}",
    }, tmp_path)  # fmt: skip
    for fact in ("leaf.signature", "leaf.signature-hash"):
        verdicts = {route[fact].verdict for route in (scanned, probed, hand)}
        assert len(verdicts) == 1, (fact, scanned[fact].reason, probed[fact].reason, hand[fact].reason)
        assert scanned[fact].x_years == probed[fact].x_years == trust
    broken = scanned["leaf.signature-hash"].verdict == Verdict.CLASSICALLY_BROKEN
    assert broken is (digest != "SHA-256")


def test_an_issuer_named_like_another_gets_one_verdict_by_every_route(tmp_path: Path) -> None:
    name = "Fictional Port Issuing CA"
    strong_key, weak_key = m.ec_key(ec.SECP256R1()), m.ec_key(ec.SECP192R1())
    strong = m.certificate(strong_key, name, ca=True)
    weak = m.certificate(weak_key, name, ca=True)
    leaf_key = m.ec_key(ec.SECP384R1())
    leaf = m.certificate(leaf_key, "localhost", weak_key, weak, dns=("localhost",))
    m.write(tmp_path / "files" / "a-strong.pem", m.cert_pem(strong))
    m.write(tmp_path / "files" / "b-weak.pem", m.cert_pem(weak))
    m.write(tmp_path / "files" / "leaf.pem", m.cert_pem(leaf))
    scanned = _scanned(tmp_path / "files", tmp_path, "leaf.pem")
    # The server sends the same-named P-256 CA before the real issuer.
    probed = _probed([leaf, strong, weak], leaf_key, tmp_path)
    hand = _hand({"leaf.signature": "purpose: signature, algorithm: ECDSA, curve: P-192"}, tmp_path)
    for route in (scanned, probed):
        assert route["leaf.signature"].spec is not None
        assert route["leaf.signature"].spec.name == "ECDSA P-192"
    assert {r["leaf.signature"].verdict for r in (scanned, probed, hand)} == {Verdict.CLASSICALLY_BROKEN}
