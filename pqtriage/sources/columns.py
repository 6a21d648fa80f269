"""Spreadsheet columns: the names pqtriage reads and writes, their synonyms, and the column map.

An inventory spreadsheet has one row per cryptographic use. Its columns are named as the YAML
keys (docs/inventory-format.md, "Spreadsheets"): system fields as they are (``id``, ``owner``,
``hosting.model``, ``extra.cost_centre``), use fields as they are (``purpose``, ``algorithm``).
A name that is both a system and a use field (``protocol``, ``notes`` ...) means the use's;
``system.protocol`` names the system's. Headers are matched loosely (case, spaces, hyphens and a
trailing unit in brackets do not matter) and common synonyms are known (``Key length`` is
``key_size``). ``--columns MAP.yaml`` maps any other header and value spelling.
"""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass, field
from typing import Any

from pqtriage.errors import InventoryError, Place
from pqtriage.sources.schema import (
    DEFAULTABLE,
    SYSTEM_FIELDS,
    TOP_FIELDS,
    USE_FIELDS,
    FieldSpec,
    field_named,
)

SYSTEM_PREFIX = "system."
USE_PREFIX = "use."
EXTRA_PREFIX = "extra."
ORGANIZATION = "organization"
"""Column naming the organisation (the same on every row, or blank)."""

_NOT_COLUMNS = {"uses", "extra", "data_classification", "hosting"}
SHARED = tuple(f.name for f in USE_FIELDS if f.name in {s.name for s in SYSTEM_FIELDS})
"""Names that are both a system and a use field: plain means the use's, ``system.X`` the system's."""


@dataclass(frozen=True)
class Column:
    """One inventory column: where its value goes."""

    name: str
    """Canonical header (as pqtriage writes it)."""
    level: str
    """``system`` or ``use`` (``top`` for the organisation)."""
    path: tuple[str, ...]
    """Keys in the inventory tree: ("hosting", "model"), ("algorithm",) ..."""
    spec: FieldSpec
    """The field's definition (for a nested field, the sub-field's)."""


def _system_columns() -> list[Column]:
    out: list[Column] = []
    for spec in SYSTEM_FIELDS:
        if spec.kind == "mapping":
            out += [Column(f"{spec.name}.{sub.name}", "system", (spec.name, sub.name), sub) for sub in spec.fields]
        elif spec.name not in _NOT_COLUMNS:
            name = SYSTEM_PREFIX + spec.name if spec.name in SHARED else spec.name
            out.append(Column(name, "system", (spec.name,), spec))
    return out


SYSTEM_COLUMNS: tuple[Column, ...] = tuple(_system_columns())
"""System columns in the order pqtriage writes them."""
USE_COLUMNS: tuple[Column, ...] = tuple(Column(s.name, "use", (s.name,), s) for s in USE_FIELDS)
"""Use columns in the order pqtriage writes them."""
ORGANIZATION_COLUMN = Column(ORGANIZATION, "top", (ORGANIZATION,), field_named(TOP_FIELDS, ORGANIZATION))
ALL_COLUMNS: dict[str, Column] = {c.name: c for c in (*SYSTEM_COLUMNS, *USE_COLUMNS, ORGANIZATION_COLUMN)}
ALL_COLUMNS.update({SYSTEM_PREFIX + c.name: c for c in SYSTEM_COLUMNS if not c.name.startswith(SYSTEM_PREFIX)})
ALL_COLUMNS.update({USE_PREFIX + c.name: c for c in USE_COLUMNS})
EXTRA_SPEC = field_named(SYSTEM_FIELDS, "extra")

SYNONYMS: dict[str, str] = {
    "system_id": "id", "system": "id", "app_id": "id", "application_id": "id", "asset_id": "id",
    "system_name": "name", "application": "name", "application_name": "name", "asset_name": "name",
    "shelf_life": "shelf_life_years", "x": "shelf_life_years", "data_shelf_life": "shelf_life_years",
    "migration_time": "migration_years", "y": "migration_years", "migration_time_years": "migration_years",
    "dependencies": "depends_on", "depends": "depends_on",
    "system_owner": "owner", "responsible": "owner", "accountable": "owner",
    "bu": "business_unit", "department": "business_unit", "division": "business_unit",
    "business_criticality": "criticality", "network_exposure": "exposure",
    "fips_199_impact": "impact", "fips199": "impact", "fips_199": "impact", "impact_level": "impact",
    "hva": "high_value_asset",
    "data_classification": "data_classification.label", "classification": "data_classification.label",
    "sensitivity": "data_classification.rank", "sensitivity_rank": "data_classification.rank",
    "hosting": "hosting.model", "hosting_model": "hosting.model", "deployment": "hosting.model",
    "cloud_provider": "hosting.provider", "provider": "hosting.provider",
    "country": "hosting.country", "hosting_country": "hosting.country",
    "supplier": "vendor", "manufacturer": "vendor", "product_name": "product", "product_version": "version",
    "usage": "purpose", "crypto_function": "purpose",
    "algo": "algorithm", "cipher": "algorithm", "crypto_algorithm": "algorithm",
    "key_length": "key_size", "key_bits": "key_size", "bits": "key_size", "modulus_size": "key_size",
    "elliptic_curve": "curve", "parameters": "parameter_set",
    "signature_lifetime": "trust_years", "key_store": "key_storage", "key_location": "key_storage",
    "cmvp_certificate": "fips_140_certificate", "fips_certificate": "fips_140_certificate",
    "library": "crypto_library", "module": "crypto_module",
    "comment": "notes", "comments": "notes", "remarks": "notes", "labels": "tags",
    "organisation": "organization",
}
"""Common header spellings (after :func:`header_key`) and the column each means."""

VALUE_SYNONYMS: dict[str, dict[str, str]] = {
    "purpose": {
        "key-exchange": "key-establishment", "key-agreement": "key-establishment", "kex": "key-establishment",
        "key-transport": "key-establishment", "key-encapsulation": "key-establishment",
        "encrypt": "encryption", "confidentiality": "encryption", "data-encryption": "encryption",
        "sign": "signature", "signing": "signature", "digital-signature": "signature",
        "auth": "authentication", "mac": "integrity", "hash": "integrity", "hashing": "integrity",
    },
    "impact": {"medium": "moderate", "mod": "moderate"},
    "hosting.model": {"on-prem": "on-premises", "onprem": "on-premises", "on-premise": "on-premises",
                      "premises": "on-premises", "data-centre": "on-premises", "data-center": "on-premises",
                      "saas": "cloud", "iaas": "cloud", "paas": "cloud", "public-cloud": "cloud"},
    "key_storage": {"hardware-security-module": "hsm", "kms": "cloud-kms", "cloud-key-management": "cloud-kms",
                    "key-vault": "cloud-kms", "file": "software", "keystore": "software"},
    "exposure": {"public": "internet", "external": "internet", "internet-facing": "internet"},
}
"""Common value spellings (after :func:`value_key`) per column, besides case and separators."""

TRUE_WORDS = {"yes", "y", "true", "t", "1", "x", "ja", "oui"}
FALSE_WORDS = {"no", "n", "false", "f", "0", "nein", "non"}

RESULT_COLUMNS = frozenset({
    "rank", "verdict", "weakest_algorithm", "x_years", "y_years", "start_by", "exposure_probability",
    "margin_years", "replacement", "reason", "use_verdict", "resolved", "use_start_by", "use_reason",
    "use_replacement", "system_verdict", "system_rank", "group", "crqc_year",
})
"""Columns pqtriage's own workbooks and CSV results carry besides the inventory: read past quietly."""

_UNIT = re.compile(r"\s*[\(\[][^\)\]]*[\)\]]\s*$")
_SEPARATORS = re.compile(r"[\s\-_/]+")


def header_key(text: str) -> str:
    """A header as compared: lower case, a trailing unit in brackets dropped, separators as '_'."""
    text = _UNIT.sub("", text.strip())
    parts = [p for p in text.lower().split(".")]
    return ".".join(_SEPARATORS.sub("_", p).strip("_") for p in parts)


def value_key(text: str) -> str:
    """A value as compared: lower case, spaces and underscores as '-'."""
    return re.sub(r"[\s_]+", "-", text.strip().lower())


@dataclass(frozen=True)
class ColumnMap:
    """The ``--columns`` file: other header names and value spellings, and what a sheet lacks."""

    path: str | None = None
    """Where it was read from."""
    columns: dict[str, str] = field(default_factory=dict)
    """Header as compared (:func:`header_key`) -> canonical column."""
    values: dict[str, dict[str, str]] = field(default_factory=dict)
    """Canonical column -> value as compared (:func:`value_key`) -> value in our spelling."""
    ignore: frozenset[str] = frozenset()
    """Headers (as compared) read past without a warning."""
    sheet: str | None = None
    """The worksheet to read in a workbook."""
    header_row: int | None = None
    """1-based row of the header (default: the first row with a value)."""
    organization: str | None = None
    """The organisation, when the sheet has no organization column."""
    policies: tuple[str, ...] = ()
    """Policy timelines that apply."""
    frameworks: tuple[str, ...] = ()
    """Policy frameworks that apply to every system that names none."""
    defaults: dict[str, Any] = field(default_factory=dict)
    """Values for every system that does not set them (validated like an inventory's defaults)."""

    def column_for(self, header: str) -> Column | str | None:
        """The column a header means; an ``extra.`` name as text; None when unknown."""
        key = header_key(header)
        name = self.columns.get(key) or key
        name = SYNONYMS.get(name, name)
        if name.startswith(EXTRA_PREFIX) and len(name) > len(EXTRA_PREFIX):
            if name == key:  # the organisation's own name: keep its case as written
                return EXTRA_PREFIX + header.strip().split(".", 1)[1].strip()
            return name
        return ALL_COLUMNS.get(name)

    def value_for(self, column: Column, text: str) -> str:
        """A value in our spelling: the map's, a common synonym, or the text as compared."""
        key = value_key(text)
        own = self.values.get(column.name, {})
        if key in own:
            return own[key]
        if column.spec.kind != "enum":
            return text
        if key in column.spec.choices:
            return key
        bare = column.name.removeprefix(SYSTEM_PREFIX)
        return VALUE_SYNONYMS.get(bare, {}).get(key, text)


_MAP_FIELDS: tuple[FieldSpec, ...] = (
    FieldSpec("sheet", "str", "Worksheet to read."),
    FieldSpec("header_row", "integer", "Row of the header.", minimum=1, maximum=1_048_576),
    FieldSpec("columns", "extra", "Header in the file: the pqtriage column it is."),
    FieldSpec("values", "extra", "Per column: spelling in the file: pqtriage's value."),
    FieldSpec("ignore", "string-list", "Headers to read past without a warning."),
    field_named(TOP_FIELDS, "organization"),
    field_named(TOP_FIELDS, "policies"),
    field_named(TOP_FIELDS, "frameworks"),
    FieldSpec("defaults", "defaults", "Values for every system that does not set them."),
)


def known_column_names() -> list[str]:
    """Every canonical column name (for messages)."""
    return [c.name for c in (*SYSTEM_COLUMNS, *USE_COLUMNS, ORGANIZATION_COLUMN)]


def load_column_map(path: str) -> ColumnMap:
    """Read and validate a ``--columns`` file; errors name file:line:column."""
    from pqtriage.sources.interface import read_inventory_text
    from pqtriage.sources.yaml_inventory import _MISSING, _Bad, _Reader
    from pqtriage.yamlio import load_yaml

    text, _ = read_inventory_text(path)
    root = load_yaml(text, path, InventoryError)
    if root is None or not isinstance(root.value, dict):
        raise InventoryError("a column map must be a mapping (columns:, values: ...)", place=Place(path, 1, 1),
                             hint="see docs/inventory-format.md, 'The column map'")
    reader = _Reader(path)
    raw = reader.mapping(root, _MAP_FIELDS, "the column map")
    simple = tuple(f for f in _MAP_FIELDS if f.name not in ("columns", "values", "defaults"))
    plain = {k: v for k, v in reader.fields_of(root, raw, simple, "the column map", optional=True).items()
             if k in raw and not isinstance(v, type(_MISSING))}
    columns: dict[str, str] = {}
    if "columns" in raw:
        node = raw["columns"]
        if not isinstance(node.value, dict):
            reader.report(node, "'columns' must map headers in the file to pqtriage columns",
                          "write 'Header in the file: algorithm'")
        else:
            for header, target in node.value.items():
                name = str(target.text if target.text is not None else target.value)
                if name in ALL_COLUMNS or name == ORGANIZATION or (
                        name.startswith(EXTRA_PREFIX) and re.match(EXTRA_SPEC.pattern or "", name[6:])):
                    columns[header_key(header)] = name
                else:
                    close = difflib.get_close_matches(name, known_column_names(), n=1, cutoff=0.6)
                    reader.report(target, f"'{name[:60]}' is not a pqtriage column",
                                  f"did you mean '{close[0]}'?" if close else "name a column of "
                                  "docs/inventory-format.md, or extra.NAME for your own field")
    values: dict[str, dict[str, str]] = {}
    if "values" in raw:
        node = raw["values"]
        if not isinstance(node.value, dict):
            reader.report(node, "'values' must map columns to spellings", "write 'purpose: {Key Exchange: key-establishment}'")
        else:
            for name, spellings in node.value.items():
                column = ALL_COLUMNS.get(name)
                if column is None or column.spec.kind not in ("enum", "bool"):
                    reader.report(spellings, f"'values' names '{name[:60]}', which is not a column with a fixed "
                                  "set of values", "use purpose, criticality, exposure, impact, hosting.model, "
                                  "key_storage ...", key=True)
                    continue
                if not isinstance(spellings.value, dict):
                    reader.report(spellings, f"'values' of '{name}' must map spellings to values")
                    continue
                own: dict[str, str] = {}
                for spelling, target in spellings.value.items():
                    try:
                        checked = reader.value(column.spec, target, f"the column map's values of '{name}'")
                    except _Bad as bad:
                        reader.report(bad.node, bad.message, bad.hint)
                        continue
                    own[value_key(spelling)] = str(checked).lower() if column.spec.kind == "bool" else checked
                values[column.name] = own
    defaults: dict[str, Any] = {}
    if "defaults" in raw:
        defaults = reader.fields(raw["defaults"], DEFAULTABLE, "defaults", optional=True)
    reader.finish()
    ignore: list[str] = [header_key(h) for h in plain.get("ignore", ())]
    return ColumnMap(
        path=path, columns=columns, values=values, ignore=frozenset(ignore), sheet=plain.get("sheet"),
        header_row=plain.get("header_row"), organization=plain.get("organization"),
        policies=tuple(plain.get("policies", ())), frameworks=tuple(plain.get("frameworks", ())),
        defaults=defaults,
    )
