"""Regenerate docs/cli.md from the commands' own --help (run from the project root)."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

COMMANDS = ["", "triage", "report", "check", "init", "estimate", "scan", "probe", "plan", "schema", "diff"]
INTRO = Path(__file__).with_name("cli_reference_intro.md")


def main() -> None:
    lines = [INTRO.read_text(encoding="utf-8").rstrip(), ""]
    env = dict(os.environ, COLUMNS="100", NO_COLOR="1")
    for command in COMMANDS:
        args = [sys.executable, "-m", "pqtriage.cli", *([command] if command else []), "--help"]
        proc = subprocess.run(args, capture_output=True, text=True, env=env, check=False)
        if proc.returncode != 0:
            continue  # a command not installed in this build
        lines += [f"## pqtriage {command}".rstrip(), "", "```text", proc.stdout.rstrip(), "```", ""]
    Path("docs/cli.md").write_text("\n".join(lines), encoding="utf-8")


if __name__ == "__main__":
    main()
