"""The hostile peers do what they claim, checked with Python's own clients (ssl, socket).

The probe's hostile-input cases (DISCOVERY_CASES in tests/hostile/test_discovery_hostile.py)
run ``pqtriage probe`` against these peers.
"""

from __future__ import annotations

import socket
import ssl

import pytest

from tests.hostile.peers import HostilePeer

pytestmark = pytest.mark.network


def _tls_client(address: tuple[str, int], timeout: float) -> ssl.SSLSocket:
    context = ssl.create_default_context()
    context.check_hostname = False
    context.verify_mode = ssl.CERT_NONE
    raw = socket.create_connection(address, timeout=timeout)
    return context.wrap_socket(raw, server_hostname="localhost")


def test_garbage_peer_fails_a_tls_handshake() -> None:
    with HostilePeer("garbage") as peer, pytest.raises(ssl.SSLError):
        _tls_client(peer.address, timeout=5)


def test_stalling_peer_times_a_tls_handshake_out() -> None:
    with HostilePeer("stall") as peer:
        with pytest.raises((TimeoutError, socket.timeout)):  # the client's own 0.5 s timeout
            _tls_client(peer.address, timeout=0.5)


def test_resetting_peer_resets_mid_handshake() -> None:
    with HostilePeer("reset") as peer, pytest.raises((ConnectionResetError, ssl.SSLError, ssl.SSLEOFError)):
        _tls_client(peer.address, timeout=5)


def test_endless_banner_never_sends_a_version_line() -> None:
    with HostilePeer("ssh-endless-banner") as peer, socket.create_connection(peer.address, timeout=5) as sock:
        received = b""
        while len(received) < 256 * 1024:
            received += sock.recv(65536)
        assert b"SSH-" not in received  # RFC 4253 section 4.2: the version line starts with "SSH-"


def test_oversized_packet_announces_four_gibibytes() -> None:
    with HostilePeer("ssh-oversized-packet") as peer, socket.create_connection(peer.address, timeout=5) as sock:
        banner = sock.recv(256)
        assert banner.startswith(b"SSH-2.0-")
        sock.sendall(b"SSH-2.0-TestClient\r\n")
        header = b""
        while len(header) < 4:
            header += sock.recv(4 - len(header))
        assert int.from_bytes(header, "big") > 35_000  # RFC 4253 section 6.1 minimum is 35,000


def test_escape_banner_sends_control_sequences_then_a_kexinit() -> None:
    with HostilePeer("ssh-escape-banner") as peer, socket.create_connection(peer.address, timeout=5) as sock:
        banner = b""
        while not banner.endswith(b"\r\n"):
            banner += sock.recv(1)
        assert banner.startswith(b"SSH-2.0-") and b"\x1b]52;" in banner and b"\x1b[2J" in banner
        sock.sendall(b"SSH-2.0-TestClient\r\n")
        packet = b""
        while len(packet) < 6:
            packet += sock.recv(6 - len(packet))
        length = int.from_bytes(packet[:4], "big")
        # RFC 4253 section 6: length + 4 is a multiple of 8; section 7.1: message 20 is KEXINIT.
        assert (length + 4) % 8 == 0 and packet[5] == 20
