"""A small inventory with hostile text, triaged on a fixed date, for the interop format tests."""

from __future__ import annotations

import datetime as dt
from pathlib import Path

from pqtriage.model.verdict import TriageResult
from pqtriage.pipeline import run_triage

AS_OF = dt.date(2026, 12, 1)

INVENTORY = """\
version: 1
organization: Brackenfold Water Board
systems:
  - id: telemetry
    name: "=HYPERLINK(\\"http://attacker.invalid\\",\\"click\\")"
    owner: "@SUM(A1:A9)"
    shelf_life_years: 10
    migration_years: 3
    exposure: internet
    uses:
      - purpose: key-establishment
        algorithm: RSA
        key_size: 2048
      - purpose: encryption
        algorithm: AES-128-GCM
  - id: "+scada-link"
    name: "-2+3 SCADA link"
    shelf_life_years: 7
    migration_years: 2
    uses:
      - purpose: key-establishment
        algorithm: TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256
        curve: P-256
        key_size: 2048
        protocol: TLS 1.2
      - purpose: encryption
        algorithm: Kuznyechik
  - id: billing
    name: Billing, "quoted" and comma
    shelf_life_years: 3
    migration_years: 1
    uses:
      - purpose: key-establishment
        algorithm: ML-KEM-768
      - purpose: encryption
        algorithm: AES-256-GCM
"""


def triaged(tmp_path: Path, text: str = INVENTORY, name: str = "inventory.yaml") -> TriageResult:
    """Write the inventory and triage it on AS_OF with a fixed what-if profile (CRQC on
    1 January 2035), so verdicts do not move when resource estimates are refined."""
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return run_triage(str(path), str(Path(__file__).with_name("what-if-2035.yaml")), AS_OF)


def line_of(text: str, needle: str) -> int:
    """1-based line of the first line containing needle."""
    return next(n for n, line in enumerate(text.splitlines(), start=1) if needle in line)
