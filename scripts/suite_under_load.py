"""Run tests with CPU-bound processes beside them, as on a shared CI machine.

    python scripts/suite_under_load.py [--busy N] [PYTEST ARGS...]

Starts N busy loops (default 2, one per core of a small CI runner), runs
``python -m pytest`` with the given arguments (default: the hostile corpus and the
probe tests, the ones that start child processes and peers), stops the loops and
exits with pytest's status. The suite asserts CPU time and memory, never wall-clock
time, so it must pass here as it does on an idle machine.
"""

from __future__ import annotations

import subprocess
import sys

BUSY_LOOP = "while True: pass"
DEFAULT_TESTS = ["tests/hostile", "tests/sources/probe"]


def main(argv: list[str]) -> int:
    busy = 2
    if argv[:1] == ["--busy"]:
        busy, argv = int(argv[1]), argv[2:]
    loops = [subprocess.Popen([sys.executable, "-c", BUSY_LOOP]) for _ in range(busy)]
    try:
        return subprocess.call([sys.executable, "-m", "pytest", *(argv or DEFAULT_TESTS)])
    finally:
        for loop in loops:
            loop.kill()
            loop.wait()


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
