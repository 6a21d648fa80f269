"""No use with a disallowed, broken or conflicting fact is shown within-margin or quantum-resistant
anywhere: JSON, Markdown, terminal table, CSV, SARIF and CBOM, for uses in use and offered.

Which uses are bad is this test's own list, not the tool's: NIST SP 800-131A Rev. 2 (2019)
disallows three-key TDEA encryption after 2023 (Table 1), signatures under 112 bits (Table 2) and
SHA-1 signature generation (§9); FIPS 186-5 (2023) drops DSA signature generation (from memory);
RFC 7465 prohibits RC4, RFC 6151 reports MD5 collisions; and a use whose name and attribute
disagree (ML-KEM-768 with parameter set 512, RSA-2048 with key size 512, P-256 with curve P-9999)
cannot be assessed.
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import json
import re
from functools import cache

from hypothesis import given, settings
from hypothesis import strategies as st
from rich.console import Console

from pqtriage.catalog import load_catalog
from pqtriage.formats.cbom.triage import CbomFormat
from pqtriage.formats.csv.triage import CsvFormat
from pqtriage.formats.json.triage import JsonFormat
from pqtriage.formats.markdown.triage import render_report
from pqtriage.formats.sarif.triage import SarifFormat
from pqtriage.formats.table.triage import terminal_view
from pqtriage.model.inventory import Criticality, CryptoUse, Exposure, Inventory, Purpose, System
from pqtriage.model.triage import triage
from pqtriage.model.verdict import TriageResult
from pqtriage.pipeline import arrival_model_for
from pqtriage.sources.profile_file import load_profile

AS_OF = dt.date(2026, 12, 1)
SAFE_LOOKING = {"within-margin", "quantum-resistant"}

KEX, ENC, SIG, MAC = Purpose.KEY_ESTABLISHMENT, Purpose.ENCRYPTION, Purpose.SIGNATURE, Purpose.INTEGRITY
BAD: tuple[tuple[Purpose, str, dict, str], ...] = (
    (ENC, "3DES", {}, "blocked"),  # SP 800-131A Rev. 2 Table 1: disallowed after 2023
    (ENC, "TLS_RSA_WITH_3DES_EDE_CBC_SHA", {"key_size": 2048}, "blocked"),
    (KEX, "RSA-1024", {}, "blocked"),  # under 112 bits
    (SIG, "DSA-2048", {}, "blocked"),  # FIPS 186-5
    (SIG, "ssh-rsa", {"key_size": 3072}, "blocked"),  # SHA-1 signatures
    (SIG, "SHA-1", {}, "blocked"),
    (ENC, "RC4", {}, "blocked"),  # RFC 7465
    (SIG, "MD5", {}, "blocked"),  # RFC 6151
    (KEX, "ML-KEM-768", {"parameter_set": "512"}, "conflict"),
    (KEX, "RSA-2048", {"key_size": 512}, "conflict"),
    (KEX, "P-256", {"curve": "P-9999"}, "conflict"),
    (ENC, "AES-128-GCM", {"key_size": 256}, "conflict"),
)
GOOD: tuple[tuple[Purpose, str, dict, str], ...] = (
    (KEX, "ML-KEM-768", {}, ""), (ENC, "AES-256-GCM", {}, ""), (KEX, "X25519MLKEM768", {}, ""),
    (SIG, "ML-DSA-65", {}, ""), (KEX, "RSA-3072", {}, ""), (SIG, "ECDSA P-256", {"trust_years": 1}, ""),
    (MAC, "HMAC-SHA256", {}, ""), (ENC, "Blowfish", {}, ""),
)


@st.composite
def inventories(draw: st.DrawFn) -> tuple[Inventory, dict[tuple[str, int], str]]:
    """Systems mixing bad and good uses, in use or offered; and the kind of each (system, use
    index): 'blocked' (disallowed or broken), 'conflict' or '' (neither)."""
    systems = []
    bad: dict[tuple[str, int], str] = {}
    for number in range(draw(st.integers(1, 6))):
        ident = f"sys{number:03d}q"
        uses = []
        for index in range(draw(st.integers(1, 4))):
            is_bad = draw(st.booleans())
            purpose, algorithm, attributes, kind = draw(st.sampled_from(BAD if is_bad else GOOD))
            role = draw(st.sampled_from(["in-use", "in-use", "offered"]))
            uses.append(CryptoUse(purpose, algorithm, role=role, **attributes))
            bad[(ident, index)] = kind
        systems.append(System(
            id=ident, name=ident, shelf_life_years=draw(st.sampled_from([0.0, 1.0, 5.0, 30.0])),
            migration_years=draw(st.sampled_from([0.5, 1.0, 3.0])), uses=tuple(uses),
            exposure=draw(st.sampled_from(list(Exposure))), criticality=draw(st.sampled_from(list(Criticality))),
        ))
    return Inventory(organization="Property Test Clinics", systems=tuple(systems)), bad


@cache
def _setup(name: str) -> tuple:
    profile = load_profile(name)
    return load_catalog(), profile, arrival_model_for(profile)


def _run(inventory: Inventory, profile: str) -> TriageResult:
    catalog, threat, arrival = _setup(profile)
    return triage(inventory, catalog, threat, arrival, AS_OF)


def _system_must_not_look_safe(result: TriageResult, bad: dict[tuple[str, int], str]) -> set[str]:
    """Systems with a bad use among those in use (all uses when none is in use), or an offered
    disallowed or broken one (old clients negotiate it): none of them may look safe."""
    ids = set()
    for item in result.items:
        uses = item.system.uses
        pool = [i for i, u in enumerate(uses) if u.role == "in-use"] or list(range(len(uses)))
        if any(bad[(item.system.id, i)] for i in pool):
            ids.add(item.system.id)
        if any(u.role == "offered" and bad[(item.system.id, i)] == "blocked" for i, u in enumerate(uses)):
            ids.add(item.system.id)
    return ids


def _cells(line: str) -> list[str]:
    return [cell.strip() for cell in re.split(r"(?<!\\)\|", line)[1:-1]]


@settings(max_examples=80, deadline=None)
@given(inventories(), st.sampled_from(["survey-2025-upper", "survey-2025-lower"]))
def test_no_bad_use_looks_safe_in_any_output(case: tuple, profile: str) -> None:
    inventory, bad = case
    result = _run(inventory, profile)
    unsafe_systems = _system_must_not_look_safe(result, bad)
    bad_uses = {key for key, value in bad.items() if value}

    # JSON: every use's verdict and every system's verdict.
    data = json.loads(JsonFormat().render(result))
    for item in data["items"]:
        for index, use in enumerate(item["uses"]):
            if (item["id"], index) in bad_uses:
                assert use["verdict"] not in SAFE_LOOKING, (item["id"], use)
        if item["id"] in unsafe_systems:
            assert item["verdict"] not in SAFE_LOOKING, item
        offered_conflicts = [u for i, u in enumerate(item["uses"])
                             if (item["id"], i) in bad_uses and u["role"] == "offered"]
        if item["verdict"] in SAFE_LOOKING and offered_conflicts:
            kinds = [f["kind"] for f in item["flags"]]
            assert "downgrade" in kinds, item  # a bad offered method is never silent

    # Markdown: the ranked table's verdict per system, the detail table's verdict per use.
    text = render_report(result)
    ranked = text.split("## Ranked systems", 1)[1].split("## System detail", 1)[0]
    for line in ranked.splitlines():
        cells = _cells(line) if line.startswith("| ") else []
        if cells and cells[1] in unsafe_systems:
            assert cells[9] not in SAFE_LOOKING, line
    for block in text.split("\n### ")[1:]:
        ident = re.search(r"^- Id: <code>(.*?)</code>$", block, flags=re.MULTILINE)
        assert ident is not None
        rows = [_cells(line) for line in block.splitlines()
                if line.startswith("| ") and not line.startswith("| Algorithm |") and len(_cells(line)) == 13]
        for index, cells in enumerate(rows):
            if (ident.group(1), index) in bad_uses:
                assert cells[9].split(" + ")[0] not in SAFE_LOOKING, (ident.group(1), cells)

    # Terminal table: the verdict column of each system's first line.
    buffer = io.StringIO()
    Console(file=buffer, width=100, no_color=True, color_system=None).print(terminal_view(result))
    for match in re.finditer(r"^\s*\d+ (sys\d{3}q)\s.*?\s(classically-broken|exposed|unassessed|within-margin|"
                             r"quantum-resistant)\s", buffer.getvalue(), flags=re.MULTILINE):
        if match.group(1) in unsafe_systems:
            assert match.group(2) not in SAFE_LOOKING, match.group(0)

    # CSV: the system verdict.
    for row in csv.DictReader(io.StringIO(CsvFormat().render(result), newline="")):
        if row["system_id"] in unsafe_systems:
            assert row["verdict"] not in SAFE_LOOKING, row

    # SARIF: every bad use is an alert (classically-broken or unassessed).
    results = json.loads(SarifFormat().render(result))["runs"][0]["results"]
    alerted = [(r["properties"]["system"], r["properties"]["purpose"]) for r in results
               if r["ruleId"] in ("classically-broken", "unassessed")]
    for system in inventory.systems:
        for index, use in enumerate(system.uses):
            if (system.id, index) in bad_uses:
                assert (system.id, use.purpose.value) in alerted, (system.id, use)

    # CBOM: the verdict property of each use's component.
    components = json.loads(CbomFormat().render(result))["components"]
    for component in components:
        system, _, number = component["bom-ref"].rpartition("#use-")
        if system and number.isdigit() and (system, int(number) - 1) in bad_uses:
            props = {p["name"]: p["value"] for p in component.get("properties", [])}
            assert props["pqtriage:verdict"] not in SAFE_LOOKING, component
