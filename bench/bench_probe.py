"""Probe of 100 loopback TLS endpoints with bounded concurrency against one at a time.

Goal (issue 7): at least 10x faster than sequential probing. Each endpoint is a
TLS server on 127.0.0.1 that waits DELAY seconds before its handshake, standing
in for network latency. Skips with a note while pqtriage.sources.probe is not
there yet (discovery is merged separately).
Run: python bench/bench_probe.py [--quick]
"""

from __future__ import annotations

import argparse
import datetime as dt
import importlib.util
import socket
import ssl
import sys
import threading
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench.common import Figure, best_of, main_for, pqtriage_argv, work_dir

GOAL_SPEEDUP = 10.0
DELAY = 0.1
"""Seconds each server waits before answering (simulated round trips)."""
PROBE_ARGS = ("probe", "--concurrency", "{concurrency}", "--format", "json", "-o", "{out}")
"""CLI arguments of the measured probe, targets appended; adjust if the probe command differs."""
CONCURRENCY = 32


def _certificate(folder: Path) -> tuple[Path, Path]:
    from cryptography import x509
    from cryptography.hazmat.primitives import hashes, serialization
    from cryptography.hazmat.primitives.asymmetric import ec
    from cryptography.x509.oid import NameOID

    key = ec.generate_private_key(ec.SECP256R1())
    name = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, "localhost")])
    now = dt.datetime.now(dt.UTC)
    cert = (x509.CertificateBuilder().subject_name(name).issuer_name(name).public_key(key.public_key())
            .serial_number(1).not_valid_before(now - dt.timedelta(days=1))
            .not_valid_after(now + dt.timedelta(days=30)).sign(key, hashes.SHA256()))
    cert_path, key_path = folder / "probe-cert.pem", folder / "probe-key.pem"
    cert_path.write_bytes(cert.public_bytes(serialization.Encoding.PEM))
    key_path.write_bytes(key.private_bytes(serialization.Encoding.PEM, serialization.PrivateFormat.PKCS8,
                                           serialization.NoEncryption()))
    return cert_path, key_path


class SlowTlsServers:
    """``count`` loopback TLS servers, each delaying its handshake; stops by itself after ``lifetime``."""

    def __init__(self, count: int, folder: Path, lifetime: float = 600.0):
        cert, key = _certificate(folder)
        self.context = ssl.SSLContext(ssl.PROTOCOL_TLS_SERVER)
        self.context.load_cert_chain(cert, key)
        self.sockets = []
        for _ in range(count):
            sock = socket.socket()
            sock.bind(("127.0.0.1", 0))
            sock.listen(16)
            sock.settimeout(0.5)
            self.sockets.append(sock)
        self.stop_at = time.monotonic() + lifetime
        self.threads = [threading.Thread(target=self._serve, args=(s,), daemon=True) for s in self.sockets]
        for thread in self.threads:
            thread.start()

    @property
    def targets(self) -> list[str]:
        """host:port of every server."""
        return [f"127.0.0.1:{s.getsockname()[1]}" for s in self.sockets]

    def _serve(self, sock: socket.socket) -> None:
        while time.monotonic() < self.stop_at:
            try:
                conn, _ = sock.accept()
            except (TimeoutError, OSError):
                continue
            try:
                time.sleep(DELAY)
                conn.settimeout(5)
                with self.context.wrap_socket(conn, server_side=True) as tls:
                    tls.recv(1)
            except (OSError, ssl.SSLError):
                pass
            finally:
                conn.close()

    def close(self) -> None:
        """Stop every server."""
        self.stop_at = 0.0
        for sock in self.sockets:
            sock.close()


def measure(args: argparse.Namespace) -> list[Figure]:
    """Measure the figure (or skip it)."""
    figure = Figure(
        name="TLS probe concurrency",
        measured=f"pqtriage probe of 100 loopback endpoints with --concurrency {CONCURRENCY}",
        floor="the same probe with --concurrency 1",
        goal=f"at least {GOAL_SPEEDUP:g}x faster than one at a time",
        met=None,
    )
    if importlib.util.find_spec("pqtriage.sources.probe") is None:
        figure.notes.append("skipped: pqtriage.sources.probe is not in this checkout yet (discovery not merged)")
        return [figure]
    folder = work_dir()
    servers = SlowTlsServers(30 if args.quick else 100, folder)
    try:
        def run(concurrency: int) -> float:
            argv = [a.format(concurrency=concurrency, out=folder / f"probe-{concurrency}.json") for a in PROBE_ARGS]
            return best_of(pqtriage_argv(*argv, *servers.targets), 1).seconds

        sequential = run(1)
        parallel = run(CONCURRENCY)
    finally:
        servers.close()
    speedup = sequential / parallel
    figure.rows.append({"endpoints": str(len(servers.sockets)), "one at a time s": f"{sequential:.2f}",
                        f"concurrency {CONCURRENCY} s": f"{parallel:.2f}", "speed-up": f"{speedup:.1f}x"})
    figure.met = speedup >= GOAL_SPEEDUP
    return [figure]


if __name__ == "__main__":
    main_for(measure, __doc__ or "")
