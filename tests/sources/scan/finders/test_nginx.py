"""nginx configurations that ``nginx -t`` accepts, read by the nginx finder.

Check values: the suites named in the file itself and the expansion of the cipher string
by the system's OpenSSL (``openssl ciphers -v``, openssl-ciphers(1)); RSA key sizes from the
certificate generated with the cryptography library.
"""

from __future__ import annotations

import subprocess
from pathlib import Path

from pqtriage.catalog import load_catalog
from pqtriage.model.inventory import Purpose
from pqtriage.sources.scan.finders.tlsconfig import DEFAULT_GROUPS_NOTE, OPENSSL_DEFAULT_GROUPS
from pqtriage.sources.scan.findings import FindingKind
from tests.sources import material as m
from tests.sources.scan.finders.tools import need, run, scan

CONFIG = """\
error_log {folder}/error.log;
pid {folder}/nginx.pid;
events {{}}
http {{
    access_log off;
    ssl_protocols TLSv1 TLSv1.2 TLSv1.3;
    ssl_ciphers "RC4-SHA:DES-CBC3-SHA:ECDHE-RSA-AES128-GCM-SHA256";
    include {folder}/extra.conf;
    server {{
        listen 127.0.0.1:8443 ssl;
        server_name portal.example.test;
        ssl_certificate certs/portal.pem;
        ssl_certificate_key certs/portal.key;
        ssl_ecdh_curve X25519:prime256v1;
    }}
    server {{
        listen 127.0.0.1:8444 ssl;
        ssl_certificate certs/portal.pem;
        ssl_certificate_key certs/portal.key;
        ssl_ciphers HIGH:!aNULL:!MD5;
    }}
}}
"""


def write_site(folder: Path) -> Path:
    key = m.rsa_key(2048)
    m.write(folder / "certs/portal.pem", m.cert_pem(m.certificate(key, "portal.example.test")))
    m.write(folder / "certs/portal.key", m.private_pem(key))
    # An include that includes its includer: nginx itself would refuse the loop at start-up,
    # so this fragment is only read by the scan (not by nginx -t below).
    (folder / "extra.conf").write_text(f"# fragment\ninclude {folder}/nginx.conf;\n")
    config = folder / "nginx.conf"
    config.write_text(CONFIG.format(folder=folder))
    return config


def test_nginx_accepts_the_file_and_every_suite_is_a_use(tmp_path: Path) -> None:
    nginx = need("nginx", "nginx-light")
    config = write_site(tmp_path)
    (tmp_path / "extra.conf").write_text("# fragment\n")
    run(nginx, "-t", "-q", "-c", str(config), "-p", str(tmp_path))
    (tmp_path / "extra.conf").write_text(f"# fragment\ninclude {tmp_path}/nginx.conf;\n")
    result = scan(tmp_path)
    uses = [f for f in result.findings if f.kind is FindingKind.CONFIG_SETTING]
    first = [f for f in uses if f.source.line == 7]
    # The three suites named on line 7, in order, and the three TLS 1.3 defaults.
    named = [f.algorithm for f in first if f.protocol != "TLS 1.3"]
    # OpenSSL 3.0 no longer builds RC4 and 3DES: they are kept (after the ones it knows).
    assert named == ["ECDHE-RSA-AES128-GCM-SHA256", "RC4-SHA", "DES-CBC3-SHA"]
    assert all(f.key_size == 2048 for f in first if f.protocol != "TLS 1.3")
    assert all(f.source.file == str(config) for f in uses)
    groups = [f for f in uses if f.purpose is Purpose.KEY_ESTABLISHMENT and f.source.line == 14]
    assert [g.algorithm for g in groups] == ["X25519", "prime256v1"]
    # The second server names no groups: OpenSSL 3.0's defaults, said to be assumed.
    assumed = [f for f in uses if f.purpose is Purpose.KEY_ESTABLISHMENT and f.source.line == 20]
    assert [g.algorithm for g in assumed] == list(OPENSSL_DEFAULT_GROUPS)
    assert all(DEFAULT_GROUPS_NOTE in g.notes for g in assumed)
    # Second server: HIGH:!aNULL:!MD5 as the system's OpenSSL expands it, less what an
    # nginx with one RSA certificate can never negotiate: the suites whose Au= (OpenSSL's own
    # listing) is not RSA, and the PSK/SRP suites (nginx has no pre-shared keys).
    expected = [
        line.split()[0]
        for line in subprocess.run(
            ["openssl", "ciphers", "-v", "HIGH:!aNULL:!MD5:@SECLEVEL=0"],
            capture_output=True, text=True, check=True,
        ).stdout.splitlines()
        if " TLSv1.3 " not in line and " Au=RSA " in line and "PSK" not in line.split()[2]
        and "SRP" not in line.split()[2]
    ]
    assert 20 < len(expected) < 125
    second = [
        f.algorithm for f in uses
        if f.source.line == 20 and f.protocol != "TLS 1.3" and f.purpose is Purpose.ENCRYPTION
    ]
    assert second == expected
    # The include loop ends: the fragment is read once, nginx.conf once.
    assert result.summary is not None
    tally = result.summary.finders["nginx"]
    assert (tally.seen, tally.understood, tally.not_understood) == (2, 2, [])


def test_rc4_and_3des_suites_are_classically_broken_by_the_catalog(tmp_path: Path) -> None:
    """SP 800-131A Rev. 2 disallows 3TDEA encryption after 2023; RFC 7465 prohibits RC4."""
    config = write_site(tmp_path)
    result = scan(config.parent)
    catalog = load_catalog()
    rc4 = next(f for f in result.findings if f.algorithm == "RC4-SHA")
    resolved = catalog.resolve(rc4.algorithm, key_size=rc4.key_size, purpose=rc4.purpose.value)
    assert resolved.spec is not None
    parts = {c.spec.name for c in resolved.spec.components}
    assert "RC4" in parts
    triple = next(f for f in result.findings if f.algorithm == "DES-CBC3-SHA")
    resolved = catalog.resolve(triple.algorithm, key_size=triple.key_size)
    assert resolved.spec is not None and "3TDEA-CBC" in {c.spec.name for c in resolved.spec.components}


def test_unterminated_block_is_not_understood(tmp_path: Path) -> None:
    config = tmp_path / "nginx.conf"
    config.write_text("http {\n  ssl_ciphers HIGH;\n")
    result = scan(tmp_path)
    assert result.summary is not None
    assert result.summary.finders["nginx"].not_understood == [
        (str(config), "nginx syntax: a block is not closed at the end of the file")
    ]
    assert not result.complete


def test_defaults_plain_servers_and_included_patterns(tmp_path: Path) -> None:
    """A TLS server without ssl_ciphers has nginx's default (ngx_http_ssl_module documentation:
    HIGH:!aNULL:!MD5); a plain-HTTP server has no TLS uses; `include` patterns are expanded,
    one matching nothing is no problem, and a named file that is absent is a note."""
    nginx = need("nginx", "nginx-light")
    sites = tmp_path / "sites"
    sites.mkdir()
    (sites / "shop.conf").write_text(
        "server {\n    listen 127.0.0.1:8445 ssl;\n    ssl_certificate /absent/shop.pem;\n"
        "    ssl_certificate_key /absent/shop.key;\n}\n"
    )
    (sites / "plain.conf").write_text("server {\n    listen 127.0.0.1:8080;\n}\n")
    config = tmp_path / "nginx.conf"
    config.write_text(
        f"error_log {tmp_path}/error.log;\npid {tmp_path}/nginx.pid;\nevents {{}}\n"
        f"http {{\n    access_log off;\n    ssl_protocols TLSv1.2;\n    include {sites}/*.conf;\n"
        f"    include {tmp_path}/none/*.conf;\n}}\n"
    )
    result = scan(config)  # the configuration alone: the sites come in through the include
    expected = [
        line.split()[0]
        for line in run("openssl", "ciphers", "-v", "HIGH:!aNULL:!MD5:@SECLEVEL=0").splitlines()
        if " TLSv1.3 " not in line and not any(w in " ".join(line.split()[2:4]) for w in ("PSK", "SRP"))
    ]
    shop = [f for f in result.findings if f.source.file == str(sites / "shop.conf")
            and f.purpose is Purpose.ENCRYPTION and f.protocol != "TLS 1.3"]  # fmt: skip
    assert [f.algorithm for f in shop] == expected
    assert "enabled by ssl_ciphers (not set: nginx default) at line 1" in shop[0].notes[1]
    assert not [f for f in result.findings if f.source.file == str(sites / "plain.conf")]
    absent = [p for p in result.problems if p.place == "/absent/shop.pem"]
    assert [p.kind.value for p in absent] == ["skipped"] and result.complete
    del nginx  # nginx -t would need the certificate files; the syntax is the one tested above
