"""The YAML inventory reader: the minimal example, and one-line errors naming the place."""

from __future__ import annotations

import datetime
import time
import tracemalloc
from pathlib import Path

import pytest

from pqtriage.errors import InventoryError
from pqtriage.model.inventory import Purpose
from pqtriage.sources.loading import load_inventory

MINIMAL = """\
version: 1
organization: Example Org
systems:
  - id: payroll-db            # unique
    name: Payroll database
    shelf_life_years: 7       # x: how long its data must stay confidential
    migration_years: 2        # y: how long moving it to post-quantum crypto takes
    depends_on: [hr-pki]      # optional, ids of other systems
    uses:
      - purpose: key-establishment   # also: encryption, signature, authentication, integrity
        algorithm: RSA
        key_size: 2048
      - purpose: signature
        algorithm: ECDSA
        curve: P-256
        trust_years: 10       # optional: how long these signatures must stay unforgeable
"""


def _write(tmp_path: Path, text: str | bytes, name: str = "inv.yaml") -> str:
    path = tmp_path / name
    if isinstance(text, str):
        path.write_text(text, encoding="utf-8")
    else:
        path.write_bytes(text)
    return str(path)


def _error(tmp_path: Path, text: str | bytes) -> str:
    path = _write(tmp_path, text)
    with pytest.raises(InventoryError) as caught:
        load_inventory(path)
    message = caught.value.diagnostics()
    assert "\n" not in message
    return message.replace(path, "inv.yaml")


def _errors(tmp_path: Path, text: str | bytes) -> list[str]:
    """Every line of a refused inventory (problems are collected, one line each)."""
    path = _write(tmp_path, text)
    with pytest.raises(InventoryError) as caught:
        load_inventory(path)
    lines = caught.value.diagnostic_lines()
    assert all("\n" not in line for line in lines)
    return [line.replace(path, "inv.yaml") for line in lines]


def test_minimal_example_from_the_format_is_valid(tmp_path: Path) -> None:
    inv = load_inventory(_write(tmp_path, MINIMAL))
    assert inv.organization == "Example Org"
    (system,) = inv.systems
    assert (system.id, system.shelf_life_years, system.migration_years) == ("payroll-db", 7, 2)
    assert [u.purpose for u in system.uses] == [Purpose.KEY_ESTABLISHMENT, Purpose.SIGNATURE]
    assert system.uses[0].key_size == 2048 and system.uses[1].curve == "P-256"
    assert system.uses[1].trust_years == 10
    assert system.uses[0].source is not None and system.uses[0].source.line == 10
    # hr-pki is not in the file: a dependency outside the inventory is a warning, not an error.
    assert len(inv.warnings) == 1 and "hr-pki" in inv.warnings[0] and ":8:" in inv.warnings[0]
    assert len(inv.source_sha256 or "") == 64


def test_role_and_validity_are_read(tmp_path: Path) -> None:
    text = ("version: 1\norganization: O\nsystems:\n  - id: a\n    shelf_life_years: 1\n"
            "    migration_years: 1\n    uses:\n"
            "      - {purpose: signature, algorithm: RSA, key_size: 2048, not_before: 2025-01-01,"
            " not_after: '2045-01-01'}\n"
            "      - {purpose: integrity, algorithm: hmac-sha1, role: offered}\n")
    first, second = load_inventory(_write(tmp_path, text)).systems[0].uses
    assert (first.role, first.not_before, first.not_after) == (
        "in-use", datetime.date(2025, 1, 1), datetime.date(2045, 1, 1))
    assert (second.role, second.not_after) == ("offered", None)


def test_defaults_fill_missing_fields(tmp_path: Path) -> None:
    text = ("version: 1\norganization: O\ndefaults: {shelf_life_years: 4, migration_years: 1, exposure: internet}\n"
            "systems:\n  - id: a\n    uses: []\n")
    (system,) = load_inventory(_write(tmp_path, text)).systems
    assert system.shelf_life_years == 4 and system.exposure.value == "internet"
    assert system.name == "a"


@pytest.mark.parametrize(
    "text, expected",
    [
        ("version: 1\norganization: O\nsystems:\n  - id: a\n    shelf_life_yeras: 3\n",
         "inv.yaml:5:5: unknown field 'shelf_life_yeras' in system 'a'; did you mean 'shelf_life_years'?"),
        ("version: 1\norganization: O\nsystems:\n  - id: a\n    shelf_life_years: seven\n",
         "inv.yaml:5:23: 'shelf_life_years' in system 'a' must be a number, got text; write digits without quotes"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: -1, migration_years: 1, uses: []}\n",
         "inv.yaml:4:31: 'shelf_life_years' in system 'a' is -1, below the minimum 0; years and sizes cannot be negative"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 3000, migration_years: 1, uses: []}\n",
         "inv.yaml:4:31: 'shelf_life_years' in system 'a' is 3000, above the maximum 100; check the unit (years, bits)"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: .nan, migration_years: 1, uses: []}\n",
         "inv.yaml:4:31: 'shelf_life_years' in system 'a' must be a finite number, got nan"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 1, migration_years: 1, uses: []}\n"
         "  - {id: a, shelf_life_years: 1, migration_years: 1, uses: []}\n",
         "inv.yaml:5:5: duplicate system id 'a' (first at line 4); give each system its own id"),
        ("version: 1\norganization: O\norganization: P\nsystems: []\n",
         "inv.yaml:3:1: duplicate key 'organization' (first at line 2); keep one of them"),
        ("version: 1\norganization: O\nsystems:\n  - {id: payroll, shelf_life_years: 1, migration_years: 1, uses: []}\n"
         "  - {id: b, shelf_life_years: 1, migration_years: 1, uses: [], depends_on: [payrol]}\n",
         "inv.yaml:5:76: system 'b' depends on unknown id 'payrol'; did you mean 'payroll'?"),
        ("version: 1\norganization: O\nsystems:\n"
         "  - {id: a, shelf_life_years: 1, migration_years: 1, uses: [], depends_on: [b]}\n"
         "  - {id: b, shelf_life_years: 1, migration_years: 1, uses: [], depends_on: [a]}\n",
         "inv.yaml:4:5: dependency cycle: a -> b -> a; break the cycle: one of them must migrate first"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 1, migration_years: 1,"
         " uses: [{purpose: signing, algorithm: RSA}]}\n",
         "inv.yaml:4:71: 'purpose' in use #1 of system 'a' is 'signing', not a known value; did you mean 'signature'?"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, migration_years: 1, uses: []}\n",
         "inv.yaml:4:5: system 'a' has no 'shelf_life_years'; add it here or in the file's defaults section"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 1, migration_years: 0,"
         " uses: []}\n",
         "inv.yaml:4:51: 'migration_years' in system 'a' is 0, it must be more than 0; give the real duration, for example 0.5 for six months"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 1, migration_years: 1,"
         " uses: [{purpose: signature, algorithm: RSA, role: offerd}]}\n",
         "inv.yaml:4:104: 'role' in use #1 of system 'a' is 'offerd', not a known value; did you mean 'offered'?"),
        ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 1, migration_years: 1,"
         " uses: [{purpose: signature, algorithm: RSA, not_after: '2030-13-01'}]}\n",
         "inv.yaml:4:109: 'not_after' in use #1 of system 'a' is '2030-13-01', not a date; write YYYY-MM-DD"),
        ("version: 1\norganization: O\nsystems: {a: 1}\n",
         "inv.yaml:3:10: 'systems' must be a list, got a mapping"),
        ("", "inv.yaml:1:1: the file is empty; run 'pqtriage init' for a template"),
        ("version: 1\norganization: O\nsystems:\n  - id: a\n   bad: [\n",
         "inv.yaml:5:4: invalid YAML"),
    ],
)
def test_errors_name_file_line_column_and_fix(tmp_path: Path, text: str, expected: str) -> None:
    # The files have other problems too (missing fields): the expected one is among the lines.
    lines = _errors(tmp_path, text)
    assert any(line.startswith(expected) for line in lines), lines


def test_invalid_utf8_bom_nul(tmp_path: Path) -> None:
    assert _error(tmp_path, b"version: 1\norganization: \xff\n").startswith("inv.yaml:2:15: the file is not valid UTF-8")
    assert _error(tmp_path, b"version: 1\norganization: a\x00b\n").startswith("inv.yaml:2:16: the file contains a NUL byte")
    bom = b"\xef\xbb\xbf" + MINIMAL.replace("\n", "\r\n").encode()
    assert load_inventory(_write(tmp_path, bom, "bom.yaml")).systems[0].id == "payroll-db"


def test_alias_bomb_is_refused_fast_with_bounded_memory(tmp_path: Path) -> None:
    lines = ["a0: &a0 [x, x, x, x, x, x, x, x, x, x]"]
    for level in range(1, 10):
        refs = ", ".join([f"*a{level - 1}"] * 10)
        lines.append(f"a{level}: &a{level} [{refs}]")
    path = _write(tmp_path, "\n".join(lines) + "\n")  # expands to 10^10 values
    tracemalloc.start()
    started = time.process_time()  # CPU time: other load on the machine does not inflate it
    with pytest.raises(InventoryError) as caught:
        load_inventory(path)
    elapsed = time.process_time() - started
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    assert "alias bomb" in caught.value.diagnostics()
    assert elapsed < 2.0 and peak < 50 * 1024 * 1024


def test_deep_nesting_is_refused(tmp_path: Path) -> None:
    message = _error(tmp_path, "version: 1\norganization: O\nsystems: " + "[" * 1000 + "]" * 1000 + "\n")
    # Our own limit, or libyaml's (newer PyYAML wheels stop deep documents in the parser).
    assert message.startswith("inv.yaml:3:") and "nesting" in message


def test_large_file_is_refused_before_parsing(tmp_path: Path) -> None:
    path = tmp_path / "big.yaml"
    with path.open("wb") as handle:
        handle.write(b"# " + b"x" * (65 * 1024 * 1024) + b"\n")
    with pytest.raises(InventoryError) as caught:
        load_inventory(str(path))
    assert "larger than 16 MiB" in caught.value.diagnostics()


@pytest.mark.parametrize("size", [0, 100_000, 99999999999999999999999])
def test_a_key_size_outside_the_catalog_range_makes_only_that_use_unassessed(tmp_path: Path, size: int) -> None:
    """Nothing dropped: a scan can meet a 100,000-bit RSA key; the file still reads
    and the catalog says why that one use cannot be assessed."""
    from pqtriage.catalog import load_catalog

    text = ("version: 1\norganization: O\nsystems:\n  - {id: a, shelf_life_years: 1, migration_years: 1,"
            f" uses: [{{purpose: signature, algorithm: RSA, key_size: {size}}},"
            " {purpose: signature, algorithm: RSA, key_size: 3072}]}\n")
    inventory = load_inventory(_write(tmp_path, text))
    big, normal = inventory.systems[0].uses
    catalog = load_catalog()
    found = catalog.resolve(big.algorithm, key_size=big.key_size, purpose="signature")
    assert big.key_size == size and not found.assessed
    assert f"key size {size} is not a plausible number of bits" in (found.reason or "")
    assert catalog.resolve(normal.algorithm, key_size=normal.key_size, purpose="signature").assessed
