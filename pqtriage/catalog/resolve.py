"""Name normalisation and lookup: the :class:`Catalog` that resolves what people write.

Lookup order: the exact spelling (case-insensitive), then the loose spelling
(also ignoring ``-``, ``_``, spaces and ``/``; a loose spelling shared by two
different things is ambiguous and not used), then a family name with a size
in it (``rsa3072``, ``DH-2048``), a family name with a curve in it
(``ECDSA-P256``), a keyed family with the use's parameter (``AES-GCM`` +
``key_size: 256``), then TLS cipher suites, then the names other tools write (Java,
OpenSSL, Go, .NET: :mod:`pqtriage.catalog.identifiers`), else unknown with suggestions.
An object identifier, when the input gives one, is resolved first and checked against the
name (:mod:`pqtriage.catalog.by_identifier`).
"""

from __future__ import annotations

import datetime as dt
import difflib
import re
from collections.abc import Iterable
from dataclasses import dataclass, replace
from typing import Any

from pqtriage.catalog.build import SpecBuilder
from pqtriage.catalog.conflicts import CatalogFacts, find_conflicts
from pqtriage.catalog.identifiers import Identifiers, Translation
from pqtriage.catalog.loader import RawCatalog, Row
from pqtriage.catalog.spec import AlgorithmSpec, Resolution
from pqtriage.catalog.strength import join_notes
from pqtriage.catalog.suites import SuiteParser
from pqtriage.catalog.transitions import Standing, Transitions, read_transitions
from pqtriage.catalog.trust import TrustDefault, TrustDefaults, read_trust_defaults
from pqtriage.errors import CatalogError, Place

MAX_KEY_BITS = 65536
"""Largest key size taken at face value; larger values are treated as input mistakes."""
SIGNING = ("signature", "authentication")
"""Purposes for which an elliptic-curve key means ECDSA (else ECDH)."""


def exact_key(text: str) -> str:
    """Case-insensitive spelling with runs of whitespace collapsed."""
    return " ".join(text.split()).casefold()


def loose_key(text: str) -> str:
    """Case-insensitive spelling without '-', '_', '/' and whitespace."""
    return re.sub(r"[-_/\s]+", "", text).casefold()


@dataclass(frozen=True)
class _Target:
    """What a spelling points at: a fixed spec, a family, a curve or a keyed family."""

    kind: str
    """fixed, family, curve or keyed."""
    label: str
    """Canonical catalog spelling (used in reasons and for identity)."""
    spec: AlgorithmSpec | None = None
    """The fixed spec (kind fixed)."""
    row: Row | None = None
    """Family row (family, keyed) or curve row (curve)."""
    name_row: Row | None = None
    """Protocol spelling row that led to a family, if any."""

    @property
    def identity(self) -> str:
        """Two spellings with the same identity name the same thing."""
        if self.spec is not None:
            return f"fixed:{self.spec.name}"
        return f"{self.kind}:{self.label}" + (
            f" via {self.name_row['name']}" if self.name_row else ""
        )


class Catalog:
    """The algorithm catalog: resolves names, lists specs and spellings."""

    def __init__(
        self,
        raw: RawCatalog,
        identifiers: Identifiers | None = None,
        transitions: Transitions | None = None,
        trust: TrustDefaults | None = None,
    ) -> None:
        self.transitions = transitions or read_transitions()
        """Classical status rules by date (NIST SP 800-131A Rev. 2, draft Rev. 3 ...)."""
        self.trust = trust or read_trust_defaults()
        """Default trust periods of signatures by role."""
        self._builder = SpecBuilder(raw)
        self._path = raw.path
        self._exact: dict[str, _Target] = {}
        self._loose: dict[str, _Target | None] = {}  # None: ambiguous
        self._display: dict[str, str] = {}
        self._curves: dict[str, Row] = {}
        self.identifiers = identifiers
        """OIDs and the names other tools write (None: catalog spellings only)."""
        if identifiers is not None:
            from pqtriage.catalog.by_identifier import attach_oids

            attach_oids(self._builder, identifiers)
        self._index(raw)
        self._suggested: dict[tuple[str, int], tuple[str, ...]] = {}
        """Suggestions already computed, per distinct unknown name (``suggest`` is memoised)."""
        self._suites = SuiteParser(raw.suite_tokens, self, raw.path)
        self._facts = CatalogFacts(
            curve=lambda name: self._curves.get(loose_key(name)),
            group_bits=self._group_bits,
            parameters=self._parameters,
            loose=loose_key,
        )
        if identifiers is not None:
            from pqtriage.catalog.by_identifier import check_targets

            check_targets(self, identifiers)

    # -- public API -----------------------------------------------------------------------
    def resolve(
        self,
        algorithm: str,
        *,
        key_size: int | None = None,
        curve: str | None = None,
        parameter_set: str | None = None,
        purpose: str | None = None,
        oid: str | None = None,
    ) -> Resolution:
        """Resolve an algorithm as written in an input, with the use's parameters.

        Args:
            algorithm: any catalog spelling (``RSA-3072``, ``prime256v1``, a TLS suite ...)
                or a name another tool writes (``SHA512withRSA``, ``AES/GCM/NoPadding``).
            key_size: key or modulus size, when the name does not fix it.
            curve: elliptic curve (or named FFDH group), when the name does not fix it.
            parameter_set: parameter set (``768`` for ML-KEM ...), when not in the name.
            purpose: the use's purpose; decides ECDSA vs ECDH for a bare curve.
            oid: the object identifier the input gives for the algorithm: resolved first; a
                name that contradicts it makes the use unassessed, naming both.

        Returns:
            A Resolution; ``spec`` is None (with a reason) when it cannot be assessed.
        """
        if oid and self.identifiers is not None:
            from pqtriage.catalog.by_identifier import resolve_with_oid

            return resolve_with_oid(self, self.identifiers, str(algorithm), oid, key_size=key_size,
                                    curve=curve, parameter_set=parameter_set, purpose=_purpose(purpose))
        return self.resolve_name(algorithm, key_size=key_size, curve=curve, parameter_set=parameter_set,
                                 purpose=purpose)

    def resolve_name(
        self,
        algorithm: str,
        *,
        key_size: int | None = None,
        curve: str | None = None,
        parameter_set: str | None = None,
        purpose: str | None = None,
    ) -> Resolution:
        """Resolve by name alone (``resolve`` without an OID)."""
        text = " ".join(str(algorithm).split())
        if not text:
            return Resolution(None, reason="no algorithm name given")
        use_purpose = _purpose(purpose)
        if key_size is not None and (
            not isinstance(key_size, int)
            or isinstance(key_size, bool)
            or not 0 < key_size <= MAX_KEY_BITS
        ):
            return Resolution(
                None, reason=f"key size {key_size!r} is not a plausible number of bits"
            )
        target = self._target(text)
        found: Resolution | None
        if target is not None:
            found = self._resolve_target(target, text, key_size, curve, parameter_set, use_purpose)
        else:
            loose = loose_key(text)
            found = self._with_size(loose, key_size, curve, use_purpose)
            found = found or self._with_curve(loose, use_purpose)
            found = found or self._keyed(loose, parameter_set or (str(key_size) if key_size else None))
            found = found or self._suites.resolve(text, key_size=key_size, curve=curve)
        if found is None:
            translation = self.identifiers.translate(text) if self.identifiers is not None else None
            if translation is not None:
                return self._translated(text, translation, key_size, curve, parameter_set, use_purpose)
            return Resolution(
                None, reason=f"'{text}' is not in the algorithm catalog", suggestions=self.suggest(text)
            )
        checked = self._check_conflicts(found, text, key_size, curve, parameter_set)
        if checked.conflicts and target is not None:
            # OpenSSL's AES128-CCM is also the cipher's own name: sizes for the public-key parts
            # mean the suite, which then takes them without conflict.
            suite = self._suites.resolve(text, key_size=key_size, curve=curve)
            if suite is not None and suite.spec is not None:
                return suite
        return checked

    def classical_standing(self, spec: AlgorithmSpec, purpose: str, as_of: dt.date) -> Standing:
        """The classical status of ``spec`` for ``purpose`` on ``as_of`` (see catalog/transitions.py)."""
        return self.transitions.standing(spec, purpose, as_of)

    def trust_default(self, role: str | None) -> TrustDefault:
        """The cautious default trust period of a signature role (None: role not known)."""
        return self.trust.for_role(role)

    def _translated(self, text: str, translation: Translation, key_size: int | None,
                    curve: str | None, parameter_set: str | None, purpose: str | None) -> Resolution:
        """A name another tool writes, resolved as the catalog spelling it stands for."""
        wanted = purpose or translation.purpose
        if translation.algorithm is None:  # Java XDH / EdDSA: the curve says which
            if not curve:
                return Resolution(None, reason=f"{text} ({translation.written_as}) needs {translation.needs}",
                                  family=text, quantum_attack="shor")
            found = self.resolve_name(curve, purpose=translation.purpose)
        else:
            found = self.resolve_name(translation.algorithm, key_size=key_size, curve=curve,
                                      parameter_set=parameter_set, purpose=wanted)
        if found.spec is None:
            reason = f"{text} (read as {translation.algorithm or curve}: {translation.written_as}): {found.reason}"
            return replace(found, reason=reason)
        spec = found.spec
        identifiers = dict(spec.identifiers)
        if translation.oid is not None:
            identifiers.setdefault("oid", translation.oid.oid)
        return Resolution(replace(
            spec, identifiers=identifiers, source=f"{translation.source}; {spec.source}",
            notes=join_notes(spec.notes, f"read as {translation.algorithm or curve}: {translation.written_as}"),
        ))

    def suggest(self, name: str, limit: int = 3) -> tuple[str, ...]:
        """Up to ``limit`` known spellings close to ``name`` (difflib ratio), best first.

        Memoised per distinct name: 100,000 uses of one misspelled name compare it with every
        known spelling once, not 100,000 times.
        """
        known = self._suggested.get((name, limit))
        if known is None:
            keys = difflib.get_close_matches(loose_key(name), self._display, n=limit, cutoff=0.6)
            known = self._suggested[(name, limit)] = tuple(self._display[key] for key in keys)
        return known

    def specs(self) -> tuple[AlgorithmSpec, ...]:
        """Every fixed-parameter entry (RSA/DH/DSA at common sizes, ECDSA/ECDH per curve, ...)."""
        return tuple(self._builder.fixed.values())

    def curve_in(self, text: str) -> str | None:
        """The catalog curve a name ends with (``ECDSA-P256`` -> P-256), or None."""
        loose = loose_key(text)
        for key in sorted(self._curves, key=len, reverse=True):
            if loose.endswith(key):
                return str(self._curves[key]["name"])
        return None

    def spellings(self) -> tuple[str, ...]:
        """Every known spelling (names, aliases, family names, curve names), sorted."""
        return tuple(sorted(set(self._display.values()), key=str.casefold))

    # -- conflicting facts ----------------------------------------------------------------
    def _check_conflicts(
        self,
        found: Resolution,
        text: str,
        key_size: int | None,
        curve: str | None,
        parameter_set: str | None,
    ) -> Resolution:
        """The resolution, or an unassessed one naming both values when the attributes disagree."""
        spec = found.spec
        if spec is None or (key_size is None and curve is None and parameter_set is None):
            return found
        conflicts = find_conflicts(
            text, spec, key_size=key_size, curve=curve, parameter_set=parameter_set, facts=self._facts
        )
        if not conflicts:
            return found
        clauses = "; ".join(conflict.describe(spec.name) for conflict in conflicts)
        return Resolution(
            None,
            reason=f"conflicting facts: {clauses}; correct the one that is wrong",
            family=spec.family,
            quantum_attack=spec.quantum_attack,
            conflicts=conflicts,
        )

    def _group_bits(self, name: str) -> int | None:
        target = self._target(name)
        if target is not None and target.spec is not None and target.spec.family == "FFDH":
            return target.spec.problem_bits
        return None

    def _parameters(self, text: str) -> set[str]:
        """Parameter-set tokens a written name fixes for a keyed family: 'ML-KEM-768' -> {'768'}."""
        loose = loose_key(text)
        found: set[str] = set()
        for prefix, target in self._loose.items():
            if target is None or target.kind != "keyed" or target.row is None:
                continue
            if not loose.startswith(prefix) or prefix == loose:
                continue
            rest = loose[len(prefix) :]
            for size in target.row["sizes"]:
                token = loose_key(str(size))
                after = rest[len(token) :]
                if rest.startswith(token) and not (after[:1].isdigit()):
                    found.add(str(size))
        return found

    # -- part lookups used by the cipher suite parser --------------------------------------
    def fixed(self, name: str) -> AlgorithmSpec:
        """A fixed spec by catalog name or alias (CatalogError if absent: a data bug)."""
        target = self._target(name)
        if target is None or target.spec is None:
            raise CatalogError(f"'{name}' is not a fixed catalog entry", place=Place(self._path))
        return target.spec

    def family_part(
        self,
        family: str,
        key_size: int | None,
        curve: str | None,
        purpose: str,
    ) -> Resolution:
        """Resolve a family (RSA, FFDH, ECDH ...) with a use's parameters, for a composite."""
        row = self._builder.families[family]
        return self._family(row, None, row["family"], None, key_size, curve, purpose)

    def suite_replacements(self) -> dict[str, str]:
        """Replacement texts for a whole cipher suite."""
        return self._builder.replacement_texts("cipher-suite", "suite_tokens")

    # -- index ----------------------------------------------------------------------------
    def _index(self, raw: RawCatalog) -> None:
        builder = self._builder
        for name, spec in builder.fixed.items():
            self._add([name, *builder.aliases.get(name, [])], _Target("fixed", name, spec=spec))
        for row in raw.curves:
            self._add(
                [row["name"], *row.get("aliases", [])], _Target("curve", row["name"], row=row)
            )
            for spelling in (
                row["name"],
                *row.get("aliases", []),
                row.get("signature"),
                row.get("agreement"),
            ):
                if spelling:
                    self._curves[loose_key(spelling)] = row
        for row in raw.families:
            kind = "keyed" if row["parameter"] == "key" else "family"
            self._add(row["names"], _Target(kind, row["family"], row=row))
        for row in raw.names:
            self._add([row["name"], *row.get("aliases", [])], self._name_target(row))

    def _name_target(self, row: Row) -> _Target:
        label = f"names ({row['name']})"
        if "target" in row:
            spec = self._builder._named(self._builder.lookup(row["target"], label), row)
            return _Target("fixed", row["name"], spec=spec)
        family = self._builder.families.get(row.get("family", ""))
        if family is None:
            self._builder.fail(label, "needs a 'target' entry or a known 'family'")
        if "size" in row:
            spec = self._builder.sized(family, row["size"], name_row=row)
            return _Target("fixed", row["name"], spec=spec)
        if "curve" in row:
            curve = self._builder.curves.get(row["curve"])
            if curve is None:
                self._builder.fail(label, f"unknown curve '{row['curve']}'")
            return _Target(
                "fixed", row["name"], spec=self._builder.on_curve(family, curve, name_row=row)
            )
        return _Target("family", row["name"], row=family, name_row=row)

    def _add(self, spellings: Iterable[str], target: _Target) -> None:
        for spelling in spellings:
            key = exact_key(spelling)
            known = self._exact.get(key)
            if known is not None and known.identity != target.identity:
                raise CatalogError(
                    f"spelling '{spelling}' names both '{known.label}' and '{target.label}'",
                    place=Place(self._path),
                    hint="keep the spelling on one row only",
                )
            self._exact[key] = target
            loose = loose_key(spelling)
            other = self._loose.get(loose, target)
            self._loose[loose] = (
                target if other is not None and other.identity == target.identity else None
            )
            self._display.setdefault(loose, spelling)

    def _target(self, text: str) -> _Target | None:
        return self._exact.get(exact_key(text)) or self._loose.get(loose_key(text))

    # -- resolution -----------------------------------------------------------------------
    def _resolve_target(
        self,
        target: _Target,
        text: str,
        key_size: int | None,
        curve: str | None,
        parameter_set: str | None,
        purpose: str | None,
    ) -> Resolution:
        if target.kind == "fixed":
            assert target.spec is not None
            return Resolution(target.spec)
        assert target.row is not None
        if target.kind == "curve":
            return Resolution(self._bare_curve(target.row, purpose))
        if target.kind == "keyed":
            param = parameter_set or (str(key_size) if key_size else None)
            found = self._keyed(loose_key(text), param)
            return found or Resolution(
                None,
                reason=f"{target.label} needs {target.row['needs']}",
                family=target.label,
                quantum_attack=target.row["quantum"],
            )
        return self._family(
            target.row, target.name_row, target.label, None, key_size, curve, purpose
        )

    def _family(
        self,
        row: Row,
        name_row: Row | None,
        label: str,
        size: int | None,
        key_size: int | None,
        curve: str | None,
        purpose: str | None,
    ) -> Resolution:
        if "by_purpose" in row:  # EC keys: the purpose decides ECDSA or ECDH
            chosen = row["by_purpose"].get(purpose) or row["by_purpose"]["default"]
            row = self._builder.families[chosen]
        unassessed = Resolution(
            None,
            reason=f"{label} needs {(name_row or {}).get('needs') or row['needs']}",
            family=row["family"],
            quantum_attack=row["quantum"],
        )
        if row["parameter"] in ("ifc", "ffc"):
            if curve and row["family"] == "FFDH":
                group = self._target(curve)
                if group is not None and group.spec is not None and group.spec.family == "FFDH":
                    return Resolution(group.spec)
            size = size or key_size
            if size is None:
                return unassessed
            return Resolution(self._builder.sized(row, size, purpose=purpose, name_row=name_row))
        if curve:
            curve_row = self._curves.get(loose_key(curve))
            if curve_row is None:
                close = difflib.get_close_matches(loose_key(curve), self._curves, n=3, cutoff=0.6)
                return Resolution(
                    None,
                    reason=f"unknown curve '{curve}'",
                    family=row["family"],
                    quantum_attack=row["quantum"],
                    suggestions=tuple(self._curves[k]["name"] for k in close),
                )
            return Resolution(
                self._builder.on_curve(row, curve_row, purpose=purpose, name_row=name_row)
            )
        if key_size is not None:
            # Table 2 depends on the order size only; name the first catalog curve of that size.
            for curve_row in self._builder.curves.values():
                if curve_row["order_bits"] == key_size and not curve_row.get("signature"):
                    spec = self._builder.on_curve(
                        row, curve_row, purpose=purpose, name_row=name_row
                    )
                    note = (
                        f"curve not given: {curve_row['name']} assumed from the "
                        f"{key_size}-bit key size"
                    )
                    return Resolution(replace(spec, notes=join_notes(note, spec.notes)))
        return unassessed

    def _bare_curve(self, curve: Row, purpose: str | None) -> AlgorithmSpec:
        signing = purpose in SIGNING
        family = self._builder.families["ECDSA" if signing else "ECDH"]
        return self._builder.on_curve(family, curve, purpose=purpose)

    def _with_size(
        self,
        loose: str,
        key_size: int | None,
        curve: str | None,
        purpose: str | None,
    ) -> Resolution | None:
        match = re.fullmatch(r"(.*?)([0-9]+)", loose)
        if not match:
            return None
        target = self._loose.get(match.group(1))
        if target is None or target.kind != "family" or target.row is None:
            return None
        size = int(match.group(2))
        if not 0 < size <= MAX_KEY_BITS:
            return Resolution(None, reason=f"key size {size} is not a plausible number of bits")
        row = target.row
        chosen = (
            row["by_purpose"].get(purpose) or row["by_purpose"]["default"]
            if "by_purpose" in row
            else None
        )
        parameter = self._builder.families[chosen]["parameter"] if chosen else row["parameter"]
        if parameter == "curve":
            return self._family(row, target.name_row, target.label, None, size, None, purpose)
        return self._family(row, target.name_row, target.label, size, key_size, curve, purpose)

    def _with_curve(self, loose: str, purpose: str | None) -> Resolution | None:
        for prefix, target in self._loose.items():
            if (
                target is None
                or target.kind != "family"
                or target.row is None
                or not loose.startswith(prefix)
                or prefix == loose
            ):
                continue
            rest = loose[len(prefix) :]
            if rest in self._curves and (target.row["parameter"] == "curve"):
                return self._family(
                    target.row,
                    target.name_row,
                    target.label,
                    None,
                    None,
                    self._curves[rest]["name"],
                    purpose,
                )
        return None

    def _keyed(self, loose: str, param: str | None) -> Resolution | None:
        for prefix, target in self._loose.items():
            if target is None or target.kind != "keyed" or not loose.startswith(prefix):
                continue
            assert target.row is not None
            rest = loose[len(prefix) :]
            sizes = [loose_key(str(size)) for size in target.row["sizes"]]
            known = [size for size in sizes if self._fixed_loose(prefix + size + rest)]
            if not known:
                continue
            if param is None:
                return Resolution(
                    None,
                    reason=f"{target.row['family']} needs {target.row['needs']}",
                    family=target.row["family"],
                    quantum_attack=target.row["quantum"],
                )
            spec = self._fixed_loose(prefix + loose_key(param) + rest)
            if spec is not None:
                return Resolution(spec)
            return Resolution(
                None,
                reason=f"{target.row['family']} has no parameter set '{param}'"
                f" in the catalog (known: {', '.join(map(str, target.row['sizes']))})",
                family=target.row["family"],
                quantum_attack=target.row["quantum"],
            )
        return None

    def _fixed_loose(self, key: str) -> AlgorithmSpec | None:
        target = self._loose.get(key)
        return target.spec if target is not None and target.kind == "fixed" else None


def _purpose(purpose: Any) -> str | None:
    """Purpose as its text value (accepts the Purpose enum or a plain string)."""
    if purpose is None:
        return None
    return str(getattr(purpose, "value", purpose)).strip().casefold() or None
