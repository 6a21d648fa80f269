"""JSON output: a documented, stable structure (see docs/cli.md)."""

from __future__ import annotations

import json
import math
import re
import secrets
from typing import Any

from pqtriage import __version__
from pqtriage.catalog.transitions import Standing
from pqtriage.formats.bands import band_dict, system_band
from pqtriage.formats.interface import ResultFormat
from pqtriage.formats.notes import CAUTIONS, SOURCES, assumptions
from pqtriage.model.inventory import Fact, SourceRef
from pqtriage.model.priority import Priority
from pqtriage.model.verdict import Flag, SystemAssessment, TriageResult, UseAssessment

SCHEMA_VERSION = 2
"""Bumped on any incompatible change of the JSON structure (2: classical status by date with its
rule, conflicts, facts, flags, priority points and the rank reason in its own field)."""


def _number(value: float | None, digits: int = 4) -> float | None:
    if value is None or math.isinf(value) or math.isnan(value):
        return None
    return round(value, digits)


def _source(ref: SourceRef | None) -> dict[str, Any] | None:
    if ref is None:
        return None
    return {"file": ref.file, "line": ref.line, "column": ref.column, "detail": ref.detail}


def _date(value: object) -> str | None:
    return value.isoformat() if value is not None else None  # type: ignore[attr-defined]


def classical_dict(standing: Standing | None) -> dict[str, Any] | None:
    """The classical status by date, its rule and document, and the next scheduled status.

    ``document`` is the short citation (DRAFT in front for a draft); the full title, section, flag
    and note are in the top-level ``classical_rules`` table, once per rule.
    """
    if standing is None:
        return None
    return {
        "status": standing.status,
        "algorithm": standing.algorithm,
        "since": _date(standing.since),
        "until": _date(standing.until),
        "rule": standing.rule,
        "document": standing.short,
        "draft": standing.draft,
        "next": None if standing.next_status is None else {
            "status": standing.next_status, "from": _date(standing.next_date),
            "document": standing.next_short,
        },
    }


def rules_table(result: TriageResult) -> dict[str, Any]:
    """Every classical-status rule the result uses: section, flag (V, V2, M, row) and note."""
    table: dict[str, Any] = {}
    for item in result.items:
        for use in item.uses:
            standing = use.classical
            if standing is not None and standing.rule not in table:
                title = standing.document if standing.flag != "row" or standing.status == "acceptable" else (
                    "the catalog row of each algorithm (its own source)")
                table[standing.rule] = {"document": title, "section": standing.section, "flag": standing.flag,
                                        "note": standing.note}
    return dict(sorted(table.items()))


def fact_dict(fact: Fact, home: str | None) -> dict[str, Any]:
    """One fact with where it came from (``file`` only when it is not the use's own file)."""
    out: dict[str, Any] = {"name": fact.name, "value": fact.value, "origin": fact.origin}
    ref = fact.source
    if ref is not None:
        if ref.file != home:
            out["file"] = ref.file
        out["line"] = ref.line
        out["column"] = ref.column
        if ref.detail:
            out["detail"] = ref.detail
    return out


def flag_dict(flag: Flag) -> dict[str, Any]:
    """One flag beside a verdict."""
    return {"kind": flag.kind, "algorithm": flag.algorithm, "text": flag.text, "date": _date(flag.date),
            "draft": flag.draft}


def priority_dict(priority: Priority | None) -> dict[str, Any] | None:
    """Priority points and their parts."""
    if priority is None:
        return None
    return {
        "points": priority.points,
        "parts": [{"factor": p.factor, "shown": p.shown, "points": p.points} for p in priority.parts],
        "probability_shown_percent": priority.probability_shown,
        "margin_shown_years": priority.margin_shown,
        "text": priority.text(),
    }


def use_dict(item: UseAssessment) -> dict[str, Any]:
    """One use as a JSON-ready dict."""
    spec = item.deciding or item.spec
    return {
        "algorithm": item.use.algorithm,
        "resolved": item.spec.name if item.spec else None,
        "deciding_component": item.deciding.name if item.deciding else None,
        "purpose": item.use.purpose.value,
        "role": item.use.role,
        "signature_role": item.use.signature_role.value if item.use.signature_role else None,
        "key_size": item.use.key_size,
        "curve": item.use.curve,
        "parameter_set": item.use.parameter_set,
        "trust_years": item.use.trust_years,
        "not_before": item.use.not_before.isoformat() if item.use.not_before else None,
        "not_after": item.use.not_after.isoformat() if item.use.not_after else None,
        "oid": item.use.oid,
        "protocol": item.use.protocol,
        "protocol_version": item.use.protocol_version,
        "key_storage": _enum(item.use.key_storage),
        "crypto_library": item.use.crypto_library,
        "crypto_module": item.use.crypto_module,
        "fips_140_certificate": item.use.fips_140_certificate,
        "fips_140_level": item.use.fips_140_level,
        "classical_bits": spec.classical_bits if spec else None,
        "classical_status": item.classical.status if item.classical else None,
        "classical": classical_dict(item.classical),
        "conflicts": [{"attribute": c.attribute, "named": c.named, "given": c.given} for c in item.conflicts],
        "flags": [flag_dict(f) for f in item.flags],
        "quantum_attack": spec.quantum_attack if spec else None,
        "nist_category": spec.nist_category if spec else None,
        "replacement": item.replacement,
        "verdict": item.verdict.value,
        "exposure_probability": _number(item.exposure_probability),
        "margin_years": _number(item.margin_years, 2),
        "start_by": item.start_by.isoformat() if item.start_by else None,
        "x_years": item.x_years,
        "y_years": item.y_years,
        "crqc_year": _number(item.crqc_year, 2),
        "beyond_horizon": item.crqc_year is not None and math.isinf(item.crqc_year),
        "arrival_shift_years": _number(item.shift_years, 2),
        "band": band_dict(item.band),
        "reason": item.reason,
        "suggestions": list(item.suggestions),
        "assumptions": list(item.assumptions),
        "source": _source(item.use.source),
        "facts": [fact_dict(f, item.use.source.file if item.use.source else None) for f in item.facts],
    }


def _enum(value: Any) -> Any:
    return None if value is None else value.value


def guidance_fields(system: Any) -> dict[str, Any]:
    """The fields official guidance asks for (docs/inventory-format.md), as the inventory gives them."""
    classification = system.data_classification
    hosting = system.hosting
    return {
        "business_unit": system.business_unit,
        "tags": list(system.tags),
        "impact": _enum(system.impact),
        "high_value_asset": system.high_value_asset,
        "data_classification": None if classification is None else
        {"label": classification.label, "rank": classification.rank},
        "hosting": None if hosting is None else
        {"model": hosting.model.value, "provider": hosting.provider, "country": hosting.country},
        "vendor": system.vendor, "product": system.product, "version": system.version,
        "protocol": system.protocol, "protocol_version": system.protocol_version,
        "crypto_library": system.crypto_library, "crypto_module": system.crypto_module,
        "fips_140_certificate": system.fips_140_certificate, "fips_140_level": system.fips_140_level,
        "key_storage": _enum(system.key_storage),
        "frameworks": None if system.frameworks is None else list(system.frameworks),
        "extra": dict(system.extra),
    }


def system_dict(item: SystemAssessment) -> dict[str, Any]:
    """One ranked system as a JSON-ready dict."""
    system = item.system
    return {
        "id": system.id,
        "name": system.name,
        "rank": item.rank,
        "verdict": item.verdict.value,
        "exposure_probability": _number(item.exposure_probability),
        "margin_years": _number(item.margin_years, 2),
        "start_by": item.start_by.isoformat() if item.start_by else None,
        "band": band_dict(system_band(item)),
        "reason": item.reason,
        "rank_reason": item.rank_reason,
        "priority": priority_dict(item.priority),
        "flags": [flag_dict(f) for f in item.flags],
        "shelf_life_years": system.shelf_life_years,
        "migration_years": system.migration_years,
        "criticality": system.criticality.value,
        "exposure": system.exposure.value,
        "owner": system.owner,
        "depends_on": list(system.depends_on),
        "policy_category": system.policy_category,
        **guidance_fields(system),
        "assumed": list(system.assumed),
        "source": _source(system.source),
        "uses": [use_dict(u) for u in item.uses],
    }


def selection_dict(result: TriageResult) -> dict[str, Any]:
    """What the view shows (--where, --top, --group-by), with the groups' system ids."""
    selection = result.selection
    assert selection is not None
    out: dict[str, Any] = {
        "where": selection.where, "top": selection.top, "group_by": selection.group_by,
        "total_systems": selection.total, "matched_systems": selection.matched,
        "shown_systems": len(result.items), "hidden_unassessed": selection.hidden_unassessed,
        "shown_counts": {v.value: n for v, n in selection.counts.items()},
        "description": selection.describe(),
    }
    if selection.group_by:
        from pqtriage.model.view import groups

        out["groups"] = [{"value": label, "systems": [i.system.id for i in items]}
                         for label, items in groups(result, selection.group_by)]
    return out


def result_dict(result: TriageResult, with_items: bool = True) -> dict[str, Any]:
    """The whole result as a JSON-ready dict (``items`` left empty when not with_items)."""
    summary = result.summary
    profile = result.profile
    return {
        "schema_version": SCHEMA_VERSION,
        "tool": {"name": "pqtriage", "version": __version__},
        "as_of": result.as_of.isoformat(),
        "inventory": {
            "file": result.inventory.source_path,
            "sha256": result.inventory.source_sha256,
            "organization": result.inventory.organization,
            "frameworks": list(result.inventory.frameworks),
            "warnings": list(result.inventory.warnings),
        },
        "profile": {
            "name": profile.name,
            "source": profile.source,
            "risk_tolerance": profile.risk_tolerance,
            "crqc_year": profile.crqc_year,
            "caveat": profile.caveat,
            "priority": {
                "per_percent": profile.priority.per_percent,
                "per_year_overdue": profile.priority.per_year_overdue,
                "time_cap_years": profile.priority.time_cap_years,
                "criticality": dict(profile.priority.criticality),
                "interception": dict(profile.priority.interception),
            },
        },
        "arrival_model": result.arrival_model,
        "uncertainty": None if result.band is None else {
            "description": result.band.describe(),
            "samples": result.band.samples,
            "seed": result.band.seed,
            "percentiles": [10, 90],
            "survey": result.band.survey,
            "doubling_years": list(result.band.doubling),
            "methods": list(result.band.methods),
            "ranking_uses": "central value",
        },
        "summary": {
            "systems": summary.systems,
            "uses": summary.uses,
            "counts": {v.value: n for v, n in summary.counts.items()},
            "use_counts": {v.value: n for v, n in summary.use_counts.items()},
            "overdue": list(summary.overdue),
            "earliest_start_by": summary.earliest_start_by.isoformat() if summary.earliest_start_by else None,
        },
        **({"selection": selection_dict(result)} if result.selection else {}),
        "items": [system_dict(i) for i in result.items] if with_items else [],
        "classical_rules": rules_table(result),
        "arrivals": [
            {"algorithm": a.algorithm, "crqc_year": _number(a.crqc_year, 2),
             "shift_years": _number(a.shift_years, 2), "beyond_horizon": math.isinf(a.crqc_year),
             "basis": a.basis}
            for a in result.arrivals
        ],
        "assumptions": assumptions(result),
        "cautions": list(CAUTIONS),
        "sources": list(SOURCES),
    }


_COMPACT = ("classical", "facts")
"""Per-use members written on one line each (they repeat for every use of a large inventory)."""


def _system_text(item: SystemAssessment, token: str) -> str:
    """One system, indented as in the whole document, each use's classical status and facts on
    one line (compact JSON, the same values)."""
    data = system_dict(item)
    compact: list[str] = []
    for use in data["uses"]:
        for key in _COMPACT:
            compact.append(json.dumps(use[key], ensure_ascii=False))
            use[key] = f"{token}:{len(compact) - 1}"
    text = "    " + json.dumps(data, indent=2, ensure_ascii=False).replace("\n", "\n    ")
    # One pass over the text (a replace per piece rescans it: quadratic in a system's uses).
    marker = re.compile(f'"{token}:([0-9]+)"')
    return marker.sub(lambda found: compact[int(found.group(1))], text)


class JsonFormat(ResultFormat):
    """Machine-readable triage result."""

    name = "json"

    def render(self, result: TriageResult) -> str:
        # Encoded one system at a time, so a 100k-use inventory never holds the whole
        # dict and the encoder's chunk list at once; the text is the same as one dumps().
        head = json.dumps(result_dict(result, with_items=False), indent=2, ensure_ascii=False)
        if not result.items:
            return head + "\n"
        marker = '\n  "items": [],\n'
        before, after = head.split(marker, 1)
        # One list of parts and one join: the text is held twice at most, not three times.
        parts = [before, '\n  "items": [\n']
        token = secrets.token_hex(16)  # never in the output: it only marks where each use's facts go
        for index, item in enumerate(result.items):
            if index:
                parts.append(",\n")
            parts.append(_system_text(item, token))
        parts += ["\n  ],\n", after, "\n"]
        return "".join(parts)

