"""Source code: calls and names that choose an algorithm, found with real grammars.

Python, Java, Go, JavaScript, TypeScript, C, C++ and Rust files are parsed with tree-sitter
and the grammar wheel of each language. The rules are data (``source_rules.yaml``): each
names a call (matched on the last segments of the callee, ``Cipher.getInstance``,
``hashlib.md5``, ``Md5::new``) or a name (``tls.VersionTLS10``, ``ring::agreement::X25519``),
what it chooses and where its parameters are. Literal algorithm names and key sizes are read
from the call's arguments, or from constants assigned once in the same file (``BITS = 1024``,
``#define BITS 1024``, ``static final int BITS``); when they are not literals the use is
reported with "parameters not resolved". Each use is ``file#lineN:rule`` with its line and
column. Names bound by Python imports and Rust ``use`` declarations are followed. What
cannot be seen: re-exports through other modules, JavaScript and Go import aliases, values
computed at run time or passed in from another file, and algorithms chosen by configuration.
"""

from __future__ import annotations

import functools
import importlib
import os
import re
from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

from pqtriage.errors import CatalogError, Place
from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.cipherstring import expand
from pqtriage.sources.scan.finders.data import load_data, require_sources
from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
    not_understood,
)
from pqtriage.sources.scan.findings import Finding, FindingKind

EXTENSIONS = {
    ".py": "python", ".java": "java", ".go": "go", ".js": "javascript", ".mjs": "javascript",
    ".cjs": "javascript", ".jsx": "javascript", ".ts": "typescript", ".tsx": "tsx",
    ".mts": "typescript", ".c": "c", ".h": "c", ".cc": "cpp", ".cpp": "cpp", ".cxx": "cpp",
    ".hpp": "cpp", ".hh": "cpp", ".rs": "rust",
}  # fmt: skip
#: Grammar wheel module and its language function, per language.
GRAMMARS = {
    "python": ("tree_sitter_python", "language"),
    "java": ("tree_sitter_java", "language"),
    "go": ("tree_sitter_go", "language"),
    "javascript": ("tree_sitter_javascript", "language"),
    "typescript": ("tree_sitter_typescript", "language_typescript"),
    "tsx": ("tree_sitter_typescript", "language_tsx"),
    "c": ("tree_sitter_c", "language"),
    "cpp": ("tree_sitter_cpp", "language"),
    "rust": ("tree_sitter_rust", "language"),
}
_RULE_LANGUAGE = {"tsx": "typescript"}
_CALLS = {"call", "call_expression", "method_invocation", "object_creation_expression"}
_NAMES = {"attribute", "field_access", "selector_expression", "member_expression",
          "scoped_identifier", "scoped_type_identifier", "type_identifier", "identifier",
          "qualified_type"}  # fmt: skip
_STRINGS = {"string", "string_literal", "interpreted_string_literal", "raw_string_literal",
            "template_string"}  # fmt: skip
_NUMBERS = {"integer", "decimal_integer_literal", "int_literal", "number", "number_literal",
            "integer_literal"}  # fmt: skip
_IMPORTS = {"import_statement", "import_from_statement", "use_declaration"}
_WRAPPERS = {"parenthesized_expression", "cast_expression", "type_cast_expression",
             "expression_list", "reference_expression", "unary_expression"}  # fmt: skip
UNRESOLVED = "parameters not resolved"
RULE_FIELDS = frozenset({
    "id", "language", "library", "call", "name", "algorithm", "algorithm_arg", "algorithm_field",
    "prefix", "size", "size_arg", "size_kw", "size_field", "size_call", "length_field", "curve",
    "curve_arg", "curve_kw", "curve_field", "cipher_string_arg", "protocol", "protocol_arg",
    "purpose", "source", "sample", "expect", "expect_size", "expect_curve",
})
"""Every field a rule may have (a misspelt one is a packaging bug, refused at load)."""
MAX_SOURCE_BYTES = 2 * 1024 * 1024
_HASHES = re.compile(r"^(MD2|MD4|MD5|SHA-?1|SHA-?224|SHA-?256|SHA-?384|SHA-?512|SHA3-\d+|RIPEMD160)$", re.I)


@dataclass(frozen=True)
class Rule:
    """One row of ``source_rules.yaml``."""

    id: str
    languages: tuple[str, ...]
    library: str
    call: str | None
    name: str | None
    purpose: Purpose
    fields: dict[str, Any]

    def get(self, key: str) -> Any:
        """A rule field, or None."""
        return self.fields.get(key)


@functools.lru_cache(maxsize=1)
def rules() -> tuple[tuple[Rule, ...], dict[str, str]]:
    """The rules and the curve spellings, checked at load."""
    raw = load_data("source_rules.yaml", ("rules", "curves"))
    require_sources(raw["rules"], "source_rules.yaml", "rules")
    loaded = []
    for row in raw["rules"]:
        unknown = set(row) - RULE_FIELDS
        if unknown:
            raise CatalogError(
                f"source rule {row.get('id')}: unknown fields {', '.join(sorted(unknown))}",
                place=Place("pqtriage/data/discovery/source_rules.yaml"),
            )
        languages = row["language"] if isinstance(row["language"], list) else [row["language"]]
        if ("call" in row) == ("name" in row):
            raise CatalogError(f"source rule {row['id']}: give exactly one of call or name")
        for language in languages:
            if language not in GRAMMARS:
                raise CatalogError(f"source rule {row['id']}: unknown language {language}")
        loaded.append(Rule(
            id=str(row["id"]), languages=tuple(languages), library=str(row["library"]),
            call=row.get("call"), name=row.get("name"), purpose=Purpose(row["purpose"]),
            fields=dict(row),
        ))  # fmt: skip
    return tuple(loaded), {str(k): str(v) for k, v in raw["curves"].items()}


@functools.cache
def parser(language: str) -> Any:
    """A tree-sitter parser for a language (the grammar wheel is imported on first use)."""
    from tree_sitter import Language, Parser

    module, function = GRAMMARS[language]
    return Parser(Language(getattr(importlib.import_module(module), function)()))


@functools.cache
def _needles(language: str) -> re.Pattern[bytes]:
    """The first segment of every rule of a language, as a word: one of them is written in
    any file a rule can fire on (``hashlib`` for ``hashlib.md5``, ``ring`` for
    ``ring::agreement::X25519``), in the call itself or in the import that binds it."""
    found = set()
    for rule in rules()[0]:
        if language in rule.languages:
            found.add(re.escape(_segments(rule.call or rule.name or "")[0]))
    return re.compile(rb"\b(" + "|".join(sorted(found)).encode() + rb")\b")


def language_of(path: str) -> str | None:
    """The language a file name says, or None."""
    return EXTENSIONS.get(os.path.splitext(path)[1].lower())


def _segments(text: str) -> list[str]:
    return [part for part in re.split(r"\.|::|->", re.sub(r"\s+", "", text)) if part]


def _text(node: Any) -> str:
    return node.text.decode("utf-8", "replace") if node is not None and node.text else ""


def _walk(root: Any) -> Iterator[Any]:
    stack = [root]
    while stack:
        node = stack.pop()
        yield node
        stack.extend(reversed(node.children))


class _File:
    """One parsed file: its constants and the helpers that read literal values."""

    def __init__(self, root: Any) -> None:
        self.root = root
        self.nodes = list(_walk(root))
        self.constants: dict[str, Any] = {}
        self.aliases: dict[str, list[str]] = {}
        """Local name -> the segments it stands for (``from hashlib import md5``,
        ``import hashlib as h``, Rust ``use ring::agreement::X25519``)."""
        seen: set[str] = set()
        for node in self.nodes:
            if node.type in _IMPORTS:
                _collect_aliases(node, self.aliases)
                continue
            pair = _assignment(node)
            if pair is None:
                continue
            name, value = pair
            if name in seen:
                self.constants.pop(name, None)  # assigned twice: not a constant
                continue
            seen.add(name)
            literal = self.literal(value, follow=False)
            if literal is not None:
                self.constants[name] = literal

    def literal(self, node: Any, follow: bool = True) -> str | int | None:
        """A string or integer literal, through casts, parentheses and same-file constants."""
        if node is None:
            return None
        if node.type in _WRAPPERS and node.named_children:
            return self.literal(node.named_children[-1], follow)
        if node.type in _STRINGS:
            if any(child.type in ("interpolation", "template_substitution") for child in node.children):
                return None
            return _unquote(_text(node))
        if node.type in _NUMBERS:
            digits = re.sub(r"(_|[uUlL]+$|(usize|u32|u64|i32|i64|u16)$)", "", _text(node))
            try:
                return int(digits, 0)
            except ValueError:
                return None
        if node.type == "preproc_arg":
            text = _text(node).strip()
            return int(text) if text.isascii() and text.isdigit() else _unquote(text) if text[:1] == '"' else None
        if follow and node.type in ("identifier", "field_identifier"):
            return self.constants.get(_text(node))
        return None

    def symbol(self, node: Any) -> str | None:
        """A name-like argument (``ec.SECP256R1()``, ``elliptic.P224()``, ``NID_secp384r1``)."""
        value = self.literal(node)
        if isinstance(value, str):
            return value
        if node is None:
            return None
        if node.type in _CALLS:
            return _segments(_text(_callee_node(node)))[-1:][0] if _text(_callee_node(node)) else None
        if node.type in _NAMES:
            return _segments(_text(node))[-1]
        return None


def _collect_aliases(node: Any, aliases: dict[str, list[str]]) -> None:
    """Names an import or ``use`` declaration binds, with what each stands for."""
    if node.type == "import_statement":  # import a.b as c
        for child in node.named_children:
            if child.type == "aliased_import":
                target = _segments(_text(child.child_by_field_name("name")))
                aliases[_text(child.child_by_field_name("alias"))] = target
        return
    if node.type == "import_from_statement":  # from a.b import c, d as e
        module = _segments(_text(node.child_by_field_name("module_name")))
        for child in node.named_children[1:]:
            if child.type == "dotted_name":
                aliases[_segments(_text(child))[-1]] = module + _segments(_text(child))
            elif child.type == "aliased_import":
                name = _segments(_text(child.child_by_field_name("name")))
                aliases[_text(child.child_by_field_name("alias"))] = module + name
        return
    _rust_use(node.child_by_field_name("argument"), [], aliases)


def _rust_use(node: Any, prefix: list[str], aliases: dict[str, list[str]]) -> None:
    if node is None:
        return
    if node.type in ("identifier", "scoped_identifier"):
        path = prefix + _segments(_text(node))
        aliases[path[-1]] = path
    elif node.type == "use_as_clause":
        path = prefix + _segments(_text(node.child_by_field_name("path")))
        aliases[_text(node.child_by_field_name("alias"))] = path
    elif node.type == "scoped_use_list":
        base = prefix + _segments(_text(node.child_by_field_name("path")))
        _rust_use(node.child_by_field_name("list"), base, aliases)
    elif node.type == "use_list":
        for child in node.named_children:
            _rust_use(child, prefix, aliases)


def _expanded(segments: list[str], aliases: dict[str, list[str]]) -> list[str]:
    """Segments with a leading imported name replaced by what it stands for."""
    if segments and segments[0] in aliases:
        return aliases[segments[0]] + segments[1:]
    return segments


def _unquote(text: str) -> str:
    text = re.sub(r"^[rbuRBUfF]{0,2}", "", text)
    for quote in ('"""', "'''", '"', "'", "`"):
        if text.startswith(quote) and text.endswith(quote) and len(text) >= 2 * len(quote):
            return text[len(quote) : -len(quote)]
    return text


def _assignment(node: Any) -> tuple[str, Any] | None:
    kind = node.type
    if kind == "assignment":  # Python
        left, right = node.child_by_field_name("left"), node.child_by_field_name("right")
    elif kind in ("variable_declarator", "init_declarator"):  # Java, JS, C
        left = node.child_by_field_name("name") or node.child_by_field_name("declarator")
        right = node.child_by_field_name("value")
    elif kind in ("const_spec", "var_spec"):  # Go
        left, right = node.child_by_field_name("name"), node.child_by_field_name("value")
    elif kind == "preproc_def":  # C
        left, right = node.child_by_field_name("name"), node.child_by_field_name("value")
    elif kind in ("const_item", "static_item"):  # Rust
        left, right = node.child_by_field_name("name"), node.child_by_field_name("value")
    elif kind == "let_declaration":
        left, right = node.child_by_field_name("pattern"), node.child_by_field_name("value")
    else:
        return None
    if left is None or right is None or left.type not in ("identifier", "field_identifier"):
        return None
    return _text(left), right


def _callee_node(node: Any) -> Any:
    if node.type == "method_invocation":
        return node  # object.name(...) : handled in _callee
    if node.type == "object_creation_expression":
        return node.child_by_field_name("type")
    return node.child_by_field_name("function")


def _callee(node: Any) -> str:
    if node.type == "method_invocation":
        target, name = node.child_by_field_name("object"), node.child_by_field_name("name")
        return f"{_text(target)}.{_text(name)}" if target is not None else _text(name)
    return _text(_callee_node(node))


def _arguments(node: Any) -> tuple[list[Any], dict[str, Any]]:
    args = node.child_by_field_name("arguments")
    positional, keywords = [], {}
    for child in args.named_children if args is not None else ():
        if child.type in ("comment", "line_comment", "block_comment"):
            continue
        if child.type == "keyword_argument":
            keywords[_text(child.child_by_field_name("name"))] = child.child_by_field_name("value")
        else:
            positional.append(child)
    return positional, keywords


def _object_fields(nodes: list[Any]) -> dict[str, Any]:
    fields = {}
    for node in nodes:
        if node.type != "object":
            continue
        for pair in node.named_children:
            if pair.type == "pair":
                key = _unquote(_text(pair.child_by_field_name("key")))
                fields[key] = pair.child_by_field_name("value")
    return fields


class SourceCodeFinder(Finder):
    """Reads source files of eight languages."""

    name = "source code"

    def wants(self, path: str, head: bytes) -> bool:
        return language_of(path) is not None

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        language = language_of(path)
        if language is None:
            return NOT_MINE
        if len(data) > MAX_SOURCE_BYTES:
            return not_understood(path, f"source file over {MAX_SOURCE_BYTES} bytes, not parsed")
        wanted = _RULE_LANGUAGE.get(language, language)
        if not _needles(wanted).search(data):
            # No rule's library is named anywhere in the file: nothing to find (a call needs
            # its module, class or function name written, or imported, in the same file).
            return FinderResult(claimed=True)
        try:
            tree = parser(language).parse(data)
        except (ImportError, ValueError) as error:
            return not_understood(path, f"no {language} grammar ({type(error).__name__})")
        # The grammars recover from errors (macros, newer syntax): what parses is still read,
        # so a file with errors is understood, not refused.
        file = _File(tree.root_node)
        table, curves = rules()
        calls = [r for r in table if r.call and wanted in r.languages]
        names = {tuple(_segments(r.name)): r for r in table if r.name and wanted in r.languages}
        findings: list[Finding] = []
        # Nodes are keyed by their span and type (the binding's node objects are not stable).
        skip = {_key(n) for top in file.nodes if top.type in _IMPORTS for n in _walk(top)}
        for node in file.nodes:
            if skip and _key(node) in skip:
                continue
            if node.type in _CALLS and calls:
                segments = _expanded(_segments(_callee(node)), file.aliases)
                for rule in calls:
                    want = _segments(rule.call or "")
                    if segments[-len(want) :] == want:
                        findings += _call_findings(rule, node, file, path, curves, context)
                        break
            elif node.type in _NAMES and names:
                written = _expanded(_segments(_text(node)), file.aliases)
                named = next((names[tuple(written[k:])] for k in range(len(written))
                              if tuple(written[k:]) in names), None)  # fmt: skip
                if named is not None and not _inside_same_name(node, named):
                    findings += [_finding(named, node, path, str(named.get("algorithm")),
                                          size=named.get("size"), curve=named.get("curve"),
                                          protocol=named.get("protocol"))]  # fmt: skip
                    skip.update(_key(n) for n in _walk(node))  # its parts are not uses
        return FinderResult(claimed=True, findings=tuple(findings))


def _key(node: Any) -> tuple[int, int, str]:
    return node.start_byte, node.end_byte, node.type


def _inside_same_name(node: Any, rule: Rule) -> bool:
    """A name already matched by its enclosing node (Rust paths nest)."""
    parent = node.parent
    return parent is not None and parent.type in _NAMES and _text(parent) == _text(node)


def _finding(
    rule: Rule, node: Any, path: str, algorithm: str, *, size: Any = None, curve: str | None = None,
    protocol: str | None = None, notes: tuple[str, ...] = (), purpose: Purpose | None = None,
    tag: str = "",
) -> Finding:
    line, column = node.start_point[0] + 1, node.start_point[1] + 1
    return Finding(
        source=SourceRef(path, line=line, column=column,
                         detail=f"line{line}.{column}:{rule.id}{tag}"),
        kind=FindingKind.SOURCE_CALL,
        algorithm=algorithm,
        purpose=purpose or rule.purpose,
        key_size=size if isinstance(size, int) and not isinstance(size, bool) and size > 0 else None,
        curve=curve,
        protocol=protocol,
        notes=(f"{rule.library}: {_text(node)[:120].splitlines()[0]}", *notes),
    )  # fmt: skip


def _call_findings(
    rule: Rule, node: Any, file: _File, path: str, curves: dict[str, str], context: FinderContext,
) -> list[Finding]:
    positional, keywords = _arguments(node)
    fields = _object_fields(positional)

    def arg(index: Any) -> Any:
        return positional[index] if isinstance(index, int) and index < len(positional) else None

    unresolved: list[str] = []
    if rule.get("cipher_string_arg") is not None:
        text = file.literal(arg(rule.get("cipher_string_arg")))
        if not isinstance(text, str):
            return [_finding(rule, node, path, "unknown", notes=(f"{UNRESOLVED}: cipher string",))]
        expansion = expand(text, context.expand_cipher_string)
        names = list(expansion.suites) or [text]
        return [_finding(rule, node, path, suite, protocol="TLS", tag=f":{suite}",
                         notes=(f"cipher string {text}",)) for suite in names]  # fmt: skip
    algorithm = rule.get("algorithm")
    if rule.get("algorithm_arg") is not None or rule.get("algorithm_field"):
        value = (file.literal(arg(rule.get("algorithm_arg"))) if rule.get("algorithm_arg") is not None
                 else file.literal(fields.get(str(rule.get("algorithm_field")))))  # fmt: skip
        if isinstance(value, str):
            algorithm = f"{rule.get('prefix') or ''}{value}"
        else:
            algorithm = "unknown"
            unresolved.append("algorithm name")
    size = None
    for key, source in (("size_arg", "arg"), ("size_kw", "kw"), ("size_field", "field"),
                        ("length_field", "field")):  # fmt: skip
        name = rule.get(key)
        if name is None or size is not None:
            continue
        node_value = arg(name) if source == "arg" else keywords.get(name) if source == "kw" else fields.get(name)
        if node_value is not None:
            size = file.literal(node_value)
    if rule.get("size_call") and size is None:
        size = _follow_up_size(node, file, str(rule.get("size_call")))
    curve = None
    for key, source in (("curve_arg", "arg"), ("curve_kw", "kw"), ("curve_field", "field")):
        name = rule.get(key)
        if name is None or curve is not None:
            continue
        node_value = arg(name) if source == "arg" else keywords.get(name) if source == "kw" else fields.get(name)
        symbol = file.symbol(node_value) if node_value is not None else None
        if symbol is not None:
            curve = curves.get(symbol, symbol)
    wants_size = any(rule.get(k) is not None for k in ("size_arg", "size_kw", "size_field", "size_call"))
    wants_curve = any(rule.get(k) is not None for k in ("curve_arg", "curve_kw", "curve_field"))
    if wants_size and not isinstance(size, int) and curve is None:
        if not (wants_curve and str(algorithm).lower() in ("ec", "ecdsa", "ecdh")):
            unresolved.append("key size")
    if wants_curve and curve is None and str(algorithm).lower() in ("ec", "ecdsa", "ecdh"):
        unresolved.append("curve")
    protocol = rule.get("protocol")
    if rule.get("protocol_arg") is not None:
        value = file.literal(arg(rule.get("protocol_arg")))
        protocol = value if isinstance(value, str) else None
        if protocol is None:
            unresolved.append("protocol")
    notes = (f"{UNRESOLVED}: " + ", ".join(unresolved),) if unresolved else ()
    return [
        _finding(rule, node, path, name, size=size, curve=curve, protocol=protocol,
                 notes=notes + extra, purpose=purpose, tag=tag)
        for name, purpose, extra, tag in _normalise(str(algorithm), rule, curve)
    ]  # fmt: skip


def _normalise(
    algorithm: str, rule: Rule, curve: str | None
) -> list[tuple[str, Purpose | None, tuple[str, ...], str]]:
    """Catalog spellings for what code writes: ``DES/ECB/PKCS5Padding`` -> DES (mode noted),
    ``SHA1withRSA`` and ``RSA-SHA1`` -> RSA plus the SHA-1 hash as its own use, ``ec`` ->
    ECDSA (or ECDH for key agreement)."""
    if "/" in algorithm:
        first, _, rest = algorithm.partition("/")
        return [(first, None, (f"transformation {algorithm} (mode and padding {rest})",), "")]
    match = re.match(r"^(.+?)with(.+)$", algorithm, re.IGNORECASE)
    if match and _HASHES.match(match.group(1)):
        digest, signer = match.group(1), match.group(2)
        return [(signer, None, (f"{algorithm}: hash {digest}",), ""),
                (digest, Purpose.SIGNATURE, (f"hash of {algorithm}",), ":hash")]  # fmt: skip
    parts = algorithm.split("-", 1)
    if len(parts) == 2 and parts[0].upper() in ("RSA", "DSA", "ECDSA") and _HASHES.match(parts[1]):
        return [(parts[0].upper(), None, (f"{algorithm}: hash {parts[1]}",), ""),
                (parts[1], Purpose.SIGNATURE, (f"hash of {algorithm}",), ":hash")]  # fmt: skip
    if algorithm.lower() in ("rsa", "dsa", "dh", "rsa-pss"):  # node key types are lower case
        return [(algorithm.upper(), None, (), "")]
    if algorithm.lower() == "ec":
        agreement = rule.purpose is Purpose.KEY_ESTABLISHMENT
        return [("ECDH" if agreement else "ECDSA", None, (), "")]
    return [(algorithm, None, (), "")]


def _follow_up_size(node: Any, file: _File, method: str) -> int | None:
    """Java: ``g = KeyPairGenerator.getInstance("RSA"); g.initialize(2048)`` in the same file."""
    parent = node.parent
    variable = None
    if parent is not None and parent.type == "variable_declarator":
        variable = _text(parent.child_by_field_name("name"))
    elif parent is not None and parent.type == "assignment_expression":
        variable = _text(parent.child_by_field_name("left"))
    if not variable:
        return None
    for other in file.nodes:
        if (
            other.type == "method_invocation"
            and _text(other.child_by_field_name("object")) == variable
            and _text(other.child_by_field_name("name")) == method
        ):
            positional, _ = _arguments(other)
            value = file.literal(positional[0]) if positional else None
            return value if isinstance(value, int) else None
    return None
