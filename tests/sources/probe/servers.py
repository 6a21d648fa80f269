"""Real peers on 127.0.0.1 for the probe tests: TLS servers and OpenSSH's sshd.

Each server runs in a daemon thread or child process, listens on a free loopback port and
stops at the end of its fixture; every accept and handshake is bounded in time.
"""

from __future__ import annotations

import os
import shutil
import socket
import ssl
import subprocess
import threading
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

from cryptography import x509
from cryptography.hazmat.primitives.asymmetric import ec
from OpenSSL import SSL

from tests.sources import material as m

SSHD = "/usr/sbin/sshd"


def _listener() -> socket.socket:
    sock = socket.socket()
    sock.bind(("127.0.0.1", 0))
    sock.listen(8)
    sock.settimeout(0.2)
    return sock


@contextmanager
def _serve(handle: Callable[[socket.socket], None]) -> Iterator[int]:
    """Accept connections on a loopback port and hand each to handle(), until closed."""
    listener = _listener()
    stop = threading.Event()

    def loop() -> None:
        while not stop.is_set():
            try:
                conn, _ = listener.accept()
            except (TimeoutError, OSError):
                continue
            conn.settimeout(3)
            try:
                handle(conn)
            except Exception:  # noqa: BLE001, S110 - a probe hanging up is expected
                pass
            finally:
                conn.close()

    thread = threading.Thread(target=loop, daemon=True)
    thread.start()
    try:
        yield listener.getsockname()[1]
    finally:
        stop.set()
        thread.join(timeout=3)
        listener.close()


def write_server_identity(folder: Path) -> tuple[Path, Path]:
    """A P-256 certificate for localhost and its key, as PEM files."""
    key = m.ec_key(ec.SECP256R1())
    cert = m.certificate(key, "localhost", dns=("localhost",))
    return m.write(folder / "server.pem", m.cert_pem(cert)), m.write(
        folder / "server.key", m.private_pem(key)
    )


@contextmanager
def python_ssl_server(folder: Path) -> Iterator[int]:
    """TLS with Python's ssl module, groups restricted to P-256 (classical only, whatever the
    system OpenSSL offers)."""
    cert, key = write_server_identity(folder)
    context = ssl.SSLContext(ssl.PROTOCOL_TLS_SERVER)
    context.load_cert_chain(cert, key)
    context.set_ecdh_curve("prime256v1")

    def handle(conn: socket.socket) -> None:
        with context.wrap_socket(conn, server_side=True) as tls:
            tls.recv(1)

    with _serve(handle) as port:
        yield port


@contextmanager
def pyopenssl_server(folder: Path) -> Iterator[int]:
    """TLS with pyOpenSSL on the cryptography library's OpenSSL, default groups (which offer
    X25519MLKEM768 from OpenSSL 3.5 on)."""
    cert, key = write_server_identity(folder)
    context = SSL.Context(SSL.TLS_SERVER_METHOD)
    context.use_certificate_file(str(cert))
    context.use_privatekey_file(str(key))

    def handle(conn: socket.socket) -> None:
        # pyOpenSSL needs a blocking socket (a timeout makes it raise WantReadError).
        conn.setblocking(True)
        tls = SSL.Connection(context, conn)
        tls.set_accept_state()
        tls.do_handshake()
        tls.shutdown()

    with _serve(handle) as port:
        yield port


@contextmanager
def tls_server(
    folder: Path,
    chain: list[x509.Certificate],
    key: Any,
    ciphers: str | None = None,
    tls12_only: bool = False,
    pyopenssl: bool = False,
) -> Iterator[int]:
    """A TLS server that sends ``chain`` (leaf first) with ``key``.

    Python's ssl module (the system OpenSSL) or pyOpenSSL (the cryptography library's); the
    security level is lowered to 0 so that legacy material (RSA-1024, SHA-1 and MD5 signed
    chains, RSA key transport) is served as old servers still do.
    """
    folder.mkdir(parents=True, exist_ok=True)
    chain_file = m.write(folder / "chain.pem", b"".join(m.cert_pem(c) for c in chain))
    key_file = m.write(folder / "key.pem", m.private_pem(key))
    suites = f"{ciphers or 'DEFAULT'}:@SECLEVEL=0"
    if pyopenssl:
        context = SSL.Context(SSL.TLS_SERVER_METHOD)
        context.set_cipher_list(suites.encode())
        if tls12_only:
            context.set_max_proto_version(SSL.TLS1_2_VERSION)
        context.use_certificate_chain_file(str(chain_file))
        context.use_privatekey_file(str(key_file))

        def handle(conn: socket.socket) -> None:
            conn.setblocking(True)
            tls = SSL.Connection(context, conn)
            tls.set_accept_state()
            tls.do_handshake()
            tls.shutdown()

    else:
        py_context = ssl.SSLContext(ssl.PROTOCOL_TLS_SERVER)
        py_context.set_ciphers(suites)
        if tls12_only:
            py_context.maximum_version = ssl.TLSVersion.TLSv1_2
        py_context.load_cert_chain(chain_file, key_file)

        def handle(conn: socket.socket) -> None:
            with py_context.wrap_socket(conn, server_side=True) as tls:
                tls.recv(1)

    with _serve(handle) as port:
        yield port


class Overlap:
    """Counts client connections open at the same moment across servers.

    Evidence that a probe works on its targets concurrently without timing it: probed one
    after another, a silent server's connection is closed by the client's timeout before the
    next target is contacted, so at most one is ever open; probed concurrently, all are.
    """

    def __init__(self) -> None:
        self._lock = threading.Lock()
        self._open = 0
        self.most = 0
        """The largest number of connections seen open at once."""

    def enter(self) -> None:
        """A connection was accepted."""
        with self._lock:
            self._open += 1
            self.most = max(self.most, self._open)

    def leave(self) -> None:
        """A connection ended."""
        with self._lock:
            self._open -= 1


@contextmanager
def banner_server(banner: bytes, linger: float = 0.05, overlap: Overlap | None = None) -> Iterator[int]:
    """A server that speaks something else: sends a line (maybe nothing), then keeps the
    connection until the client hangs up or ``linger`` seconds pass, and hangs up."""

    def handle(conn: socket.socket) -> None:
        if overlap is not None:
            overlap.enter()
        try:
            conn.sendall(banner)
            ends = time.monotonic() + linger
            while (left := ends - time.monotonic()) > 0:
                conn.settimeout(left)
                try:
                    if not conn.recv(4096):
                        return  # the client hung up
                except TimeoutError:
                    return
        finally:
            if overlap is not None:
                overlap.leave()

    with _serve(handle) as port:
        yield port


@contextmanager
def closed_port() -> Iterator[int]:
    """A loopback port with nothing listening."""
    sock = socket.socket()
    sock.bind(("127.0.0.1", 0))
    port = sock.getsockname()[1]
    sock.close()
    yield port


def sshd_missing_reason() -> str | None:
    """Why a real sshd cannot run here, or None when it can."""
    if not os.path.exists(SSHD):
        return f"{SSHD} is absent (apt-get install openssh-server)"
    if shutil.which("ssh-keygen") is None:
        return "ssh-keygen is absent (apt-get install openssh-client)"
    if os.geteuid() != 0 and not os.access("/run/sshd", os.W_OK):
        return "sshd needs /run/sshd (privilege separation directory)"
    return None


@contextmanager
def sshd_server(
    folder: Path, extra_config: str = "", host_keys: tuple[str, ...] = ("ed25519",)
) -> Iterator[int]:
    """Debian's OpenSSH server on a loopback port with fresh host keys and a temp config.

    ``host_keys`` are ssh-keygen types, with a size for RSA: ``ed25519``, ``ecdsa``,
    ``rsa:3072`` ...
    """
    lines = []
    for spec in host_keys:
        kind, _, bits = spec.partition(":")
        host_key = folder / f"ssh_host_{kind}{bits}_key"
        size = ["-b", bits] if bits else []
        subprocess.run(
            ["ssh-keygen", "-q", "-t", kind, *size, "-N", "", "-f", str(host_key)],
            check=True,
            timeout=60,
        )
        lines.append(f"HostKey {host_key}")
    with closed_port() as port:
        pass
    config = folder / "sshd_config"
    keys = "\n".join(lines)
    config.write_text(
        f"Port {port}\nListenAddress 127.0.0.1\n{keys}\nPidFile none\n"
        f"UsePAM no\nStrictModes no\n{extra_config}\n"
    )
    os.makedirs("/run/sshd", exist_ok=True)
    process = subprocess.Popen(
        [SSHD, "-D", "-e", "-f", str(config)], stderr=subprocess.PIPE, stdout=subprocess.DEVNULL
    )
    try:
        deadline = time.monotonic() + 5
        while True:
            try:
                socket.create_connection(("127.0.0.1", port), timeout=0.2).close()
                break
            except OSError:
                if process.poll() is not None or time.monotonic() > deadline:
                    error = process.stderr.read().decode() if process.stderr else ""
                    raise RuntimeError(f"sshd did not start: {error[-400:]}") from None
                time.sleep(0.05)
        yield port
    finally:
        process.terminate()
        try:
            process.wait(timeout=5)
        except subprocess.TimeoutExpired:
            process.kill()
        if process.stderr:
            process.stderr.close()
