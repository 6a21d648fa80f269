"""Cold start of `pqtriage --help` against `python -c "import typer"`.

Goal (issue 7): at most 1.5x; each command imports what it needs when it runs,
so --help must not load rich, PyYAML, cryptography or the catalog.
Run: python bench/bench_cold_start.py [--quick]
"""

from __future__ import annotations

import argparse
import subprocess
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.common import ROOT, Figure, child_env, main_for, median_seconds, pqtriage_argv

GOAL_RATIO = 1.5
HEAVY = ("rich", "yaml", "cryptography", "pqtriage.catalog", "pqtriage.model", "pqtriage.formats")
"""Modules --help must not import (they belong to the commands that use them)."""


def heavy_imports() -> list[str]:
    """Heavy modules loaded by `pqtriage --help` (should be none)."""
    code = ("import io, sys, contextlib\n"
            "from pqtriage.cli import main\n"
            "with contextlib.redirect_stdout(io.StringIO()):\n"
            "    main(['--help'])\n"
            f"print(' '.join(sorted(m for m in sys.modules if m.split('.')[0] in {HEAVY!r} "
            f"or any(m == h or m.startswith(h + '.') for h in {HEAVY!r}))))\n")
    out = subprocess.run([sys.executable, "-c", code], check=False, cwd=ROOT, env=child_env(), capture_output=True,
                         text=True, timeout=60)
    return out.stdout.split()


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure."""
    repeat = 7 if args.quick else 21
    floor = median_seconds([sys.executable, "-c", "import typer"], repeat)
    run = median_seconds(pqtriage_argv("--help"), repeat)
    ratio = run / floor
    loaded = heavy_imports()
    figure = Figure(
        name="Cold start",
        measured="pqtriage --help (python -c 'from pqtriage.cli import main; main([\"--help\"])')",
        floor="python -c 'import typer'",
        goal=f"at most {GOAL_RATIO:g}x the floor; no heavy module imported by --help",
        met=ratio <= GOAL_RATIO and not loaded,
        rows=[{"pqtriage --help s": f"{run:.3f}", "import typer s": f"{floor:.3f}",
               "ratio": f"{ratio:.2f}x", "median of": str(repeat)}],
    )
    figure.notes.append("heavy modules imported by --help: " + (", ".join(loaded) if loaded else "none"))
    if not figure.met:
        figure.notes.append("to see where: python -X importtime -m pqtriage.cli --help")
    return [figure]


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
