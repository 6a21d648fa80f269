"""Read and validate the catalog YAML into plain rows (no interpretation yet).

Every section is checked at load: unknown keys, missing keys, wrong types and
values outside the enumerations raise :class:`~pqtriage.errors.CatalogError`
naming the file, the section, the row index and the row's name. Rows stay as
validated dictionaries; :mod:`pqtriage.catalog.build` turns them into specs.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any, NoReturn, cast

import yaml

from pqtriage.catalog.spec import CLASSICAL_STATUSES, QUANTUM_ATTACKS
from pqtriage.errors import CatalogError, Place

try:  # the C loader is much faster; both are safe loaders
    _Loader: Any = yaml.CSafeLoader
except AttributeError:  # pragma: no cover - PyYAML built without libyaml
    _Loader = yaml.SafeLoader

Row = dict[str, Any]

PURPOSES = ("key-establishment", "encryption", "signature", "authentication", "integrity")
PRIMITIVES = (
    "signature",
    "kem",
    "key-agreement",
    "public-key-encryption",
    "block-cipher",
    "stream-cipher",
    "aead",
    "hash",
    "mac",
    "xof",
    "kdf",
    "cipher-suite",
    "null-cipher",
)
SHOR_PROBLEMS = ("factoring", "finite-field-dlog", "elliptic-curve-dlog")
GROVER_TARGETS = ("key-search", "preimage", "collision")
PARAMETERS = ("ifc", "ffc", "curve", "key")

_STR = (str,)
_INT = (int,)
_OPT_INT = (int, type(None))
_LIST = (list,)
_MAP = (dict,)
_BOOL = (bool,)

# key -> (allowed types, required)
Schema = Mapping[str, tuple[tuple[type, ...], bool]]

STRENGTH_ROW: Schema = {
    "bits": (_INT, True),
    "symmetric": (_STR, True),
    "ffc_l": (_INT, True),
    "ffc_n": (_INT, True),
    "ifc": (_INT, True),
    "ecc": (_INT, True),
    "source": (_STR, True),
}
STRENGTH_POLICY: Schema = {
    "minimum_bits": (_INT, True),
    "below_minimum": (_STR, True),
    "below_minimum_note": (_STR, True),
    "at_minimum_note": (_STR, True),
    "below_table_note": (_STR, True),
    "source": (_STR, True),
}
CATEGORY_ROW: Schema = {
    "category": (_INT, True),
    "reference": (_STR, True),
    "bits": (_INT, True),
    "source": (_STR, True),
}
MODE_ROW: Schema = {
    "primitive": (_STR, True),
    "status_at_best": (_STR, False),
    "replacements": (_STR, False),
    "notes": (_STR, False),
    "prefix": (_STR, False),
    "source": (_STR, True),
}
FAMILY_ROW: Schema = {
    "family": (_STR, True),
    "parameter": (_STR, True),
    "names": (_LIST, True),
    "name_format": (_STR, False),
    "primitive": (_MAP, False),
    "quantum": (_STR, True),
    "shor_problem": (_STR, False),
    "needs": (_STR, True),
    "broken_below": (_INT, False),
    "broken_note": (_STR, False),
    "status_at_best": (_STR, False),
    "notes": (_STR, False),
    "common_sizes": (_LIST, False),
    "sizes": (_LIST, False),
    "by_purpose": (_MAP, False),
    "replacements": (_STR, False),
    "source": (_STR, True),
}
CURVE_ROW: Schema = {
    "name": (_STR, True),
    "aliases": (_LIST, False),
    "order_bits": (_INT, True),
    "field_bits": (_INT, False),
    "bits": (_INT, False),
    "signature": (_STR, False),
    "agreement": (_STR, False),
    "source": (_STR, True),
}
GROUP_ROW: Schema = {
    "name": (_STR, True),
    "aliases": (_LIST, False),
    "p_bits": (_INT, True),
    "notes": (_STR, False),
    "source": (_STR, True),
}
ENTRY_ROW: Schema = {
    "name": (_STR, True),
    "aliases": (_LIST, False),
    "family": (_STR, True),
    "primitive": (_STR, True),
    "bits": (_OPT_INT, False),
    "status": (_STR, True),
    "quantum": (_STR, True),
    "shor_problem": (_STR, False),
    "problem_bits": (_OPT_INT, False),
    "grover_target": ((str, type(None)), False),
    "nist_category": (_INT, False),
    "preimage_bits": (_INT, False),
    "preimage_category": (_INT, False),
    "replacements": (_STR, True),
    "components": (_LIST, False),
    "hybrid": (_BOOL, False),
    "notes": (_STR, False),
    "source": (_STR, True),
    "identifiers": (_MAP, False),
    "modes": (_LIST, False),
    "block_bits": (_INT, False),
    "key_sizes": (_LIST, False),
}
COMPONENT_ROW: Schema = {"purpose": (_STR, True), "ref": (_STR, True)}
NAME_ROW: Schema = {
    "name": (_STR, True),
    "aliases": (_LIST, False),
    "target": (_STR, False),
    "family": (_STR, False),
    "curve": (_STR, False),
    "size": (_INT, False),
    "purpose": (_STR, False),
    "status_at_best": (_STR, False),
    "notes": (_STR, False),
    "needs": (_STR, False),
    "hash": (_STR, False),
    "source": (_STR, True),
}
KX_TOKEN: Schema = {
    "kx": ((str, type(None)), True),
    "auth": ((str, type(None)), True),
    "status_at_best": (_STR, False),
    "notes": (_STR, False),
}
OPENSSL_CIPHER: Schema = {
    "iana": (_STR, True),
    "hash": (_STR, False),
    "hash_in_name": (_BOOL, False),
}
TOP_LEVEL = (
    "version",
    "strength_table",
    "strength_policy",
    "categories",
    "replacements",
    "modes",
    "families",
    "curves",
    "groups",
    "entries",
    "names",
    "suite_tokens",
)
SUITE_SECTIONS = (
    "source",
    "key_exchange",
    "ciphers",
    "hashes",
    "openssl_key_exchange",
    "openssl_ciphers",
)

ENUMS: Mapping[str, tuple[str, ...]] = {
    "status": CLASSICAL_STATUSES,
    "status_at_best": CLASSICAL_STATUSES,
    "below_minimum": CLASSICAL_STATUSES,
    "quantum": QUANTUM_ATTACKS,
    "shor_problem": SHOR_PROBLEMS,
    "grover_target": GROVER_TARGETS,
    "primitive": PRIMITIVES,
    "purpose": PURPOSES,
    "parameter": PARAMETERS,
}


@dataclass(frozen=True)
class RawCatalog:
    """The catalog file's sections, each row validated but not yet interpreted."""

    path: str
    """File the catalog was read from."""
    strength_table: tuple[Row, ...]
    """NIST SP 800-57 Part 1 Rev. 5 Table 2 rows, weakest first."""
    strength_policy: Row
    """How a computed strength maps to a classical status."""
    categories: tuple[Row, ...]
    """NIST security categories and their classical reference strength."""
    replacements: dict[str, dict[str, str]]
    """Replacement texts per set name and purpose."""
    modes: dict[str, Row]
    """Block cipher modes by name."""
    families: tuple[Row, ...]
    """Parameterised families (RSA, FFDH, ECDSA ...)."""
    curves: tuple[Row, ...]
    """Elliptic curves."""
    groups: tuple[Row, ...]
    """Named finite-field groups."""
    entries: tuple[Row, ...]
    """Fixed-parameter entries, group defaults merged in."""
    names: tuple[Row, ...]
    """Protocol and format spellings."""
    suite_tokens: dict[str, Any]
    """TLS cipher suite token tables."""


def read_catalog(path: Path) -> RawCatalog:
    """Read ``path`` and validate every section.

    Raises:
        CatalogError: the file is missing, not YAML, or a row breaks the schema.
    """
    where = str(path)
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as error:
        raise CatalogError(
            f"cannot read the catalog: {error.strerror}", place=Place(where)
        ) from error
    try:
        data = yaml.load(text, Loader=_Loader)  # noqa: S506 - a safe loader
    except yaml.YAMLError as error:
        mark = getattr(error, "problem_mark", None)
        place = Place(where, mark.line + 1, mark.column + 1) if mark else Place(where)
        raise CatalogError("the catalog is not valid YAML", place=place) from error
    if not isinstance(data, dict):
        raise CatalogError("the catalog must be a mapping of sections", place=Place(where))
    _keys(data, TOP_LEVEL, TOP_LEVEL, where, "top level")
    entries: list[Row] = []
    for index, group in enumerate(_list(data, "entries", where)):
        label = f"entries[{index}]"
        if not isinstance(group, dict):
            _fail(where, label, "must be a mapping with 'defaults' and 'rows'")
        _keys(group, ("defaults", "rows"), ("rows",), where, label)
        defaults = group.get("defaults") or {}
        for number, row in enumerate(_as_list(group["rows"], where, label + ".rows")):
            if not isinstance(row, dict):
                _fail(where, f"{label}.rows[{number}]", "must be a mapping")
            merged = {**defaults, **row}
            entries.append(_row(merged, ENTRY_ROW, where, f"{label}.rows[{number}]"))
            for part in merged.get("components", []):
                _row(
                    part,
                    COMPONENT_ROW,
                    where,
                    f"{label}.rows[{number}] ({merged['name']}) component",
                )
    return RawCatalog(
        path=where,
        strength_table=_rows(data, "strength_table", STRENGTH_ROW, where),
        strength_policy=_row(
            data.get("strength_policy"), STRENGTH_POLICY, where, "strength_policy"
        ),
        categories=_rows(data, "categories", CATEGORY_ROW, where),
        replacements=_replacements(data.get("replacements"), where),
        modes={
            str(name): _row(row, MODE_ROW, where, f"modes.{name}")
            for name, row in _map(data, "modes", where).items()
        },
        families=_rows(data, "families", FAMILY_ROW, where),
        curves=_rows(data, "curves", CURVE_ROW, where),
        groups=_rows(data, "groups", GROUP_ROW, where),
        entries=tuple(entries),
        names=_rows(data, "names", NAME_ROW, where),
        suite_tokens=_suite_tokens(data.get("suite_tokens"), where),
    )


def _fail(where: str, label: str, message: str) -> NoReturn:
    raise CatalogError(
        f"{label}: {message}",
        place=Place(where),
        hint="fix the row in the catalog file; see docs/catalog.md",
    )


def _keys(
    row: Mapping[str, Any],
    allowed: tuple[str, ...] | Mapping[str, Any],
    required: tuple[str, ...],
    where: str,
    label: str,
) -> None:
    for key in row:
        if key not in allowed:
            _fail(where, label, f"unknown key '{key}' (allowed: {', '.join(allowed)})")
    for key in required:
        if key not in row:
            _fail(where, label, f"missing '{key}'")


def _row(row: Any, schema: Schema, where: str, label: str) -> Row:
    if not isinstance(row, dict):
        _fail(where, label, "must be a mapping")
    name = row.get("name") or row.get("family") or row.get("category")
    if name is not None:
        label = f"{label} ({name})"
    required = tuple(key for key, (_, needed) in schema.items() if needed)
    _keys(row, schema, required, where, label)
    for key, value in row.items():
        types = schema[key][0]
        # bool is an int in Python: do not let `true` pass for a number of bits.
        if not isinstance(value, types) or (isinstance(value, bool) and bool not in types):
            _fail(where, label, f"'{key}' has the wrong type ({type(value).__name__})")
        allowed = ENUMS.get(key)
        if allowed and isinstance(value, str) and value not in allowed:
            _fail(where, label, f"'{key}' is '{value}', not one of: {', '.join(allowed)}")
        if key == "source" and not str(value).strip():
            _fail(where, label, "empty 'source': name the document by title and identifier")
        if key in ("aliases", "names") and not all(
            isinstance(item, str) for item in cast(list[Any], value)
        ):
            _fail(where, label, f"'{key}' must be a list of strings")
    return dict(row)


def _list(data: Mapping[str, Any], key: str, where: str) -> list[Any]:
    if key not in data:
        _fail(where, "top level", f"missing section '{key}'")
    return _as_list(data[key], where, key)


def _as_list(value: Any, where: str, label: str) -> list[Any]:
    if not isinstance(value, list):
        _fail(where, label, "must be a list")
    return list(value)


def _map(data: Mapping[str, Any], key: str, where: str) -> dict[str, Any]:
    value = data.get(key)
    if not isinstance(value, dict):
        _fail(where, key, "missing or not a mapping")
    return dict(value)


def _rows(data: Mapping[str, Any], key: str, schema: Schema, where: str) -> tuple[Row, ...]:
    return tuple(
        _row(row, schema, where, f"{key}[{index}]")
        for index, row in enumerate(_list(data, key, where))
    )


def _replacements(value: Any, where: str) -> dict[str, dict[str, str]]:
    if not isinstance(value, dict):
        _fail(where, "replacements", "missing or not a mapping")
    result: dict[str, dict[str, str]] = {}
    for name, texts in value.items():
        if not isinstance(texts, dict) or not texts:
            _fail(where, f"replacements.{name}", "must map purposes to texts")
        for purpose, text in texts.items():
            if purpose not in (*PURPOSES, "default"):
                _fail(where, f"replacements.{name}", f"unknown purpose '{purpose}'")
            if not isinstance(text, str) or not text.strip():
                _fail(where, f"replacements.{name}.{purpose}", "must be a non-empty text")
        result[str(name)] = {str(k): str(v) for k, v in texts.items()}
    return result


def _suite_tokens(value: Any, where: str) -> dict[str, Any]:
    if not isinstance(value, dict):
        _fail(where, "suite_tokens", "missing or not a mapping")
    _keys(value, SUITE_SECTIONS, SUITE_SECTIONS, where, "suite_tokens")
    if not isinstance(value["source"], str) or not value["source"].strip():
        _fail(where, "suite_tokens", "missing 'source'")
    for section in SUITE_SECTIONS[1:]:
        if not isinstance(value[section], dict):
            _fail(where, f"suite_tokens.{section}", "must be a mapping")
    for token, row in value["key_exchange"].items():
        _row(row, KX_TOKEN, where, f"suite_tokens.key_exchange.{token}")
    for token, row in value["openssl_ciphers"].items():
        _row(row, OPENSSL_CIPHER, where, f"suite_tokens.openssl_ciphers.{token}")
    for section in ("ciphers", "hashes", "openssl_key_exchange"):
        for token, target in value[section].items():
            if not isinstance(target, str):
                _fail(where, f"suite_tokens.{section}.{token}", "must name a catalog entry")
    return dict(value)
