"""SARIF 2.1.0 output: code-scanning tools show each urgent use as an alert at its inventory line.

Mapping (OASIS Static Analysis Results Interchange Format (SARIF) Version 2.1.0):

- one ``reportingDescriptor`` rule per verdict, id = the verdict (``exposed`` ...), with
  short and full descriptions and help;
- one ``result`` per use whose verdict is classically-broken, exposed or unassessed (the
  verdicts at or above "treat as exposed"); within-margin and quantum-resistant uses are not
  alerts, but a flag of any use (legacy, deprecated, downgrade) is a ``warning`` result of the
  rule of its kind, so a resistant use with a legacy algorithm is never silent;
- ``level`` by severity: classically-broken and exposed are ``error``, unassessed ``warning``
  (within-margin would be ``note``, quantum-resistant ``none``);
- location: the file and line the use was read from (inventory, CBOM or scanned file); a use
  found by probing a host is placed at the inventory file, with the host in the message.
"""

from __future__ import annotations

import hashlib
import json
import math
import re
from typing import Any
from urllib.parse import quote

from pqtriage import __version__
from pqtriage.formats.interface import ResultFormat
from pqtriage.formats.labels import short_replacement
from pqtriage.formats.notes import classical_text, fact_text
from pqtriage.formats.text import visible
from pqtriage.model.verdict import (
    SEVERITY,
    VERDICT_MEANING,
    Flag,
    SystemAssessment,
    TriageResult,
    UseAssessment,
    Verdict,
)

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
"""Canonical location of the OASIS SARIF 2.1.0 JSON schema (Errata 01)."""

LEVEL: dict[Verdict, str] = {
    Verdict.CLASSICALLY_BROKEN: "error",
    Verdict.EXPOSED: "error",
    Verdict.UNASSESSED: "warning",
    Verdict.WITHIN_MARGIN: "note",
    Verdict.QUANTUM_RESISTANT: "none",
}
"""SARIF result level per verdict (SARIF 2.1.0 section 3.27.10: none, note, warning, error)."""

REPORTED = SEVERITY[Verdict.UNASSESSED]
"""Uses at or above this severity become results."""

_RULE_NAME = {v: "".join(part.capitalize() for part in v.value.split("-")) for v in Verdict}
_HELP: dict[Verdict, str] = {
    Verdict.CLASSICALLY_BROKEN: "Replace the algorithm now with the recommended standardized one; it does "
    "not protect the data even against classical attacks.",
    Verdict.EXPOSED: "Start migrating this system to the recommended post-quantum algorithm: its data must stay "
    "secure longer than the time left before a cryptographically relevant quantum computer may exist, "
    "minus the migration time.",
    Verdict.UNASSESSED: "Complete the inventory entry (algorithm name, key size, curve) so pqtriage can assess "
    "it; until then treat it as exposed.",
    Verdict.WITHIN_MARGIN: "Plan the migration before the start-by date shown in the report.",
    Verdict.QUANTUM_RESISTANT: "Nothing to do now; review when the threat profile changes.",
}
FLAG_RULES: dict[str, tuple[str, str]] = {
    "legacy": ("Legacy algorithm: kept for existing data, not for new protection",
               "Plan its replacement: the standard it rests on (or its catalog row) allows it only for "
               "processing existing data, or it is not approved for new use."),
    "deprecated": ("Deprecated algorithm: allowed for now, with a date after which it is not",
                   "Replace it before its status turns disallowed; the flag names the date and the document "
                   "(a DRAFT document is labelled so)."),
    "downgrade": ("Weaker method offered beside the one in use",
                  "Remove the weaker method from what the server offers: clients that still use it fall back "
                  "to it."),
}
"""One warning rule per flag kind."""
FLAG_LEVEL = "warning"

_PROBE = re.compile(r"^[^/\\\s]+:\d+$")  # host:port, not a file


def _uri(path: str) -> str:
    """A relative or file URI reference for a path (RFC 3986; SARIF 2.1.0 section 3.4.3)."""
    text = path.replace("\\", "/")
    if text.startswith("/"):
        return "file://" + quote(text)
    return quote(text)


def rules() -> list[dict[str, Any]]:
    """One rule per verdict, most urgent first, then one per flag kind."""
    return _verdict_rules() + [
        {
            "id": kind,
            "name": kind.capitalize(),
            "shortDescription": {"text": short},
            "fullDescription": {"text": short + "."},
            "help": {"text": help_text},
            "defaultConfiguration": {"level": FLAG_LEVEL},
            "properties": {"tags": ["cryptography", "post-quantum", "flag"]},
        }
        for kind, (short, help_text) in FLAG_RULES.items()
    ]


def _verdict_rules() -> list[dict[str, Any]]:
    return [
        {
            "id": verdict.value,
            "name": _RULE_NAME[verdict],
            "shortDescription": {"text": f"Use is {verdict.value}"},
            "fullDescription": {"text": VERDICT_MEANING[verdict][0].upper() + VERDICT_MEANING[verdict][1:] + "."},
            "help": {"text": _HELP[verdict]},
            "defaultConfiguration": {"level": LEVEL[verdict]},
            "properties": {"tags": ["cryptography", "post-quantum"], "severity": SEVERITY[verdict]},
        }
        for verdict in Verdict
    ]


def _location(item: SystemAssessment, use: UseAssessment, inventory_path: str | None) -> tuple[dict[str, Any], str | None]:
    ref = use.use.source or item.system.source
    target = None
    if ref is None or _PROBE.match(ref.file):
        target = ref.file if ref is not None else None
        physical: dict[str, Any] = {"artifactLocation": {"uri": _uri(inventory_path or "inventory")}}
        line = item.system.source.line if item.system.source and item.system.source.file == inventory_path else None
        column = None
    else:
        physical = {"artifactLocation": {"uri": _uri(ref.file)}}
        line, column = ref.line, ref.column
    if line is not None and line >= 1:
        physical["region"] = {"startLine": line}
        if column is not None and column >= 1:
            physical["region"]["startColumn"] = column
    location = {
        "physicalLocation": physical,
        "logicalLocations": [{"name": visible(item.system.id), "kind": "module"}],
    }
    return location, target


def result_entry(item: SystemAssessment, use: UseAssessment, rule_index: int, inventory_path: str | None) -> dict[str, Any]:
    """The SARIF result of one use."""
    spec = use.deciding or use.spec
    algorithm = spec.name if spec else use.use.algorithm
    location, target = _location(item, use, inventory_path)
    message = f"{item.system.id}: {algorithm} for {use.use.purpose.value} is {use.verdict.value}: {use.reason}"
    if use.replacement:
        message += f"; replace with {short_replacement(use.replacement)}"
    if target:
        message += f" (found at {target})"
    detail = use.use.source.detail if use.use.source and use.use.source.detail else ""
    fingerprint = hashlib.sha256(
        f"{item.system.id}\x1f{use.use.algorithm}\x1f{use.use.purpose.value}\x1f{detail}".encode()
    ).hexdigest()
    properties: dict[str, Any] = {"system": visible(item.system.id), "verdict": use.verdict.value,
                                  "purpose": use.use.purpose.value, "role": use.use.role, "rank": item.rank}
    if use.classical is not None:
        properties["classicalStatus"] = use.classical.status
        properties["classicalStatusText"] = visible(classical_text(use.classical))
    if use.flags:
        properties["flags"] = [visible(flag.text) for flag in use.flags]
    if use.conflicts:
        properties["conflicts"] = [visible(c.describe(use.use.algorithm)) for c in use.conflicts]
    properties["facts"] = [visible(fact_text(fact)) for fact in use.facts]
    if use.exposure_probability is not None:
        properties["exposureProbability"] = round(use.exposure_probability, 4)
    if use.start_by is not None:
        properties["startBy"] = use.start_by.isoformat()
    if use.crqc_year is not None and math.isfinite(use.crqc_year):
        properties["crqcYear"] = round(use.crqc_year, 2)
    if use.band is not None:
        band = use.band
        properties["exposureProbabilityLow"] = round(band.exposure_probability.low, 4)
        properties["exposureProbabilityHigh"] = round(band.exposure_probability.high, 4)
        for key, value in (("crqcYearLow", band.crqc_year.low), ("crqcYearHigh", band.crqc_year.high)):
            if math.isfinite(value):
                properties[key] = round(value, 2)
        if band.start_by[0] is not None:
            properties["startByEarliest"] = band.start_by[0].isoformat()
        if band.start_by[1] is not None:
            properties["startByLatest"] = band.start_by[1].isoformat()
        properties["band"] = "10-90 % over seeded samples; verdict and rank use the central value"
    if use.replacement:
        properties["replacement"] = visible(use.replacement)
    return {
        "ruleId": use.verdict.value,
        "ruleIndex": rule_index,
        "level": LEVEL[use.verdict],
        "message": {"text": visible(message)},
        "locations": [location],
        "partialFingerprints": {"pqtriageUse/v1": fingerprint},
        "properties": properties,
    }


def flag_entry(item: SystemAssessment, use: UseAssessment, flag: Flag, rule_index: int,
               inventory_path: str | None) -> dict[str, Any]:
    """The SARIF warning of one flag of a use."""
    location, target = _location(item, use, inventory_path)
    message = f"{item.system.id}: {flag.text} (verdict {use.verdict.value})"
    if use.replacement:
        message += f"; replace with {short_replacement(use.replacement)}"
    if target:
        message += f" (found at {target})"
    detail = use.use.source.detail if use.use.source and use.use.source.detail else ""
    fingerprint = hashlib.sha256(
        f"{item.system.id}\x1f{use.use.algorithm}\x1f{use.use.purpose.value}\x1f{detail}\x1f{flag.kind}".encode()
    ).hexdigest()
    return {
        "ruleId": flag.kind,
        "ruleIndex": rule_index,
        "level": FLAG_LEVEL,
        "message": {"text": visible(message)},
        "locations": [location],
        "partialFingerprints": {"pqtriageUse/v1": fingerprint},
        "properties": {"system": visible(item.system.id), "verdict": use.verdict.value, "flag": flag.kind,
                       "purpose": use.use.purpose.value, "role": use.use.role, "rank": item.rank,
                       "draft": flag.draft, "date": flag.date.isoformat() if flag.date else None},
    }


def sarif_log(result: TriageResult) -> dict[str, Any]:
    """The whole SARIF log as a JSON-ready dict."""
    index = {verdict: i for i, verdict in enumerate(Verdict)}
    flag_index = {kind: len(index) + i for i, kind in enumerate(FLAG_RULES)}
    results = []
    for item in result.items:
        for use in item.uses:
            if SEVERITY[use.verdict] >= REPORTED:
                results.append(result_entry(item, use, index[use.verdict], result.inventory.source_path))
            results += [flag_entry(item, use, flag, flag_index[flag.kind], result.inventory.source_path)
                        for flag in use.flags]
    return {
        "$schema": SARIF_SCHEMA,
        "version": SARIF_VERSION,
        "runs": [{
            "tool": {"driver": {"name": "pqtriage", "version": __version__, "rules": rules()}},
            "columnKind": "unicodeCodePoints",
            "results": results,
            "properties": {
                "asOf": result.as_of.isoformat(),
                "profile": visible(result.profile.name),
                "organization": visible(result.inventory.organization),
                "inventorySha256": result.inventory.source_sha256,
                **({"view": visible(result.selection.describe())} if result.selection else {}),
            },
        }],
    }


class SarifFormat(ResultFormat):
    """SARIF 2.1.0 for code-scanning dashboards."""

    name = "sarif"

    def render(self, result: TriageResult) -> str:
        return json.dumps(sarif_log(result), indent=2, ensure_ascii=False) + "\n"
