"""Findings -> inventory document (a plain dict in the inventory format) -> YAML or JSON text.

Values a scan cannot know come from documented defaults and are listed in each system's
``assumed``: shelf-life (Mosca's x), migration time (Mosca's y) and exposure.

A signature that rests on a certificate must stay unforgeable at least while the certificate
is valid: its ``trust_years`` is the certificate's remaining validity at the scan date
(``--as-of``, default today), for the CA's or signer's own key and for the signature (and its
hash) on the certificate. The validity dates are kept on the use as facts.
"""

from __future__ import annotations

import datetime as dt
import json
import re
from collections.abc import Mapping
from typing import Any

from pqtriage.model.inventory import IN_USE, Purpose
from pqtriage.model.validity import MAX_YEARS, remaining_years
from pqtriage.sources.scan.findings import Finding
from pqtriage.sources.scan.grouping import Group
from pqtriage.sources.schema import USE_FIELDS
from pqtriage.sources.yaml_stream import dump_document

#: Documented defaults (docs/discovery.md): a scan cannot know these, the owner must set them.
DEFAULT_SHELF_LIFE_YEARS = 5
DEFAULT_MIGRATION_YEARS = 2
DEFAULT_EXPOSURE = "internal"
ASSUMED_SYSTEM_FIELDS = ["shelf_life_years", "migration_years", "exposure"]
DEFAULT_ORGANIZATION = "Scanned inventory"

_SLUG = re.compile(r"[^a-z0-9]+")


def slugify(text: str) -> str:
    """Lower-case ASCII letters and digits joined by hyphens, at most 60 characters."""
    slug = _SLUG.sub("-", text.lower()).strip("-")[:60].strip("-")
    return slug or "system"


def unique_id(base: str, taken: set[str]) -> str:
    """``base``, or ``base-2``, ``base-3`` ... whichever is not taken yet (and take it)."""
    candidate, number = base, 2
    while candidate in taken:
        candidate, number = f"{base}-{number}", number + 1
    taken.add(candidate)
    return candidate


def use_notes(finding: Finding) -> str | None:
    """The facts beside a use, as one line: subject, issuer, validity, CA, key usage, notes."""
    parts: list[str] = []
    if finding.subject:
        parts.append(f"subject={finding.subject}")
    if finding.issuer:
        parts.append(f"issuer={finding.issuer}")
    if finding.ca is not None:
        parts.append("CA" if finding.ca else "not CA")
    if finding.key_usage:
        parts.append("keyUsage=" + ",".join(finding.key_usage))
    parts.extend(finding.notes)
    return "; ".join(parts) if parts else None


def trust_from_validity(not_after: str, as_of: dt.date) -> tuple[float, str]:
    """Remaining validity in years at ``as_of`` (0 when expired, capped at 100), with the note
    explaining it (the pure core's rule, :func:`pqtriage.model.validity.remaining_years`)."""
    end = dt.date.fromisoformat(not_after)
    years = remaining_years(end, as_of)
    if years >= MAX_YEARS:
        return years, f"trust_years: valid until {end.isoformat()}, capped at {MAX_YEARS:g} years"
    if years == 0:
        return 0.0, f"trust_years: certificate expired on {end.isoformat()} (before {as_of.isoformat()})"
    return years, f"trust_years: remaining validity on {as_of.isoformat()}"


def use_dict(finding: Finding, as_of: dt.date | None = None) -> dict[str, Any]:
    """One use in the inventory format; ``as_of`` dates the remaining validity of certificates."""
    use: dict[str, Any] = {"purpose": finding.purpose.value, "algorithm": finding.algorithm}
    if finding.key_size is not None:
        use["key_size"] = finding.key_size
    if finding.curve is not None:
        use["curve"] = finding.curve
    if finding.parameter_set is not None:
        use["parameter_set"] = finding.parameter_set
    if finding.protocol is not None:
        use["protocol"] = finding.protocol
    notes = use_notes(finding)
    if finding.purpose is Purpose.SIGNATURE and finding.not_after and as_of is not None:
        use["trust_years"], trust_note = trust_from_validity(finding.not_after, as_of)
        notes = f"{notes}; {trust_note}" if notes else trust_note
    if finding.role != IN_USE:
        use["role"] = finding.role
    if finding.not_before:
        use["not_before"] = finding.not_before
    if finding.not_after:
        use["not_after"] = finding.not_after
    if notes:
        use["notes"] = notes
    use["source"] = finding.locator()
    return conform_use(use)


_USE_SPECS = {spec.name: spec for spec in USE_FIELDS}


def conform_use(use: dict[str, Any]) -> dict[str, Any]:
    """A use that the inventory reader accepts whatever the material held (a scan
    never writes an inventory that ``triage`` refuses whole).

    Per item: an empty text field is left out (an empty algorithm becomes ``unknown``, so the
    use is unassessed); a number above the format's maximum is written as the maximum (the
    cautious side for a trust period) and one below the minimum is left out; each change is
    said in the use's notes. Key sizes have no range in the format: the catalog makes a size
    it cannot assess (a 100,000-bit RSA key) an unassessed use with the reason.
    """
    said: list[str] = []
    for name, value in list(use.items()):
        spec = _USE_SPECS.get(name)
        if spec is None or value is None:
            continue
        if spec.kind == "str" and isinstance(value, str) and not value.strip():
            if name == "algorithm":
                use[name] = "unknown"  # an unknown use: unassessed in triage, kept in every output
            else:
                del use[name]
            said.append(f"{name} was empty in the material")
        elif spec.kind in ("number", "integer") and isinstance(value, (int, float)) and not isinstance(value, bool):
            if spec.maximum is not None and value > spec.maximum:
                use[name] = spec.maximum if spec.kind == "number" else int(spec.maximum)
                said.append(f"{name} {value:g} is above the format's maximum {spec.maximum:g}; written as "
                            f"{spec.maximum:g}")
            elif spec.below_minimum(value):
                del use[name]
                said.append(f"{name} {value:g} is below {spec.lower_bound_text()}; left out")
    if said:
        notes = "; ".join(said)
        use["notes"] = f"{use['notes']}; {notes}" if use.get("notes") else notes
        source = use.pop("source", None)  # keep the source last, as in every other use
        if source is not None:
            use["source"] = source
    return use


def inventory_dict(
    groups: list[Group],
    organization: str = DEFAULT_ORGANIZATION,
    shelf_life_years: float = DEFAULT_SHELF_LIFE_YEARS,
    migration_years: float = DEFAULT_MIGRATION_YEARS,
    system_extras: Mapping[str, Mapping[str, Any]] | None = None,
    as_of: dt.date | None = None,
) -> dict[str, Any]:
    """Build the inventory document; ``system_extras`` adds protocol / notes per group key,
    ``as_of`` is the date certificates' remaining validity is counted from."""
    taken: set[str] = set()
    systems = []
    for group in groups:
        system: dict[str, Any] = {
            "id": unique_id(slugify(group.key), taken),
            "name": group.key if group.label != "folder" else f"{group.key} (folder)",
            "shelf_life_years": shelf_life_years,
            "migration_years": migration_years,
            "assumed": list(ASSUMED_SYSTEM_FIELDS),
            "source": group.key,
            "exposure": DEFAULT_EXPOSURE,
        }
        extras = (system_extras or {}).get(group.key, {})
        for key in ("protocol", "notes"):
            if extras.get(key):
                system[key] = extras[key]
        if "notes" not in system:
            system["notes"] = f"found by discovery; grouped by {group.label}"
        seen: set[str] = set()
        uses = []
        for finding in group.findings:
            use = use_dict(finding, as_of)
            # Sources identify uses (merge relies on it): keep them unique.
            use["source"] = unique_id(use["source"], seen)
            uses.append(use)
        system["uses"] = uses
        systems.append(system)
    return {"version": 1, "organization": organization, "systems": systems}


def render(document: Mapping[str, Any], output_format: str = "yaml") -> str:
    """Inventory document as YAML (block style, key order kept) or JSON text."""
    if output_format == "json":
        return render_json(document)
    # One pass, hidden characters escaped (pqtriage.sources.yaml_stream).
    return dump_document(document)


_USE_ENCODER = json.JSONEncoder(ensure_ascii=True, check_circular=False)
"""One encoder for every use (json.dumps with options builds a new encoder on each call)."""


def render_json(document: Mapping[str, Any]) -> str:
    """JSON with one use per line: indented like ``indent=2`` down to the uses, each use on one
    line, ASCII only (a lone surrogate of an undecodable file name becomes ``\\udcXX``, and no
    control or bidi character reaches a terminal that shows the file). The same data; the uses
    go through the C encoder, so large scans (hundreds of
    thousands of uses) are written in a fraction of the time the indenting encoder takes."""
    systems = document.get("systems")
    if not isinstance(systems, list) or not all(isinstance(s, Mapping) for s in systems):
        return json.dumps(document, indent=2, ensure_ascii=True) + "\n"

    def value(item: Any, depth: int) -> str:
        text = json.dumps(item, indent=2, ensure_ascii=True)
        return text.replace("\n", "\n" + "  " * depth)

    lines = ["{"]
    head = [(k, v) for k, v in document.items() if k != "systems"]
    for key, item in head:
        lines.append(f"  {json.dumps(key)}: {value(item, 1)},")
    lines.append('  "systems": [' if systems else '  "systems": []')
    for index, system in enumerate(systems):
        lines.append("    {")
        fields = [(k, v) for k, v in system.items() if k != "uses"]
        uses = system.get("uses")
        for number, (key, item) in enumerate(fields):
            last = number == len(fields) - 1 and "uses" not in system
            lines.append(f"      {json.dumps(key)}: {value(item, 3)}" + ("" if last else ","))
        if isinstance(uses, list) and uses:
            lines.append('      "uses": [')
            encode = _USE_ENCODER.encode
            lines.append(",\n".join(["        " + encode(use) for use in uses]))
            lines.append("      ]")
        elif "uses" in system:
            lines.append(f'      "uses": {value(uses, 3)}')
        lines.append("    }" + ("," if index < len(systems) - 1 else ""))
    if systems:
        lines.append("  ]")
    lines.append("}")
    return "\n".join(lines) + "\n"
