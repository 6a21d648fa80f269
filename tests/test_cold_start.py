"""Cold start: `pqtriage --help` (and each command's --help) must not load the heavy modules.

The commands import cryptography, pyOpenSSL, numpy and the scan and probe modules inside the
function that needs them; help text alone must not pull them in. Each case runs in a fresh
interpreter and inspects sys.modules afterwards (no timing: common practice, no source).
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

HEAVY_PACKAGES = ("cryptography", "OpenSSL", "numpy")
HEAVY_PREFIXES = ("pqtriage.sources.scan", "pqtriage.sources.probe")

_PROGRAM = """
import contextlib, io, json, sys
from pqtriage.cli import main
args = json.loads(sys.argv[1])
with contextlib.redirect_stdout(io.StringIO()) as out:
    try:
        code = main(args)
    except SystemExit as exc:
        code = exc.code
print(json.dumps({"code": code, "help": out.getvalue(), "modules": sorted(sys.modules)}))
"""

COMMANDS = ["triage", "report", "check", "init", "estimate", "scan", "probe", "plan", "schema",
            "diff"]


def _modules_after(args: list[str]) -> dict:
    done = subprocess.run([sys.executable, "-c", _PROGRAM, json.dumps(args)],
                          capture_output=True, text=True, check=True)
    return json.loads(done.stdout.strip().splitlines()[-1])


def _heavy(modules: list[str]) -> list[str]:
    return [name for name in modules
            if name.split(".")[0] in HEAVY_PACKAGES or name.startswith(HEAVY_PREFIXES)]


def test_the_check_sees_a_heavy_import() -> None:
    """The detector itself: a run that does import the scan modules is caught."""
    done = subprocess.run(
        [sys.executable, "-c",
         "import json, sys, pqtriage.sources.scan.run; print(json.dumps(sorted(sys.modules)))"],
        capture_output=True, text=True, check=True)
    assert _heavy(json.loads(done.stdout))


def test_importing_the_app_loads_no_heavy_module() -> None:
    done = subprocess.run(
        [sys.executable, "-c", "import json, sys, pqtriage.cli; print(json.dumps(sorted(sys.modules)))"],
        capture_output=True, text=True, check=True)
    assert _heavy(json.loads(done.stdout)) == []


@pytest.mark.parametrize("command", [None, *COMMANDS])
def test_help_loads_no_heavy_module(command: str | None) -> None:
    args = ["--help"] if command is None else [command, "--help"]
    result = _modules_after(args)
    assert result["code"] in (0, None)
    assert "Usage" in result["help"]  # the help really was printed
    assert _heavy(result["modules"]) == []
