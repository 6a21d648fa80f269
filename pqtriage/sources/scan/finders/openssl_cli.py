"""The system's ``openssl ciphers``, as an expander the configuration finders may be given.

This is the edge: it runs a program. Results are cached per string; a missing or failing
OpenSSL yields None so the finders fall back to the shipped table.
"""

from __future__ import annotations

import functools
import shutil
import subprocess
from collections.abc import Callable


@functools.lru_cache(maxsize=512)
def _run(text: str) -> tuple[str, ...] | None:
    try:
        done = subprocess.run(
            ["openssl", "ciphers", "-v", f"{text}:@SECLEVEL=0"],
            capture_output=True,
            text=True,
            timeout=10,
            check=False,
        )
    except (OSError, subprocess.SubprocessError):
        return None
    if done.returncode != 0:
        return None
    # The cipher string governs TLS 1.2 and earlier; TLS 1.3 suites are listed apart.
    return tuple(line.split()[0] for line in done.stdout.splitlines() if " TLSv1.3 " not in line)


def system_expander() -> Callable[[str], list[str] | None] | None:
    """An expander backed by the system's OpenSSL, or None when ``openssl`` is not installed."""
    if shutil.which("openssl") is None:
        return None

    def expand(text: str) -> list[str] | None:
        if not text.strip() or any(ch in text for ch in "\n\r\0"):
            return None
        found = _run(text.strip())
        return list(found) if found is not None else None

    return expand
