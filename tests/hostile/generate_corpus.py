"""Checked-in generator of the hostile-input corpus (large files are made at test time).

Run ``python tests/hostile/generate_corpus.py FOLDER`` to write every case to a
folder for manual inspection; the tests call :func:`write_case` into tmp_path.
Each case is bytes that pqtriage must answer within bounded time and memory
with a one-line error naming the place, or with an unassessed item; never a
traceback.
"""

from __future__ import annotations

import sys
from collections.abc import Callable
from pathlib import Path

VALID = """\
version: 1
organization: Hostile Corpus Test Cooperative
systems:
  - id: alpha
    name: Alpha service
    shelf_life_years: 5
    migration_years: 2
    uses:
      - purpose: key-establishment
        algorithm: RSA
        key_size: 2048
"""
"""A tiny valid inventory that the cases below corrupt one way each."""

INJECTION = "[bold red]x[/] \x1b[31mred\x1b[0m <script>alert(1)</script> | pipe | **md** =cmd() @SUM(A1)"
"""Rich markup, an ANSI escape, HTML, a Markdown table pipe, Markdown emphasis and spreadsheet formulas."""

TEXT_FIELDS = ("organization", "id", "name", "owner", "description", "notes", "protocol", "source",
               "use notes", "use protocol", "use source", "algorithm", "curve")
"""Every free-text field of the format (system-level unless prefixed 'use')."""


def _quoted(text: str) -> str:
    """A YAML double-quoted scalar (escapes make the ESC byte legal in the file)."""
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"').replace("\x1b", "\\e") + '"'


def injection_inventory(tag: str = "") -> str:
    """An inventory with the injection payload in every text field (the tag keeps ids unique)."""
    payload = _quoted(INJECTION + tag)
    return f"""\
version: 1
organization: {payload}
systems:
  - id: {payload}
    name: {payload}
    owner: {payload}
    description: {payload}
    notes: {payload}
    protocol: {payload}
    source: {payload}
    shelf_life_years: 10
    migration_years: 3
    uses:
      - purpose: key-establishment
        algorithm: RSA
        key_size: 2048
        notes: {payload}
        protocol: {payload}
        source: {payload}
      - purpose: encryption
        algorithm: {payload}
      - purpose: key-establishment
        algorithm: ECDH
        curve: {payload}
"""


def alias_bomb(levels: int = 9) -> bytes:
    """Nine levels of ten aliases each: 10^10 values once expanded."""
    lines = ["a0: &a0 [x, x, x, x, x, x, x, x, x, x]"]
    for level in range(1, levels + 1):
        lines.append(f"a{level}: &a{level} [" + ", ".join([f"*a{level - 1}"] * 10) + "]")
    return ("\n".join(lines) + "\n").encode()


def deep_nesting(depth: int = 1000) -> bytes:
    """A 1,000-deep flow list inside an otherwise valid inventory."""
    return ("version: 1\norganization: O\nsystems: " + "[" * depth + "]" * depth + "\n").encode()


def flow_flood(megabytes: int = 12) -> bytes:
    """Millions of one-character values in one flow list: refused by the value limit while parsing."""
    count = megabytes * 1024 * 1024 // 2
    return b"version: 1\norganization: O\nsystems: [" + b"1," * count + b"1]\n"


def fifty_megabytes() -> bytes:
    """A 50 MB inventory of real systems (over the 16 MiB limit: refused before parsing)."""
    system = ("  - id: sys-{0:07d}\n    shelf_life_years: 5\n    migration_years: 2\n    uses:\n"
              "      - {{purpose: key-establishment, algorithm: RSA, key_size: 2048}}\n")
    head = "version: 1\norganization: Fifty Megabyte Cooperative\nsystems:\n"
    one = len(system.format(0))
    return (head + "".join(system.format(i) for i in range(50_000_000 // one + 1))).encode()


def replace(old: str, new: str) -> bytes:
    """VALID with one line changed."""
    assert old in VALID, old
    return VALID.replace(old, new, 1).encode()


CASES: dict[str, Callable[[], bytes]] = {
    "alias-bomb": alias_bomb,
    "deep-nesting-1000": deep_nesting,
    "flow-flood-12mb": flow_flood,
    "inventory-50mb": fifty_megabytes,
    "nul-byte": lambda: replace("name: Alpha service", "name: Alpha\x00service"),
    "invalid-utf8": lambda: VALID.encode().replace(b"Alpha service", b"Alpha \xff\xfe service"),
    "tab-indentation": lambda: replace("    name: Alpha service", "\tname: Alpha service"),
    "duplicate-key": lambda: replace("    name: Alpha service\n", "    name: Alpha service\n    name: Again\n"),
    "duplicate-top-key": lambda: replace("version: 1\n", "version: 1\nversion: 1\n"),
    "merge-key": lambda: replace("    name: Alpha service\n", "    <<: {name: merged}\n"),
    "two-documents": lambda: (VALID + "---\n" + VALID).encode(),
    "huge-integer": lambda: replace("key_size: 2048", "key_size: " + "9" * 5000),
    "float-overflow": lambda: replace("shelf_life_years: 5", "shelf_life_years: 1.0e+400"),
    "nan": lambda: replace("shelf_life_years: 5", "shelf_life_years: .nan"),
    "infinity": lambda: replace("migration_years: 2", "migration_years: .inf"),
    "minus-infinity": lambda: replace("migration_years: 2", "migration_years: -.inf"),
    "negative-years": lambda: replace("shelf_life_years: 5", "shelf_life_years: -3"),
    "absurd-years": lambda: replace("migration_years: 2", "migration_years: 1000000000"),
    "negative-trust-years": lambda: replace("key_size: 2048", "key_size: 2048\n        trust_years: -1"),
    "version-absurd": lambda: replace("version: 1", "version: 99999999999999999999"),
    "wrong-type-id-list": lambda: replace("id: alpha", "id: [a, b]"),
    "wrong-type-name-map": lambda: replace("name: Alpha service", "name: {a: 1}"),
    "wrong-type-years-text": lambda: replace("shelf_life_years: 5", "shelf_life_years: five"),
    "wrong-type-years-bool": lambda: replace("shelf_life_years: 5", "shelf_life_years: yes"),
    "wrong-type-key-size-float": lambda: replace("key_size: 2048", "key_size: 2048.5"),
    "wrong-type-purpose-number": lambda: replace("purpose: key-establishment", "purpose: 7"),
    "wrong-type-algorithm-null": lambda: replace("algorithm: RSA", "algorithm: null"),
    "wrong-type-uses-text": lambda: VALID.split("    uses:")[0].encode() + b"    uses: plenty\n",
    "wrong-type-systems-map": lambda: b"version: 1\norganization: O\nsystems: {a: 1}\n",
    "wrong-type-root-list": lambda: b"- version: 1\n",
    "wrong-type-root-scalar": lambda: b"just a sentence\n",
    "wrong-type-depends-on": lambda: replace("    name: Alpha service\n", "    name: Alpha service\n    depends_on: 5\n"),
    "wrong-type-organization-null": lambda: replace("organization: Hostile Corpus Test Cooperative", "organization:"),
    "python-tag": lambda: replace("name: Alpha service", "name: !!python/object/apply:os.system [echo]"),
    "undefined-alias": lambda: replace("name: Alpha service", "name: *nowhere"),
    "self-alias": lambda: replace("name: Alpha service", "name: &loop [*loop]"),
    "empty-file": lambda: b"",
    "only-comments": lambda: b"# nothing here\n",
    "truncated": lambda: VALID.encode()[: len(VALID) // 2] + b"[",
}
"""Cases that must end in exit code 2 and a one-line error naming the place."""

ACCEPTED: dict[str, Callable[[], bytes]] = {
    "binary-tag-kept-as-text": lambda: replace("name: Alpha service", "name: !!binary aGVsbG8="),
    "bom-crlf": lambda: b"\xef\xbb\xbf" + VALID.replace("\n", "\r\n").encode(),
    "tabs-in-values": lambda: replace("name: Alpha service", 'name: "Alpha\\tservice\\there"'),
    "unknown-algorithm": lambda: replace("algorithm: RSA", "algorithm: Kuznyechik-9000"),
    # A key size no catalog row has: only that use is unassessed (a scan can meet any size).
    "big-integer": lambda: replace("key_size: 2048", "key_size: " + "9" * 40),
    "injection": lambda: injection_inventory().encode(),
    "bidi-override": lambda: replace("name: Alpha service", 'name: "Alpha \\u202eecivres"'),
    # Issue 12: text fields keep what was typed, whatever YAML 1.1 would read it as.
    "id-looks-like-a-boolean": lambda: replace("id: alpha", "id: true"),
    "id-with-leading-zero": lambda: replace("id: alpha", "id: 010"),
}
"""Cases that must be triaged: accepted as written, anything unknown shown as unassessed."""


def write_case(folder: Path, name: str) -> Path:
    """Write one case (from CASES or ACCEPTED) to folder and return its path."""
    maker = CASES.get(name) or ACCEPTED[name]
    path = folder / f"{name}.yaml"
    path.write_bytes(maker())
    return path


def main(argv: list[str]) -> int:
    """Write every case into the folder given as the only argument."""
    if len(argv) != 1:
        sys.stderr.write("usage: python tests/hostile/generate_corpus.py FOLDER\n")
        return 2
    folder = Path(argv[0])
    folder.mkdir(parents=True, exist_ok=True)
    for name in (*CASES, *ACCEPTED):
        print(write_case(folder, name))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
