"""Hostile network peers on loopback for the probe tests: each misbehaves one way.

Every peer listens on 127.0.0.1 only, serves a bounded number of connections
and stops by itself after ``lifetime`` seconds. Behaviours:

- ``garbage``: answers a ClientHello with random bytes (not a TLS record);
- ``stall``: accepts and never sends anything;
- ``reset``: reads the ClientHello, then resets the connection (RST via SO_LINGER 0);
- ``ssh-endless-banner``: sends banner-like lines forever (RFC 4253 section 4.2 allows
  lines before the version string, but not without end);
- ``ssh-oversized-packet``: a valid version string, then a binary packet whose length
  field announces 4 GiB (RFC 4253 section 6.1: implementations need handle only 35,000 bytes);
- ``ssh-escape-banner``: an identification string carrying terminal control sequences
  (ECMA-48 OSC 0 "set window title", OSC 52 "set clipboard", CSI 2J "erase display"), then a
  well-formed KEXINIT (RFC 4253 section 7.1), so the probe succeeds and reports the banner.
"""

from __future__ import annotations

import os
import socket
import struct
import threading
import time
from types import TracebackType
from typing import Self

BEHAVIOURS = ("garbage", "stall", "reset", "ssh-endless-banner", "ssh-oversized-packet",
              "ssh-escape-banner")
ESCAPE_BANNER = b"SSH-2.0-Evil\x1b]0;owned\x07\x1b]52;c;cm0gLXJmIH4=\x07\x1b[2J_1.0\r\n"
"""The identification line of ``ssh-escape-banner``."""


def kexinit_packet() -> bytes:
    """One SSH binary packet (RFC 4253 section 6) holding a KEXINIT (section 7.1)."""
    lists = [b"curve25519-sha256", b"ssh-ed25519", b"aes128-ctr", b"aes128-ctr", b"hmac-sha2-256",
             b"hmac-sha2-256", b"none", b"none", b"", b""]
    payload = b"\x14" + bytes(16) + b"".join(struct.pack(">I", len(n)) + n for n in lists) + b"\x00" + bytes(4)
    padding = 8 - (len(payload) + 5) % 8
    padding += 8 if padding < 4 else 0
    return struct.pack(">IB", len(payload) + padding + 1, padding) + payload + bytes(padding)


class HostilePeer:
    """A loopback server with one hostile behaviour; use as a context manager."""

    def __init__(self, behaviour: str, lifetime: float = 20.0, max_connections: int = 20):
        if behaviour not in BEHAVIOURS:
            raise ValueError(behaviour)
        self.behaviour = behaviour
        self.stop_at = time.monotonic() + lifetime
        self.max_connections = max_connections
        self.sock = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
        self.sock.bind(("127.0.0.1", 0))
        self.sock.listen(8)
        self.sock.settimeout(0.2)
        self.thread = threading.Thread(target=self._serve, daemon=True)

    @property
    def address(self) -> tuple[str, int]:
        """(host, port) to connect to."""
        host, port = self.sock.getsockname()[:2]
        return host, port

    @property
    def target(self) -> str:
        """host:port text, as a probe target."""
        return f"{self.address[0]}:{self.address[1]}"

    def __enter__(self) -> Self:
        self.thread.start()
        return self

    def __exit__(self, kind: type[BaseException] | None, value: BaseException | None,
                 traceback: TracebackType | None) -> None:
        self.stop_at = 0.0
        self.thread.join(timeout=5)
        self.sock.close()

    def _alive(self) -> bool:
        return time.monotonic() < self.stop_at

    def _serve(self) -> None:
        served = 0
        while self._alive() and served < self.max_connections:
            try:
                conn, _ = self.sock.accept()
            except (TimeoutError, OSError):
                continue
            served += 1
            threading.Thread(target=self._handle, args=(conn,), daemon=True).start()

    def _handle(self, conn: socket.socket) -> None:
        conn.settimeout(0.2)
        try:
            if self.behaviour == "garbage":
                self._read_some(conn)
                conn.sendall(os.urandom(4096))
                self._linger(conn)
            elif self.behaviour == "stall":
                self._linger(conn)
            elif self.behaviour == "reset":
                self._read_some(conn)
                conn.setsockopt(socket.SOL_SOCKET, socket.SO_LINGER, struct.pack("ii", 1, 0))
            elif self.behaviour == "ssh-endless-banner":
                line = b"Welcome " + b"x" * 200 + b"\r\n"
                while self._alive():
                    conn.sendall(line)
            elif self.behaviour == "ssh-escape-banner":
                conn.sendall(ESCAPE_BANNER)
                self._read_some(conn)
                conn.sendall(kexinit_packet())
                self._linger(conn)
            elif self.behaviour == "ssh-oversized-packet":
                conn.sendall(b"SSH-2.0-HostilePeer_1.0\r\n")
                self._read_some(conn)
                conn.sendall(struct.pack(">I", 0xFFFFFFF0) + b"\x0a\x14" + os.urandom(64))
                self._linger(conn)
        except OSError:
            pass
        finally:
            conn.close()

    def _read_some(self, conn: socket.socket) -> bytes:
        deadline = time.monotonic() + 2
        while self._alive() and time.monotonic() < deadline:
            try:
                data = conn.recv(65536)
            except TimeoutError:
                continue
            return data
        return b""

    def _linger(self, conn: socket.socket) -> None:
        """Keep the connection open, reading and discarding, until the peer stops."""
        while self._alive():
            try:
                if not conn.recv(65536):
                    return
            except TimeoutError:
                continue
