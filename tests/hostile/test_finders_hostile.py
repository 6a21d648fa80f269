"""Hostile inputs for the finders, through the real ``pqtriage scan`` in a child process.

Each case puts one bad file beside a good certificate and asserts: no traceback; one line
naming the bad file (the archive, keystore, capture or configuration) with the expected
words, or none when the case must pass silently (an include loop ends by itself); the good
certificate still in the inventory; the documented exit code; and the CPU-time and memory
budgets of tests/hostile/test_inventory_hostile.py.

Formats: zip per PKWARE APPNOTE 6.3 (via Python's zipfile), tar per POSIX.1-2001 ustar (via
tarfile), JKS per the magic 0xFEEDFEED that pyjks documents, pcap per the libpcap file format
(24-byte file header, 16-byte record headers).
"""

from __future__ import annotations

import io
import json
import re
import tarfile
import zipfile
from collections.abc import Callable
from pathlib import Path

import pytest

from tests.hostile.runner import run_cli
from tests.hostile.test_discovery_hostile import CERT, assert_clean, good_folder
from tests.hostile.test_inventory_hostile import MEMORY_BUDGET, TIME_BUDGET
from tests.sources import material as m


def _zip_bomb(path: Path) -> None:
    with zipfile.ZipFile(path, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("zeros.bin", bytes(64 * 1024 * 1024))  # about 64 KiB compressed


def _nested(path: Path, depth: int = 8) -> None:
    data = m.cert_pem(CERT)
    name = "deep.pem"
    for level in range(depth):
        buffer = io.BytesIO()
        with zipfile.ZipFile(buffer, "w") as archive:
            archive.writestr(name, data)
        data, name = buffer.getvalue(), f"level{level}.zip"
    path.write_bytes(data)


def _many_members(path: Path) -> None:
    with zipfile.ZipFile(path, "w") as archive:
        for index in range(25_000):
            archive.writestr(f"m/{index}.txt", b"")


def _tar_link_and_device(path: Path) -> None:
    with tarfile.open(path, "w") as archive:
        link = tarfile.TarInfo("etc/passwd-link")
        link.type, link.linkname = tarfile.SYMTYPE, "/etc/passwd"
        archive.addfile(link)
        device = tarfile.TarInfo("dev/zero")
        device.type = tarfile.CHRTYPE
        archive.addfile(device)


def _bad_jks(path: Path) -> None:
    path.write_bytes(bytes.fromhex("feedfeed00000002") + b"\xff" * 64)


def _truncated_pcap(path: Path) -> None:
    header = bytes.fromhex("d4c3b2a1020004000000000000000000ffff000001000000")
    path.write_bytes(header + bytes.fromhex("0000000000000000ffff0000ffff0000") + bytes(40))


def _nginx_loop(path: Path) -> None:
    (path.parent / "a.conf").write_text(f"include {path.parent}/b.conf;\nssl_protocols TLSv1;\n")
    (path.parent / "b.conf").write_text(f"include {path.parent}/a.conf;\n")
    path.write_text(f"http {{\n  include {path.parent}/a.conf;\n  include {path};\n}}\n")


def _sshd_loop(path: Path) -> None:
    path.write_text(f"Include {path}\nKexAlgorithms diffie-hellman-group1-sha1\n")


def _deep_braces(path: Path) -> None:
    path.write_text("http {\n" * 50_000 + "}\n" * 50_000)


@pytest.fixture(scope="module")
def scan_startup(tmp_path_factory: pytest.TempPathFactory) -> float:
    """CPU seconds a scan of one good certificate takes here (start-up and imports)."""
    folder = good_folder(tmp_path_factory.mktemp("scan-startup"))
    return min(run_cli("scan", str(folder), "--format", "json").cpu_seconds for _ in range(2))


# (case, file name, writer, exit code, words in the one line about the file, or None).
Case = tuple[str, str, Callable[[Path], None], int, str | None]
CASES: list[Case] = [
    ("zip-bomb", "bomb.zip", _zip_bomb, 1, "zip bomb refused"),
    ("archive-nested-too-deep", "nested.zip", _nested, 1, "nested deeper than 4 archives"),
    ("archive-too-many-members", "many.zip", _many_members, 1, "more members than the limit"),
    ("tar-links-and-devices", "links.tar", _tar_link_and_device, 0, None),
    ("keystore-malformed", "broken.jks", _bad_jks, 1, "JKS keystore does not parse"),
    ("pcap-truncated", "cut.pcap", _truncated_pcap, 1, "truncated file"),
    ("nginx-include-loop", "nginx.conf", _nginx_loop, 0, None),
    ("sshd-include-loop", "sshd_config", _sshd_loop, 0, None),
    ("nginx-deep-braces", "nginx.conf", _deep_braces, 0, None),
]  # fmt: skip
FINDER_CASES = [case[0] for case in CASES]
"""Every hostile finder case (listed in docs/hardening.md)."""


@pytest.mark.parametrize("case", CASES, ids=FINDER_CASES)
def test_finder_case(case: Case, tmp_path: Path, scan_startup: float) -> None:
    name, file_name, writer, exit_code, words = case
    folder = good_folder(tmp_path)
    bad = folder / file_name
    writer(bad)
    outcome = run_cli("scan", str(folder), "--format", "json")
    assert_clean(outcome)
    assert outcome.code == exit_code, outcome.stderr
    pattern = re.compile(re.escape(str(bad)) + r"(!/\S+|#\S+)?: ")
    lines = [line for line in outcome.stderr.splitlines() if pattern.match(line)]
    if words is None:
        assert not [line for line in lines if "not understood" in line], outcome.stderr
    else:
        assert len(lines) == 1 and words in lines[0], outcome.stderr
    inventory = json.loads(outcome.stdout)
    sources = [use["source"] for system in inventory["systems"] for use in system["uses"]]
    assert f"{folder / 'web.pem'}#block1" in sources, "the good certificate is still found"
    if words is not None:  # the file that could not be read stays, as an unknown use
        assert any(source.startswith(str(bad)) for source in sources)
    assert outcome.cpu_seconds - scan_startup < TIME_BUDGET, outcome.cpu_seconds
    assert outcome.peak_rss < MEMORY_BUDGET, outcome.peak_rss
    if name == "nginx-include-loop":  # each of the three files read once, the loop cut
        assert "nginx: 3 seen, 3 understood" in outcome.stderr, outcome.stderr
    if name == "sshd-include-loop":
        assert "openssh config: 1 seen, 1 understood" in outcome.stderr, outcome.stderr


def test_member_names_cannot_reach_the_terminal(tmp_path: Path) -> None:
    """An archive member named with an escape code, itself a damaged zip: its line shows the
    escape as text (pqtriage.formats.text.visible), never the ESC byte."""
    folder = good_folder(tmp_path)
    bad = folder / "evil.zip"
    with zipfile.ZipFile(bad, "w") as archive:
        archive.writestr("evil\x1b[31mred.zip", b"PK\x03\x04 not a zip")
    outcome = run_cli("scan", str(folder), "--format", "json")
    assert_clean(outcome)
    assert "\x1b" not in outcome.stderr
    assert f"{bad}!/evil\\x1b[31mred.zip: not understood: damaged archive" in outcome.stderr
