"""Every problem at once: collected, sorted by position, one line each with the fix, then a count.

Structural problems (invalid YAML, alias bombs, NUL bytes ...) still stop at once with one line:
tests/hostile/test_inventory_hostile.py. Typing mistakes in algorithm and curve names are checked
by edit distance ("A technique for computer detection and correction of spelling errors",
Communications of the ACM 7(3), 1964: insert, delete, substitute, swap two neighbours).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from pqtriage.catalog.typos import allowed_edits, closest, edit_distance
from pqtriage.cli import main

TEN_MISTAKES = """\
version: 2
organization: Quillmere Port Authority
systems:
  - id: harbour-radio
    name: Harbour radio
    shelf_life_years: 5
    migration_years: two
    hosting: {model: cloud, country: Germany}
    uses:
      - purpose: signing
        algorithm: RSA
        key_size: 2048
  - id: crane-control
    shelf_life_years: 5
    migration_years: 1
    high_value_asset: maybe
    uses:
      - purpose: key-establishment
        algorithm: X25591
      - purpose: signature
        algorithm: ECDSA
        curve: P-265
      - purpose: integrity
        algorithm: HMAC-SHA256
        trust_years: -1
      - purpose: encryption
        algorithm: AES-256-GCM
        key_sise: 256
  - id: gate-scanner
    shelf_life_years: 3
    migration_years: 1
    depends_on: [crane-contrl]
    uses: []
  - id: gate-scanner
    shelf_life_years: 3
    migration_years: 1
    uses: []
"""
"""A fictional port authority's inventory with ten different mistakes."""

EXPECTED = [
    ":1:10: 'version' in the inventory is 2, above the maximum 1: format versions that exist are 1; write 'version: 1'",
    ":7:22: 'migration_years' in system 'harbour-radio' must be a number, got text; write digits without quotes",
    ":8:38: 'country' in 'hosting' in system 'harbour-radio' is 'Germany', not a two-letter ISO 3166-1 code in "
    "capitals (DE, FR, US ...)",
    ":10:18: 'purpose' in use #1 of system 'harbour-radio' is 'signing', not a known value; did you mean 'signature'?",
    ":16:23: 'high_value_asset' in system 'crane-control' must be true or false, got 'maybe'; write true or false",
    ":19:20: unknown algorithm 'X25591'; did you mean 'X25519'?",
    ":22:16: unknown curve 'P-265'; did you mean 'P-256'?",
    ":25:22: 'trust_years' in use #3 of system 'crane-control' is -1, below the minimum 0; years and sizes cannot be "
    "negative",
    ":28:9: unknown field 'key_sise' in use #4 of system 'crane-control'; did you mean 'key_size'?",
    ":34:5: duplicate system id 'gate-scanner' (first at line 29); give each system its own id",
]


def _check(tmp_path: Path, capsys: pytest.CaptureFixture[str], text: str, *args: str) -> tuple[int, list[str]]:
    path = tmp_path / "inventory.yaml"
    path.write_text(text, encoding="utf-8")
    code = main(["check", str(path), *args])
    _, err = capsys.readouterr()
    return code, [line.replace(str(path), "FILE") for line in err.splitlines()]


def test_ten_mistakes_are_listed_in_one_run(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code, lines = _check(tmp_path, capsys, TEN_MISTAKES)
    assert code == 2
    assert lines == [f"pqtriage: error: FILE{line}" for line in EXPECTED] + [
        "pqtriage: error: 10 problems in FILE; nothing was triaged"]


def test_once_fixed_the_dependency_typo_is_found_too(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # With crane-control readable, the typo in gate-scanner's depends_on names it.
    text = (TEN_MISTAKES.replace("version: 2", "version: 1").replace("migration_years: two", "migration_years: 2")
            .replace("signing", "signature").replace("    high_value_asset: maybe\n", "")
            .replace("X25591", "X25519").replace("P-265", "P-256").replace("trust_years: -1", "trust_years: 1")
            .replace("key_sise", "key_size").replace("country: Germany", "country: DE"))
    # One line fewer above gate-scanner (high_value_asset removed).
    code, lines = _check(tmp_path, capsys, text)
    assert code == 2
    assert lines == [
        "pqtriage: error: FILE:31:17: system 'gate-scanner' depends on unknown id 'crane-contrl'; did you mean 'crane-control'?",
        "pqtriage: error: FILE:33:5: duplicate system id 'gate-scanner' (first at line 28); give each system its own id",
        "pqtriage: error: 2 problems in FILE; nothing was triaged",
    ]


def test_a_name_far_from_every_known_one_is_a_warning(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    text = ("version: 1\norganization: Quillmere Port Authority\nsystems:\n  - id: a\n    shelf_life_years: 1\n"
            "    migration_years: 1\n    uses:\n      - purpose: encryption\n        algorithm: Kuznyechik\n")
    code, lines = _check(tmp_path, capsys, text)
    assert code == 0
    assert lines[0].startswith("warning: FILE:9:20: algorithm 'Kuznyechik' is not in the catalog, so this use will "
                               "be unassessed")
    assert lines[-1] == "FILE: valid inventory of 1 systems and 1 uses (1 unassessed, 1 warnings)"
    code, lines = _check(tmp_path, capsys, text, "--strict")
    assert code == 2


def test_triage_stops_on_a_typing_mistake_too(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "inventory.yaml"
    path.write_text("version: 1\norganization: O\nsystems:\n  - id: a\n    shelf_life_years: 1\n    migration_years: 1\n"
                    "    uses:\n      - {purpose: key-establishment, algorithm: ML-KEM-786}\n", encoding="utf-8")
    assert main(["triage", str(path)]) == 2
    _, err = capsys.readouterr()
    assert err == f"pqtriage: error: {path}:8:49: unknown algorithm 'ML-KEM-786'; did you mean 'ML-KEM-768'?\n"


@pytest.mark.parametrize("first, second, distance", [
    ("x25591", "x25519", 1),    # neighbours swapped
    ("p265", "p256", 1),
    ("rsa", "rsa", 0),
    ("mlkem768", "mlkem1024", 4),
    ("kitten", "sitting", 3),   # the textbook example: two substitutions and one insertion
    ("ca", "abc", 3),           # optimal string alignment: each substring edited once
])
def test_edit_distance(first: str, second: str, distance: int) -> None:
    assert edit_distance(first, second) == distance
    assert edit_distance(second, first) == distance


def test_short_names_are_never_called_typos() -> None:
    assert allowed_edits("rsb") == 0 and closest("RSB", ("RSA",)) is None
    assert allowed_edits("aes128gmc") == 2
    assert closest("AES-128-GMC", ("AES-128-GMAC", "AES-128-GCM", "AES-192-GMAC")) == "'AES-128-GMAC' or 'AES-128-GCM'"
