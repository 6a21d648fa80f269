"""scan --merge into a hand-kept, commented inventory changes only the merged lines.

Checked with a textual diff (Python's difflib, unified format): comments, blank lines, flow
lists, key order and quoting of the file stay as the owner wrote them.
"""

from __future__ import annotations

import difflib
from pathlib import Path

import yaml

from pqtriage.cli.scan import scan_command
from pqtriage.sources.loading import load_inventory
from tests.sources import material as m


def _scalar(value: object) -> str:
    return yaml.safe_dump(value, default_flow_style=True).strip().removesuffix("...").strip()


def _use_lines(use: dict[str, object], index: int) -> str:
    """A scanned use as the owner keeps it: every scanned fact, a comment, the owner's note."""
    lines = []
    for number, (key, value) in enumerate(use.items()):
        if key == "notes":
            value = f"hand note {index}: keep"
        text = f"{key}: {_scalar(value)}"
        if key == "key_size":
            text = f"{text:<25}# rotated soon"
        lines.append(("      - " if number == 0 else "        ") + text + "\n")
    return "".join(lines)


def _hand_kept(tmp_path: Path) -> tuple[Path, Path, str]:
    folder = tmp_path / "svc"
    pem = m.write(folder / "svc.pem", m.cert_pem(m.certificate(m.rsa_key(2048), "Fictional Signal Service")))
    scanned = yaml.safe_load(scan_command([str(folder)]).text)["systems"][0]
    uses = "".join(_use_lines(use, index) for index, use in enumerate(scanned["uses"], start=1))
    text = f"""\
# Crypto register of the Wrenfield Ferry Company (kept by hand; do not reorder)
version: 1
organization: Wrenfield Ferry Company

defaults: {{exposure: internal, criticality: medium}}

systems:
  # Ticketing: owned by the ticket office
  - id: 010                      # leading zero on purpose
    name: Ticketing
    tags: [public, pci]          # flow style stays
    shelf_life_years: 7
    migration_years: 2
    uses:
      - {{purpose: signature, algorithm: ML-DSA-65}}

  - id: signal-service
    name: Signal service
    source: {scanned['source']!r}
    shelf_life_years: 5          # from the retention schedule
    migration_years: 1
    uses:
{uses}"""
    inventory = m.write(tmp_path / "inventory.yaml", text)
    return folder, pem, inventory.read_text(encoding="utf-8")


def test_merge_changes_only_the_merged_lines(tmp_path: Path) -> None:
    folder, pem, before = _hand_kept(tmp_path)
    m.write(pem, m.cert_pem(m.certificate(m.rsa_key(3072), "Fictional Signal Service")))  # rotated
    m.write(folder / "extra.pem", m.cert_pem(m.certificate(m.rsa_key(2048), "Fictional Extra")))  # new
    merged = scan_command([str(folder)], merge=str(tmp_path / "inventory.yaml"))
    diff = [line for line in difflib.unified_diff(before.splitlines(), merged.text.splitlines(), lineterm="", n=0)
            if not line.startswith(("---", "+++", "@@"))]
    removed = [line for line in diff if line.startswith("-")]
    added = [line for line in diff if line.startswith("+")]
    # The certificate's key and signature: the key size of each, nothing else of theirs.
    assert removed == ["-        key_size: 2048           # rotated soon"] * 2
    assert added[:2] == ["+        key_size: 3072           # rotated soon"] * 2
    new_uses = "\n".join(line[1:] for line in added[2:])
    assert "algorithm: RSA" in new_uses and "extra.pem" in new_uses
    assert all(line.startswith("+      ") for line in added[2:])  # appended under the same system
    assert len(diff) == len(removed) + len(added)
    # And the result is still a valid inventory that keeps the id as typed.
    out = m.write(tmp_path / "merged.yaml", merged.text)
    inventory = load_inventory(str(out))
    assert [s.id for s in inventory.systems] == ["010", "signal-service"]
    assert len(inventory.systems[1].uses) == 4


def test_merge_with_nothing_new_leaves_the_file_byte_identical(tmp_path: Path) -> None:
    folder, _, before = _hand_kept(tmp_path)
    merged = scan_command([str(folder)], merge=str(tmp_path / "inventory.yaml"))
    assert merged.text == before
