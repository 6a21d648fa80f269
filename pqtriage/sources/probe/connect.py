"""Open a TCP connection with a bounded timeout and name the failure in plain words."""

from __future__ import annotations

import socket

from pqtriage.sources.probe.outcome import ProbeFailure


def connect(host: str, port: int, timeout: float) -> socket.socket:
    """Connect to host:port within ``timeout`` seconds; raise ProbeFailure with one line."""
    try:
        return socket.create_connection((host, port), timeout=timeout)
    except ConnectionRefusedError:
        raise ProbeFailure("refused (nothing listens on that port)") from None
    except TimeoutError:
        raise ProbeFailure(f"timed out connecting (after {timeout:g} s)") from None
    except socket.gaierror:
        raise ProbeFailure("host name does not resolve") from None
    except OSError as error:
        raise ProbeFailure(f"cannot connect ({error.strerror or type(error).__name__})") from None
