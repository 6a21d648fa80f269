"""Our YAML inventory format: validated field by field against pqtriage.sources.schema.

Every problem is collected before stopping, each with its file:line:column and a fix, then
raised together sorted by position (:class:`~pqtriage.errors.InventoryProblems`). What stops at
once with one line, because nothing after it can be read reliably: the file itself (size,
encoding, NUL bytes, invalid YAML, alias bombs, nesting, duplicate or merge keys, as
:mod:`pqtriage.yamlio` refuses them), an empty file, a top level that is not a mapping and a
``systems`` that is not a list. The spreadsheet sources build the same positioned tree from
their cells and are validated by this reader too.
"""

from __future__ import annotations

import datetime as dt
import difflib
import math
import re
from collections.abc import Callable
from typing import Any

from pqtriage.errors import InventoryError, InventoryProblems, Place, Problem, chain_text, quoted
from pqtriage.model.inventory import (
    IN_USE,
    Criticality,
    CryptoUse,
    DataClassification,
    Exposure,
    Fact,
    Hosting,
    HostingModel,
    Impact,
    Inventory,
    KeyStorage,
    Purpose,
    SignatureRole,
    SourceRef,
    System,
)
from pqtriage.sources.interface import InventorySource, UseCheck
from pqtriage.sources.lookalike import lookalike_key, lookalike_pairs, looks_alike, spelled_out
from pqtriage.sources.schema import (
    DEFAULTABLE,
    FORMAT_VERSIONS,
    SYSTEM_FIELDS,
    TOP_FIELDS,
    USE_FIELDS,
    FieldSpec,
)
from pqtriage.yamlio import Node, load_yaml, paused_gc

_FACT_FIELDS = ("algorithm", "purpose", "key_size", "curve", "parameter_set", "trust_years", "signature_role", "role",
                "not_before", "not_after")
"""Use fields recorded as facts with their own line and column."""

def _fact_text(value: object) -> str:
    if isinstance(value, float):
        return f"{value:g}"
    return value.isoformat() if hasattr(value, "isoformat") else str(value)


_TYPE_NAMES = {str: "text", int: "a whole number", float: "a number", bool: "true/false",
               list: "a list", dict: "a mapping", type(None): "nothing"}
_NESTED = ("uses", "systems", "defaults")

PlaceOf = Callable[[int | None, int | None], Place]
"""Turns a node's line and column into the Place messages name (a workbook cell for a sheet)."""


_ISO_DATE = re.compile(r"\d{4}-\d{2}-\d{2}")


def _kind_of(value: object) -> str:
    return _TYPE_NAMES.get(type(value), type(value).__name__)


class _Bad(Exception):
    """One problem at one node (internal: caught, recorded, reading goes on)."""

    def __init__(self, node: Node, message: str, hint: str | None = None, key: bool = False):
        super().__init__(message)
        self.node, self.message, self.hint, self.key = node, message, hint, key


class _Reader:
    """Validates one document, collecting every problem with its place and a fix."""

    def __init__(self, path: str, check: UseCheck | None = None, place_of: PlaceOf | None = None):
        self.path = path
        self.check = check
        self.place_of: PlaceOf = place_of or (lambda line, column: Place(path, line, column))
        self.warnings: list[str] = []
        self.problems: list[Problem] = []

    # -- recording ------------------------------------------------------------------------
    def _place(self, node: Node, key: bool = False) -> Place:
        if key and node.key_line:
            return self.place_of(node.key_line, node.key_column)
        return self.place_of(node.line, node.column)

    def fail(self, node: Node, message: str, hint: str | None = None, key: bool = False) -> InventoryError:
        """An error to raise at once (used by readers built on this one)."""
        return InventoryError(message, place=self._place(node, key), hint=hint)

    def report(self, node: Node, message: str, hint: str | None = None, key: bool = False) -> None:
        """Record a problem and go on reading."""
        self.problems.append(Problem(self._place(node, key), message, hint))

    def warn(self, node: Node, message: str) -> None:
        """Record a warning (an error under ``check --strict``)."""
        self.warnings.append(f"{self._place(node)}: {' '.join(message.split())}")

    def finish(self) -> None:
        """Raise every problem recorded so far, sorted by position."""
        if self.problems:
            raise InventoryProblems(self.problems)

    # -- fields ---------------------------------------------------------------------------
    def mapping(self, node: Node, fields: tuple[FieldSpec, ...], what: str) -> dict[str, Node]:
        """The node's known fields; each unknown field is recorded. Not a mapping: _Bad."""
        if not isinstance(node.value, dict):
            raise _Bad(node, f"{what} must be a mapping of fields, got {_kind_of(node.value)}")
        known = {f.name for f in fields}
        out: dict[str, Node] = {}
        for key, child in node.value.items():
            if key in known:
                out[key] = child
                continue
            close = difflib.get_close_matches(key, sorted(known), n=1, cutoff=0.6)
            hint = f"did you mean '{close[0]}'?" if close else f"known fields: {', '.join(sorted(known))}"
            self.report(child, f"unknown field '{key}' in {what}", hint, key=True)
        return out

    def _text(self, spec: FieldSpec, node: Node, label: str) -> str:
        value = node.value
        if value is None or isinstance(value, (list, dict)):
            raise _Bad(node, f"{label} must be text, got {_kind_of(value)}", "quote the value")
        # A plain scalar that YAML 1.1 reads as a number, a boolean or a date is kept as typed.
        text = node.text if node.text is not None else str(value)
        if not text.strip():
            raise _Bad(node, f"{label} is empty", "write a value or remove the field")
        if spec.pattern and not re.match(spec.pattern, text):
            raise _Bad(node, f"{label} is {text[:60]!r}, not {spec.pattern_hint or spec.pattern}")
        return text

    def value(self, spec: FieldSpec, node: Node, what: str) -> Any:
        """The validated value of one field (raises _Bad)."""
        value = node.value
        label = f"'{spec.name}' in {what}"
        if spec.kind == "str":
            return self._text(spec, node, label)
        if spec.kind in ("number", "integer"):
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise _Bad(node, f"{label} must be {'a whole number' if spec.kind == 'integer' else 'a number'}"
                           f", got {_kind_of(value)}", "write digits without quotes")
            if spec.kind == "integer" and not isinstance(value, int):
                raise _Bad(node, f"{label} must be a whole number, got {value}")
            if isinstance(value, float) and not math.isfinite(value):
                raise _Bad(node, f"{label} must be a finite number, got {value}")
            if spec.below_minimum(value):
                if spec.exclusive_minimum:
                    raise _Bad(node, f"{label} is {value}, it must be {spec.lower_bound_text()}",
                               "give the real duration, for example 0.5 for six months")
                raise _Bad(node, f"{label} is {value}, below {spec.lower_bound_text()}",
                           "years and sizes cannot be negative")
            if spec.maximum is not None and value > spec.maximum:
                if spec.name == "version" and what == "the inventory":
                    versions = ", ".join(str(v) for v in FORMAT_VERSIONS)
                    raise _Bad(node, f"{label} is {value}, above the maximum {spec.maximum:g}: format versions"
                               f" that exist are {versions}", f"write 'version: {FORMAT_VERSIONS[-1]}'")
                raise _Bad(node, f"{label} is {value}, above the maximum {spec.maximum:g}",
                           "check the unit (years, bits)")
            return value
        if spec.kind == "bool":
            if not isinstance(value, bool):
                raise _Bad(node, f"{label} must be true or false, got {str(value)[:60]!r}", "write true or false")
            return value
        if spec.kind == "enum":
            if not isinstance(value, str) or value not in spec.choices:
                close = difflib.get_close_matches(str(value), spec.choices, n=1, cutoff=0.5)
                hint = f"did you mean '{close[0]}'?" if close else f"use one of: {', '.join(spec.choices)}"
                raise _Bad(node, f"{label} is {str(value)[:60]!r}, not a known value", hint)
            return value
        if spec.kind == "date":
            try:
                if not isinstance(value, str) or not _ISO_DATE.fullmatch(value):
                    raise ValueError(value)
                return dt.date.fromisoformat(value)
            except ValueError:
                raise _Bad(node, f"{label} is {str(value)[:40]!r}, not a date",
                           "write YYYY-MM-DD, for example 2030-06-30") from None
        if spec.kind in ("string-list", "field-list", "identifier-list"):
            if not isinstance(value, list):
                raise _Bad(node, f"{label} must be a list, got {_kind_of(value)}",
                           "write [a, b] or one '- item' per line")
            items = []
            for item in value:
                if item.value is None or isinstance(item.value, (list, dict)):
                    raise _Bad(item, f"each entry of {label} must be text, got {_kind_of(item.value)}")
                items.append(self._text(spec, item, f"an entry of {label}"))
            return tuple(items)
        if spec.kind == "mapping":
            raw = self.mapping(node, spec.fields, label)
            return self.fields_of(node, raw, spec.fields, label, strict=True)
        if spec.kind == "extra":
            if not isinstance(value, dict):
                raise _Bad(node, f"{label} must be a mapping of your own field names to values, "
                           f"got {_kind_of(value)}", "write 'extra: {cost_centre: CC-104}'")
            pairs = []
            for key, child in value.items():
                if not re.match(spec.pattern or "", key):
                    raise _Bad(child, f"{label} has the key {key[:60]!r}, not {spec.pattern_hint}", key=True)
                item = child.value
                if item is None or isinstance(item, (list, dict)):
                    raise _Bad(child, f"'{key}' in {label} must be text, a number or true/false, "
                               f"got {_kind_of(item)}")
                if isinstance(item, float) and not math.isfinite(item):
                    raise _Bad(child, f"'{key}' in {label} must be a finite number, got {item}")
                pairs.append((key, item))
            return tuple(pairs)
        raise AssertionError(spec.kind)  # pragma: no cover

    def fields_of(self, node: Node, raw: dict[str, Node], fields: tuple[FieldSpec, ...], what: str,
                  defaults: dict[str, Any] | None = None, optional: bool = False,
                  strict: bool = False) -> dict[str, Any]:
        """Validated values of a mapping's fields; problems recorded, bad fields left out.

        With ``strict`` (a nested mapping), any problem makes the whole mapping _Bad.
        """
        out: dict[str, Any] = {}
        for spec in fields:
            if spec.kind in _NESTED:
                continue
            if spec.name in raw:
                try:
                    out[spec.name] = self.value(spec, raw[spec.name], what)
                except _Bad as bad:
                    if strict:
                        raise
                    self.report(bad.node, bad.message, bad.hint, bad.key)
                    out[spec.name] = _MISSING
            elif defaults and spec.name in defaults:
                out[spec.name] = defaults[spec.name]
            elif spec.required and not optional:
                hint = "add it here or in the file's defaults section" if spec.defaultable else "add it"
                if strict:
                    raise _Bad(node, f"{what} has no '{spec.name}'", hint)
                self.report(node, f"{what} has no '{spec.name}'", hint)
                out[spec.name] = _MISSING
        return out

    def fields(self, node: Node, fields: tuple[FieldSpec, ...], what: str,
               defaults: dict[str, Any] | None = None, optional: bool = False) -> dict[str, Any]:
        """Validated values of a mapping (for the CBOM side file); not a mapping is recorded."""
        try:
            raw = self.mapping(node, fields, what)
        except _Bad as bad:
            self.report(bad.node, bad.message, bad.hint)
            return {}
        values = self.fields_of(node, raw, fields, what, defaults, optional)
        return {k: v for k, v in values.items() if v is not _MISSING}

    # -- uses and systems -----------------------------------------------------------------
    def use(self, node: Node, what: str) -> CryptoUse | None:
        try:
            raw = self.mapping(node, USE_FIELDS, what)
        except _Bad as bad:
            self.report(bad.node, bad.message, bad.hint)
            return None
        values = self.fields_of(node, raw, USE_FIELDS, what)
        if any(v is _MISSING for v in values.values()):
            return None
        storage = values.get("key_storage")
        assumed = set(values.get("assumed", ()))
        evidence = tuple(
            Fact(name, _fact_text(values[name]),
                 "default" if name in assumed else "inventory",
                 SourceRef(self.path, raw[name].key_line or raw[name].line,
                           raw[name].key_column or raw[name].column, values.get("source")))
            for name in _FACT_FIELDS if name in raw
        )
        use = CryptoUse(
            purpose=Purpose(values["purpose"]),
            algorithm=values["algorithm"],
            key_size=values.get("key_size"),
            curve=values.get("curve"),
            parameter_set=values.get("parameter_set"),
            trust_years=values.get("trust_years"),
            protocol=values.get("protocol"),
            protocol_version=values.get("protocol_version"),
            key_storage=KeyStorage(storage) if storage else None,
            crypto_library=values.get("crypto_library"),
            crypto_module=values.get("crypto_module"),
            fips_140_certificate=values.get("fips_140_certificate"),
            fips_140_level=values.get("fips_140_level"),
            notes=values.get("notes"),
            source=SourceRef(self.path, node.line, node.column, values.get("source")),
            assumed=values.get("assumed", ()),
            role=values.get("role", IN_USE),
            not_before=values.get("not_before"),
            not_after=values.get("not_after"),
            oid=values.get("oid"),
            signature_role=SignatureRole(values["signature_role"]) if "signature_role" in values else None,
            evidence=evidence,
        )
        if self.check is not None:
            for found in self.check(use):
                where = raw.get(found.field, node)
                if found.error:
                    self.report(where, found.message, found.hint)
                else:
                    self.warn(where, found.message + (f"; {found.hint}" if found.hint else ""))
        return use

    def system(self, node: Node, index: int, defaults: dict[str, Any]) -> System | None:
        label = f"system #{index + 1}"
        if isinstance(node.value, dict) and "id" in node.value:
            ident = node.value["id"]
            if ident.value is not None and not isinstance(ident.value, (list, dict)):
                text = ident.text if ident.text is not None else str(ident.value)
                label = f"system '{text[:80]}'"
        try:
            raw = self.mapping(node, SYSTEM_FIELDS, label)
        except _Bad as bad:
            self.report(bad.node, bad.message, bad.hint)
            return None
        values = self.fields_of(node, raw, SYSTEM_FIELDS, label, defaults)
        uses: list[CryptoUse | None] = []
        if "uses" not in raw:
            self.report(node, f"{label} has no 'uses'", "list the cryptography it uses, or 'uses: []'")
        elif not isinstance(raw["uses"].value, list):
            self.report(raw["uses"], f"'uses' in {label} must be a list, got {_kind_of(raw['uses'].value)}")
        else:
            uses = [self.use(u, f"use #{i + 1} of {label}") for i, u in enumerate(raw["uses"].value)]
        if any(v is _MISSING for v in values.values()) or "uses" not in raw or any(u is None for u in uses):
            return None
        assumed = tuple(values.get("assumed", ())) + tuple(
            f.name for f in DEFAULTABLE if f.name not in raw and f.name in defaults
            and f.name in ("shelf_life_years", "migration_years")
        )
        classification = values.get("data_classification")
        hosting = values.get("hosting")
        return System(
            id=values["id"],
            name=values.get("name", values["id"]),
            shelf_life_years=float(values["shelf_life_years"]),
            migration_years=float(values["migration_years"]),
            uses=tuple(u for u in uses if u is not None),
            depends_on=values.get("depends_on", ()),
            owner=values.get("owner"),
            description=values.get("description"),
            exposure=Exposure(values.get("exposure", Exposure.INTERNAL.value)),
            criticality=Criticality(values.get("criticality", Criticality.MEDIUM.value)),
            protocol=values.get("protocol"),
            notes=values.get("notes"),
            policy_category=values.get("policy_category"),
            effort_person_weeks=values.get("effort_person_weeks"),
            vendor_readiness=values.get("vendor_readiness"),
            business_unit=values.get("business_unit"),
            tags=values.get("tags", ()),
            impact=Impact(values["impact"]) if "impact" in values else None,
            high_value_asset=values.get("high_value_asset"),
            data_classification=DataClassification(classification["label"], classification.get("rank"))
            if classification else None,
            hosting=Hosting(HostingModel(hosting["model"]), hosting.get("provider"), hosting.get("country"))
            if hosting else None,
            vendor=values.get("vendor"),
            product=values.get("product"),
            version=values.get("version"),
            protocol_version=values.get("protocol_version"),
            crypto_library=values.get("crypto_library"),
            crypto_module=values.get("crypto_module"),
            fips_140_certificate=values.get("fips_140_certificate"),
            fips_140_level=values.get("fips_140_level"),
            key_storage=KeyStorage(values["key_storage"]) if "key_storage" in values else None,
            frameworks=values.get("frameworks"),
            extra=values.get("extra", ()),
            source=SourceRef(self.path, node.line, node.column, values.get("source")),
            assumed=tuple(dict.fromkeys(assumed)),
        )

    def inventory(self, root: Node | None, sha256: str | None,
                  given_defaults: dict[str, Any] | None = None) -> Inventory:
        if root is None:
            raise InventoryError("the file is empty", place=self.place_of(1, 1),
                                 hint="run 'pqtriage init' for a template")
        try:
            raw = self.mapping(root, TOP_FIELDS, "the inventory")
        except _Bad as bad:  # nothing else can be read
            raise self.fail(bad.node, bad.message, bad.hint) from None
        top = self.fields_of(root, raw, TOP_FIELDS, "the inventory")
        defaults: dict[str, Any] = dict(given_defaults or {})
        if "defaults" in raw:
            defaults = self.fields(raw["defaults"], DEFAULTABLE, "defaults", optional=True)
        systems: list[System] = []
        if "systems" in raw:
            systems_node = raw["systems"]
            if not isinstance(systems_node.value, list):
                self.report(systems_node, f"'systems' must be a list, got {_kind_of(systems_node.value)}")
                self.finish()
            nodes: list[Node] = systems_node.value  # type: ignore[assignment]
            read = [(n, self.system(n, i, defaults)) for i, n in enumerate(nodes)]
            good = [(n, s) for n, s in read if s is not None]
            self.check_ids([n for n, _ in good], [s for _, s in good], len(good) == len(read))
            systems = [s for _, s in good]
        self.finish()
        return Inventory(
            organization=top["organization"],
            systems=tuple(systems),
            version=top["version"],
            source_path=self.path,
            source_sha256=sha256,
            policies=top.get("policies", ()),
            frameworks=top.get("frameworks", ()),
            warnings=tuple(self.warnings),
        )

    def check_ids(self, nodes: list[Node], systems: list[System], complete: bool = True) -> None:
        """Duplicate ids, look-alike ids (Unicode normalisation, invisible and confusable
        characters), dependencies on unknown or own ids, cycles (recorded)."""
        seen: dict[str, Node] = {}
        for node, system in zip(nodes, systems, strict=True):
            if system.id in seen:
                alias = (f"; this entry is an alias of the system at line {node.alias_of}"
                         if node.alias_of is not None else "")
                self.report(node, f"duplicate system id {quoted(system.id)} (first at line {seen[system.id].line}){alias}",
                            "give each system its own id" + (" (write it out instead of the alias)" if alias else ""))
            else:
                seen[system.id] = node
        ids = list(seen)
        for earlier, later in lookalike_pairs(ids):
            self.report(
                seen[ids[later]],
                f"system id {quoted(spelled_out(ids[later]))} looks like {quoted(spelled_out(ids[earlier]))}"
                f" (line {seen[ids[earlier]].line}): they differ only by Unicode normalisation, invisible"
                " or look-alike characters, so every output would show them the same",
                "rename one of them (plain ASCII ids are safest)",
            )
        keys: dict[str, str] | None = None
        for node, system in zip(nodes, systems, strict=True):
            for dep in system.depends_on:
                where = _child(node, "depends_on")
                if dep == system.id:
                    self.report(where, f"system {quoted(system.id)} depends on itself",
                                "remove it from its own depends_on")
                    continue
                if dep in seen:
                    continue
                if keys is None:
                    keys = {lookalike_key(i): i for i in reversed(ids)}
                twin = keys.get(lookalike_key(dep))
                if twin is not None and looks_alike(dep, twin):
                    self.report(where, f"system {quoted(system.id)} depends on {quoted(spelled_out(dep))},"
                                f" which looks like system {quoted(spelled_out(twin))} but is not the same text",
                                "copy the id exactly")
                    continue
                # difflib over every id is quadratic in large inventories: only for small ones.
                close = difflib.get_close_matches(dep, ids, n=1, cutoff=0.75) if len(ids) <= 5000 else []
                if close:  # almost certainly a typo of a system in this file
                    self.report(where, f"system {quoted(system.id)} depends on unknown id {quoted(dep)}",
                                f"did you mean {quoted(close[0])}?")
                elif complete:  # with systems left out by other problems, the warning may be wrong
                    # A dependency outside this file (another team's PKI) is legitimate: warn.
                    self.warn(where, f"system {quoted(system.id)} depends on {quoted(dep)}, which is not in this"
                              " inventory; treated as an external dependency (add it to plan it too;"
                              " 'check --strict' makes this an error)")
        cycle = find_cycle({s.id: tuple(d for d in s.depends_on if d != s.id) for s in systems})
        if cycle:
            self.report(seen[cycle[0]], "dependency cycle: " + chain_text(cycle, closed=True),
                        "break the cycle: one of them must migrate first")


class _Missing:
    """Marks a field that was present but invalid, or required and absent."""

    def __repr__(self) -> str:
        return "<missing>"


_MISSING: Any = _Missing()


def _child(node: Node, key: str) -> Node:
    """The value node of a mapping key (the caller knows the key is present)."""
    assert isinstance(node.value, dict)
    return node.value[key]


def find_cycle(graph: dict[str, tuple[str, ...]]) -> list[str] | None:
    """Return one dependency cycle as a list of ids, or None (iterative DFS, any size)."""
    state: dict[str, int] = {}  # 1 = on the stack, 2 = done
    for start in graph:
        if state.get(start):
            continue
        stack: list[tuple[str, int]] = [(start, 0)]
        path: list[str] = []
        while stack:
            node, index = stack.pop()
            if index == 0:
                state[node] = 1
                path.append(node)
            deps = graph.get(node, ())
            if index < len(deps):
                stack.append((node, index + 1))
                nxt = deps[index]
                if state.get(nxt) == 1:
                    return path[path.index(nxt):]
                if not state.get(nxt) and nxt in graph:
                    stack.append((nxt, 0))
            else:
                state[node] = 2
                path.pop()
    return None


def read_tree(root: Node | None, path: str, sha256: str | None, check: UseCheck | None = None,
              place_of: PlaceOf | None = None, defaults: dict[str, Any] | None = None) -> Inventory:
    """Validate a positioned tree (from YAML or from a spreadsheet's cells) into an Inventory.

    ``defaults`` are already validated values (a column map's) used like a defaults section.
    """
    with paused_gc():
        return _Reader(path, check, place_of).inventory(root, sha256, defaults)


class YamlInventorySource(InventorySource):
    """pqtriage's own YAML inventory format, version 1."""

    name = "pqtriage YAML inventory"

    def accepts(self, text: str) -> bool:
        return True  # the fallback: anything not recognised by another source

    def parse(self, text: str, path: str, sha256: str | None = None) -> Inventory:
        return self.read(text, path, sha256)

    def read(self, text: str, path: str, sha256: str | None = None, check: UseCheck | None = None) -> Inventory:
        return read_tree(load_yaml(text, path, InventoryError), path, sha256, check)
