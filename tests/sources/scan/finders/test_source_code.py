"""Source-code finder: every rule's own sample, and one small program of ours per language,
compiled or run with the language's real toolchain where it is installed (python3, javac,
go, node, gcc); TypeScript and Rust samples are parsed only (no tsc, and no crate registry
here for rustc). Check values: what each program calls, as written in it; the algorithm
names are the libraries' documented ones (source named on each rule row).
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from pqtriage.sources.scan.finders.interface import FinderContext
from pqtriage.sources.scan.finders.source_code import (
    EXTENSIONS,
    UNRESOLVED,
    SourceCodeFinder,
    parser,
    rules,
)
from pqtriage.sources.scan.findings import FindingKind
from pqtriage.sources.scan.scanner import scan_paths

SAMPLES = Path(__file__).parent / "samples"
SUFFIX = {"python": ".py", "java": ".java", "go": ".go", "javascript": ".js",
          "typescript": ".ts", "c": ".c", "cpp": ".cpp", "rust": ".rs"}  # fmt: skip
CASES = [(rule, language) for rule in rules()[0] for language in rule.languages]


@pytest.mark.parametrize(("rule", "language"), CASES, ids=[f"{r.id}-{lang}" for r, lang in CASES])
def test_every_rule_finds_its_own_sample(rule: object, language: str) -> None:
    sample = str(rule.get("sample")).encode()  # type: ignore[attr-defined]
    tree = parser(language).parse(sample)
    assert not tree.root_node.has_error, f"sample of {rule.id} is not valid {language}"  # type: ignore[attr-defined]
    result = SourceCodeFinder().read(sample, f"sample{SUFFIX[language]}", FinderContext())
    found = [f for f in result.findings if f.source.detail.split(":")[1] == rule.id]  # type: ignore[attr-defined,union-attr]
    assert found, f"{rule.id} did not fire on its sample"  # type: ignore[attr-defined]
    first = found[0]
    assert first.algorithm == rule.get("expect")  # type: ignore[attr-defined]
    if rule.get("expect_size") is not None:  # type: ignore[attr-defined]
        assert first.key_size == rule.get("expect_size")  # type: ignore[attr-defined]
    if rule.get("expect_curve") is not None:  # type: ignore[attr-defined]
        assert first.curve == rule.get("expect_curve")  # type: ignore[attr-defined]
    assert first.kind is FindingKind.SOURCE_CALL and first.source.line and first.source.column


def test_every_rule_has_a_source_and_a_sample() -> None:
    for rule in rules()[0]:
        assert str(rule.get("source")).strip() and rule.get("sample") and rule.get("expect"), rule.id


def _found(name: str) -> list[tuple[int | None, str, int | None, str | None, bool]]:
    result = scan_paths([str(SAMPLES / name)])
    return [
        (f.source.line, f.algorithm, f.key_size, f.curve, any(UNRESOLVED in n for n in f.notes))
        for f in result.findings
        if f.kind is FindingKind.SOURCE_CALL
    ]


EXPECTED = {
    "ledger_keys.py": [
        (13, "RSA", 1024, None, False), (14, "ECDSA", None, "P-256", False),
        (15, "RSA", None, None, True), (16, "SHA-1", None, None, False),
        (20, "MD5", None, None, False), (26, "ECDHE-RSA-AES128-GCM-SHA256", None, None, False),
    ],
    "LedgerCrypto.java": [
        (12, "RSA", 1024, None, False), (14, "DESede", None, None, False),
        (15, "RSA", None, None, False), (15, "SHA1", None, None, False),
        (16, "unknown", None, None, True),
    ],
    "ledger.go": [
        (17, "RSA", 1024, None, False), (18, "ECDSA", None, "P-224", False),
        (20, "unknown", None, None, False), (21, "TLS_RSA_WITH_3DES_EDE_CBC_SHA", None, None, False),
        (22, "X25519", None, None, False), (24, "MD5", None, None, False),
    ],
    "ledger.js": [
        (5, "RSA", 1024, None, False), (6, "des-ede3-cbc", None, None, False),
        (7, "sha1", None, None, False), (8, "unknown", None, None, True),
    ],
    "ledger.ts": [(3, "SHA-1", None, None, False), (5, "ECDSA", None, "P-384", False)],
    "ledger_tls.c": [
        (10, "3TDEA-CBC", None, None, False), (11, "SHA-1", None, None, False),
        (12, "RSA", 1024, None, False), (13, "RSA", None, None, True),
        (14, "RC4-SHA", None, None, False), (14, "DES-CBC3-SHA", None, None, False),
    ],
    "ledger.rs": [
        (9, "RSA", 1024, None, False), (10, "MD5", None, None, False),
        (11, "X25519", None, None, False), (12, "unknown", None, None, False),
    ],
}  # fmt: skip


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_our_programs(name: str) -> None:
    assert _found(name) == EXPECTED[name]


def test_every_sample_language_is_covered() -> None:
    languages = {EXTENSIONS[os.path.splitext(name)[1]] for name in EXPECTED}
    assert languages >= {"python", "java", "go", "javascript", "typescript", "c", "rust"}


def _tool(name: str, package: str) -> str:
    found = shutil.which(name)
    if found is None:
        pytest.skip(f"{name} is absent (apt-get install {package})")
    return found


def _ok(*args: str, cwd: Path | None = None, env: dict[str, str] | None = None) -> None:
    done = subprocess.run(list(args), capture_output=True, text=True, timeout=300, cwd=cwd,
                          env=env, check=False)  # fmt: skip
    assert done.returncode == 0, done.stdout[-1000:] + done.stderr[-1000:]


@pytest.mark.slow
def test_samples_are_real_code(tmp_path: Path) -> None:
    """Each sample runs or compiles with its language's toolchain."""
    _ok(sys.executable, str(SAMPLES / "ledger_keys.py"))
    _ok(_tool("javac", "default-jdk-headless"), "-d", str(tmp_path), str(SAMPLES / "LedgerCrypto.java"))
    _ok(_tool("node", "nodejs"), str(SAMPLES / "ledger.js"))
    _ok(_tool("gcc", "gcc"), "-fsyntax-only", "-Wno-deprecated-declarations",
        str(SAMPLES / "ledger_tls.c"))  # fmt: skip
    go = _tool("go", "golang-go")
    env = {**os.environ, "GOCACHE": str(tmp_path / "gocache"), "GOPATH": str(tmp_path / "gopath"),
           "GO111MODULE": "off"}  # fmt: skip
    _ok(go, "vet", str(SAMPLES / "ledger.go"), env=env)


ALIASED = [
    ("aliases.py",
     b"import hashlib as h\nfrom hashlib import md5 as m5, sha1\nfrom ssl import PROTOCOL_TLSv1\n"
     b"from Crypto.PublicKey import RSA as R\nh.md5(b'')\nm5(b'')\nsha1(b'')\n"
     b"ctx = PROTOCOL_TLSv1\nR.generate(1024)\n",
     [(5, "MD5", None), (6, "MD5", None), (7, "SHA-1", None), (8, "unknown", None),
      (9, "RSA", 1024)]),
    ("aliases.rs",
     b"use ring::agreement::X25519;\nuse md5::{Digest, Md5 as M};\nuse rustls::version;\n"
     b"fn main() {\n    let a = &X25519;\n    let h = M::new();\n    let v = &version::TLS12;\n}\n",
     [(5, "X25519", None), (6, "MD5", None), (7, "unknown", None)]),
]  # fmt: skip


@pytest.mark.parametrize(("name", "source", "expected"), ALIASED, ids=[a[0] for a in ALIASED])
def test_imported_names_are_followed(name: str, source: bytes, expected: list[tuple[int, str, int | None]]) -> None:
    """Python ``import ... as`` / ``from ... import`` and Rust ``use`` bind names the rules know;
    the import lines themselves are not uses."""
    found = SourceCodeFinder().read(source, name, FinderContext()).findings
    assert [(f.source.line, f.algorithm, f.key_size) for f in found] == expected
