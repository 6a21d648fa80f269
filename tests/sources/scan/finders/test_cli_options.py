"""The scan's finder options through the real CLI: keystore passwords from the command line,
the environment (taken whole) and a file; --summary-json; --openssh-version; archive bounds.
Keystores are made with pyjks (tests/sources/scan/finders/test_keystores.py makes them with
keytool); OpenSSH 9.2 defaults as shipped (checked against sshd -T there)."""

from __future__ import annotations

import json
import os
import subprocess
import sys
import zipfile
from pathlib import Path

import jks
from cryptography.hazmat.primitives.serialization import Encoding

from tests.sources import material as m

PASSWORD = "two words"


def _store(folder: Path) -> Path:
    cert = m.certificate(m.rsa_key(2048), "Fictional Ledger CA", ca=True)
    key = m.rsa_key(2048)
    entry = jks.PrivateKeyEntry.new("ledger", [cert.public_bytes(Encoding.DER)],
                                    m.private_der(key), "pkcs8")  # fmt: skip
    store = jks.KeyStore.new("jks", [entry])
    path = folder / "ledger.jks"
    path.write_bytes(store.saves(PASSWORD))
    return path


def _scan(*args: str, env: dict[str, str] | None = None) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "pqtriage.cli", "scan", *args], capture_output=True,
                          text=True, timeout=120, env=env, check=False)  # fmt: skip


def test_password_from_the_environment_is_taken_whole(tmp_path: Path) -> None:
    store = _store(tmp_path)
    closed = _scan(str(store), "--format", "json")
    assert "ledger.jks#ledger.key" in closed.stdout and '"algorithm": "unknown"' in closed.stdout
    env = {**os.environ, "PQTRIAGE_KEYSTORE_PASSWORD": PASSWORD}
    opened = _scan(str(store), "--format", "json", env=env)
    assert opened.returncode == 0, opened.stderr
    uses = [u for s in json.loads(opened.stdout)["systems"] for u in s["uses"]]
    key = next(u for u in uses if u["source"].endswith("#ledger.key"))
    assert (key["algorithm"], key["key_size"]) == ("RSA", 2048)
    assert PASSWORD not in opened.stdout + opened.stderr


def test_password_from_the_command_line_and_a_file(tmp_path: Path) -> None:
    store = _store(tmp_path)
    by_option = _scan(str(store), "--keystore-password", "wrong", "--keystore-password", PASSWORD)
    assert by_option.returncode == 0 and "keystore: 1 seen, 1 understood" in by_option.stderr
    secret = tmp_path / "secret.txt"
    secret.write_text(PASSWORD + "\n")
    by_file = _scan(str(store), "--keystore-password-file", str(secret))
    assert by_file.returncode == 0 and "keystore: 1 seen, 1 understood" in by_file.stderr


def test_summary_json_openssh_version_and_archive_depth(tmp_path: Path) -> None:
    (tmp_path / "sshd_config").write_text("KexAlgorithms +diffie-hellman-group1-sha1\n")
    with zipfile.ZipFile(tmp_path / "app.zip", "w") as archive:
        archive.writestr("conf/sshd_config", "Ciphers 3des-cbc\n")
    summary = tmp_path / "out/summary.json"
    summary.parent.mkdir()
    done = _scan(str(tmp_path), "--openssh-version", "9.2", "--summary-json", str(summary),
                 "--format", "json")  # fmt: skip
    assert done.returncode == 0, done.stderr
    report = json.loads(summary.read_text())
    tally = {row["finder"]: row for row in report["finders"]}
    assert tally["openssh config"]["seen"] == 2 and tally["archive"]["understood"] == 1
    sources = [u["source"] for s in json.loads(done.stdout)["systems"] for u in s["uses"]]
    assert any("default:Ciphers:aes128-ctr" in s for s in sources)  # 9.2 defaults applied
    flat = _scan(str(tmp_path), "--archive-depth", "0", "--format", "json")
    assert "nested deeper than 0 archives" in flat.stderr
    bad = _scan(str(tmp_path), "--openssh-version", "1.0")
    assert bad.returncode == 2 and "no shipped defaults for OpenSSH '1.0'" in bad.stderr
