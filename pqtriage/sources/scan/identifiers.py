"""The shipped table of identifiers scan and probe recognise (OIDs, TLS groups, SSH names).

Loaded once from ``pqtriage/data/discovery_identifiers.yaml`` and validated at load;
every row names its source.
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

_FILE = "discovery_identifiers.yaml"
_SECTIONS = (
    "public_key_algorithms",
    "signature_algorithms",
    "tls_hybrid_groups",
    "tls_post_quantum_groups",
    "tls_key_exchange_prefixes",
    "ssh_hybrid_kex",
    "ssh_pseudo_algorithms",
)


@dataclass(frozen=True)
class OidEntry:
    """One object identifier and the algorithm it names."""

    oid: str
    """Dotted object identifier."""
    algorithm: str
    """Algorithm in the inventory's catalog spelling."""
    parameter_set: str | None
    """Parameter set fixed by the identifier, if any."""
    hash: str | None
    """Hash function fixed by a signature identifier, if any."""
    notes: str | None
    """Extra words worth carrying into the finding."""
    source: str
    """Standard that assigns the identifier."""


@dataclass(frozen=True)
class Identifiers:
    """All identifier tables, keyed for lookup."""

    public_key_algorithms: dict[str, OidEntry]
    """Subject public key algorithm OIDs."""
    signature_algorithms: dict[str, OidEntry]
    """Certificate signature algorithm OIDs."""
    tls_hybrid_groups: frozenset[str]
    """TLS groups combining a classical and a post-quantum key exchange."""
    tls_post_quantum_groups: frozenset[str]
    """TLS groups that are post-quantum only."""
    tls_key_exchange_prefixes: dict[str, str]
    """OpenSSL TLS 1.2 suite name prefix -> key exchange (ECDH, FFDH, RSA, PSK, SRP)."""
    ssh_hybrid_kex: frozenset[str]
    """SSH key exchange methods that are hybrid post-quantum."""
    ssh_pseudo_algorithms: frozenset[str]
    """KEXINIT names that signal a feature, not an algorithm."""


def _fail(message: str) -> CatalogError:
    return CatalogError(f"{_FILE}: {message}", hint="reinstall pqtriage; this is a packaging bug")


def _oid_rows(rows: Any, section: str) -> dict[str, OidEntry]:
    table: dict[str, OidEntry] = {}
    for index, row in enumerate(rows):
        if not isinstance(row, dict) or not {"oid", "algorithm", "source"} <= row.keys():
            raise _fail(f"{section}[{index}] needs oid, algorithm and source")
        oid = str(row["oid"])
        if oid in table:
            raise _fail(f"{section}[{index}] repeats OID {oid}")
        table[oid] = OidEntry(
            oid=oid,
            algorithm=str(row["algorithm"]),
            parameter_set=None if row.get("parameter_set") is None else str(row["parameter_set"]),
            hash=None if row.get("hash") is None else str(row["hash"]),
            notes=None if row.get("notes") is None else str(row["notes"]),
            source=str(row["source"]),
        )
    return table


def _name_rows(rows: Any, section: str) -> frozenset[str]:
    names = set()
    for index, row in enumerate(rows):
        if not isinstance(row, dict) or not {"name", "source"} <= row.keys():
            raise _fail(f"{section}[{index}] needs name and source")
        names.add(str(row["name"]))
    return frozenset(names)


def _prefix_rows(rows: Any) -> dict[str, str]:
    table: dict[str, str] = {}
    for index, row in enumerate(rows):
        if not isinstance(row, dict) or set(row) != {"name", "key_exchange", "source"}:
            raise _fail(f"tls_key_exchange_prefixes[{index}] needs name, key_exchange and source")
        table[str(row["name"])] = str(row["key_exchange"])
    return table


@functools.cache
def identifiers() -> Identifiers:
    """Return the identifier tables, loading and validating them on first use."""
    text = resources.files("pqtriage").joinpath("data", _FILE).read_text(encoding="utf-8")
    data = yaml.load(text, Loader=_Loader)
    if not isinstance(data, dict) or set(data) != set(_SECTIONS):
        raise _fail(f"top level must have exactly the sections {', '.join(_SECTIONS)}")
    for section in _SECTIONS:
        if not isinstance(data[section], list):
            raise _fail(f"{section} must be a list")
    return Identifiers(
        public_key_algorithms=_oid_rows(data["public_key_algorithms"], "public_key_algorithms"),
        signature_algorithms=_oid_rows(data["signature_algorithms"], "signature_algorithms"),
        tls_hybrid_groups=_name_rows(data["tls_hybrid_groups"], "tls_hybrid_groups"),
        tls_post_quantum_groups=_name_rows(
            data["tls_post_quantum_groups"], "tls_post_quantum_groups"
        ),
        tls_key_exchange_prefixes=_prefix_rows(data["tls_key_exchange_prefixes"]),
        ssh_hybrid_kex=_name_rows(data["ssh_hybrid_kex"], "ssh_hybrid_kex"),
        ssh_pseudo_algorithms=_name_rows(data["ssh_pseudo_algorithms"], "ssh_pseudo_algorithms"),
    )
