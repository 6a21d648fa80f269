"""Identifiers and names other tools write: OIDs, Java, OpenSSL, Go and .NET spellings.

Data in ``pqtriage/data/algorithm_identifiers.yaml``, validated here at load. Each row points at
a catalog spelling; :class:`Identifiers` turns what a producer wrote into that spelling (and
the hash a signature name fixes), so the catalog resolves it like any other name:

- ``by_oid(oid)``: the OID row, or None;
- ``translate(name)``: a :class:`Translation` for a foreign name (a family column of an OID row,
  a ``names`` row or a Java ``ALGORITHM/MODE/PADDING`` transformation), or None.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, NoReturn

import yaml

from pqtriage.catalog.loader import PURPOSES
from pqtriage.errors import CatalogError, Place

try:  # the C loader is much faster; both are safe loaders
    _Loader: Any = yaml.CSafeLoader
except AttributeError:  # pragma: no cover - PyYAML built without libyaml
    _Loader = yaml.SafeLoader

FAMILIES = ("java", "openssl", "go", "dotnet")
"""Naming families, each a column of the OID rows and a value of ``names[].family``."""
KINDS = ("public-key", "signature", "curve", "cipher", "hash", "mac", "kem", "key-agreement")
_OID = re.compile(r"[0-2](\.(0|[1-9][0-9]*))+")
_OID_KEYS = {"oid", "name", "algorithm", "kind", "hash", "purpose", "source", *FAMILIES}
_NAME_KEYS = {"family", "name", "algorithm", "hash", "purpose", "needs", "curve_purpose"}


@dataclass(frozen=True)
class OidRow:
    """One object identifier and what it names."""

    oid: str
    """Dotted OID."""
    name: str
    """Its ASN.1 identifier as the assigning document writes it (sha512WithRSAEncryption)."""
    algorithm: str
    """The catalog spelling it resolves to."""
    kind: str
    """public-key, signature, curve, cipher, hash, mac, kem or key-agreement."""
    source: str
    """The document that assigns the OID, by title and identifier."""
    hash: str | None = None
    """The digest a signature OID fixes."""
    purpose: str | None = None
    """The purpose the OID implies (a signature OID: signature), when it implies one."""
    spellings: dict[str, tuple[str, ...]] = field(default_factory=dict, compare=False, hash=False)
    """Naming family -> how that family writes this algorithm (java: SHA512withRSA ...)."""


@dataclass(frozen=True)
class Translation:
    """What a foreign name stands for."""

    algorithm: str | None
    """Catalog spelling; None when only a curve can say (Java XDH, EdDSA)."""
    written_as: str
    """Which naming family wrote it and how: 'Java standard name SHA512withRSA'."""
    source: str
    """Source of the spelling."""
    oid: OidRow | None = None
    """The OID row the name stands for, when it has one."""
    hash: str | None = None
    """The digest the name fixes (signatures)."""
    purpose: str | None = None
    """The purpose the name implies."""
    needs: str | None = None
    """What is missing when the name alone cannot be assessed."""


_LABEL = {"java": "Java standard name", "openssl": "OpenSSL name", "go": "Go name", "dotnet": ".NET name"}


def _fail(where: str, label: str, message: str) -> NoReturn:
    raise CatalogError(f"{label}: {message}", place=Place(where),
                       hint="fix the row in the identifier file; see docs/catalog.md")


class Identifiers:
    """The identifier tables of one file."""

    def __init__(self, data: Any, where: str) -> None:
        if not isinstance(data, dict):
            _fail(where, "top level", "must be a mapping of sections")
        for key in data:
            if key not in ("version", "naming_sources", "oids", "names", "transformations"):
                _fail(where, "top level", f"unknown section '{key}'")
        sources = data.get("naming_sources")
        if not isinstance(sources, dict) or set(sources) != set(FAMILIES) or not all(
                isinstance(v, str) and v.strip() for v in sources.values()):
            _fail(where, "naming_sources", f"must give a source for each of {', '.join(FAMILIES)}")
        self.where = where
        self.sources: dict[str, str] = dict(sources)
        self.oids: dict[str, OidRow] = {}
        self._names: dict[str, Translation] = {}
        for index, row in enumerate(_list(data, "oids", where)):
            self._oid_row(row, f"oids[{index}]")
        for index, row in enumerate(_list(data, "names", where)):
            self._name_row(row, f"names[{index}]")
        self._transformations(data.get("transformations"))

    # -- loading ------------------------------------------------------------------------------
    def _oid_row(self, row: Any, label: str) -> None:
        if not isinstance(row, dict):
            _fail(self.where, label, "must be a mapping")
        _check_keys(row, _OID_KEYS, ("oid", "name", "algorithm", "kind", "source"), self.where, label)
        oid = str(row["oid"])
        label = f"{label} ({oid})"
        if not _OID.fullmatch(oid):
            _fail(self.where, label, "is not a dotted object identifier")
        if oid in self.oids:
            _fail(self.where, label, "listed twice")
        if row["kind"] not in KINDS:
            _fail(self.where, label, f"kind '{row['kind']}' is not one of: {', '.join(KINDS)}")
        if row.get("purpose") is not None and row["purpose"] not in PURPOSES:
            _fail(self.where, label, f"purpose '{row['purpose']}' is not one of: {', '.join(PURPOSES)}")
        if row["kind"] == "signature" and row.get("purpose") is None:
            row = {**row, "purpose": "signature"}
        columns: dict[str, tuple[str, ...]] = {}
        for family in FAMILIES:
            spellings = row.get(family, [])
            if not isinstance(spellings, list) or not all(isinstance(s, str) for s in spellings):
                _fail(self.where, label, f"'{family}' must be a list of names")
            columns[family] = tuple(spellings)
        item = OidRow(oid=oid, name=str(row["name"]), algorithm=str(row["algorithm"]), kind=str(row["kind"]),
                      source=str(row["source"]), hash=row.get("hash"), purpose=row.get("purpose"),
                      spellings=columns)
        self.oids[oid] = item
        self._add(item.name, Translation(item.algorithm, f"ASN.1 name {item.name} (OID {oid})", item.source,
                                         oid=item, hash=item.hash, purpose=item.purpose), label)
        for family in FAMILIES:
            for spelling in columns[family]:
                self._add(spelling, Translation(
                    item.algorithm, f"{_LABEL[family]} {spelling} (OID {oid}, {item.name})",
                    f"{self.sources[family]}; OID: {item.source}", oid=item, hash=item.hash,
                    purpose=item.purpose), label)

    def _name_row(self, row: Any, label: str) -> None:
        if not isinstance(row, dict):
            _fail(self.where, label, "must be a mapping")
        _check_keys(row, _NAME_KEYS, ("family", "name"), self.where, label)
        if row["family"] not in FAMILIES:
            _fail(self.where, label, f"family '{row['family']}' is not one of: {', '.join(FAMILIES)}")
        if ("algorithm" in row) == ("needs" in row):
            _fail(self.where, label, "needs either 'algorithm' or 'needs' (with 'curve_purpose')")
        family = str(row["family"])
        self._add(str(row["name"]), Translation(
            row.get("algorithm"), f"{_LABEL[family]} {row['name']}", self.sources[family],
            hash=row.get("hash"), purpose=row.get("purpose") or row.get("curve_purpose"),
            needs=row.get("needs")), label)

    def _transformations(self, value: Any) -> None:
        if not isinstance(value, dict) or not str(value.get("source", "")).strip():
            _fail(self.where, "transformations", "must be a mapping with a 'source'")
        for key in ("ciphers", "rsa_paddings"):
            if not isinstance(value.get(key), dict):
                _fail(self.where, f"transformations.{key}", "must be a mapping")
        if not isinstance(value.get("plain_modes"), list):
            _fail(self.where, "transformations.plain_modes", "must be a list")
        self.transformation_source = str(value["source"])
        self._ciphers = {k.casefold(): v for k, v in value["ciphers"].items()}
        for name, row in value["ciphers"].items():
            if not isinstance(row, dict) or not isinstance(row.get("algorithm"), str):
                _fail(self.where, f"transformations.ciphers.{name}", "must name an 'algorithm'")
        self._plain_modes = {str(m).casefold() for m in value["plain_modes"]}
        self._paddings = {k.casefold(): str(v) for k, v in value["rsa_paddings"].items()}

    def _add(self, spelling: str, translation: Translation, label: str) -> None:
        key = _key(spelling)
        known = self._names.get(key)
        if known is not None and (known.algorithm, known.hash) != (translation.algorithm, translation.hash):
            _fail(self.where, label, f"name '{spelling}' already stands for {known.algorithm}")
        self._names.setdefault(key, translation)

    # -- lookups ------------------------------------------------------------------------------
    def translations(self) -> tuple[Translation, ...]:
        """Every name of every naming family (OID columns included), in file order."""
        return tuple(self._names.values())

    def transformation_targets(self) -> tuple[str, ...]:
        """Catalog spellings the Java transformation tables point at (ciphers and paddings)."""
        targets = [str(row["algorithm"]) for row in self._ciphers.values()]
        return tuple(dict.fromkeys(targets + list(self._paddings.values())))

    def by_oid(self, oid: str) -> OidRow | None:
        """The row of this OID (leading 'OID.' and spaces ignored), or None."""
        text = oid.strip()
        if text.upper().startswith("OID."):
            text = text[4:]
        return self.oids.get(text)

    def translate(self, name: str) -> Translation | None:
        """What a foreign name stands for, or None when no naming family writes it."""
        found = self._names.get(_key(name))
        if found is not None:
            return found
        if _OID.fullmatch(name.strip()):
            row = self.by_oid(name)
            if row is not None:
                return Translation(row.algorithm, f"OID {row.oid} ({row.name})", row.source, oid=row,
                                   hash=row.hash, purpose=row.purpose)
        return self._transformation(name)

    def _transformation(self, name: str) -> Translation | None:
        parts = [p.strip() for p in name.split("/")]
        if len(parts) != 3 or not all(parts):
            return None
        cipher, mode, padding = parts
        row = self._ciphers.get(cipher.casefold())
        if row is None:
            return None
        written = f"Java transformation {name}"
        if row.get("paddings"):
            target = self._paddings.get(padding.casefold())
            if target is None:
                return None
            return Translation(target, written, self.transformation_source,
                               purpose="encryption" if target != "RSA" else None)
        base = str(row["algorithm"])
        if not row.get("modes") or mode.casefold() in self._plain_modes:
            return Translation(base, written, self.transformation_source)
        if mode.casefold() in ("gcm", "ccm", "cbc", "ctr", "ecb"):
            return Translation(f"{base}-{mode.upper()}", written, self.transformation_source)
        return None


def _key(spelling: str) -> str:
    return " ".join(spelling.split()).casefold()


def _list(data: dict[str, Any], key: str, where: str) -> list[Any]:
    value = data.get(key)
    if not isinstance(value, list):
        _fail(where, key, "missing or not a list")
    return value


def _check_keys(row: dict[str, Any], allowed: set[str], required: tuple[str, ...], where: str,
                label: str) -> None:
    for key in row:
        if key not in allowed:
            _fail(where, label, f"unknown key '{key}'")
    for key in required:
        if key not in row or not str(row[key]).strip():
            _fail(where, label, f"missing '{key}'")


def shipped_identifiers_path() -> Path:
    """Path of the identifier file shipped with the package."""
    from importlib import resources

    return Path(str(resources.files("pqtriage") / "data" / "algorithm_identifiers.yaml"))


def read_identifiers(path: Path) -> Identifiers:
    """Read and validate an identifier file (CatalogError naming the row on a mistake)."""
    where = str(path)
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as error:
        raise CatalogError(f"cannot read the identifier file: {error.strerror}", place=Place(where)) from error
    try:
        data = yaml.load(text, Loader=_Loader)  # noqa: S506 - a safe loader
    except yaml.YAMLError as error:
        mark = getattr(error, "problem_mark", None)
        place = Place(where, mark.line + 1, mark.column + 1) if mark else Place(where)
        raise CatalogError("the identifier file is not valid YAML", place=place) from error
    return Identifiers(data, where)
