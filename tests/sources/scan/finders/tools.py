"""Real programs the finder tests run: each config is one the real program accepts."""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import pytest

from pqtriage.sources.scan.scanner import ScanResult, scan_paths


def need(program: str, package: str) -> str:
    """Path of a program, or skip naming the Debian package that brings it (CI installs it)."""
    found = shutil.which(program) or next(
        (str(p) for p in (Path("/usr/sbin") / program, Path("/sbin") / program) if p.exists()), None
    )
    if found is None:
        pytest.skip(f"{program} is absent (apt-get install {package})")
    return found


def run(*args: str, cwd: Path | None = None, env: dict[str, str] | None = None) -> str:
    """Run a real program; fail the test with its output when it refuses."""
    done = subprocess.run(
        list(args), capture_output=True, text=True, timeout=60, cwd=cwd, env=env, check=False
    )
    assert done.returncode == 0, f"{args[0]} refused: {done.stdout[-800:]} {done.stderr[-800:]}"
    return done.stdout + done.stderr


def scan(path: Path) -> ScanResult:
    """Scan one folder or file with the default finders."""
    return scan_paths([str(path)])


def by_detail(result: ScanResult, file: Path) -> dict[str, object]:
    """Findings of one file keyed by their source detail."""
    return {f.source.detail or "": f for f in result.findings if f.source.file == str(file)}
