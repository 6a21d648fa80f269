"""The shipped SSH client preference lists the probe negotiates with (see the data file).

Loaded once from ``pqtriage/data/ssh_client_preferences.yaml`` and validated at load;
every client and every special name names its source.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from importlib import resources
from typing import Any

import yaml

from pqtriage.errors import CatalogError

try:  # The C loader is much faster; both are safe loaders.
    _Loader: Any = yaml.CSafeLoader
except AttributeError:  # pragma: no cover - depends on how PyYAML was built
    _Loader = yaml.SafeLoader

_FILE = "ssh_client_preferences.yaml"
_TOP = {"default_client", "clients", "authenticated_ciphers", "group_exchange_request"}
_LISTS = ("kex", "host_key", "ciphers", "macs")


@dataclass(frozen=True)
class ClientPreferences:
    """One SSH client's default algorithm lists, most preferred first."""

    name: str
    """Client and version, as shown in outputs (OpenSSH 10.0)."""
    kex: tuple[str, ...]
    """KexAlgorithms."""
    host_key: tuple[str, ...]
    """HostKeyAlgorithms."""
    ciphers: tuple[str, ...]
    """Ciphers (the same list both ways)."""
    macs: tuple[str, ...]
    """MACs (the same list both ways)."""
    source: str
    """Manual page or release notes the lists come from (and whether they were checked)."""


@dataclass(frozen=True)
class GroupExchangeRequest:
    """Sizes asked for in a Diffie-Hellman group exchange (RFC 4419, section 3)."""

    min: int
    """Smallest group accepted, bits."""
    preferred: int
    """Preferred group size, bits."""
    max: int
    """Largest group accepted, bits."""
    source: str
    """Where the numbers come from."""


@dataclass(frozen=True)
class SshPreferences:
    """Everything the probe's negotiation needs."""

    clients: dict[str, ClientPreferences]
    """Client lists by name."""
    default_client: str
    """The client the probe assumes."""
    authenticated_ciphers: frozenset[str]
    """Ciphers with their own tag: no MAC is negotiated with them."""
    group_exchange: GroupExchangeRequest
    """What the probe asks for when it runs a group exchange."""

    @property
    def client(self) -> ClientPreferences:
        """The default client's lists."""
        return self.clients[self.default_client]


def _fail(message: str) -> CatalogError:
    return CatalogError(f"{_FILE}: {message}", hint="reinstall pqtriage; this is a packaging bug")


def _names(value: Any, where: str) -> tuple[str, ...]:
    if not isinstance(value, list) or not value or not all(isinstance(v, str) for v in value):
        raise _fail(f"{where} must be a non-empty list of names")
    if len(set(value)) != len(value):
        raise _fail(f"{where} repeats a name")
    return tuple(value)


def _client(row: Any, index: int) -> ClientPreferences:
    if not isinstance(row, dict) or set(row) != {"name", "source", *_LISTS}:
        raise _fail(f"clients[{index}] needs exactly name, source, {', '.join(_LISTS)}")
    if not str(row["source"]).strip():
        raise _fail(f"clients[{index}] has an empty source")
    lists = {name: _names(row[name], f"clients[{index}].{name}") for name in _LISTS}
    return ClientPreferences(name=str(row["name"]), source=str(row["source"]), **lists)


def parse_preferences(data: Any) -> SshPreferences:
    """Validate the loaded YAML; raise CatalogError naming what is wrong."""
    if not isinstance(data, dict) or set(data) != _TOP:
        raise _fail(f"top level must have exactly {', '.join(sorted(_TOP))}")
    if not isinstance(data["clients"], list) or not data["clients"]:
        raise _fail("clients must be a non-empty list")
    clients = {}
    for index, row in enumerate(data["clients"]):
        client = _client(row, index)
        if client.name in clients:
            raise _fail(f"clients[{index}] repeats the client {client.name}")
        clients[client.name] = client
    if data["default_client"] not in clients:
        raise _fail(f"default_client {data['default_client']!r} is not one of the clients")
    ciphers = set()
    for index, row in enumerate(data["authenticated_ciphers"] or []):
        if not isinstance(row, dict) or set(row) != {"name", "source"}:
            raise _fail(f"authenticated_ciphers[{index}] needs exactly name and source")
        ciphers.add(str(row["name"]))
    request = data["group_exchange_request"]
    if not isinstance(request, dict) or set(request) != {"min", "preferred", "max", "source"}:
        raise _fail("group_exchange_request needs exactly min, preferred, max and source")
    sizes = [request["min"], request["preferred"], request["max"]]
    if not all(isinstance(size, int) for size in sizes) or sorted(sizes) != sizes:
        raise _fail("group_exchange_request needs whole numbers with min <= preferred <= max")
    return SshPreferences(
        clients=clients,
        default_client=str(data["default_client"]),
        authenticated_ciphers=frozenset(ciphers),
        group_exchange=GroupExchangeRequest(sizes[0], sizes[1], sizes[2], str(request["source"])),
    )


@functools.cache
def ssh_preferences() -> SshPreferences:
    """Return the shipped preferences, loading and validating them on first use."""
    text = resources.files("pqtriage").joinpath("data", _FILE).read_text(encoding="utf-8")
    return parse_preferences(yaml.load(text, Loader=_Loader))
