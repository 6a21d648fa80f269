"""Atomic outputs: a run killed mid-write leaves the previous file or none, never a partial one.

write_atomic writes a temporary file in the target's folder and renames it over
the target (POSIX rename(2) replaces the name atomically: IEEE Std 1003.1-2017,
rename). A killed process may leave its hidden temporary file behind, but the
target name only ever points at a complete file.
"""

from __future__ import annotations

import json
import os
import re
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tests.hostile.runner import ROOT

PACKAGE = ROOT / "pqtriage"
CHILD_ENV = {**os.environ, "PYTHONPATH": str(ROOT)}
PREVIOUS = '{"previous": "complete file"}\n'


def _start(code: str, *args: str) -> subprocess.Popen[str]:
    return subprocess.Popen([sys.executable, "-c", code, *args], cwd=ROOT, env=CHILD_ENV,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def _leftovers(folder: Path, name: str) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name != name)


WRITER = """\
import sys
from pqtriage.cli.output import write_atomic
text = "x" * (400 * 1024 * 1024) + "\\nEND\\n"
print("ready", flush=True)
write_atomic(sys.argv[1], text)
"""


@pytest.mark.parametrize("previous", [True, False], ids=["previous-file", "no-file"])
def test_killed_during_a_large_write_leaves_old_file_or_none(tmp_path: Path, previous: bool) -> None:
    target = tmp_path / "out.json"
    if previous:
        target.write_text(PREVIOUS, encoding="utf-8")
    child = _start(WRITER, str(target))
    assert child.stdout is not None and child.stdout.readline().strip() == "ready"
    deadline = time.monotonic() + 30
    temp: list[Path] = []
    while time.monotonic() < deadline:  # wait until the temporary file is being filled
        temp = [p for p in tmp_path.glob(".out.json.*.tmp") if p.stat().st_size > 1024 * 1024]
        if temp:
            break
        time.sleep(0.001)
    assert temp, "the writer never started writing its temporary file"
    child.send_signal(signal.SIGKILL)
    child.wait(timeout=30)
    assert child.returncode == -signal.SIGKILL, "killed mid-write, not after"
    if previous:
        assert target.read_text(encoding="utf-8") == PREVIOUS
    else:
        assert not target.exists()
    # What may be left is the hidden temporary file, never something named like the target.
    for name in _leftovers(tmp_path, "out.json"):
        assert re.fullmatch(r"\.out\.json\..+\.tmp", name), name


def test_completed_write_leaves_no_temporary_file(tmp_path: Path) -> None:
    target = tmp_path / "out.json"
    target.write_text(PREVIOUS, encoding="utf-8")
    code = "import sys; from pqtriage.cli.output import write_atomic; write_atomic(sys.argv[1], 'new\\n')"
    done = subprocess.run([sys.executable, "-c", code, str(target)], check=False, cwd=ROOT, env=CHILD_ENV)
    assert done.returncode == 0
    assert target.read_text(encoding="utf-8") == "new\n"
    assert _leftovers(tmp_path, "out.json") == []


def test_permissions_are_those_of_a_plain_write(tmp_path: Path) -> None:
    sys.path.insert(0, str(ROOT))
    from pqtriage.cli.output import write_atomic

    fresh = tmp_path / "fresh.md"
    write_atomic(fresh, "new\n")
    umask = os.umask(0o022)
    os.umask(umask)
    assert fresh.stat().st_mode & 0o777 == 0o666 & ~umask
    kept = tmp_path / "kept.md"
    kept.write_text("old\n", encoding="utf-8")
    kept.chmod(0o640)
    write_atomic(kept, "new\n")
    assert kept.stat().st_mode & 0o777 == 0o640 and kept.read_text(encoding="utf-8") == "new\n"


CLI = "import sys; from pqtriage.cli import main; sys.exit(main(sys.argv[1:]))"


@pytest.mark.parametrize("delay", [0.3, 0.6, 0.9, 1.2, 1.6, 2.2])
def test_cli_killed_at_any_moment_leaves_a_complete_json(tmp_path: Path, delay: float) -> None:
    sys.path.insert(0, str(ROOT))
    from bench.synthetic import inventory_text

    inventory = tmp_path / "big.yaml"
    inventory.write_text(inventory_text(10_000), encoding="utf-8")
    target = tmp_path / "out.json"
    target.write_text(PREVIOUS, encoding="utf-8")
    child = _start(CLI, "triage", str(inventory), "--format", "json", "-o", str(target), "--as-of", "2026-12-01")
    time.sleep(delay)
    child.send_signal(signal.SIGKILL)
    child.wait(timeout=60)
    text = target.read_text(encoding="utf-8")
    if text != PREVIOUS:  # the run finished before the kill: then the file is whole
        assert len(json.loads(text)["items"]) == 2500
    for name in _leftovers(tmp_path, "out.json"):
        assert name == "big.yaml" or re.fullmatch(r"\.out\.json\..+\.tmp", name), name


# Every way of writing a file, as it would appear in source code.
WRITES = [
    re.compile(r"\bopen\([^)]*['\"][^'\"]*[wax+][^'\"]*['\"]"),
    re.compile(r"\.write_(text|bytes)\("),
    re.compile(r"\bos\.(O_WRONLY|O_RDWR|O_CREAT|O_APPEND)\b"),
    re.compile(r"\bos\.(rename|replace|link|symlink)\("),
    re.compile(r"\bshutil\.(copy\w*|move)\("),
    re.compile(r"\b(mkstemp|NamedTemporaryFile|TemporaryFile|mkdtemp)\("),
    re.compile(r"\bos\.fdopen\([^)]*['\"][wax+]"),
]
ALLOWED: dict[str, str] = {
    "pqtriage/cli/output.py": "write_atomic itself: the one place that writes",
}
"""Files allowed to write, each with its reason."""


def test_every_file_write_goes_through_write_atomic() -> None:
    offenders = []
    for path in sorted(PACKAGE.rglob("*.py")):
        relative = path.relative_to(ROOT).as_posix()
        if relative in ALLOWED:
            continue
        for number, line in enumerate(path.read_text(encoding="utf-8").splitlines(), start=1):
            code = line.split("#", 1)[0]
            if any(pattern.search(code) for pattern in WRITES):
                offenders.append(f"{relative}:{number}: {line.strip()}")
    assert offenders == [], "write through pqtriage.cli.output.write_atomic:\n" + "\n".join(offenders)


def test_the_scan_catches_a_direct_write(tmp_path: Path) -> None:
    samples = ['open(path, "w")', "Path(p).write_text(t)", "os.open(p, os.O_WRONLY)", "os.replace(a, b)",
               "tempfile.mkstemp()", 'open(p, mode="ab")']
    for sample in samples:
        assert any(p.search(sample) for p in WRITES), sample
    assert not any(p.search('open(path, "rb")') for p in WRITES)
    assert not any(p.search("os.open(path, os.O_RDONLY | os.O_NONBLOCK)") for p in WRITES)
