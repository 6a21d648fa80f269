"""Properties of triage and its outputs, over generated inventories.

- every input system (and use) appears exactly once in every output format (JSON, Markdown,
  terminal table, CSV, CBOM; SARIF lists exactly the classically-broken, exposed and
  unassessed uses);
- the ranking is a deterministic total order (input order does not matter);
- raising x or y never lowers the exposure probability (Mosca's inequality, x + y > z:
  "Cybersecurity in an era with quantum computers: will we be ready?", IACR ePrint 2015/1075);
- at equal x and y a quantum-resistant use never ranks above a Shor-attackable one.
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import itertools
import json
import math
import re
from collections import Counter
from collections.abc import Callable
from functools import cache

from hypothesis import assume, given, settings
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
from pqtriage.model.mosca import evaluate_use
from pqtriage.model.triage import triage
from pqtriage.model.verdict import SystemAssessment, TriageResult, Verdict
from pqtriage.pipeline import arrival_model_for
from pqtriage.sources.profile_file import load_profile
from tests.properties.strategies import inventories

AS_OF = dt.date(2026, 12, 1)
PROFILES = ("survey-2025-upper", "survey-2025-lower")


@cache
def _setup(profile_name: str) -> tuple:
    profile = load_profile(profile_name)
    return load_catalog(), profile, arrival_model_for(profile)


def run(inventory: Inventory, profile_name: str = PROFILES[0]) -> TriageResult:
    catalog, profile, arrival = _setup(profile_name)
    return triage(inventory, catalog, profile, arrival, AS_OF)


def ids_in_json(result: TriageResult) -> list[str]:
    data = json.loads(JsonFormat().render(result))
    return [item["id"] for item in data["items"]]


def ids_in_markdown(result: TriageResult) -> list[str]:
    text = render_report(result)
    # One "- Id: <code>...</code>" line per system in the detail section.
    return re.findall(r"^- Id: <code>(.*?)</code>$", text, flags=re.MULTILINE)


def ids_in_table(result: TriageResult) -> list[str]:
    buffer = io.StringIO()
    Console(file=buffer, width=100, no_color=True, color_system=None).print(terminal_view(result))
    return re.findall(r"^\s*\d+\s+(sys\d{3}q)\*?\s", buffer.getvalue(), flags=re.MULTILINE)


def ids_in_csv(result: TriageResult) -> list[str]:
    # Read back with Python's csv module (RFC 4180): one row per system.
    return [row["system_id"] for row in csv.DictReader(io.StringIO(CsvFormat().render(result), newline=""))]


def ids_in_cbom(result: TriageResult) -> list[str]:
    # CycloneDX 1.6: each system is an "application" component whose bom-ref is its id.
    components = json.loads(CbomFormat().render(result))["components"]
    return [c["bom-ref"] for c in components if c["type"] == "application"]


# SARIF reports uses, not systems: see test_sarif_reports_every_urgent_use_exactly_once.
OUTPUTS: list[tuple[str, Callable[[TriageResult], list[str]]]] = [
    ("json", ids_in_json),
    ("markdown", ids_in_markdown),
    ("table", ids_in_table),
    ("csv", ids_in_csv),
    ("cbom", ids_in_cbom),
]


@settings(max_examples=60, deadline=None)
@given(inventories(text_ids=False, max_systems=8))
def test_every_system_appears_exactly_once_in_every_output(inventory: Inventory) -> None:
    result = run(inventory)
    expected = Counter(s.id for s in inventory.systems)
    for name, extract in OUTPUTS:
        assert Counter(extract(result)) == expected, name


@settings(max_examples=60, deadline=None)
@given(inventories(max_systems=6))
def test_every_use_appears_exactly_once_in_json_and_markdown(inventory: Inventory) -> None:
    result = run(inventory)
    data = json.loads(JsonFormat().render(result))
    by_id = {s.id: s for s in inventory.systems}
    for item in data["items"]:
        assert [u["algorithm"] for u in item["uses"]] == [u.algorithm for u in by_id[item["id"]].uses]
    # Markdown: one row per use in each system's table (13 columns), none elsewhere, and one
    # numbered line of facts per use.
    text = render_report(result)
    detail = text.split("## System detail", 1)[1]
    rows = [line for line in detail.splitlines() if line.startswith("| ")
            and len(re.findall(r"(?<!\\)\|", line)) == 14 and not line.startswith("| Algorithm |")]
    assert len(rows) == sum(len(s.uses) for s in inventory.systems)


@settings(max_examples=60, deadline=None)
@given(inventories(max_systems=6))
def test_every_use_appears_exactly_once_in_cbom(inventory: Inventory) -> None:
    # One cryptographic-asset component "<system>#use-<n>" per use, in input order, carrying the
    # inventory's algorithm text as the pqtriage:algorithm property (docs/interop.md).
    result = run(inventory)
    components = json.loads(CbomFormat().render(result))["components"]
    found: dict[str, list[str]] = {}
    for component in components:
        ref = component["bom-ref"]
        system, _, use = ref.rpartition("#use-")
        if component["type"] == "cryptographic-asset" and system and use.isdigit():
            props = {p["name"]: p["value"] for p in component.get("properties", [])}
            assert props["pqtriage:system"] == system
            found.setdefault(system, []).append(props["pqtriage:algorithm"])
    expected = {s.id: [u.algorithm for u in s.uses] for s in inventory.systems if s.uses}
    assert found == expected


@settings(max_examples=60, deadline=None)
@given(inventories(text_ids=False, max_systems=8))
def test_sarif_reports_every_urgent_use_exactly_once(inventory: Inventory) -> None:
    # SARIF: one result per classically-broken, exposed or unassessed use, one warning per flag
    # (legacy, deprecated, downgrade) of any use, and no other.
    result = run(inventory)
    urgent = {Verdict.CLASSICALLY_BROKEN, Verdict.EXPOSED, Verdict.UNASSESSED}
    expected = Counter((item.system.id, use.use.purpose.value, use.verdict.value)
                       for item in result.items for use in item.uses if use.verdict in urgent)
    expected.update((item.system.id, use.use.purpose.value, flag.kind)
                    for item in result.items for use in item.uses for flag in use.flags)
    results = json.loads(SarifFormat().render(result))["runs"][0]["results"]
    found = Counter((r["properties"]["system"], r["properties"]["purpose"], r["ruleId"]) for r in results)
    assert found == expected
    uses = sum(len(s.uses) for s in inventory.systems)
    flags = sum(len(use.flags) for item in result.items for use in item.uses)
    assert len(results) == uses + flags - sum(use.verdict not in urgent for item in result.items for use in item.uses)


@settings(max_examples=60, deadline=None)
@given(inventories(max_systems=8), st.randoms(use_true_random=False))
def test_ranking_is_a_deterministic_total_order(inventory: Inventory, random: object) -> None:
    first = run(inventory)
    shuffled = list(inventory.systems)
    random.shuffle(shuffled)  # type: ignore[attr-defined]
    second = run(Inventory(organization=inventory.organization, systems=tuple(shuffled)))
    assert [i.system.id for i in first.items] == [i.system.id for i in second.items]
    assert [i.rank for i in first.items] == list(range(1, len(first.items) + 1))
    for above, below in itertools.pairwise(first.items):
        assert _ranked_above(above, below), (above.system.id, below.system.id)


# The documented ranking (docs/method.md, "Ranking"), written out here rather than taken from the
# tool's sort key: verdicts most urgent first, then more priority points, then the higher
# probability in whole percent, then the shorter margin to one decimal, then criticality and
# exposure to interception, then the id. Checked pairwise on adjacent rows.
VERDICT_ORDER = ["classically-broken", "exposed", "unassessed", "within-margin", "quantum-resistant"]
CRITICALITY_RANK = ["critical", "high", "medium", "low"]
INTERCEPTION_RANK = ["internet", "partner", "internal", "isolated"]


def _ranked_above(a: SystemAssessment, b: SystemAssessment) -> bool:
    def facets(item: SystemAssessment) -> list:
        priority = item.priority
        p = item.exposure_probability
        margin = item.margin_years
        finite = margin is not None and math.isfinite(margin)
        shown_margin = float(f"{margin:.1f}") if finite else None
        return [
            VERDICT_ORDER.index(item.verdict.value),
            -(priority.points if priority is not None else 0.0),
            -(int(p * 100 + 0.5) if p is not None else -1),
            shown_margin if shown_margin is not None else float("inf"),
            CRITICALITY_RANK.index(item.system.criticality.value),
            INTERCEPTION_RANK.index(item.system.exposure.value),
            item.system.id,
        ]

    for x, y in zip(facets(a), facets(b), strict=True):
        if x != y:
            return x < y
    return False  # equal on every facet: no total order


SHOR = ("RSA-2048", "RSA-3072", "ECDSA P-256", "X25519", "ECDH P-384")
GROVER = ("AES-128-GCM", "AES-256-GCM")
RESISTANT = ("ML-KEM-768", "ML-KEM-1024", "ML-DSA-65", "SLH-DSA-SHA2-128s")


def _system(ident: str, algorithm: str, purpose: Purpose, x: float, y: float,
            criticality: Criticality = Criticality.MEDIUM, exposure: Exposure = Exposure.INTERNAL) -> System:
    use = CryptoUse(purpose=purpose, algorithm=algorithm, trust_years=x)
    return System(id=ident, name=ident, shelf_life_years=x, migration_years=y, uses=(use,),
                  criticality=criticality, exposure=exposure)


@settings(max_examples=200, deadline=None)
@given(st.sampled_from(SHOR + GROVER), st.sampled_from([Purpose.KEY_ESTABLISHMENT, Purpose.SIGNATURE]),
       st.floats(0, 40), st.floats(0, 40), st.floats(0, 20), st.floats(0, 20), st.sampled_from(PROFILES))
def test_raising_x_or_y_never_lowers_the_exposure_probability(
    algorithm: str, purpose: Purpose, x: float, y: float, dx: float, dy: float, profile_name: str
) -> None:
    catalog, profile, arrival = _setup(profile_name)
    resolution = catalog.resolve(algorithm, purpose=purpose.value)
    assume(resolution.spec is not None)

    def probability(shelf: float, migration: float) -> float:
        system = _system("s", algorithm, purpose, shelf, migration)
        value = evaluate_use(system.uses[0], system, resolution, profile, arrival, AS_OF, catalog).exposure_probability
        assert value is not None
        return value

    base = probability(x, y)
    assert probability(x + dx, y) >= base
    assert probability(x, y + dy) >= base
    assert probability(x + dx, y + dy) >= base


@settings(max_examples=200, deadline=None)
@given(st.sampled_from(SHOR), st.sampled_from(RESISTANT), st.floats(0, 60), st.floats(0, 30),
       st.sampled_from(list(Criticality)), st.sampled_from(list(Exposure)),
       st.sampled_from(list(Criticality)), st.sampled_from(list(Exposure)), st.sampled_from(PROFILES))
def test_quantum_resistant_never_ranks_above_shor_attackable(
    shor: str, resistant: str, x: float, y: float, crit_a: Criticality, exp_a: Exposure,
    crit_b: Criticality, exp_b: Exposure, profile_name: str
) -> None:
    catalog, _, _ = _setup(profile_name)
    purpose = Purpose.SIGNATURE if resistant.startswith(("ML-DSA", "SLH")) else Purpose.KEY_ESTABLISHMENT
    if shor.startswith("ECDSA") and purpose is Purpose.KEY_ESTABLISHMENT:
        shor = "ECDH P-384"
    assume(catalog.resolve(shor, purpose=purpose.value).spec is not None)
    assume(catalog.resolve(resistant, purpose=purpose.value).spec is not None)
    # The resistant system gets the id that would win a tie, and any criticality and exposure.
    inventory = Inventory(organization="Property Test Cooperative", systems=(
        _system("a-resistant", resistant, purpose, x, y, crit_a, exp_a),
        _system("z-shor", shor, purpose, x, y, crit_b, exp_b),
    ))
    result = run(inventory, profile_name)
    ranks = {i.system.id: i.rank for i in result.items}
    assert ranks["z-shor"] < ranks["a-resistant"], [(i.system.id, i.verdict, i.reason) for i in result.items]
