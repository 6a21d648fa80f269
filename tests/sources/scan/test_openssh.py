"""OpenSSH public keys, authorized_keys and known_hosts.

Formats from the sshd(8) manual (AUTHORIZED_KEYS FILE FORMAT, SSH_KNOWN_HOSTS FILE FORMAT);
keys, lines and certificates are made by the cryptography library (its OpenSSH encoder and
SSHCertificateBuilder), sizes checked against the library's own key_size.
"""

from __future__ import annotations

from cryptography.hazmat.primitives.asymmetric import ec, ed25519

from pqtriage.model.inventory import Purpose
from pqtriage.sources.scan.findings import FindingKind, ProblemKind
from pqtriage.sources.scan.openssh import parse_openssh_text, split_fields
from tests.sources import material as m


def test_public_key_file() -> None:
    key = m.rsa_key(3072)
    (found,) = parse_openssh_text(
        m.ssh_public_line(key, "ops@example.test") + "\n", "id.pub"
    ).findings
    assert (found.kind, found.algorithm, found.key_size) == (FindingKind.SSH_KEY, "RSA", 3072)
    assert found.locator() == "id.pub#line1"
    assert "comment=ops@example.test" in found.notes


def test_authorized_keys_with_quoted_options() -> None:
    key = m.ec_key(ec.SECP384R1())
    line = 'from="10.0.0.0/8",command="echo \\"hi there\\"",no-pty ' + m.ssh_public_line(key)
    assert split_fields(line)[0].startswith('from="10.0.0.0/8",command=')
    text = "# fictional host keys\n\n" + line + "\ncert-authority " + m.ssh_public_line(key) + "\n"
    first, second = parse_openssh_text(text, "authorized_keys").findings
    assert (first.algorithm, first.curve, first.key_size) == ("ECDSA", "P-384", 384)
    assert first.locator() == "authorized_keys#line3"
    assert first.purpose is Purpose.AUTHENTICATION
    assert any(note.startswith("options=from=") for note in first.notes)
    assert second.purpose is Purpose.SIGNATURE  # cert-authority option: key signs certificates


def test_known_hosts_markers_hashed_names_and_certificates() -> None:
    host_key = ed25519.Ed25519PrivateKey.generate()
    ca_key = m.rsa_key(2048)
    cert_key = m.ec_key(ec.SECP256R1())
    text = "\n".join(
        [
            "|1|c2FsdHNhbHRzYWx0c2FsdA==|aGFzaGhhc2hoYXNoaGFzaA== " + m.ssh_public_line(host_key),
            "@cert-authority *.example.test " + m.ssh_public_line(ca_key),
            "@revoked old.example.test " + m.ssh_public_line(cert_key),
            "web.example.test,192.0.2.10 " + m.ssh_certificate_line(cert_key, host_key, "web01"),
        ]
    )
    findings = parse_openssh_text(text, "known_hosts").findings
    hashed, authority, revoked, cert, cert_signature = findings
    assert hashed.host is not None and hashed.host.startswith("|1|")
    assert "hashed host name" in hashed.notes
    assert authority.purpose is Purpose.SIGNATURE and authority.key_size == 2048
    assert revoked.host == "old.example.test" and any("@revoked" in n for n in revoked.notes)
    assert cert.kind is FindingKind.SSH_CERTIFICATE and cert.curve == "P-256"
    assert cert.subject_name == "web01" and "host certificate" in cert.notes
    assert cert.host == "web.example.test"
    assert cert.not_before == "2025-01-01"
    assert (cert_signature.algorithm, cert_signature.purpose) == ("Ed25519", Purpose.SIGNATURE)
    # The CA's signature must hold while the certificate is valid: it carries the validity
    # (OpenSSH PROTOCOL.certkeys valid after / valid before), from which trust_years follows.
    assert (cert_signature.not_before, cert_signature.not_after) == ("2025-01-01", "2025-01-02")


def test_damaged_key_lines_are_problems_and_others_still_read() -> None:
    key = ed25519.Ed25519PrivateKey.generate()
    good = m.ssh_public_line(key)
    key_type, blob = good.split()
    text = f"{good}\n{key_type} {blob[:32]}\n{key_type} not*base64\nssh-rsa {blob}\n"
    outcome = parse_openssh_text(text, "authorized_keys")
    assert [f.locator() for f in outcome.findings] == ["authorized_keys#line1"]
    assert [(p.place, p.kind) for p in outcome.problems] == [
        ("authorized_keys#line2", ProblemKind.TRUNCATED),
        ("authorized_keys#line3", ProblemKind.CORRUPT),
        ("authorized_keys#line4", ProblemKind.CORRUPT),  # the line's type disagrees with its blob
    ]
