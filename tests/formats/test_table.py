"""Exact text of the terminal table (width 100, colours off) on a small fixed inventory.

The profile is a deterministic what-if (CRQC on 1 January 2035), as of 2026-12-01 (decimal
year 2026.917), with shared arrivals, so every number can be checked by hand:
crew-archive RSA-3072 key establishment: x + y = 14 > 8.08 years to z: exposed, P = 100%,
start by 2035.0 - 14 = 2021.0; ticket-web X25519: x + y = 5 < 8.08: within margin,
start by 2035 - 5 = 2030-01-01.
"""

from __future__ import annotations

import datetime as dt
import io
from pathlib import Path

from rich.console import Console

from pqtriage.catalog import load_catalog
from pqtriage.formats.table.triage import terminal_view
from pqtriage.model.arrival_model import SharedArrival
from pqtriage.model.triage import triage
from pqtriage.model.verdict import TriageResult
from pqtriage.sources.loading import load_inventory
from pqtriage.sources.profile_file import load_profile

HERE = Path(__file__).parent


def small_result() -> TriageResult:
    inventory = load_inventory(str(HERE / "small.yaml"))
    profile = load_profile(str(HERE / "what-if-2035.yaml"))
    return triage(inventory, load_catalog(), profile, SharedArrival(), dt.date(2026, 12, 1))


def render(renderable: object) -> str:
    buffer = io.StringIO()
    Console(file=buffer, width=100, no_color=True, color_system=None, highlight=False).print(renderable)
    return buffer.getvalue()


def test_ranked_table_exact_text() -> None:
    text = render(terminal_view(small_result()))
    lines = [line.rstrip() for line in text.splitlines()]
    expected = (HERE / "expected_table.txt").read_text(encoding="utf-8").splitlines()
    assert lines == expected


def test_hand_computed_numbers() -> None:
    result = small_result()
    by_id = {i.system.id: i for i in result.items}
    # One system per verdict, so the verdicts alone order them; priority points (docs/method.md):
    # legacy-link 100 + 0 + medium 10 + internal 5 = 115; crew-archive 100 + 6 (margin -5.9) + 15 = 121;
    # mystery 0 + 0 + 15; ticket-web 0 - 3 (margin 3.1) + high 20 + internet 20 = 37; pq-backup 15.
    assert [i.system.id for i in result.items] == ["legacy-link", "crew-archive", "mystery", "ticket-web", "pq-backup"]
    assert [i.priority.points for i in result.items if i.priority] == [115, 121, 15, 37, 15]
    assert by_id["crew-archive"].start_by == dt.date(2021, 1, 1)
    assert by_id["ticket-web"].start_by == dt.date(2030, 1, 1)
    assert by_id["ticket-web"].exposure_probability == 0.0
    assert by_id["crew-archive"].exposure_probability == 1.0


def banded_result() -> TriageResult:
    """The same inventory under the shipped survey profile, with the uncertainty band."""
    from pqtriage.pipeline import arrival_and_band
    from pqtriage.sources.hardware_file import shipped_hardware

    inventory = load_inventory(str(HERE / "small.yaml"))
    profile = load_profile("survey-2025-upper")
    day = dt.date(2026, 12, 1)
    arrival, band = arrival_and_band(profile, day, shipped_hardware())
    return triage(inventory, load_catalog(), profile, arrival, day, band)


def test_ranked_table_with_the_band_exact_text() -> None:
    # Central values (what the verdict and rank use) with the 10-90 % band beneath, dim. By hand
    # for crew-archive (RSA-3072, x + y = 14): P = F(2026.915 + 14 - shift) on the survey's
    # pessimistic end (Quantum Threat Timeline Report 2025, 49 % at 10 y, 70 % at 15 y):
    # 0.49 + 0.21 x (12.35 - 10) / 5 = 0.589 with the model's shift of 2.38 years: "59%".
    text = render(terminal_view(banded_result()))
    lines = [line.rstrip() for line in text.splitlines()]
    expected = (HERE / "expected_table_band.txt").read_text(encoding="utf-8").splitlines()
    assert lines == expected


def facets_result() -> TriageResult:
    inventory = load_inventory(str(HERE / "facets.yaml"))
    profile = load_profile(str(HERE / "what-if-2035.yaml"))
    return triage(inventory, load_catalog(), profile, SharedArrival(), dt.date(2026, 12, 1))


def test_facets_exact_text() -> None:
    # What-if CRQC on 1 January 2035, as of 2026-12-01 (8.08 years away), shared arrival:
    # - harbour-gate: offered 3DES (SP 800-131A Rev. 2, Table 1: disallowed after 2023) makes it
    #   classically-broken: 100 + medium 10 + partner 10 = 120 points;
    # - ticket-signing: ECDSA P-256, document-signing default x = 30 years (trust_defaults.yaml),
    #   y = 2: 32 > 8.08, exposed, P 100 %, margin 8.08 - 32 = -23.9: 100 + 24 + 10 + internal 5 = 139;
    # - fare-db: ML-KEM-768 with parameter_set 512, conflicting facts: unassessed, 0 + 10 + 5 = 15;
    # - booking-api: X25519MLKEM768 in use (quantum-resistant), offered X25519 (within-margin: a
    #   downgrade), Blowfish (legacy since 2016-08-24): 0 + 10 + internet 20 = 30.
    text = render(terminal_view(facets_result()))
    lines = [line.rstrip() for line in text.splitlines()]
    expected = (HERE / "expected_table_facets.txt").read_text(encoding="utf-8").splitlines()
    assert lines == expected
