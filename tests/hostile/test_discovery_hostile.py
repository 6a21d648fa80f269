"""Hostile discovery inputs through the real CLI (``pqtriage scan`` / ``pqtriage probe``) in a child.

Every case puts one bad file (or one hostile loopback peer) beside a good one and asserts:

- exactly one summary line names the bad place (``path``, ``path#blockN``, ``path#lineN`` or
  the probe target) with the expected words, and the good one is still in the inventory;
- the documented exit code: scan 0 when everything was read (skips are notes), 1 when
  something could not be read; probe 1 when a target failed (pqtriage/sources/scan/result.py);
- never a ``Traceback``, and no private-key material in stdout or stderr;
- the budgets of tests/hostile/test_inventory_hostile.py: 4 s of CPU time beyond the start-up of
  the same command on good input only, and 200 MB of peak memory. A probe's waiting is not CPU
  time: that it gives up on a stalling peer is shown by its "timed out" line, and the runner's
  hard timeout guards against a hang.

Formats: PEM per RFC 7468, DER per ITU-T X.690 section 8.1, PKCS#12 per RFC 7292,
authorized_keys per the sshd(8) manual (AUTHORIZED_KEYS FILE FORMAT); the peers are
described in tests/hostile/peers.py (RFC 4253 sections 4.2 and 6.1 for SSH).
"""

from __future__ import annotations

import json
import os
import re
from collections.abc import Callable, Iterator
from pathlib import Path

import pytest
from cryptography.hazmat.primitives.asymmetric import ec, ed25519

from tests.hostile.peers import HostilePeer
from tests.hostile.runner import Outcome, run_cli
from tests.hostile.test_inventory_hostile import MEMORY_BUDGET, TIME_BUDGET
from tests.sources import material as m
from tests.sources.probe.servers import python_ssl_server

KEY = m.ec_key(ec.SECP256R1())
"""The private key inside every bad file that holds one: none of it may reach any output."""
CERT = m.certificate(KEY, "web.example.test", dns=("web.example.test",))
SECRETS = m.secret_fragments(KEY)


def _flip(data: bytes, *positions: int) -> bytes:
    out = bytearray(data)
    for position in positions:
        out[position] ^= 0xFF
    return bytes(out)


def _garbage_in_base64(pem: bytes) -> bytes:
    lines = pem.split(b"\n")
    lines[2] = lines[2][:10] + b"!?*%" + lines[2][14:]  # not in the base64 alphabet (RFC 4648)
    return b"\n".join(lines)


def _der_wrong_inner_length(der: bytes) -> bytes:
    # Byte 5 is the tbsCertificate length: the outer SEQUENCE still covers the file.
    return _flip(der, 5)


def _sparse_oversized(path: Path) -> None:
    """A 17 MiB file (over the default 16 MiB limit) that starts like PEM; sparse, so cheap."""
    with open(path, "wb") as stream:
        stream.write(m.private_pem(KEY))
        stream.truncate(17 * 1024 * 1024)


def _authorized_keys() -> bytes:
    good = m.ssh_public_line(ed25519.Ed25519PrivateKey.generate(), "alice@example.test")
    garbage_blob = "ssh-ed25519 " + "QUJD" * 20 + " mallory@example.test"  # base64 of "ABC...": no blob
    return f"{good}\nssh-rsa AAAA!!!notbase64=== eve@example.test\n{garbage_blob}\n".encode()


der = CERT.public_bytes(m.serialization.Encoding.DER)
p12 = m.pkcs12_bundle(KEY, CERT, [], None)

# (case, file name, file bytes or a writer, exit code, expected (place suffix, words) lines).
ScanCase = tuple[str, str, bytes | Callable[[Path], None], int, list[tuple[str, str]]]
SCAN_CASES: list[ScanCase] = [
    ("pem-corrupt", "key.pem", _garbage_in_base64(m.private_pem(KEY)), 1,
     [("#block1", "corrupt: PRIVATE KEY body is not valid base64")]),
    ("pem-truncated", "key.pem", m.private_pem(KEY)[:120], 1,
     [("#block1", "truncated: PRIVATE KEY has no END line")]),
    ("pem-oversized", "huge.pem", _sparse_oversized, 0, [("", "skipped: larger than the limit")]),
    ("der-corrupt", "cert.der", _der_wrong_inner_length(der), 1,
     [("", "corrupt: DER structure is not a certificate")]),
    ("der-truncated", "cert.der", der[: len(der) // 2], 1, [("", "truncated: DER structure announces")]),
    ("pkcs12-corrupt", "bundle.p12", _flip(p12, len(p12) // 2, len(p12) // 2 + 1), 1,
     [("", "corrupt: PKCS#12 does not parse")]),
    ("pkcs12-truncated", "bundle.p12", p12[: len(p12) // 2], 1, [("", "truncated: PKCS#12 announces")]),
    ("authorized-keys-garbage", "authorized_keys", _authorized_keys(), 1,
     [("#line2", "corrupt: key is not valid base64"), ("#line3", "ssh-ed25519 key blob")]),
]  # fmt: skip

ProbeCase = tuple[str, str, list[str]]
PROBE_CASES: list[ProbeCase] = [
    ("tls-peer-garbage", "garbage", ["not TLS (handshake failed"]),
    ("tls-peer-stall", "stall", ["timed out during the TLS handshake"]),
    ("tls-peer-reset", "reset", ["connection closed during the handshake", "connection failed"]),
    ("ssh-endless-banner", "ssh-endless-banner", ["not SSH (no identification line)"]),
    ("ssh-oversized-packet", "ssh-oversized-packet", ["not SSH (implausible packet length"]),
]
"""(case, peer behaviour, accepted words: one of them must be in the target's line)."""

DISCOVERY_CASES = [case[0] for case in SCAN_CASES] + [case[0] for case in PROBE_CASES]
"""Every hostile discovery case (listed in docs/hardening.md)."""


def good_folder(folder: Path) -> Path:
    """A folder with one good certificate (the scan must go on to find it)."""
    m.write(folder / "good" / "web.pem", m.cert_pem(CERT))
    return folder / "good"


@pytest.fixture(scope="module")
def scan_startup(tmp_path_factory: pytest.TempPathFactory) -> float:
    """CPU seconds a scan of one good certificate takes here (start-up and imports)."""
    folder = good_folder(tmp_path_factory.mktemp("scan-startup"))
    return min(run_cli("scan", str(folder), "--format", "json").cpu_seconds for _ in range(2))


def assert_clean(outcome: Outcome) -> None:
    """No traceback and nothing private-key-like anywhere in the output."""
    text = outcome.stdout + outcome.stderr
    assert "Traceback" not in text, outcome.stderr
    assert "PRIVATE KEY-----" not in text
    for fragment in SECRETS:
        assert fragment not in text


def problem_lines(outcome: Outcome, place: str) -> list[str]:
    """Summary lines about one place (the place, then '#...' or ':')."""
    pattern = re.compile(re.escape(place) + r"(#\S+)?: ")
    return [line for line in outcome.stderr.splitlines() if pattern.match(line)]


@pytest.mark.parametrize("case", SCAN_CASES, ids=[c[0] for c in SCAN_CASES])
def test_scan_reports_each_bad_file_in_one_line_and_goes_on(
    case: ScanCase, tmp_path: Path, scan_startup: float
) -> None:
    name, file_name, content, exit_code, expected = case
    folder = good_folder(tmp_path)
    bad = folder / file_name
    if callable(content):
        content(bad)
    else:
        m.write(bad, content)
    outcome = run_cli("scan", str(folder), "--format", "json")
    assert_clean(outcome)
    assert outcome.code == exit_code, outcome.stderr
    lines = problem_lines(outcome, str(bad))
    assert len(lines) == len(expected), outcome.stderr
    for line, (suffix, words) in zip(lines, expected, strict=True):
        assert line.startswith(f"{bad}{suffix}: "), line
        assert words in line, line
    inventory = json.loads(outcome.stdout)
    sources = [use["source"] for system in inventory["systems"] for use in system["uses"]]
    assert f"{folder / 'web.pem'}#block1" in sources, "the good certificate is still found"
    if name == "authorized-keys-garbage":
        assert f"{bad}#line1" in sources, "the good key line is still found"
    assert outcome.cpu_seconds - scan_startup < TIME_BUDGET, outcome.cpu_seconds
    assert outcome.peak_rss < MEMORY_BUDGET, outcome.peak_rss


def test_scan_skips_a_symlink_loop_with_a_note(tmp_path: Path, scan_startup: float) -> None:
    folder = good_folder(tmp_path)
    (folder / "loop").symlink_to(folder)  # a folder link back to its parent
    (folder / "a.pem").symlink_to(folder / "b.pem")
    (folder / "b.pem").symlink_to(folder / "a.pem")
    outcome = run_cli("scan", str(folder), "--format", "json")
    assert_clean(outcome)
    assert outcome.code == 0, outcome.stderr  # skips are notes, not failures
    for place, words in ((folder / "loop", "skipped: symbolic link loop"),
                         (folder / "a.pem", "skipped: symbolic link loop"),
                         (folder / "b.pem", "skipped: symbolic link loop")):
        (line,) = problem_lines(outcome, str(place))
        assert words in line, line
    assert outcome.cpu_seconds - scan_startup < TIME_BUDGET


ROOT_READS_ANYTHING = "root reads files whatever their mode (CI runs this as an unprivileged user)"


@pytest.mark.unprivileged
@pytest.mark.skipif(os.geteuid() == 0, reason=ROOT_READS_ANYTHING)
def test_scan_reports_an_unreadable_file(tmp_path: Path) -> None:
    folder = good_folder(tmp_path)
    secret = m.write(folder / "secret.pem", m.private_pem(KEY))
    secret.chmod(0)
    outcome = run_cli("scan", str(folder), "--format", "json")
    assert_clean(outcome)
    assert outcome.code == 1
    (line,) = problem_lines(outcome, str(secret))
    assert "unreadable" in line


@pytest.fixture(scope="module")
def tls_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    """A well-behaved loopback TLS server (Python's ssl module): the probe must still reach it."""
    with python_ssl_server(tmp_path_factory.mktemp("tls")) as port:
        yield f"127.0.0.1:{port}"


@pytest.fixture(scope="module")
def probe_startup(tls_server: str) -> float:
    """CPU seconds a probe of the good server alone takes here."""
    return min(run_cli("probe", tls_server, "--format", "json").cpu_seconds for _ in range(2))


@pytest.mark.network
@pytest.mark.parametrize("case", PROBE_CASES, ids=[c[0] for c in PROBE_CASES])
def test_probe_reports_a_hostile_peer_in_one_line_and_goes_on(
    case: ProbeCase, tls_server: str, probe_startup: float
) -> None:
    _, behaviour, words = case
    timeout = 1.0
    with HostilePeer(behaviour, lifetime=10) as peer:
        target = peer.target if behaviour in ("garbage", "stall", "reset") else f"ssh://{peer.target}"
        outcome = run_cli("probe", target, tls_server, "--timeout", f"{timeout:g}", "--format", "json")
    assert_clean(outcome)
    assert outcome.code == 1, outcome.stderr
    (line,) = problem_lines(outcome, target)
    assert line.startswith(f"{target}: unreachable: "), line
    assert any(word in line for word in words), line
    inventory = json.loads(outcome.stdout)
    probed = [s["source"] for s in inventory["systems"] if s["uses"]]
    assert probed == [tls_server], "the good server is still probed"
    # The hostile target is not dropped: it stays as a system with no uses (unassessed in triage).
    (failed,) = [s for s in inventory["systems"] if not s["uses"]]
    assert failed["source"] == target and failed["notes"].startswith("probe failed, not assessed:")
    assert outcome.cpu_seconds - probe_startup < TIME_BUDGET, outcome.cpu_seconds
    assert outcome.peak_rss < MEMORY_BUDGET, outcome.peak_rss
