"""The inventory format, defined once: the validator and the JSON Schema both read this.

Each field is a :class:`FieldSpec`. ``pqtriage schema`` turns these definitions
into a JSON Schema; the YAML validator checks files against the same objects.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from pqtriage.model.inventory import (
    USE_ROLES,
    Criticality,
    Exposure,
    HostingModel,
    Impact,
    KeyStorage,
    Purpose,
    SignatureRole,
)

MAX_SHELF_LIFE_YEARS = 100.0
"""Longest shelf-life accepted: beyond a century the number is a typo, not a plan."""
MAX_MIGRATION_YEARS = 50.0
"""Longest migration time accepted."""
MAX_KEY_SIZE = 65536
"""Largest key size assessed, in bits (the catalog's limit): larger sizes make the use unassessed."""

POLICY_CATEGORIES = (
    "software-firmware-signing",
    "web-cloud",
    "networking",
    "operating-system",
    "niche",
    "custom-legacy",
)
"""CNSA 2.0 system categories (NSA CNSA 2.0, 2022; FAQ 2024)."""
VENDOR_READINESS = ("available", "announced", "unknown")
"""Post-quantum support from the vendor: available now, announced, or unknown."""
FORMAT_VERSIONS = (1,)
"""Inventory format versions this pqtriage reads."""
FIPS_140_LEVELS = tuple(f"fips140-{edition}-l{level}" for edition in (1, 2, 3) for level in (1, 2, 3, 4))
"""FIPS 140 edition and security level of a validated module, spelled as CycloneDX 1.6
(ECMA-424) certificationLevel spells them (FIPS 140-2 and FIPS 140-3 define levels 1 to 4)."""
MAX_SENSITIVITY_RANK = 10
"""Highest sensitivity rank of a data classification (the organisation's own scale, 0 = public)."""
IDENTIFIER = r"^[a-z0-9][a-z0-9._-]*$"
"""Policy frameworks and extra keys: lower-case letters, digits, '.', '_' and '-'."""
EXTRA_KEY = r"^[A-Za-z][A-Za-z0-9_-]*$"
"""Keys of a system's ``extra`` mapping (the organisation's own fields)."""
COUNTRY = r"^[A-Z]{2}$"
"""ISO 3166-1 alpha-2 country code (DE, FR, US ...)."""
CMVP_CERTIFICATE = r"^#?[0-9]{1,6}$"
"""A NIST CMVP validation certificate number (4282 or #4282)."""


@dataclass(frozen=True)
class FieldSpec:
    """One field of an inventory mapping."""

    name: str
    """Key as written in YAML."""
    kind: str
    """str, number, integer, bool, enum, date, string-list, identifier-list, field-list, mapping,
    extra, uses, systems or defaults."""
    description: str
    """What the field means, shown in the JSON Schema and docs."""
    required: bool = False
    """Whether the field must be present (after file defaults are applied)."""
    minimum: float | None = None
    """Smallest accepted number (itself excluded when ``exclusive_minimum``)."""
    exclusive_minimum: bool = False
    """Whether the number must be strictly greater than ``minimum``."""
    maximum: float | None = None
    """Largest accepted number."""
    choices: tuple[str, ...] = ()
    """Accepted values of an enum."""
    defaultable: bool = False
    """Whether the file's ``defaults`` section may supply it."""
    pattern: str | None = None
    """Regular expression a text value (or each list entry) must match."""
    pattern_hint: str | None = None
    """What the pattern asks for, in words, for messages."""
    fields: tuple[FieldSpec, ...] = ()
    """The sub-fields of a ``mapping`` field."""
    ordered: bool = False
    """Whether an enum's choices run from least to most (filters may compare them)."""

    def below_minimum(self, value: float) -> bool:
        """Whether a number is under the field's lower bound."""
        if self.minimum is None:
            return False
        return value <= self.minimum if self.exclusive_minimum else value < self.minimum

    def lower_bound_text(self) -> str:
        """The lower bound for messages: 'the minimum 0' or 'more than 0'."""
        assert self.minimum is not None
        return f"more than {self.minimum:g}" if self.exclusive_minimum else f"the minimum {self.minimum:g}"


USE_FIELDS: tuple[FieldSpec, ...] = (
    FieldSpec("purpose", "enum", "What the algorithm protects here.", required=True,
              choices=tuple(p.value for p in Purpose)),
    FieldSpec("algorithm", "str", "Algorithm name in any common spelling (RSA, P-256, AES-128-GCM, "
              "ML-KEM-768, TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256 ...).", required=True),
    # No range here: a scan can meet any size (a 100,000-bit RSA key), and nothing may make the
    # whole file unreadable; a size outside 1..MAX_KEY_SIZE makes that one use unassessed.
    FieldSpec("key_size", "integer", "Key or modulus size in bits, when the name does not fix it "
              f"(a size outside 1..{MAX_KEY_SIZE} bits makes the use unassessed, with the reason)."),
    FieldSpec("curve", "str", "Elliptic curve, when the name does not fix it (P-256, secp384r1 ...)."),
    FieldSpec("parameter_set", "str", "Parameter set, when the name does not fix it (768, 65 ...)."),
    FieldSpec("trust_years", "number", "How long signatures or integrity tags made here must stay "
              "unforgeable (years).", minimum=0, maximum=MAX_SHELF_LIFE_YEARS),
    FieldSpec("signature_role", "enum", "What a signature protects; sets the cautious default x when "
              "trust_years is absent (docs/method.md).", choices=tuple(r.value for r in SignatureRole)),
    FieldSpec("protocol", "str", "Protocol carrying the use (TLS 1.3, SSH, IPsec ...)."),
    FieldSpec("protocol_version", "str", "Version of that protocol, when not in its name (1.3, 2 ...)."),
    FieldSpec("key_storage", "enum", "Where this use's key is kept (overrides the system's).",
              choices=tuple(k.value for k in KeyStorage)),
    FieldSpec("crypto_library", "str", "Cryptographic library doing this operation (overrides the system's)."),
    FieldSpec("crypto_module", "str", "Validated cryptographic module doing it (overrides the system's)."),
    FieldSpec("fips_140_certificate", "str", "CMVP certificate number of that module (overrides the system's).",
              pattern=CMVP_CERTIFICATE, pattern_hint="a CMVP certificate number such as 4282"),
    FieldSpec("fips_140_level", "enum", "FIPS 140 edition and level of that module (overrides the system's).",
              choices=FIPS_140_LEVELS, ordered=True),
    FieldSpec("notes", "str", "Free text."),
    FieldSpec("source", "str", "Where the use was found (file and block, host:port)."),
    FieldSpec("assumed", "field-list", "Fields whose values are defaults, not facts."),
    FieldSpec("role", "enum", "in-use (what runs; the default) or offered (a server offers it, a "
              "current client does not negotiate it).", choices=USE_ROLES),
    FieldSpec("not_before", "date", "Start of validity of the certificate the use rests on "
              "(YYYY-MM-DD)."),
    FieldSpec("not_after", "date", "End of validity of the certificate the use rests on "
              "(YYYY-MM-DD)."),
    FieldSpec("oid", "str", "Object identifier of the algorithm (1.2.840.113549.1.1.11 ...), when the "
              "source gives one: resolved first; a name that contradicts it is unassessed."),
)

DATA_CLASSIFICATION_FIELDS: tuple[FieldSpec, ...] = (
    FieldSpec("label", "str", "The organisation's own label (Confidential, Restricted ...).", required=True),
    FieldSpec("rank", "integer", f"Sensitivity on the organisation's scale: 0 (public) to {MAX_SENSITIVITY_RANK}"
              " (most sensitive).", minimum=0, maximum=MAX_SENSITIVITY_RANK),
)
HOSTING_FIELDS: tuple[FieldSpec, ...] = (
    FieldSpec("model", "enum", "Where it runs.", required=True, choices=tuple(h.value for h in HostingModel)),
    FieldSpec("provider", "str", "Cloud or hosting provider."),
    FieldSpec("country", "str", "Country where it runs or its data is kept (ISO 3166-1 alpha-2).",
              pattern=COUNTRY, pattern_hint="a two-letter ISO 3166-1 code in capitals (DE, FR, US ...)"),
)

SYSTEM_FIELDS: tuple[FieldSpec, ...] = (
    FieldSpec("id", "str", "Unique identifier.", required=True),
    FieldSpec("name", "str", "Human-readable name (defaults to the id)."),
    FieldSpec("shelf_life_years", "number", "Mosca's x: how long the data must stay confidential.",
              required=True, minimum=0, maximum=MAX_SHELF_LIFE_YEARS, defaultable=True),
    FieldSpec("migration_years", "number", "Mosca's y: how long migrating the system takes "
              "(more than 0: a migration takes time, and the plan needs a duration).",
              required=True, minimum=0, exclusive_minimum=True, maximum=MAX_MIGRATION_YEARS,
              defaultable=True),
    FieldSpec("depends_on", "string-list", "Ids of systems that must migrate first."),
    FieldSpec("owner", "str", "Accountable person or team.", defaultable=True),
    FieldSpec("description", "str", "Free text."),
    FieldSpec("exposure", "enum", "Reachability of its traffic to an interceptor.",
              choices=tuple(e.value for e in Exposure), defaultable=True),
    FieldSpec("criticality", "enum", "Business criticality.",
              choices=tuple(c.value for c in Criticality), defaultable=True),
    FieldSpec("protocol", "str", "Main protocol, informational."),
    FieldSpec("notes", "str", "Free text."),
    FieldSpec("policy_category", "enum", "CNSA 2.0 system category.", choices=POLICY_CATEGORIES,
              defaultable=True),
    FieldSpec("effort_person_weeks", "number", "Planning: estimated effort of the migration.",
              minimum=0, maximum=100_000, defaultable=True),
    FieldSpec("vendor_readiness", "enum", "Planning: post-quantum support from the vendor.",
              choices=VENDOR_READINESS, defaultable=True),
    FieldSpec("business_unit", "str", "Business unit or department the system belongs to.", defaultable=True),
    FieldSpec("tags", "string-list", "Labels of the organisation's own, for filtering and grouping."),
    FieldSpec("impact", "enum", "FIPS 199 impact level of the system (low, moderate, high).",
              choices=tuple(i.value for i in Impact), defaultable=True, ordered=True),
    FieldSpec("high_value_asset", "bool", "Whether the system is a high-value asset (OMB M-19-03).",
              defaultable=True),
    FieldSpec("data_classification", "mapping", "Classification of its data: a label and a sensitivity rank.",
              defaultable=True, fields=DATA_CLASSIFICATION_FIELDS),
    FieldSpec("hosting", "mapping", "Where it runs: on-premises, cloud or hybrid, provider, country.",
              defaultable=True, fields=HOSTING_FIELDS),
    FieldSpec("vendor", "str", "Vendor of the product, or the team that builds it."),
    FieldSpec("product", "str", "Product name."),
    FieldSpec("version", "str", "Product version (text: 2.10 stays 2.10)."),
    FieldSpec("protocol_version", "str", "Version of the main protocol, when not in its name."),
    FieldSpec("crypto_library", "str", "Cryptographic library it uses (name and version)."),
    FieldSpec("crypto_module", "str", "Validated cryptographic module it uses."),
    FieldSpec("fips_140_certificate", "str", "CMVP certificate number of that module.",
              pattern=CMVP_CERTIFICATE, pattern_hint="a CMVP certificate number such as 4282"),
    FieldSpec("fips_140_level", "enum", "FIPS 140 edition and level of that module.",
              choices=FIPS_140_LEVELS, ordered=True),
    FieldSpec("key_storage", "enum", "Where its keys are kept.", choices=tuple(k.value for k in KeyStorage),
              defaultable=True),
    FieldSpec("frameworks", "identifier-list", "Policy frameworks that apply to this system (replaces the "
              "file's list): us-federal, cnsa-2.0, eu, uk, canada, australia, germany-bsi, france-anssi ...",
              pattern=IDENTIFIER, pattern_hint="lower-case letters, digits, '.', '_' or '-'"),
    FieldSpec("extra", "extra", "The organisation's own fields: a mapping of names to text, numbers or "
              "true/false.", pattern=EXTRA_KEY, pattern_hint="a letter, then letters, digits, '_' or '-'"),
    FieldSpec("source", "str", "Where the system was found (folder, host)."),
    FieldSpec("assumed", "field-list", "Fields whose values are defaults, not facts."),
    FieldSpec("uses", "uses", "Every cryptographic use of the system.", required=True),
)

TOP_FIELDS: tuple[FieldSpec, ...] = (
    FieldSpec("version", "integer", "Format version; must be 1.", required=True, minimum=1, maximum=1),
    FieldSpec("organization", "str", "Organisation the inventory describes.", required=True),
    FieldSpec("policies", "string-list", "Policy timelines that apply (nist-ir-8547, cnsa2 ...)."),
    FieldSpec("frameworks", "identifier-list", "Policy frameworks that apply to every system unless it names "
              "its own: us-federal, cnsa-2.0, eu, uk, canada, australia, germany-bsi, france-anssi ...",
              pattern=IDENTIFIER, pattern_hint="lower-case letters, digits, '.', '_' or '-'"),
    FieldSpec("defaults", "defaults", "Values applied to every system that does not set them."),
    FieldSpec("systems", "systems", "The systems.", required=True),
)

DEFAULTABLE: tuple[FieldSpec, ...] = tuple(f for f in SYSTEM_FIELDS if f.defaultable)


def field_named(fields: tuple[FieldSpec, ...], name: str) -> FieldSpec:
    """The spec of the field with this name (KeyError if absent)."""
    for spec in fields:
        if spec.name == name:
            return spec
    raise KeyError(name)


def _field_schema(spec: FieldSpec) -> dict[str, Any]:
    schema: dict[str, Any]
    if spec.kind == "str":
        schema = {"type": "string", "minLength": 1}
        if spec.pattern:
            schema["pattern"] = spec.pattern
    elif spec.kind in ("number", "integer"):
        schema = {"type": spec.kind}
        if spec.minimum is not None:
            schema["exclusiveMinimum" if spec.exclusive_minimum else "minimum"] = spec.minimum
        if spec.maximum is not None:
            schema["maximum"] = spec.maximum
    elif spec.kind == "enum":
        schema = {"type": "string", "enum": list(spec.choices)}
    elif spec.kind == "bool":
        schema = {"type": "boolean"}
    elif spec.kind == "date":
        schema = {"type": "string", "format": "date"}
    elif spec.kind == "string-list":
        schema = {"type": "array", "items": {"type": "string"}}
    elif spec.kind == "identifier-list":
        schema = {"type": "array", "items": {"type": "string", "pattern": spec.pattern}}
    elif spec.kind == "mapping":
        schema = _object(spec.fields)
    elif spec.kind == "extra":
        schema = {"type": "object", "propertyNames": {"pattern": spec.pattern},
                  "additionalProperties": {"type": ["string", "number", "boolean"]}}
    elif spec.kind == "field-list":
        schema = {"type": "array", "items": {"type": "string"}}
    elif spec.kind == "uses":
        schema = {"type": "array", "items": {"$ref": "#/$defs/use"}}
    elif spec.kind == "systems":
        schema = {"type": "array", "items": {"$ref": "#/$defs/system"}}
    elif spec.kind == "defaults":
        schema = {"$ref": "#/$defs/defaults"}
    else:  # pragma: no cover - guarded by test_every_kind_has_a_schema
        raise ValueError(spec.kind)
    schema["description"] = spec.description
    return schema


def _object(fields: tuple[FieldSpec, ...], required: bool = True) -> dict[str, Any]:
    obj: dict[str, Any] = {
        "type": "object",
        "additionalProperties": False,
        "properties": {f.name: _field_schema(f) for f in fields},
    }
    names = [f.name for f in fields if f.required and required]
    if names:
        obj["required"] = names
    return obj


def json_schema() -> dict[str, Any]:
    """Return the JSON Schema (draft 2020-12) of the inventory format."""
    system = _object(SYSTEM_FIELDS)
    # Defaultable fields may come from the file's defaults section instead.
    system["required"] = [f.name for f in SYSTEM_FIELDS if f.required and not f.defaultable]
    schema = _object(TOP_FIELDS)
    # Any version is read far enough to say which versions exist; the schema names the one there is.
    schema["properties"]["version"]["enum"] = list(FORMAT_VERSIONS)
    schema.update(
        {
            "$schema": "https://json-schema.org/draft/2020-12/schema",
            "$id": "https://pqtriage.invalid/schema/inventory-v1.json",
            "title": "pqtriage inventory, version 1",
        }
    )
    schema["$defs"] = {
        "use": _object(USE_FIELDS),
        "system": system,
        "defaults": _object(DEFAULTABLE, required=False),
    }
    return schema
