"""Resolution by object identifier first, checked against the name.

An input that gives an OID (a CycloneDX ``cryptoProperties.oid``, a certificate's algorithm
identifier) is resolved by that OID: it names the algorithm (and, for a signature, its hash)
more precisely than most names do. The name is then checked against it:

- the name stands for another OID of the same kind (``SHA256withRSA`` with the OID of
  sha512WithRSAEncryption), or fixes another hash: the use is unassessed, naming both;
- the name resolves to another family (``ECDSA`` with rsaEncryption) or another size or curve
  (``P-256`` with the OID of secp384r1): unassessed, naming both;
- the name is more specific (a signature name with the OID of its key type): the name decides;
- the name is unknown (a product's own label): the OID decides;
- the OID needs a parameter the name has (``RSA-2048`` with sha256WithRSAEncryption): the OID's
  algorithm with the name's size.

An OID pqtriage does not know leaves the name to decide.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Protocol

from pqtriage.catalog.build import SpecBuilder
from pqtriage.catalog.identifiers import Identifiers, OidRow
from pqtriage.catalog.spec import Resolution
from pqtriage.errors import CatalogError, Place


class Catalog(Protocol):
    """What resolution by identifier asks of the catalog (pqtriage.catalog.resolve.Catalog has it)."""

    def resolve_name(self, algorithm: str, *, key_size: int | None = None, curve: str | None = None,
                     parameter_set: str | None = None, purpose: str | None = None) -> Resolution:
        """Resolve by name alone."""
        ...

    def curve_in(self, text: str) -> str | None:
        """The catalog curve a name ends with, or None."""
        ...

_UNKNOWN = "is not in the algorithm catalog"


def attach_oids(builder: SpecBuilder, identifiers: Identifiers) -> None:
    """Record each OID on the fixed spec it names (AES-128-GCM gets 2.16.840.1.101.3.4.1.6)."""
    by_spelling: dict[str, str] = {}
    for name, spec in builder.fixed.items():
        for spelling in (name, *builder.aliases.get(name, [])):
            by_spelling.setdefault(spelling.casefold(), spec.name)
    for row in identifiers.oids.values():
        canonical = by_spelling.get(row.algorithm.casefold())
        if canonical is None:
            continue
        spec = builder.fixed[canonical]
        if "oid" not in spec.identifiers:
            builder.fixed[canonical] = replace(spec, identifiers={**spec.identifiers, "oid": row.oid})


def check_targets(catalog: Catalog, identifiers: Identifiers) -> None:
    """Every row must point at something the catalog knows (a data bug otherwise)."""
    targets = [(f"oids ({row.oid})", row.algorithm, row.purpose) for row in identifiers.oids.values()]
    targets += [(f"names ({t.written_as})", t.algorithm, t.purpose) for t in identifiers.translations()
                if t.algorithm is not None and t.oid is None]
    targets += [(f"transformations ({name})", name, None) for name in identifiers.transformation_targets()]
    for label, algorithm, purpose in targets:
        assert algorithm is not None
        found = catalog.resolve_name(algorithm, purpose=purpose)
        if found.spec is None and found.family is None and _UNKNOWN in (found.reason or ""):
            raise CatalogError(f"{label}: '{algorithm}' is not a catalog spelling", place=Place(identifiers.where),
                               hint="point the row at a name, alias or family of catalog.yaml")


def _family(found: Resolution) -> str | None:
    return found.spec.family if found.spec is not None else found.family


def _conflict(text: str, what: str, row: OidRow, found: Resolution) -> Resolution:
    return Resolution(
        None,
        reason=(f"the name '{text}' ({what}) and the OID {row.oid} ({row.name}, {row.source}) name"
                " different algorithms: check which one the producer meant"),
        family=_family(found), quantum_attack=found.spec.quantum_attack if found.spec else found.quantum_attack,
    )


def _with_oid(found: Resolution, row: OidRow) -> Resolution:
    if found.spec is None:
        return replace(found, reason=f"OID {row.oid} ({row.name}): {found.reason}")
    spec = found.spec
    return Resolution(replace(spec, identifiers={**spec.identifiers, "oid": row.oid},
                              source=f"{spec.source}; OID {row.oid} ({row.name}): {row.source}"))


def resolve_with_oid(catalog: Catalog, identifiers: Identifiers, algorithm: str, oid: str, *,
                     key_size: int | None, curve: str | None, parameter_set: str | None,
                     purpose: str | None) -> Resolution:
    """Resolve a use that gives both a name and an OID (see the module docstring)."""
    text = " ".join(algorithm.split())

    def by_name(name: str, size: int | None = key_size, on_curve: str | None = curve,
                wanted: str | None = purpose) -> Resolution:
        return catalog.resolve_name(name, key_size=size, curve=on_curve, parameter_set=parameter_set,
                                    purpose=wanted)

    row = identifiers.by_oid(oid)
    if row is None:
        found = by_name(text)
        if found.spec is None and _UNKNOWN in (found.reason or ""):
            return replace(found, reason=f"{found.reason}, and its OID {oid.strip()[:80]} is not one pqtriage knows")
        return found
    from_oid = by_name(row.algorithm, wanted=purpose or row.purpose)
    if not text or text.casefold() in (row.oid, row.name.casefold(), row.algorithm.casefold()):
        return _with_oid(from_oid, row)
    translation = identifiers.translate(text)
    named = translation.oid if translation is not None else None
    if named is not None and named.oid != row.oid and named.kind == row.kind \
            and (named.algorithm, named.hash) != (row.algorithm, row.hash):
        return _conflict(text, translation.written_as if translation else text, row, from_oid)
    if translation is not None and translation.hash and row.hash and translation.hash != row.hash:
        return _conflict(text, f"{translation.written_as}, hash {translation.hash}", row, from_oid)
    from_name = by_name(text)
    if from_name.spec is None and from_name.family is None:
        return _with_oid(from_oid, row)  # a label pqtriage does not know: the OID decides
    name_family, oid_family = _family(from_name), _family(from_oid)
    if name_family and oid_family and name_family != oid_family:
        return _conflict(text, f"{name_family}", row, from_oid)
    if from_name.spec is not None and from_oid.spec is not None:
        a, b = from_name.spec, from_oid.spec
        if (a.problem_bits, a.nist_category) != (b.problem_bits, b.nist_category):
            return _conflict(text, a.name, row, from_oid)
    more_specific = named is not None and named.kind == "signature" and row.kind == "public-key"
    if more_specific or (from_oid.spec is None and from_name.spec is not None and row.kind == "public-key"):
        return _with_oid(from_name, row)
    if from_oid.spec is None and from_name.spec is not None:
        # The OID's algorithm lacks a parameter the name carries: give it the name's size or curve.
        spec = from_name.spec
        if spec.shor_problem in ("factoring", "finite-field-dlog") and spec.problem_bits:
            retry = by_name(row.algorithm, size=spec.problem_bits, wanted=purpose or row.purpose)
        else:
            retry = by_name(row.algorithm, on_curve=curve or catalog.curve_in(text), wanted=purpose or row.purpose)
        return _with_oid(retry if retry.spec is not None else from_name, row)
    return _with_oid(from_oid, row)
