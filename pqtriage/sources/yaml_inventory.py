"""Our YAML inventory format: validated field by field against pqtriage.sources.schema."""

from __future__ import annotations

import datetime as dt
import difflib
import math
import re
from typing import Any

from pqtriage.errors import InventoryError, Place
from pqtriage.model.inventory import (
    IN_USE,
    Criticality,
    CryptoUse,
    Exposure,
    Inventory,
    Purpose,
    SourceRef,
    System,
)
from pqtriage.sources.interface import InventorySource
from pqtriage.sources.schema import (
    DEFAULTABLE,
    SYSTEM_FIELDS,
    TOP_FIELDS,
    USE_FIELDS,
    FieldSpec,
)
from pqtriage.yamlio import Node, load_yaml, paused_gc

_TYPE_NAMES = {str: "text", int: "a whole number", float: "a number", bool: "true/false",
               list: "a list", dict: "a mapping", type(None): "nothing"}


_ISO_DATE = re.compile(r"\d{4}-\d{2}-\d{2}")


def _kind_of(value: object) -> str:
    return _TYPE_NAMES.get(type(value), type(value).__name__)


class _Reader:
    """Validates one document; every error names file:line:column and a fix."""

    def __init__(self, path: str):
        self.path = path
        self.warnings: list[str] = []

    def fail(self, node: Node, message: str, hint: str | None = None, key: bool = False) -> InventoryError:
        line, column = (node.key_line, node.key_column) if key and node.key_line else (node.line, node.column)
        return InventoryError(message, place=Place(self.path, line, column), hint=hint)

    def mapping(self, node: Node, fields: tuple[FieldSpec, ...], what: str) -> dict[str, Node]:
        if not isinstance(node.value, dict):
            raise self.fail(node, f"{what} must be a mapping of fields, got {_kind_of(node.value)}")
        known = {f.name for f in fields}
        for key, child in node.value.items():
            if key not in known:
                close = difflib.get_close_matches(key, sorted(known), n=1, cutoff=0.6)
                hint = f"did you mean '{close[0]}'?" if close else f"known fields: {', '.join(sorted(known))}"
                raise self.fail(child, f"unknown field '{key}' in {what}", hint, key=True)
        return node.value

    def value(self, spec: FieldSpec, node: Node, what: str) -> Any:
        value = node.value
        label = f"'{spec.name}' in {what}"
        if spec.kind == "str":
            if isinstance(value, bool) or value is None or isinstance(value, (list, dict)):
                raise self.fail(node, f"{label} must be text, got {_kind_of(value)}", "quote the value")
            if isinstance(value, float):
                raise self.fail(node, f"{label} must be text, got {_kind_of(value)}", "quote the value")
            text = str(value)
            if not text.strip():
                raise self.fail(node, f"{label} is empty", "write a value or remove the field")
            return text
        if spec.kind in ("number", "integer"):
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise self.fail(node, f"{label} must be {'a whole number' if spec.kind == 'integer' else 'a number'}"
                                f", got {_kind_of(value)}", "write digits without quotes")
            if spec.kind == "integer" and not isinstance(value, int):
                raise self.fail(node, f"{label} must be a whole number, got {value}")
            if isinstance(value, float) and not math.isfinite(value):
                raise self.fail(node, f"{label} must be a finite number, got {value}")
            if spec.minimum is not None and value < spec.minimum:
                raise self.fail(node, f"{label} is {value}, below the minimum {spec.minimum:g}",
                                "years and sizes cannot be negative")
            if spec.maximum is not None and value > spec.maximum:
                raise self.fail(node, f"{label} is {value}, above the maximum {spec.maximum:g}",
                                "check the unit (years, bits)")
            return value
        if spec.kind == "enum":
            if not isinstance(value, str) or value not in spec.choices:
                close = difflib.get_close_matches(str(value), spec.choices, n=1, cutoff=0.5)
                hint = f"did you mean '{close[0]}'?" if close else f"use one of: {', '.join(spec.choices)}"
                raise self.fail(node, f"{label} is {str(value)[:60]!r}, not a known value", hint)
            return value
        if spec.kind == "date":
            try:
                if not isinstance(value, str) or not _ISO_DATE.fullmatch(value):
                    raise ValueError(value)
                return dt.date.fromisoformat(value)
            except ValueError:
                raise self.fail(node, f"{label} is {str(value)[:40]!r}, not a date",
                                "write YYYY-MM-DD, for example 2030-06-30") from None
        if spec.kind in ("string-list", "field-list"):
            if not isinstance(value, list):
                raise self.fail(node, f"{label} must be a list, got {_kind_of(value)}",
                                "write [a, b] or one '- item' per line")
            items = []
            for item in value:
                if isinstance(item.value, bool) or not isinstance(item.value, (str, int)):
                    raise self.fail(item, f"each entry of {label} must be text, got {_kind_of(item.value)}")
                items.append(str(item.value))
            return tuple(items)
        raise AssertionError(spec.kind)  # pragma: no cover

    def fields(self, node: Node, fields: tuple[FieldSpec, ...], what: str,
               defaults: dict[str, Any] | None = None, optional: bool = False) -> dict[str, Any]:
        raw = self.mapping(node, fields, what)
        out: dict[str, Any] = {}
        for spec in fields:
            if spec.kind in ("uses", "systems", "defaults"):
                continue
            if spec.name in raw:
                out[spec.name] = self.value(spec, raw[spec.name], what)
            elif defaults and spec.name in defaults:
                out[spec.name] = defaults[spec.name]
            elif spec.required and not optional:
                hint = "add it here or in the file's defaults section" if spec.defaultable else "add it"
                raise self.fail(node, f"{what} has no '{spec.name}'", hint)
        return out

    def use(self, node: Node, what: str) -> CryptoUse:
        values = self.fields(node, USE_FIELDS, what)
        return CryptoUse(
            purpose=Purpose(values["purpose"]),
            algorithm=values["algorithm"],
            key_size=values.get("key_size"),
            curve=values.get("curve"),
            parameter_set=values.get("parameter_set"),
            trust_years=values.get("trust_years"),
            protocol=values.get("protocol"),
            notes=values.get("notes"),
            source=SourceRef(self.path, node.line, node.column, values.get("source")),
            assumed=values.get("assumed", ()),
            role=values.get("role", IN_USE),
            not_before=values.get("not_before"),
            not_after=values.get("not_after"),
        )

    def system(self, node: Node, index: int, defaults: dict[str, Any]) -> System:
        label = f"system #{index + 1}"
        if isinstance(node.value, dict) and "id" in node.value:
            ident = node.value["id"].value
            if isinstance(ident, (str, int)) and not isinstance(ident, bool):
                label = f"system '{str(ident)[:80]}'"
        raw = self.mapping(node, SYSTEM_FIELDS, label)
        values = self.fields(node, SYSTEM_FIELDS, label, defaults)
        if "uses" not in raw:
            raise self.fail(node, f"{label} has no 'uses'", "list the cryptography it uses, or 'uses: []'")
        uses_node = raw["uses"]
        if not isinstance(uses_node.value, list):
            raise self.fail(uses_node, f"'uses' in {label} must be a list, got {_kind_of(uses_node.value)}")
        uses = tuple(self.use(u, f"use #{i + 1} of {label}") for i, u in enumerate(uses_node.value))
        assumed = tuple(values.get("assumed", ())) + tuple(
            f.name for f in DEFAULTABLE if f.name not in raw and f.name in defaults
            and f.name in ("shelf_life_years", "migration_years")
        )
        return System(
            id=values["id"],
            name=values.get("name", values["id"]),
            shelf_life_years=float(values["shelf_life_years"]),
            migration_years=float(values["migration_years"]),
            uses=uses,
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
            source=SourceRef(self.path, node.line, node.column, values.get("source")),
            assumed=tuple(dict.fromkeys(assumed)),
        )

    def inventory(self, root: Node | None, sha256: str | None) -> Inventory:
        if root is None:
            raise InventoryError("the file is empty", place=Place(self.path, 1, 1),
                                 hint="run 'pqtriage init' for a template")
        raw = self.mapping(root, TOP_FIELDS, "the inventory")
        top = self.fields(root, TOP_FIELDS, "the inventory")
        defaults: dict[str, Any] = {}
        if "defaults" in raw:
            defaults = self.fields(raw["defaults"], DEFAULTABLE, "defaults", optional=True)
        systems_node = raw["systems"]
        if not isinstance(systems_node.value, list):
            raise self.fail(systems_node, f"'systems' must be a list, got {_kind_of(systems_node.value)}")
        systems = [self.system(n, i, defaults) for i, n in enumerate(systems_node.value)]
        self.check_ids(systems_node.value, systems)
        return Inventory(
            organization=top["organization"],
            systems=tuple(systems),
            version=top["version"],
            source_path=self.path,
            source_sha256=sha256,
            policies=top.get("policies", ()),
            warnings=tuple(self.warnings),
        )

    def check_ids(self, nodes: list[Node], systems: list[System]) -> None:
        seen: dict[str, int] = {}
        for node, system in zip(nodes, systems, strict=True):
            if system.id in seen:
                raise self.fail(node, f"duplicate system id '{system.id}' (first at line {seen[system.id]})",
                                "give each system its own id")
            seen[system.id] = node.line
        for node, system in zip(nodes, systems, strict=True):
            for dep in system.depends_on:
                if dep not in seen:
                    close = difflib.get_close_matches(dep, list(seen), n=1, cutoff=0.75)
                    where = _child(node, "depends_on")
                    if close:  # almost certainly a typo of a system in this file
                        raise self.fail(where, f"system '{system.id}' depends on unknown id '{dep}'",
                                        f"did you mean '{close[0]}'?")
                    # A dependency outside this file (another team's PKI) is legitimate: warn.
                    self.warnings.append(
                        f"{Place(self.path, where.line, where.column)}: system '{system.id}' depends on "
                        f"'{dep}', which is not in this inventory; treated as an external dependency"
                        " (add it to plan it too; 'check --strict' makes this an error)"
                    )
                if dep == system.id:
                    raise self.fail(_child(node, "depends_on"), f"system '{system.id}' depends on itself",
                                    "remove it from its own depends_on")
        cycle = find_cycle({s.id: s.depends_on for s in systems})
        if cycle:
            first = next(n for n, s in zip(nodes, systems, strict=True) if s.id == cycle[0])
            raise self.fail(first, "dependency cycle: " + " -> ".join(cycle + [cycle[0]]),
                            "break the cycle: one of them must migrate first")


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


class YamlInventorySource(InventorySource):
    """pqtriage's own YAML inventory format, version 1."""

    name = "pqtriage YAML inventory"

    def accepts(self, text: str) -> bool:
        return True  # the fallback: anything not recognised by another source

    def parse(self, text: str, path: str, sha256: str | None = None) -> Inventory:
        root = load_yaml(text, path, InventoryError)
        with paused_gc():
            return _Reader(path).inventory(root, sha256)
