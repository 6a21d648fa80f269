"""Turn validated catalog rows into :class:`AlgorithmSpec` values.

Fixed entries become specs directly (modes expanded, strengths of
post-quantum schemes taken from their category); parameterised families
(RSA, FFDH, DSA, ECDSA, ECDH) build a spec for a given size or curve with the
strength from NIST SP 800-57 Part 1 Rev. 5 Table 2.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any, NoReturn, cast

from pqtriage.catalog.loader import RawCatalog, Row, _fail
from pqtriage.catalog.spec import AlgorithmSpec, ClassicalStatus, Component
from pqtriage.catalog.strength import StrengthTable, cap_status, join_notes


class SpecBuilder:
    """Builds specs from the rows of one catalog file."""

    def __init__(self, raw: RawCatalog) -> None:
        self.raw = raw
        self.table = StrengthTable(raw.strength_table, raw.strength_policy)
        self.category_bits = {row["category"]: row["bits"] for row in raw.categories}
        self.families = {row["family"]: row for row in raw.families}
        self.curves = {row["name"]: row for row in raw.curves}
        self.scheme_curves = {
            row[key]: row["name"] for row in raw.curves for key in ("signature", "agreement") if row.get(key)
        }
        """Edwards and Montgomery scheme name (Ed25519, X25519 ...) -> its curve."""
        self.fixed: dict[str, AlgorithmSpec] = {}
        """Every fixed spec by canonical name, in catalog order."""
        self.aliases: dict[str, list[str]] = {}
        """Canonical name -> extra spellings."""
        self._check_families()
        for curve in raw.curves:
            self._curve_specs(curve)
        for group in raw.groups:
            spec = self.sized(self.families["FFDH"], group["p_bits"], name=group["name"])
            spec = replace(
                spec,
                source=f"{group['source']}; {spec.source}",
                notes=join_notes(spec.notes, group.get("notes")),
            )
            self._add(spec, group.get("aliases", []))
        for row in raw.entries:
            self._entry(row)
        for family in raw.families:
            for size in family.get("common_sizes", []):
                spec = self.sized(family, size)
                self.fixed.setdefault(spec.name, spec)

    # -- helpers --------------------------------------------------------------------------
    def fail(self, label: str, message: str) -> NoReturn:
        """Raise a CatalogError naming the row."""
        _fail(self.raw.path, label, message)

    def replacement_texts(self, ref: str | None, label: str) -> dict[str, str]:
        """The replacement set named ``ref`` ('none' or None: no replacement)."""
        if ref in (None, "none"):
            return {}
        texts = self.raw.replacements.get(str(ref))
        if texts is None:
            self.fail(
                label,
                f"unknown replacement set '{ref}' (known: {', '.join(self.raw.replacements)})",
            )
        return dict(texts)

    def _add(self, spec: AlgorithmSpec, aliases: list[str]) -> None:
        if spec.name in self.fixed:
            self.fail(spec.name, "defined twice")
        self.fixed[spec.name] = spec
        self.aliases[spec.name] = list(aliases)

    def lookup(self, name: str, label: str) -> AlgorithmSpec:
        """A fixed spec by canonical name or alias (case-insensitive), for component refs."""
        wanted = name.casefold()
        for canonical, spec in self.fixed.items():
            if canonical.casefold() == wanted or wanted in (
                a.casefold() for a in self.aliases[canonical]
            ):
                return spec
        self.fail(label, f"component '{name}' is not a catalog entry defined above it")

    def _check_families(self) -> None:
        for family in self.raw.families:
            label = f"families ({family['family']})"
            if family["parameter"] in ("ifc", "ffc", "curve") and "by_purpose" not in family:
                for key in ("name_format", "primitive", "shor_problem"):
                    if key not in family:
                        self.fail(label, f"missing '{key}'")
            if family["parameter"] == "key" and not family.get("sizes"):
                self.fail(label, "a keyed family needs 'sizes'")
            for target in family.get("by_purpose", {}).values():
                if target not in self.families:
                    self.fail(label, f"by_purpose names unknown family '{target}'")
        for required in ("FFDH", "ECDSA", "ECDH"):
            if required not in self.families:
                self.fail("families", f"missing the {required} family")

    # -- parameterised families -----------------------------------------------------------
    def sized(
        self,
        family: Row,
        size: int,
        *,
        purpose: str | None = None,
        name: str | None = None,
        name_row: Row | None = None,
    ) -> AlgorithmSpec:
        """Spec of an IFC/FFC family (RSA, FFDH, DSA) at ``size`` bits."""
        bits = self.table.bits(family["parameter"], size)
        status, note = self.table.status(bits)
        if size < family.get("broken_below", 0):
            status, note = "broken", join_notes(note, family.get("broken_note"))
        status = cap_status(status, family.get("status_at_best"))
        return self._family_spec(
            family,
            name or family["name_format"].format(size=size),
            bits,
            status,
            size,
            note,
            purpose,
            name_row,
            self.table.source(),
            None,
        )

    def on_curve(
        self,
        family: Row,
        curve: Row,
        *,
        purpose: str | None = None,
        name_row: Row | None = None,
    ) -> AlgorithmSpec:
        """Spec of ECDSA or ECDH on ``curve`` (Edwards/Montgomery curves give their own entry)."""
        own = curve.get("signature" if family["family"] == "ECDSA" else "agreement")
        if own:
            spec = self.lookup(own, f"curves ({curve['name']})")
            return self._named(spec, name_row)
        bits = curve.get("bits") or self.table.bits("ecc", curve["order_bits"])
        status, note = self.table.status(bits)
        status = cap_status(status, family.get("status_at_best"))
        return self._family_spec(
            family,
            family["name_format"].format(curve=curve["name"]),
            bits,
            status,
            curve["order_bits"],
            note,
            purpose,
            name_row,
            curve["source"],
            curve["name"],
        )

    def _family_spec(
        self,
        family: Row,
        name: str,
        bits: int | None,
        status: str,
        problem_bits: int,
        note: str,
        purpose: str | None,
        name_row: Row | None,
        extra_source: str,
        curve: str | None,
    ) -> AlgorithmSpec:
        primitives = family["primitive"]
        wanted = (name_row or {}).get("purpose") or purpose
        primitive = primitives.get(wanted) or primitives["default"]
        sources = [family["source"], extra_source]
        notes = [note, family.get("notes")]
        if name_row is not None:
            status = cap_status(status, name_row.get("status_at_best"))
            if name_row.get("status_at_best"):
                name = f"{name} ({name_row['name']})"
            sources.insert(0, name_row["source"])
            notes.append(name_row.get("notes"))
        return AlgorithmSpec(
            name=name,
            family=family["family"],
            primitive=primitive,
            classical_bits=bits,
            classical_status=cast(ClassicalStatus, status),
            quantum_attack=family["quantum"],
            source="; ".join(dict.fromkeys(sources)),
            shor_problem=family.get("shor_problem"),
            problem_bits=problem_bits,
            replacements=self.replacement_texts(family.get("replacements"), family["family"]),
            notes=join_notes(*notes),
            curve=curve,
            signature_hash=(name_row or {}).get("hash"),
        )

    def _named(self, spec: AlgorithmSpec, name_row: Row | None) -> AlgorithmSpec:
        """A fixed spec as reached through a protocol spelling that may add a cap or a note."""
        if name_row is None or not (
            name_row.get("status_at_best") or name_row.get("notes") or name_row.get("hash")
        ):
            return spec
        at_best = name_row.get("status_at_best")
        return replace(
            spec,
            name=f"{spec.name} ({name_row['name']})" if at_best else spec.name,
            classical_status=cast(ClassicalStatus, cap_status(spec.classical_status, at_best)),
            notes=join_notes(spec.notes, name_row.get("notes")),
            source=f"{name_row['source']}; {spec.source}",
            signature_hash=name_row.get("hash") or spec.signature_hash,
        )

    def _curve_specs(self, curve: Row) -> None:
        if curve.get("signature") or curve.get("agreement"):
            return  # Edwards/Montgomery: their schemes are entries of their own
        for family in (self.families["ECDSA"], self.families["ECDH"]):
            self._add(self.on_curve(family, curve), [])

    # -- fixed entries --------------------------------------------------------------------
    def _entry(self, row: Row) -> None:
        label = f"entries ({row['name']})"
        if "bits" in row:
            bits = row["bits"]
        elif "nist_category" in row:
            bits = self.category_bits.get(row["nist_category"])
        elif row.get("components"):
            bits = None
        else:
            self.fail(label, "missing 'bits' (or a 'nist_category' to derive it from)")
        if row["quantum"] == "shor" and not row.get("shor_problem"):
            self.fail(label, "quantum: shor needs 'shor_problem'")
        components = tuple(
            Component(purpose=part["purpose"], spec=self.lookup(part["ref"], label))
            for part in row.get("components", [])
        )
        category = row.get("nist_category")
        if components:
            # A hybrid leaks only if both halves fall: its strength is that of the stronger half.
            part_bits = [c.spec.classical_bits for c in components if c.spec.classical_bits]
            bits = bits if "bits" in row else (max(part_bits) if part_bits else None)
            cats = [c.spec.nist_category for c in components if c.spec.nist_category]
            category = category if category is not None else (max(cats) if cats else None)
        base = AlgorithmSpec(
            name=row["name"],
            family=row["family"],
            primitive=row["primitive"],
            classical_bits=bits,
            classical_status=row["status"],
            quantum_attack=row["quantum"],
            source=row["source"],
            nist_category=category,
            shor_problem=row.get("shor_problem"),
            problem_bits=row.get("problem_bits"),
            grover_target=row.get("grover_target"),
            replacements=self.replacement_texts(row["replacements"], label),
            components=components,
            hybrid=bool(row.get("hybrid", False)),
            notes=row.get("notes", ""),
            preimage_bits=row.get("preimage_bits"),
            preimage_category=row.get("preimage_category"),
            identifiers={str(k): str(v) for k, v in row.get("identifiers", {}).items()},
            curve=self.scheme_curves.get(row["name"]),
            block_bits=row.get("block_bits"),
            key_sizes=tuple(int(size) for size in row.get("key_sizes", ())),
        )
        self._add(base, row.get("aliases", []))
        for mode_name in row.get("modes", []):
            self._mode(base, row, mode_name, label)

    def _mode(self, base: AlgorithmSpec, row: Row, mode_name: str, label: str) -> None:
        mode: dict[str, Any] | None = self.raw.modes.get(mode_name)
        if mode is None:
            self.fail(label, f"unknown mode '{mode_name}' (known: {', '.join(self.raw.modes)})")
        replacements = (
            self.replacement_texts(mode["replacements"], label)
            if "replacements" in mode
            else base.replacements
        )
        spec = replace(
            base,
            name=f"{base.name}-{mode_name}",
            primitive=mode["primitive"],
            classical_status=cast(
                ClassicalStatus, cap_status(base.classical_status, mode.get("status_at_best"))
            ),
            notes=join_notes(mode.get("notes"), base.notes),
            replacements=replacements,
            source=f"{base.source}; {mode['source']}",
        )
        spellings = [f"{alias}-{mode_name}" for alias in row.get("aliases", [])]
        if mode.get("prefix"):
            spellings += [f"{mode['prefix']}-{n}" for n in (base.name, *row.get("aliases", []))]
        self._add(spec, spellings)
