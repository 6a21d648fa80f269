"""The ``--where`` filter language: a small expression over system fields and verdicts.

Parsed by the recursive-descent parser below into a tree of tests (never ``eval``); errors
point at the column of the expression. Grammar (docs/inventory-format.md, "Views")::

    expression := term ("or" term)*
    term       := factor ("and" factor)*
    factor     := "not" factor | "(" expression ")" | test
    test       := FIELD OPERATOR VALUE
                | FIELD "in" "(" VALUE ("," VALUE)* ")"
                | FIELD "is" ["not"] "empty"
                | FIELD                          (a true/false field: high_value_asset)
    OPERATOR   := "=" | "!=" | "<" | "<=" | ">" | ">=" | "~"   ("~": contains, any case)
    VALUE      := a word (letters, digits and . _ : / @ + -) or a quoted "text"

Text compares without regard to case. A field with several values (tags, frameworks, a
system's algorithms) matches when any value does; ``!=`` is the negation of ``=``. Ordered
fields (criticality, impact, verdict, fips_140_level) and numbers and dates compare with
``<``/``>``: ``criticality >= high``, ``verdict >= exposed`` (more urgent), ``start_by < 2030-01-01``.
"""

from __future__ import annotations

import datetime as dt
import difflib
import re
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from pqtriage.errors import UsageError
from pqtriage.model.inventory import CRITICALITY_ORDER, IMPACT_ORDER, Criticality, Impact, Inventory
from pqtriage.model.verdict import SEVERITY, SystemAssessment, Verdict

Getter = Callable[[SystemAssessment, Inventory], list[Any]]
_FIPS_LEVELS = tuple(f"fips140-{edition}-l{level}" for edition in (1, 2, 3) for level in (1, 2, 3, 4))


@dataclass(frozen=True)
class FieldInfo:
    """A field the filter and the grouping know."""

    kind: str
    """text, enum, ordered, bool, number or date."""
    getter: Getter
    """The field's values for one system (empty when not set)."""
    choices: tuple[str, ...] = ()
    """Accepted values of an enum; for an ordered one, from least to most."""


def _one(value: Any) -> list[Any]:
    if value is None:
        return []
    return [getattr(value, "value", value)]


def _system(attribute: str) -> Getter:
    return lambda item, inventory: _one(getattr(item.system, attribute))


def _nested(outer: str, inner: str) -> Getter:
    def get(item: SystemAssessment, inventory: Inventory) -> list[Any]:
        holder = getattr(item.system, outer)
        return [] if holder is None else _one(getattr(holder, inner))
    return get


def _uses(attribute: str, fallback: str | None = None) -> Getter:
    """Values over the system's uses (a use's own, else the system's ``fallback`` field)."""
    def get(item: SystemAssessment, inventory: Inventory) -> list[Any]:
        values = []
        for use in item.system.uses:
            value = getattr(use, attribute)
            if value is None and fallback:
                value = getattr(item.system, fallback)
            values += _one(value)
        if not item.system.uses and fallback:
            values += _one(getattr(item.system, fallback))
        return list(dict.fromkeys(values))
    return get


def _algorithms(item: SystemAssessment, inventory: Inventory) -> list[Any]:
    names: list[str] = []
    for use in item.uses:
        names.append(use.use.algorithm)
        for spec in (use.spec, use.deciding):
            if spec is not None:
                names.append(spec.name)
    return list(dict.fromkeys(names))


def _number(getter: Callable[[SystemAssessment], Any]) -> Getter:
    return lambda item, inventory: _one(getter(item))


FIELDS: dict[str, FieldInfo] = {
    "id": FieldInfo("text", _system("id")),
    "name": FieldInfo("text", _system("name")),
    "owner": FieldInfo("text", _system("owner")),
    "business_unit": FieldInfo("text", _system("business_unit")),
    "criticality": FieldInfo("ordered", _system("criticality"),
                             tuple(c.value for c in sorted(Criticality, key=lambda c: -CRITICALITY_ORDER[c]))),
    "exposure": FieldInfo("enum", _system("exposure"), ("internet", "partner", "internal", "isolated")),
    "impact": FieldInfo("ordered", _system("impact"), tuple(i.value for i in sorted(Impact, key=lambda i: IMPACT_ORDER[i]))),
    "high_value_asset": FieldInfo("bool", _system("high_value_asset")),
    "data_classification": FieldInfo("text", _nested("data_classification", "label")),
    "data_classification.rank": FieldInfo("number", _nested("data_classification", "rank")),
    "hosting.model": FieldInfo("enum", _nested("hosting", "model"), ("on-premises", "cloud", "hybrid")),
    "hosting.provider": FieldInfo("text", _nested("hosting", "provider")),
    "hosting.country": FieldInfo("text", _nested("hosting", "country")),
    "vendor": FieldInfo("text", _system("vendor")),
    "product": FieldInfo("text", _system("product")),
    "version": FieldInfo("text", _system("version")),
    "protocol": FieldInfo("text", _uses("protocol", "protocol")),
    "crypto_library": FieldInfo("text", _uses("crypto_library", "crypto_library")),
    "crypto_module": FieldInfo("text", _uses("crypto_module", "crypto_module")),
    "fips_140_certificate": FieldInfo("text", _uses("fips_140_certificate", "fips_140_certificate")),
    "fips_140_level": FieldInfo("ordered", _uses("fips_140_level", "fips_140_level"), _FIPS_LEVELS),
    "key_storage": FieldInfo("enum", _uses("key_storage", "key_storage"),
                             ("hsm", "tpm", "software", "cloud-kms", "unknown")),
    "policy_category": FieldInfo("text", _system("policy_category")),
    "vendor_readiness": FieldInfo("enum", _system("vendor_readiness"), ("available", "announced", "unknown")),
    "tags": FieldInfo("text", lambda item, inventory: list(item.system.tags)),
    "frameworks": FieldInfo("text", lambda item, inventory: list(inventory.frameworks_of(item.system))),
    "algorithm": FieldInfo("text", _algorithms),
    "purpose": FieldInfo("enum", lambda item, inventory: list(dict.fromkeys(u.purpose.value for u in item.system.uses)),
                         ("key-establishment", "encryption", "signature", "authentication", "integrity")),
    "verdict": FieldInfo("ordered", lambda item, inventory: [item.verdict.value],
                         tuple(v.value for v in sorted(Verdict, key=lambda v: SEVERITY[v]))),
    "rank": FieldInfo("number", _number(lambda item: item.rank)),
    "shelf_life_years": FieldInfo("number", _number(lambda item: item.system.shelf_life_years)),
    "migration_years": FieldInfo("number", _number(lambda item: item.system.migration_years)),
    "margin_years": FieldInfo("number", _number(lambda item: item.margin_years)),
    "exposure_probability": FieldInfo("number", _number(lambda item: item.exposure_probability)),
    "effort_person_weeks": FieldInfo("number", _number(lambda item: item.system.effort_person_weeks)),
    "start_by": FieldInfo("date", _number(lambda item: item.start_by)),
}
"""Every field a filter or a grouping may name (plus ``extra.NAME``)."""


def field_info(name: str) -> FieldInfo | None:
    """The field's definition; ``extra.NAME`` is the organisation's own field (text or number)."""
    if name in FIELDS:
        return FIELDS[name]
    if name.startswith("extra.") and len(name) > 6:
        key = name[6:]
        return FieldInfo("extra", lambda item, inventory: [v for k, v in item.system.extra if k == key])
    return None


_TOKEN = re.compile(r"""\s*(?:(?P<op><=|>=|!=|=|<|>|~)|(?P<paren>[(),])|(?P<quoted>"(?:[^"\\]|\\.)*"|'(?:[^'\\]|\\.)*')"""
                    r"""|(?P<word>[A-Za-z0-9_.:/@+\-]+)|(?P<bad>\S))""")
KEYWORDS = {"and", "or", "not", "in", "is", "empty"}


@dataclass(frozen=True)
class Token:
    """One token with its 1-based column."""

    kind: str
    text: str
    column: int


def tokenize(text: str) -> list[Token]:
    """Split an expression into tokens (errors name the column)."""
    tokens: list[Token] = []
    position = 0
    while position < len(text):
        match = _TOKEN.match(text, position)
        if match is None or match.end() == position:
            break
        kind = match.lastgroup or "bad"
        start = match.start(kind)
        value = match.group(kind)
        if kind == "bad":
            raise _error(start + 1, f"unexpected character {value!r}",
                         "quote values with spaces or other signs: \"Payments team\"")
        if kind == "quoted":
            body = value[1:-1]
            value = re.sub(r"\\(.)", r"\1", body)
        elif kind == "word" and value.lower() in KEYWORDS:
            kind, value = "keyword", value.lower()
        tokens.append(Token(kind, value, start + 1))
        position = match.end()
    return tokens


def _error(column: int, message: str, hint: str | None = None) -> UsageError:
    return UsageError(f"--where, column {column}: {message}", hint=hint)


class Test:
    """A node of the parsed expression."""

    def matches(self, item: SystemAssessment, inventory: Inventory) -> bool:  # pragma: no cover - abstract
        raise NotImplementedError


@dataclass(frozen=True)
class Compare(Test):
    """FIELD OPERATOR VALUE (or ``in``, or ``is empty``)."""

    field: str
    info: FieldInfo
    operator: str
    values: tuple[Any, ...]

    def matches(self, item: SystemAssessment, inventory: Inventory) -> bool:
        found = self.info.getter(item, inventory)
        if self.operator == "empty":
            return not found
        if self.operator == "!=":
            return not any(self._equal(v, w) for v in found for w in self.values)
        if self.operator in ("=", "in"):
            return any(self._equal(v, w) for v in found for w in self.values)
        if self.operator == "~":
            needle = str(self.values[0]).casefold()
            return any(needle in str(v).casefold() for v in found)
        return any(self._order(v, self.values[0]) for v in found)

    def _equal(self, value: Any, wanted: Any) -> bool:
        if isinstance(wanted, str) and not isinstance(value, bool):
            return str(value).casefold() == wanted.casefold()
        return bool(value == wanted)

    def _order(self, value: Any, wanted: Any) -> bool:
        if self.info.kind == "ordered":
            value, wanted = self.info.choices.index(value), self.info.choices.index(wanted)
        elif self.info.kind == "extra":
            if not isinstance(value, (int, float)) or isinstance(value, bool):
                return False
        result: bool = {"<": value < wanted, "<=": value <= wanted, ">": value > wanted,
                        ">=": value >= wanted}[self.operator]
        return result


@dataclass(frozen=True)
class Not(Test):
    inner: Test

    def matches(self, item: SystemAssessment, inventory: Inventory) -> bool:
        return not self.inner.matches(item, inventory)


@dataclass(frozen=True)
class Both(Test):
    left: Test
    right: Test

    def matches(self, item: SystemAssessment, inventory: Inventory) -> bool:
        return self.left.matches(item, inventory) and self.right.matches(item, inventory)


@dataclass(frozen=True)
class Either(Test):
    left: Test
    right: Test

    def matches(self, item: SystemAssessment, inventory: Inventory) -> bool:
        return self.left.matches(item, inventory) or self.right.matches(item, inventory)


@dataclass(frozen=True)
class Filter:
    """A parsed ``--where`` expression."""

    text: str
    """The expression as given."""
    test: Test
    """Its tree."""

    def matches(self, item: SystemAssessment, inventory: Inventory) -> bool:
        """Whether a ranked system passes the filter."""
        return self.test.matches(item, inventory)


class _Parser:
    def __init__(self, text: str):
        self.text = text
        self.tokens = tokenize(text)
        self.index = 0

    def peek(self) -> Token | None:
        return self.tokens[self.index] if self.index < len(self.tokens) else None

    def take(self) -> Token:
        token = self.peek()
        if token is None:
            raise _error(len(self.text) + 1, "the expression ends too early", "complete it: FIELD = VALUE")
        self.index += 1
        return token

    def keyword(self, word: str) -> bool:
        token = self.peek()
        if token is not None and token.kind == "keyword" and token.text == word:
            self.index += 1
            return True
        return False

    def expression(self) -> Test:
        test = self.term()
        while self.keyword("or"):
            test = Either(test, self.term())
        return test

    def term(self) -> Test:
        test = self.factor()
        while self.keyword("and"):
            test = Both(test, self.factor())
        return test

    def factor(self) -> Test:
        if self.keyword("not"):
            return Not(self.factor())
        token = self.peek()
        if token is not None and token.kind == "paren" and token.text == "(":
            self.take()
            test = self.expression()
            close = self.take()
            if close.kind != "paren" or close.text != ")":
                raise _error(close.column, f"expected ')' here, found {close.text!r}")
            return test
        return self.test()

    def test(self) -> Test:
        token = self.take()
        if token.kind != "word":
            raise _error(token.column, f"expected a field name, found {token.text!r}",
                         "start with a field: criticality >= high")
        name = token.text.lower()
        info = field_info(name)
        if info is None:
            close = difflib.get_close_matches(name, list(FIELDS), n=1, cutoff=0.6)
            raise _error(token.column, f"unknown field '{token.text[:40]}'",
                         f"did you mean '{close[0]}'?" if close else
                         f"fields: {', '.join(FIELDS)}, extra.NAME")
        following = self.peek()
        if following is None or following.kind == "keyword" and following.text in ("and", "or") or (
                following.kind == "paren" and following.text == ")"):
            if info.kind != "bool":
                raise _error(token.column + len(token.text), f"'{name}' needs a comparison",
                             f"write for example {name} = VALUE")
            return Compare(name, info, "=", (True,))
        if self.keyword("is"):
            negate = self.keyword("not")
            word = self.take()
            if word.kind != "keyword" or word.text != "empty":
                raise _error(word.column, "expected 'empty' after 'is'", f"write {name} is empty")
            test: Test = Compare(name, info, "empty", ())
            return Not(test) if negate else test
        if self.keyword("in"):
            opening = self.take()
            if opening.kind != "paren" or opening.text != "(":
                raise _error(opening.column, "expected '(' after 'in'", f"write {name} in (a, b)")
            values = [self.value(name, info, "in")]
            while True:
                sep = self.take()
                if sep.kind == "paren" and sep.text == ")":
                    break
                if sep.kind != "paren" or sep.text != ",":
                    raise _error(sep.column, f"expected ',' or ')', found {sep.text!r}")
                values.append(self.value(name, info, "in"))
            return Compare(name, info, "in", tuple(values))
        operator = self.take()
        if operator.kind != "op":
            raise _error(operator.column, f"expected an operator after '{name}', found {operator.text!r}",
                         "use = != < <= > >= ~ in or is empty")
        if operator.text in ("<", "<=", ">", ">=") and info.kind in ("text", "enum", "bool"):
            raise _error(operator.column, f"'{name}' has no order, so '{operator.text}' does not apply",
                         "use =, != or ~")
        return Compare(name, info, operator.text, (self.value(name, info, operator.text),))

    def value(self, name: str, info: FieldInfo, operator: str) -> Any:
        token = self.take()
        if token.kind not in ("word", "quoted", "keyword"):
            raise _error(token.column, f"expected a value for '{name}', found {token.text!r}")
        text = token.text
        if operator == "~":
            return text
        if info.kind in ("enum", "ordered"):
            lowered = text.lower()
            if lowered not in info.choices:
                close = difflib.get_close_matches(lowered, info.choices, n=1, cutoff=0.5)
                raise _error(token.column, f"'{text[:40]}' is not a value of {name}",
                             f"did you mean '{close[0]}'?" if close else f"use one of: {', '.join(info.choices)}")
            return lowered
        if info.kind == "bool":
            if text.lower() not in ("true", "false", "yes", "no"):
                raise _error(token.column, f"'{name}' is true or false, not '{text[:40]}'")
            return text.lower() in ("true", "yes")
        if info.kind == "number" or (info.kind == "extra" and operator in ("<", "<=", ">", ">=")):
            try:
                return float(text)
            except ValueError:
                raise _error(token.column, f"'{name}' is a number, not '{text[:40]}'") from None
        if info.kind == "date":
            try:
                return dt.date.fromisoformat(text)
            except ValueError:
                raise _error(token.column, f"'{name}' is a date, not '{text[:40]}'", "write YYYY-MM-DD") from None
        return text


def parse_filter(text: str) -> Filter:
    """Parse a ``--where`` expression; a UsageError names the column of any mistake."""
    if not text.strip():
        raise _error(1, "the expression is empty", "for example: criticality >= high and verdict = exposed")
    parser = _Parser(text)
    test = parser.expression()
    rest = parser.peek()
    if rest is not None:
        raise _error(rest.column, f"unexpected {rest.text!r}", "join tests with 'and' or 'or'")
    return Filter(text, test)
