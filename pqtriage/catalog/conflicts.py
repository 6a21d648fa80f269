"""Conflicting facts: a use whose name and explicit attributes disagree.

``ML-KEM-768`` with ``parameter_set: 512``, ``P-256`` with ``curve: P-9999``, ``RSA-2048`` with
``key_size: 512``: which one is true cannot be known from the input, so the use is unassessed
with both values named, never decided by the name alone. The check runs on the spec the catalog
resolved: an attribute the resolution used agrees with it by construction, so only attributes
the name overrode (or that do not apply to the algorithm at all) are reported.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass

from pqtriage.catalog.loader import Row
from pqtriage.catalog.spec import AlgorithmSpec, Conflict

KEY_SEARCH_PRIMITIVES = ("block-cipher", "aead", "stream-cipher", "mac")
"""Symmetric primitives whose name fixes the key size (AES-128-GCM, 3TDEA ...)."""
KEYLESS_MACS = ("HMAC", "Poly1305")
"""MAC families whose key length the name does not fix (HMAC keys may have any length)."""


@dataclass(frozen=True)
class CatalogFacts:
    """What the check needs to know of the catalog beyond the spec."""

    curve: Callable[[str], Row | None]
    """A curve row by any spelling, or None."""
    group_bits: Callable[[str], int | None]
    """The prime size of a named finite-field group (ffdhe2048, modp2048), or None."""
    parameters: Callable[[str], set[str]]
    """The parameter-set tokens a written name fixes for a keyed family (ML-KEM-768: {'768'})."""
    loose: Callable[[str], str]
    """The catalog's loose spelling (case, '-', '_', '/' and spaces ignored)."""


def _curve_sizes(row: Row) -> set[int]:
    """Key sizes people write for a curve: the order bits, the field bits, whole bytes of it."""
    field = int(row.get("field_bits") or row["order_bits"])
    return {int(row["order_bits"]), field, 8 * math.ceil(field / 8)}


def _key_sizes(spec: AlgorithmSpec, text: str, facts: CatalogFacts) -> tuple[set[str], str] | None:
    """The key sizes the name allows (as text) and how to show them, or None when it fixes none."""
    if spec.curve:
        row = facts.curve(spec.curve)
        if row is not None:
            sizes = _curve_sizes(row)
            return {str(size) for size in sizes}, f"{min(sizes)} ({spec.curve})"
    if spec.shor_problem in ("factoring", "finite-field-dlog") and spec.problem_bits:
        return {str(spec.problem_bits)}, str(spec.problem_bits)
    if spec.quantum_attack == "none" and not spec.hybrid:
        tokens = facts.parameters(text) | facts.parameters(spec.name)
        if tokens:
            return tokens, " or ".join(sorted(tokens))
        return None
    if spec.primitive in KEY_SEARCH_PRIMITIVES and spec.family not in KEYLESS_MACS and spec.problem_bits:
        sizes = {spec.problem_bits, *spec.key_sizes}
        return {str(size) for size in sizes}, " or ".join(str(size) for size in sorted(sizes))
    if spec.primitive == "hash" and spec.problem_bits:
        return {str(spec.problem_bits)}, str(spec.problem_bits)
    return None


def _curves_of(spec: AlgorithmSpec) -> Iterable[str]:
    if spec.curve:
        yield spec.curve
    for part in spec.components:
        if part.spec.curve:
            yield part.spec.curve


def _curve_conflict(spec: AlgorithmSpec, curve: str, facts: CatalogFacts) -> Conflict | None:
    named = list(dict.fromkeys(_curves_of(spec)))
    if spec.family == "FFDH" and spec.problem_bits:
        bits = facts.group_bits(curve)
        if bits == spec.problem_bits:
            return None
        return Conflict("curve", f"a {spec.problem_bits}-bit group ({spec.name})", curve)
    if not named:
        return Conflict("curve", None, curve)
    row = facts.curve(curve)
    if row is not None and row["name"] in named:
        return None
    return Conflict("curve", " or ".join(named), curve)


def find_conflicts(
    text: str,
    spec: AlgorithmSpec,
    *,
    key_size: int | None,
    curve: str | None,
    parameter_set: str | None,
    facts: CatalogFacts,
) -> tuple[Conflict, ...]:
    """Every attribute of the use that disagrees with the resolved algorithm.

    Cipher suites are left out: their attributes size the parts and cannot disagree with a name
    that fixes none of them.
    """
    if spec.primitive == "cipher-suite":
        return ()
    found: list[Conflict] = []
    if key_size is not None and not spec.hybrid:
        allowed = _key_sizes(spec, text, facts)
        if allowed is not None and str(key_size) not in allowed[0] and \
                facts.loose(str(key_size)) not in allowed[0]:
            found.append(Conflict("key_size", allowed[1], str(key_size)))
    if curve is not None:
        conflict = _curve_conflict(spec, curve, facts)
        if conflict is not None:
            found.append(conflict)
    if parameter_set is not None:
        wanted = facts.loose(parameter_set)
        tokens = facts.parameters(text) | facts.parameters(spec.name)
        sized = _key_sizes(spec, text, facts)
        agrees = (
            wanted in {facts.loose(t) for t in tokens}
            or (sized is not None and wanted in sized[0])
            or wanted in (facts.loose(spec.name), facts.loose(text))
            or (not tokens and bool(wanted) and wanted in facts.loose(spec.name))
        )
        if not agrees:
            named = " or ".join(sorted(tokens)) if tokens else (sized[1] if sized else None)
            found.append(Conflict("parameter_set", named, parameter_set))
    return tuple(found)
