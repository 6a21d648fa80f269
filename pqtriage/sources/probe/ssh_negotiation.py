"""What an SSH client and server agree on, from their KEXINIT lists (RFC 4253, section 7.1).

Pure functions over name lists. RFC 4253, section 7.1:
  - key exchange: the first algorithm on the client's list that the server also supports,
    and for which a compatible host key algorithm exists (every method here needs a
    signature-capable host key, and every host key algorithm here signs);
  - host key: the first algorithm on the client's list that the server also supports;
  - cipher and MAC, each direction on its own: the first algorithm on the client's list that
    is also on the server's list. A cipher that authenticates on its own (ChaCha20-Poly1305,
    AES-GCM in OpenSSH) leaves the MAC unnegotiated.
The connection fails when any category has nothing in common; then nothing is in use.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass


@dataclass(frozen=True)
class ServerOffer:
    """The name-lists of a server's KEXINIT (RFC 4253, section 7.1), pseudo-names removed."""

    kex: tuple[str, ...]
    """kex_algorithms."""
    host_key: tuple[str, ...]
    """server_host_key_algorithms."""
    ciphers_client_to_server: tuple[str, ...]
    """encryption_algorithms_client_to_server."""
    ciphers_server_to_client: tuple[str, ...]
    """encryption_algorithms_server_to_client."""
    macs_client_to_server: tuple[str, ...]
    """mac_algorithms_client_to_server."""
    macs_server_to_client: tuple[str, ...]
    """mac_algorithms_server_to_client."""

    @classmethod
    def from_lists(cls, lists: Sequence[Sequence[str]], pseudo: Iterable[str] = ()) -> ServerOffer:
        """From the ten KEXINIT name-lists in wire order; names in ``pseudo`` are dropped."""
        ignored = set(pseudo)

        def clean(index: int) -> tuple[str, ...]:
            return tuple(name for name in lists[index] if name not in ignored)

        return cls(clean(0), clean(1), clean(2), clean(3), clean(4), clean(5))


@dataclass(frozen=True)
class Negotiated:
    """What the client would use; None where nothing is in common (or no MAC is needed)."""

    kex: str | None
    """Key exchange method."""
    host_key: str | None
    """Host key (signature) algorithm."""
    cipher_client_to_server: str | None
    """Cipher, client to server."""
    cipher_server_to_client: str | None
    """Cipher, server to client."""
    mac_client_to_server: str | None
    """MAC, client to server; None with an authenticated cipher."""
    mac_server_to_client: str | None
    """MAC, server to client; None with an authenticated cipher."""
    failure: str | None = None
    """The first category with nothing in common: the client cannot connect at all."""

    @property
    def connects(self) -> bool:
        """True when every category found an algorithm."""
        return self.failure is None

    def in_use(self) -> dict[str, set[str]]:
        """Names in use per category (kex, hostkey, cipher, mac); empty when it cannot connect."""
        if not self.connects:
            return {"kex": set(), "hostkey": set(), "cipher": set(), "mac": set()}
        return {
            "kex": _present(self.kex),
            "hostkey": _present(self.host_key),
            "cipher": _present(self.cipher_client_to_server, self.cipher_server_to_client),
            "mac": _present(self.mac_client_to_server, self.mac_server_to_client),
        }


def _present(*names: str | None) -> set[str]:
    return {name for name in names if name}


def first_common(client: Sequence[str], server: Sequence[str]) -> str | None:
    """The first algorithm on the client's list that the server also lists."""
    offered = set(server)
    return next((name for name in client if name in offered), None)


def negotiate(
    kex: Sequence[str],
    host_key: Sequence[str],
    ciphers: Sequence[str],
    macs: Sequence[str],
    server: ServerOffer,
    authenticated_ciphers: Iterable[str] = (),
) -> Negotiated:
    """Negotiate a client's lists (the same cipher and MAC lists both ways, as OpenSSH's)
    against a server's offer."""
    aead = set(authenticated_ciphers)
    chosen_host_key = first_common(host_key, server.host_key)
    common_kex = first_common(kex, server.kex)
    chosen_kex = common_kex if chosen_host_key else None
    to_server = first_common(ciphers, server.ciphers_client_to_server)
    to_client = first_common(ciphers, server.ciphers_server_to_client)
    mac_to_server = (
        None if to_server in aead else first_common(macs, server.macs_client_to_server)
    )
    mac_to_client = (
        None if to_client in aead else first_common(macs, server.macs_server_to_client)
    )
    checks = (
        ("key exchange", common_kex is not None),
        ("host key", chosen_host_key is not None),
        ("cipher", to_server is not None and to_client is not None),
        (
            "MAC",
            (to_server in aead or mac_to_server is not None)
            and (to_client in aead or mac_to_client is not None),
        ),
    )
    failure = next((f"no {name} algorithm in common" for name, ok in checks if not ok), None)
    return Negotiated(
        chosen_kex, chosen_host_key, to_server, to_client, mac_to_server, mac_to_client, failure
    )
