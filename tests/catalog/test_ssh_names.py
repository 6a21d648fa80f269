"""Every algorithm name the installed OpenSSH supports is in the catalog, each with a source.

The reference is OpenSSH itself: ``ssh -Q kex|cipher|mac|HostKeyAlgorithms`` lists what the
build supports (a default sshd offers a subset). Mappings checked by name:
  - hmac-sha1-96 and hmac-md5-96 are HMAC-SHA1 and HMAC-MD5 with 96-bit tags: RFC 4253
    (2006), section 6.4;
  - umac-64 and umac-128 are UMAC with 64- and 128-bit tags: RFC 4418 (2006);
  - *-cert-v01@openssh.com carry the certified key's algorithm: OpenSSH PROTOCOL.certkeys;
  - ssh-rsa and its certificate sign with SHA-1, disallowed for signature generation: NIST
    SP 800-131A Rev. 2 (2019), section 9.
"""

from __future__ import annotations

import shutil
import subprocess

import pytest

from pqtriage.catalog import load_catalog

needs_ssh = pytest.mark.skipif(shutil.which("ssh") is None, reason="ssh is absent (apt-get install openssh-client)")
PURPOSES = {"kex": "key-establishment", "cipher": "encryption", "mac": "integrity",
            "HostKeyAlgorithms": "authentication"}


def _resolve(catalog: object, name: str, purpose: str) -> object:
    """The name alone, or with a 2048-bit key when the name leaves the size open (RSA host keys,
    group exchange): a size given to a name that fixes its own would be a conflicting fact."""
    found = catalog.resolve(name, purpose=purpose)  # type: ignore[attr-defined]
    if found.spec is None and not found.conflicts:
        found = catalog.resolve(name, purpose=purpose, key_size=2048)  # type: ignore[attr-defined]
    return found


@needs_ssh
@pytest.mark.parametrize("query", sorted(PURPOSES))
def test_every_name_openssh_supports_resolves(query: str) -> None:
    names = subprocess.run(["ssh", "-Q", query], capture_output=True, text=True, timeout=10,
                           check=True).stdout.split()
    assert names
    catalog = load_catalog()
    for name in names:
        found = _resolve(catalog, name, PURPOSES[query])
        assert found.spec is not None, (name, found.reason)
        assert found.spec.source.strip(), name


@pytest.mark.parametrize(
    ("name", "expected", "status"),
    [
        ("hmac-sha1-96", "HMAC-SHA1", "acceptable"),  # RFC 4253 §6.4
        ("hmac-md5-96-etm@openssh.com", "HMAC-MD5", "legacy"),  # RFC 4253 §6.4; RFC 6151
        ("umac-64@openssh.com", "UMAC-64", "acceptable"),  # RFC 4418
        ("umac-128-etm@openssh.com", "UMAC-128", "acceptable"),  # RFC 4418
        ("ssh-ed25519-cert-v01@openssh.com", "Ed25519", "acceptable"),  # PROTOCOL.certkeys
        ("ecdsa-sha2-nistp384-cert-v01@openssh.com", "ECDSA P-384", "acceptable"),
        ("sk-ecdsa-sha2-nistp256@openssh.com", "ECDSA P-256", "acceptable"),  # PROTOCOL.u2f
        ("ssh-rsa-cert-v01@openssh.com", "RSA-2048", "weak"),  # SHA-1: SP 800-131A r2 §9
    ],
)
def test_openssh_names_map_to_their_standards(name: str, expected: str, status: str) -> None:
    found = _resolve(load_catalog(), name, "integrity" if "mac" in name else "authentication")
    assert found.spec is not None, found.reason
    assert found.spec.name.startswith(expected) and found.spec.classical_status == status
