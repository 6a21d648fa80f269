"""The first-use scenario, end to end through the real CLI: a folder holding a Java
keystore made by keytool, an nginx configuration with RC4 and 3DES suites, an sshd_config
offering diffie-hellman-group1-sha1 and ssh-dss, a jar and a .tar.gz. Scan, then triage.

Check values: RFC 7465 prohibits RC4 in TLS; NIST SP 800-131A Rev. 2 disallows 3TDEA for
encryption after 2023 and 1024-bit finite-field DH (diffie-hellman-group1-sha1 is the
1024-bit Oakley Group 2, RFC 4253 section 8.1 and RFC 2409 section 6.2) and DSA-1024.
"""

from __future__ import annotations

import json
import subprocess
import sys
import tarfile
import zipfile
from pathlib import Path

from tests.sources import material as m
from tests.sources.scan.finders.tools import need, run


def test_scan_then_triage_finds_what_the_first_scan_missed(tmp_path: Path) -> None:
    keytool = need("keytool", "default-jdk-headless")
    site = tmp_path / "site"
    site.mkdir()
    run(keytool, "-genkeypair", "-alias", "portal", "-keyalg", "RSA", "-keysize", "2048",
        "-dname", "CN=portal.example.test", "-storetype", "JKS", "-keystore",
        str(site / "portal.jks"), "-storepass", "ledger-pass", "-keypass", "ledger-pass",
        "-noprompt")  # fmt: skip
    key = m.rsa_key(2048)
    m.write(site / "tls/portal.pem", m.cert_pem(m.certificate(key, "portal.example.test")))
    (site / "nginx.conf").write_text(
        "events {}\nhttp {\n  server {\n    listen 443 ssl;\n"
        "    ssl_ciphers RC4-SHA:DES-CBC3-SHA;\n    ssl_certificate tls/portal.pem;\n  }\n}\n"
    )
    (site / "sshd_config").write_text(
        "# OpenSSH 9.2\nKexAlgorithms diffie-hellman-group1-sha1\nHostKeyAlgorithms ssh-dss\n"
    )
    cert = m.cert_pem(m.certificate(m.rsa_key(2048), "api.example.test"))
    with zipfile.ZipFile(site / "api.jar", "w") as archive:
        archive.writestr("META-INF/api.pem", cert)
    source = m.write(tmp_path / "staging/edge.pem", cert)
    with tarfile.open(site / "edge.tar.gz", "w:gz") as archive:
        archive.add(source, arcname="certs/edge.pem")
    inventory = tmp_path / "inventory.yaml"
    summary = tmp_path / "summary.json"
    scan = subprocess.run(
        [sys.executable, "-m", "pqtriage.cli", "scan", str(site), "-o", str(inventory),
         "--summary-json", str(summary)],
        capture_output=True, text=True, timeout=120, check=False,
    )  # fmt: skip
    assert scan.returncode == 0, scan.stderr
    tally = {row["finder"]: row for row in json.loads(summary.read_text())["finders"]}
    assert tally["keystore"]["seen"] == 1 and tally["keystore"]["not_understood"][0]["why"].startswith(
        "JKS keystore: no password given")
    assert tally["archive"]["understood"] == 2
    assert tally["nginx"]["findings"] >= 2 and tally["openssh config"]["findings"] >= 2
    assert f"{site}/portal.jks: not understood by keystore: JKS keystore: no password given" in scan.stderr
    report = subprocess.run(
        [sys.executable, "-m", "pqtriage.cli", "triage", str(inventory), "--format", "json",
         "--as-of", "2026-12-02"],
        capture_output=True, text=True, timeout=120, check=False,
    )  # fmt: skip
    assert report.returncode in (0, 1), report.stderr
    uses = {
        use["source"]["detail"]: use
        for item in json.loads(report.stdout)["items"]
        for use in item["uses"]
    }
    def verdict(suffix: str) -> str:
        matches = [u for s, u in uses.items() if s.endswith(suffix)]
        assert matches, (suffix, sorted(uses))
        return str(matches[0]["verdict"])

    assert verdict("nginx.conf#line5:RC4-SHA") == "classically-broken"
    # 3TDEA's classical status for TLS (SP 800-131A Rev. 2) is the catalog's business;
    # here: the suite is found, sized from the certificate, and never shown safe.
    assert verdict("nginx.conf#line5:DES-CBC3-SHA") in ("classically-broken", "exposed")
    assert verdict("sshd_config#line2:KexAlgorithms:diffie-hellman-group1-sha1") == "classically-broken"
    assert verdict("sshd_config#line3:HostKeyAlgorithms:ssh-dss") == "classically-broken"
    assert any(s.startswith(f"{site}/api.jar!/META-INF/api.pem#") for s in uses)
    assert any(s.startswith(f"{site}/edge.tar.gz!/certs/edge.pem#") for s in uses)
    assert verdict("portal.jks#portal.key") == "unassessed"
