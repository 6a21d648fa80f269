"""Probe targets as the user names them: ``host:port`` (TLS) or ``ssh://host[:port]`` (SSH).

Only explicitly named endpoints are probed: address ranges, CIDR blocks and wildcards are
refused as bad usage.
"""

from __future__ import annotations

import ipaddress
import re
from dataclasses import dataclass

from pqtriage.errors import UsageError

_HOST = re.compile(r"^[A-Za-z0-9._-]{1,253}$")


@dataclass(frozen=True)
class Target:
    """One endpoint to probe."""

    protocol: str
    """``tls`` or ``ssh``."""
    host: str
    """Host name or address (IPv6 without brackets)."""
    port: int
    """TCP port."""
    text: str
    """The target as shown in outputs: ``host:port`` or ``ssh://host:port``."""


def _split_host_port(text: str, default_port: int | None, original: str) -> tuple[str, int]:
    if text.startswith("["):
        host, _, rest = text[1:].partition("]")
        port_text = rest[1:] if rest.startswith(":") else ""
        if rest and not rest.startswith(":"):
            raise UsageError(f"probe target {original!r}: text after ']' must be ':port'")
    elif text.count(":") == 1:
        host, port_text = text.split(":")
    elif text.count(":") > 1:
        raise UsageError(
            f"probe target {original!r}: an IPv6 address needs brackets", hint="write [::1]:443"
        )
    else:
        host, port_text = text, ""
    if not port_text:
        if default_port is None:
            raise UsageError(f"probe target {original!r} has no port", hint="write host:443")
        port = default_port
    elif port_text.isascii() and port_text.isdigit() and 0 < int(port_text) < 65536:
        port = int(port_text)
    else:
        raise UsageError(f"probe target {original!r}: port must be a number from 1 to 65535")
    _check_host(host, original)
    return host, port


def _check_host(host: str, original: str) -> None:
    try:
        ipaddress.ip_address(host)
        return
    except ValueError:
        pass
    if "/" in host or "*" in host or not _HOST.match(host):
        raise UsageError(
            f"probe target {original!r} is not one host name or address",
            hint="name each endpoint explicitly; ranges are not probed",
        )


def parse_target(text: str) -> Target:
    """Parse one target; raises UsageError naming the target and the fix."""
    original = text.strip()
    if not original:
        raise UsageError("empty probe target")
    if original.startswith("ssh://"):
        host, port = _split_host_port(original[len("ssh://") :].rstrip("/"), 22, original)
        shown = f"[{host}]" if ":" in host else host
        return Target("ssh", host, port, f"ssh://{shown}:{port}")
    if original.startswith("tls://"):
        original_body = original[len("tls://") :].rstrip("/")
    elif "://" in original:
        raise UsageError(f"probe target {original!r}: scheme must be ssh:// or tls:// (or none)")
    else:
        original_body = original
    host, port = _split_host_port(original_body, None, original)
    shown = f"[{host}]" if ":" in host else host
    return Target("tls", host, port, f"{shown}:{port}")


def read_targets_file(text: str, path: str) -> list[str]:
    """Targets from a file: one a line, ``#`` starts a comment, blank lines ignored."""
    targets = []
    for line in text.splitlines():
        line = line.split("#", 1)[0].strip()
        if line:
            targets.append(line)
    if not targets:
        raise UsageError(f"{path}: no targets in the file", hint="write one host:port a line")
    return targets
