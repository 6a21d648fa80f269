"""scan_command end to end on a generated folder of mixed material: inventory shape, exit
codes, walk limits, grouping rules, merge semantics, and no private-key bytes anywhere.
"""

from __future__ import annotations

import json
import os
from pathlib import Path
from typing import Any

import pytest
import yaml
from cryptography.hazmat.primitives import serialization
from cryptography.hazmat.primitives.asymmetric import ec, ed25519

from pqtriage.cli.scan import scan_command
from pqtriage.errors import UsageError
from tests.sources import material as m

SYSTEM_KEYS = {
    "id", "name", "shelf_life_years", "migration_years", "assumed", "source", "exposure",
    "protocol", "notes", "uses",
}  # fmt: skip
USE_KEYS = {
    "purpose", "algorithm", "key_size", "curve", "parameter_set", "protocol", "notes", "source",
    "assumed", "trust_years", "role", "not_before", "not_after",
}  # fmt: skip
PURPOSES = {"key-establishment", "encryption", "signature", "authentication", "integrity"}


@pytest.fixture(scope="module")
def tree(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, list[Any]]:
    """A folder of mixed material; returns it with every private key written into it."""
    root = tmp_path_factory.mktemp("material")
    ca_key = m.rsa_key(3072)
    ca = m.certificate(ca_key, "Fictional Root CA", ca=True)
    web_key = m.ec_key(ec.SECP256R1())
    web = m.certificate(web_key, "web.example.test", ca_key, ca, dns=("web.example.test",))
    pq_key = m.mldsa_key(87)
    ssh_key = ed25519.Ed25519PrivateKey.generate()
    m.write(root / "web" / "chain.pem", m.cert_pem(web) + m.cert_pem(ca))
    m.write(root / "web" / "web.key", m.private_pem(web_key))
    m.write(root / "web" / "bundle.p12", m.pkcs12_bundle(web_key, web, [ca], None))
    m.write(root / "web" / "locked.p12", m.pkcs12_bundle(web_key, web, [ca], b"fictional-pw"))
    m.write(root / "pki" / "root.der", ca.public_bytes(serialization.Encoding.DER))
    m.write(root / "pki" / "root.key", m.private_der(ca_key))
    m.write(root / "pq" / "signer.pem", m.cert_pem(m.certificate(pq_key, "Fictional PQ", ca=True)))
    m.write(root / "pq" / "signer.key", m.private_pem(pq_key))
    m.write(root / "ssh" / "known_hosts", "git.example.test " + m.ssh_public_line(ssh_key) + "\n")
    m.write(
        root / "ssh" / "id_ed25519",
        m.private_pem(ssh_key, None, serialization.PrivateFormat.OpenSSH),
    )
    m.write(root / "docs" / "readme.txt", "nothing here\n")
    return root, [web_key, ca_key, pq_key, ssh_key]


def _systems(text: str) -> list[dict[str, Any]]:
    return yaml.safe_load(text)["systems"]


def test_inventory_shape_and_traceability(tree: tuple[Path, list[Any]]) -> None:
    root, _ = tree
    result = scan_command([str(root)])
    assert result.exit_code == 0
    document = yaml.safe_load(result.text)
    assert set(document) == {"version", "organization", "systems"}
    sources = []
    for system in document["systems"]:
        assert set(system) <= SYSTEM_KEYS
        assert system["assumed"] == ["shelf_life_years", "migration_years", "exposure"]
        for use in system["uses"]:
            assert set(use) <= USE_KEYS and use["purpose"] in PURPOSES
            sources.append(use["source"])
            file_part = use["source"].split("#", 1)[0]
            assert os.path.isfile(file_part), use["source"]  # every finding traces to a file
    assert len(sources) == len(set(sources))
    names = {s["source"] for s in document["systems"]}
    assert names == {str(root / d) for d in ("web", "pki", "pq", "ssh")}
    assert json.loads(scan_command([str(root)], output_format="json").text) == document


def test_no_private_key_bytes_in_any_output(tree: tuple[Path, list[Any]], tmp_path: Path) -> None:
    root, keys = tree
    password = m.write(tmp_path / "pw.txt", "fictional-pw\n")
    outputs = []
    for output_format in ("yaml", "json"):
        result = scan_command([str(root)], output_format=output_format, password_file=str(password))
        outputs.append(result.text + "\n".join(result.summary))
    everything = "\n".join(outputs)
    assert "fictional-pw" not in everything
    for key in keys:
        for fragment in m.secret_fragments(key):
            assert fragment not in everything


def test_exit_code_one_when_something_is_unreadable(tmp_path: Path) -> None:
    pem = m.cert_pem(m.certificate(m.ec_key(ec.SECP256R1()), "Fictional"))
    m.write(tmp_path / "ok.pem", pem)
    m.write(tmp_path / "cut.pem", pem[:200])
    result = scan_command([str(tmp_path)])
    assert result.exit_code == 1
    assert any(line.endswith("truncated: CERTIFICATE has no END line") for line in result.summary)
    uses = _systems(result.text)[0]["uses"]
    # The good (self-signed) certificate's two uses, and the damaged one kept as unknown.
    assert len(uses) == 3
    damaged = [u for u in uses if u["algorithm"] == "unknown"]
    assert len(damaged) == 1 and damaged[0]["source"].endswith("cut.pem#block1")
    assert damaged[0]["notes"].startswith("truncated material, not assessed:")


def test_walk_limits_are_notes_not_failures(tmp_path: Path) -> None:
    m.write(tmp_path / "a" / "ok.pem", m.cert_pem(m.certificate(m.ec_key(ec.SECP256R1()), "F")))
    os.symlink(tmp_path, tmp_path / "a" / "loop")
    os.mkfifo(tmp_path / "a" / "pipe")
    m.write(tmp_path / "a" / "big.pem", b"x" * 5000)
    result = scan_command([str(tmp_path)], max_file_bytes=4096)
    assert result.exit_code == 0
    text = "\n".join(result.summary)
    assert "skipped: symbolic link loop" in text
    assert "skipped: special file (named pipe)" in text
    assert "skipped: larger than the limit (5000 > 4096 bytes)" in text


ROOT_READS_ANYTHING = "root reads files whatever their mode (CI runs this as an unprivileged user)"


@pytest.mark.unprivileged
@pytest.mark.skipif(os.geteuid() == 0, reason=ROOT_READS_ANYTHING)
def test_unreadable_file(tmp_path: Path) -> None:
    path = m.write(tmp_path / "secret.pem", b"-----BEGIN CERTIFICATE-----\n")
    path.chmod(0)
    result = scan_command([str(tmp_path)])
    assert result.exit_code == 1 and any("unreadable" in line for line in result.summary)


def test_bad_usage_raises() -> None:
    with pytest.raises(UsageError):
        scan_command(["/no/such/folder/anywhere"])
    with pytest.raises(UsageError):
        scan_command(["."], output_format="xml")
    with pytest.raises(UsageError):
        scan_command(["."], group_by="colour")


def test_grouping_rules(tree: tuple[Path, list[Any]]) -> None:
    root, _ = tree
    by_subject = {s["source"] for s in _systems(scan_command([str(root)], group_by="subject").text)}
    assert {"web.example.test", "Fictional Root CA", "Fictional PQ"} <= by_subject
    by_host = {s["source"] for s in _systems(scan_command([str(root)], group_by="host").text)}
    assert {"web.example.test", "git.example.test"} <= by_host
    by_file = _systems(scan_command([str(root)], group_by="file").text)
    assert all(os.path.isfile(s["source"]) for s in by_file)


def test_merge_keeps_hand_written_fields_is_idempotent_and_reports_vanished(
    tree: tuple[Path, list[Any]], tmp_path: Path
) -> None:
    root, _ = tree
    first = yaml.safe_load(scan_command([str(root)]).text)
    web = next(s for s in first["systems"] if s["source"].endswith("web"))
    web.update(shelf_life_years=12, owner="Fictional Web Team", assumed=["migration_years"])
    web["uses"][0]["notes"] = "hand note"
    web["uses"].append({"purpose": "encryption", "algorithm": "AES-256-GCM"})  # no source
    ghost = {"purpose": "signature", "algorithm": "RSA", "source": str(root / "web" / "gone.pem")}
    web["uses"].append(ghost)
    first["systems"].append({"id": "hand", "name": "Hand", "shelf_life_years": 1,
                             "migration_years": 1, "uses": []})  # fmt: skip
    existing = m.write(tmp_path / "inventory.yaml", yaml.safe_dump(first, sort_keys=False))
    merged = scan_command([str(root)], merge=str(existing))
    document = yaml.safe_load(merged.text)
    web_after = next(s for s in document["systems"] if s["source"].endswith("web"))
    assert web_after["shelf_life_years"] == 12 and web_after["owner"] == "Fictional Web Team"
    assert web_after["uses"][0]["notes"] == "hand note"
    assert {"purpose": "encryption", "algorithm": "AES-256-GCM"} in web_after["uses"]
    assert ghost in web_after["uses"]  # vanished, but kept
    assert any("vanished (kept" in line and "gone.pem" in line for line in merged.summary)
    assert any(s["id"] == "hand" for s in document["systems"])
    again_path = m.write(tmp_path / "again.yaml", merged.text)
    again = scan_command([str(root)], merge=str(again_path))
    assert yaml.safe_load(again.text) == document  # idempotent


def test_merge_refreshes_scanned_facts(tmp_path: Path) -> None:
    path = m.write(tmp_path / "svc" / "svc.pem", m.cert_pem(m.certificate(m.rsa_key(2048), "S")))
    inventory = m.write(tmp_path / "inv.yaml", scan_command([str(tmp_path / "svc")]).text)
    m.write(path, m.cert_pem(m.certificate(m.rsa_key(4096), "S")))  # the key was rotated
    merged = scan_command([str(tmp_path / "svc")], merge=str(inventory))
    uses = _systems(merged.text)[0]["uses"]
    assert uses[0]["key_size"] == 4096
    assert any("key_size 2048 -> 4096" in line for line in merged.summary)


def test_written_atomically(tmp_path: Path) -> None:
    m.write(tmp_path / "in" / "a.pem", m.cert_pem(m.certificate(m.ec_key(ec.SECP256R1()), "F")))
    out = tmp_path / "inventory.yaml"
    result = scan_command([str(tmp_path / "in")], output=str(out))
    assert out.read_text() == result.text and result.written == str(out)
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".pqtriage-")] == []
