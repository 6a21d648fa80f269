"""Apache httpd, HAProxy, OpenSSL and OpenVPN configurations that the real programs accept
(``apache2 -t``, ``haproxy -c``, ``openssl ciphers`` under ``OPENSSL_CONF``, ``openvpn
--show-tls`` which parses every option first), read by their finders.

Check values: the suites and groups written in each file; the cipher-string expansion of the
system's OpenSSL (openssl-ciphers(1)); RSA sizes of certificates made with the cryptography
library (tests/sources/material.py).
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from pqtriage.model.inventory import Purpose
from pqtriage.sources.scan.findings import FindingKind
from tests.sources import material as m
from tests.sources.scan.finders.tools import need, run, scan


def _identity(folder: Path, bits: int = 2048) -> tuple[Path, Path]:
    key = m.rsa_key(bits)
    cert = m.write(folder / "site.pem", m.cert_pem(m.certificate(key, "portal.example.test")))
    private = m.write(folder / "site.key", m.private_pem(key))
    return cert, private


def _uses(result: object, config: Path) -> list:  # type: ignore[type-arg]
    return [
        f for f in result.findings  # type: ignore[attr-defined]
        if f.kind is FindingKind.CONFIG_SETTING and f.source.file == str(config)
    ]


APACHE = """\
ServerRoot {folder}
Listen 127.0.0.1:18443
LoadModule mpm_event_module /usr/lib/apache2/modules/mod_mpm_event.so
LoadModule authz_core_module /usr/lib/apache2/modules/mod_authz_core.so
LoadModule ssl_module /usr/lib/apache2/modules/mod_ssl.so
ErrorLog {folder}/error.log
PidFile {folder}/httpd.pid
SSLProtocol all -SSLv3 -TLSv1
<VirtualHost 127.0.0.1:18443>
    SSLEngine on
    SSLCipherSuite ECDHE-RSA-AES256-GCM-SHA384:DES-CBC3-SHA
    SSLCipherSuite TLSv1.3 TLS_AES_256_GCM_SHA384
    SSLOpenSSLConfCmd Curves X25519:secp384r1
    SSLCertificateFile {cert}
    SSLCertificateKeyFile {key}
</VirtualHost>
"""


def test_apache(tmp_path: Path) -> None:
    apache = need("apache2", "apache2")
    cert, key = _identity(tmp_path, 3072)
    config = tmp_path / "httpd.conf"
    config.write_text(APACHE.format(folder=tmp_path, cert=cert, key=key))
    run(apache, "-t", "-f", str(config))
    uses = _uses(scan(tmp_path), config)
    assert [(f.algorithm, f.source.line, f.key_size) for f in uses if f.source.line == 11] == [
        ("ECDHE-RSA-AES256-GCM-SHA384", 11, 3072), ("DES-CBC3-SHA", 11, 3072),
    ]  # fmt: skip
    assert [f.algorithm for f in uses if f.source.line == 12] == ["TLS_AES_256_GCM_SHA384"]
    groups = [f.algorithm for f in uses if f.purpose is Purpose.KEY_ESTABLISHMENT]
    assert groups == ["X25519", "secp384r1"]
    assert all("virtual host 127.0.0.1:18443 (line 9)" in f.notes for f in uses)
    assert uses[0].curve == "X25519" and uses[0].protocol == "TLS (all -SSLv3 -TLSv1)"


HAPROXY = """\
global
    ssl-default-bind-ciphers ECDHE-RSA-AES128-GCM-SHA256:AES128-SHA
    ssl-default-bind-ciphersuites TLS_AES_128_GCM_SHA256
    ssl-default-bind-options ssl-min-ver TLSv1.2
defaults
    mode http
    timeout connect 5s
    timeout client 5s
    timeout server 5s
frontend portal
    bind 127.0.0.1:18444 ssl crt {bundle} curves X25519:P-256
    default_backend app
backend app
    server app1 127.0.0.1:18080 ssl verify none ciphers AES256-SHA
"""


def test_haproxy(tmp_path: Path) -> None:
    haproxy = need("haproxy", "haproxy")
    cert, key = _identity(tmp_path)
    bundle = tmp_path / "bundle.pem"
    bundle.write_bytes(cert.read_bytes() + key.read_bytes())
    config = tmp_path / "haproxy.cfg"
    config.write_text(HAPROXY.format(bundle=bundle))
    run(haproxy, "-c", "-f", str(config))
    uses = _uses(scan(tmp_path), config)
    bind = [(f.algorithm, f.source.line, f.key_size) for f in uses if f.source.line == 2]
    # The bind line takes the global ciphers; its certificate (the bundle) gives the RSA size.
    assert bind == [("ECDHE-RSA-AES128-GCM-SHA256", 2, 2048), ("AES128-SHA", 2, 2048)]
    assert [f.algorithm for f in uses if f.source.line == 3] == ["TLS_AES_128_GCM_SHA256"]
    assert [f.algorithm for f in uses if f.source.line == 11] == ["X25519", "P-256"]
    backend = [
        f.algorithm for f in uses
        if f.source.line == 14 and f.protocol != "TLS 1.3" and f.purpose is Purpose.ENCRYPTION
    ]
    assert backend == ["AES256-SHA"]
    # No TLS 1.3 setting for servers: OpenSSL's three default TLS 1.3 suites, said so.
    defaults = [f for f in uses if f.source.line == 14 and f.protocol == "TLS 1.3"]
    assert len(defaults) == 3 and "by default" in defaults[0].notes[-1]


OPENSSL_CNF = """\
openssl_conf = default_conf
[default_conf]
ssl_conf = ssl_sect
[ssl_sect]
system_default = system_default_sect
[system_default_sect]
MinProtocol = TLSv1.2
CipherString = ECDHE+AESGCM:!aNULL
Groups = X25519:secp384r1
"""


def test_openssl_configuration_as_openssl_applies_it(tmp_path: Path) -> None:
    openssl = need("openssl", "openssl")
    config = tmp_path / "openssl.cnf"
    config.write_text(OPENSSL_CNF)
    # The real program, with this file as its configuration, lists what it enables.
    listed = run(openssl, "ciphers", "-v", env={**os.environ, "OPENSSL_CONF": str(config)})
    assert listed  # accepted (a bad file makes openssl fail)
    expected = [
        line.split()[0]
        for line in run(openssl, "ciphers", "-v", "ECDHE+AESGCM:!aNULL").splitlines()
        if " TLSv1.3 " not in line
    ]
    uses = _uses(scan(config), config)
    assert [f.algorithm for f in uses if f.source.line == 8 and f.protocol != "TLS 1.3"] == expected
    assert [f.algorithm for f in uses if f.source.line == 9] == ["X25519", "secp384r1"]
    assert all(f.protocol in ("TLS (TLSv1.2+)", "TLS 1.3") for f in uses)


OPENVPN = """\
client
dev tun
proto udp
remote vpn.example.test 1194
tls-version-min 1.2
tls-cipher TLS-ECDHE-RSA-WITH-AES-256-GCM-SHA384
data-ciphers AES-256-GCM:AES-128-CBC
data-ciphers-fallback BF-CBC
auth SHA1
ca {cert}
cert {cert}
key {key}
"""


def test_openvpn(tmp_path: Path) -> None:
    openvpn = need("openvpn", "openvpn")
    cert, key = _identity(tmp_path)
    config = tmp_path / "client.ovpn"
    config.write_text(OPENVPN.format(cert=cert, key=key))
    run(openvpn, "--config", str(config), "--verb", "0", "--show-tls")
    uses = _uses(scan(tmp_path), config)
    found = [(f.algorithm, f.purpose.value, f.source.line) for f in uses]
    assert ("TLS_ECDHE_RSA_WITH_AES_256_GCM_SHA384", "encryption", 6) in found
    assert [a for a, _, line in found if line in (7, 8)] == ["AES-256-GCM", "AES-128-CBC", "BF-CBC"]
    assert ("HMAC-SHA1", "integrity", 9) in found
    suite = next(f for f in uses if f.source.line == 6 and f.protocol != "TLS 1.3")
    assert suite.key_size == 2048  # from the certificate named by 'cert'


@pytest.mark.parametrize("name", ["haproxy.cfg", "httpd.conf", "openssl.cnf"])
def test_files_of_the_kind_without_tls_are_understood_and_empty(tmp_path: Path, name: str) -> None:
    config = tmp_path / name
    config.write_text("# nothing about TLS here\n")
    result = scan(config)
    assert _uses(result, config) == []


def test_openvpn_file_found_by_content(tmp_path: Path) -> None:
    """A client file named .conf outside an openvpn folder (openvpn(8): dev and remote)."""
    config = tmp_path / "office.conf"
    config.write_text("client\ndev tun\nremote vpn.example.test 1194\ncipher BF-CBC\n")
    uses = _uses(scan(config), config)
    assert [(f.algorithm, f.source.line) for f in uses] == [("BF-CBC", 4)]
