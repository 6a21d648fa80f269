"""SSH probe against Debian's OpenSSH server started on a loopback port by the test.

References outside the project:
  - RFC 4253 (2006), section 7.1: each category takes the first algorithm on the client's
    list that the server also supports; KEXINIT layout;
  - the real OpenSSH client installed beside the server: ``ssh -G`` prints its compiled-in
    defaults (the shipped lists of that version must equal them) and ``ssh -vv`` prints what
    it negotiates (the probe's computation must agree);
  - the pseudo-names ext-info-s and kex-strict-s-v00@openssh.com (RFC 8308; OpenSSH strict
    key exchange) are not algorithms;
  - moduli(5): the group sizes sshd may choose in a group exchange (/etc/ssh/moduli).
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path
from typing import Any

import pytest
import yaml

from pqtriage.cli.probe import probe_command
from pqtriage.model.verdict import Verdict
from pqtriage.sources.probe.ssh import describe_kexinit
from pqtriage.sources.probe.ssh_negotiation import ServerOffer, first_common, negotiate
from pqtriage.sources.probe.ssh_preferences import ssh_preferences
from tests.sources.probe import servers
from tests.sources.routes import one_use_inventory, triage_text, uses_by_source

pytestmark = [pytest.mark.network]
REASON = servers.sshd_missing_reason()
needs_sshd = pytest.mark.skipif(REASON is not None, reason=REASON or "")
needs_ssh = pytest.mark.skipif(shutil.which("ssh") is None, reason="ssh is absent (apt-get install openssh-client)")


def _uses(text: str) -> list[dict[str, Any]]:
    (system,) = yaml.safe_load(text)["systems"]
    return list(system["uses"])


def _by(uses: list[dict[str, Any]], purpose: str, role: str | None = None) -> list[str]:
    return [u["algorithm"] for u in uses
            if u["purpose"] == purpose and (role is None or u.get("role", "in-use") == role)]


def _installed_openssh() -> str:
    """The installed client's version as the data names it: ``OpenSSH 9.2p1``."""
    banner = subprocess.run(["ssh", "-V"], capture_output=True, text=True, timeout=10).stderr
    match = re.match(r"OpenSSH_(\S+?)[ ,]", banner)
    assert match, banner
    return f"OpenSSH {match.group(1)}"


def test_negotiation_takes_the_clients_first_choice_the_server_has() -> None:
    # RFC 4253, section 7.1: the client's order decides, not the server's.
    assert first_common(["b", "a", "c"], ["a", "b"]) == "b"
    assert first_common(["x"], ["a", "b"]) is None
    offer = ServerOffer(
        kex=("curve25519-sha256", "sntrup761x25519-sha512"),
        host_key=("rsa-sha2-512", "ssh-ed25519"),
        ciphers_client_to_server=("aes128-ctr", "chacha20-poly1305@openssh.com"),
        ciphers_server_to_client=("aes128-ctr",),
        macs_client_to_server=("hmac-sha1", "hmac-sha2-256"),
        macs_server_to_client=("hmac-sha1",),
    )
    chosen = negotiate(
        ["sntrup761x25519-sha512", "curve25519-sha256"], ["ssh-ed25519", "rsa-sha2-512"],
        ["chacha20-poly1305@openssh.com", "aes128-ctr"], ["hmac-sha2-256", "hmac-sha1"],
        offer, authenticated_ciphers=["chacha20-poly1305@openssh.com"],
    )  # fmt: skip
    assert (chosen.kex, chosen.host_key) == ("sntrup761x25519-sha512", "ssh-ed25519")
    # Each direction on its own; an authenticated cipher negotiates no MAC.
    assert (chosen.cipher_client_to_server, chosen.mac_client_to_server) == (
        "chacha20-poly1305@openssh.com", None,
    )  # fmt: skip
    assert (chosen.cipher_server_to_client, chosen.mac_server_to_client) == ("aes128-ctr", "hmac-sha1")
    assert chosen.in_use()["mac"] == {"hmac-sha1"}
    # Nothing in common in one category: the client cannot connect, nothing is in use.
    refused = negotiate(["curve25519-sha256"], ["ssh-dss"], ["aes128-ctr"], ["hmac-sha1"], offer)
    assert refused.failure == "no host key algorithm in common"
    assert refused.in_use() == {"kex": set(), "hostkey": set(), "cipher": set(), "mac": set()}


@needs_ssh
def test_shipped_lists_equal_the_installed_openssh_clients_defaults() -> None:
    # The reference: the real client prints its compiled-in defaults with -G (no config file).
    version = _installed_openssh()
    clients = ssh_preferences().clients
    assert version in clients, f"add the default lists of {version} (ssh_config(5)) to the data"
    printed = subprocess.run(
        ["ssh", "-G", "-F", "/dev/null", "host.example.test"], capture_output=True, text=True,
        timeout=10, check=True,
    ).stdout  # fmt: skip
    values = dict(line.split(" ", 1) for line in printed.splitlines() if " " in line)
    lists = clients[version]
    assert values["kexalgorithms"].split(",") == list(lists.kex)
    assert values["hostkeyalgorithms"].split(",") == list(lists.host_key)
    assert values["ciphers"].split(",") == list(lists.ciphers)
    assert values["macs"].split(",") == list(lists.macs)


def test_every_name_in_the_shipped_lists_is_in_the_catalog() -> None:
    from pqtriage.catalog import load_catalog

    catalog = load_catalog()
    for client in ssh_preferences().clients.values():
        for purpose, names in (("key-establishment", client.kex), ("authentication", client.host_key),
                               ("encryption", client.ciphers), ("integrity", client.macs)):
            for name in names:
                found = catalog.resolve(name, purpose=purpose)
                if found.spec is None:  # an RSA host key or a group exchange: the size is read apart
                    found = catalog.resolve(name, purpose=purpose, key_size=3072)
                assert found.spec is not None, (client.name, name, found.reason)


def _real_client_negotiation(port: int) -> dict[str, str]:
    """What the installed OpenSSH client negotiates with the server (its -vv debug lines)."""
    run = subprocess.run(
        ["ssh", "-vv", "-F", "/dev/null", "-o", "BatchMode=yes", "-o", "StrictHostKeyChecking=no",
         "-o", "UserKnownHostsFile=/dev/null", "-o", "GlobalKnownHostsFile=/dev/null",
         "-o", "ConnectTimeout=10", "-p", str(port), "nobody@127.0.0.1", "true"],
        capture_output=True, text=True, timeout=30, stdin=subprocess.DEVNULL,
    )  # fmt: skip
    found = {}
    for line in run.stderr.splitlines():
        if match := re.search(r"kex: algorithm: (\S+)", line):
            found["kex"] = match.group(1)
        elif match := re.search(r"kex: host key algorithm: (\S+)", line):
            found["hostkey"] = match.group(1)
        elif match := re.search(r"kex: server->client cipher: (\S+) MAC: (\S+)", line):
            found["cipher"], found["mac"] = match.group(1), match.group(2)
    assert set(found) == {"kex", "hostkey", "cipher", "mac"}, run.stderr[-2000:]
    return found


RESTRICTED = (
    "KexAlgorithms diffie-hellman-group-exchange-sha256,diffie-hellman-group14-sha1,"
    "curve25519-sha256\n"
    "HostKeyAlgorithms rsa-sha2-256,rsa-sha2-512,ssh-rsa\n"
    "Ciphers aes256-cbc,aes128-ctr\nMACs hmac-sha1,hmac-sha2-256,hmac-md5\n"
)


@pytest.mark.sshd
@needs_sshd
@needs_ssh
@pytest.mark.parametrize(
    ("config", "host_keys"),
    [("", ("ed25519", "ecdsa", "rsa:3072")), (RESTRICTED, ("rsa:2048",))],
    ids=["default", "restricted"],
)
def test_the_computed_negotiation_is_what_a_real_openssh_client_does(
    tmp_path: Path, config: str, host_keys: tuple[str, ...]
) -> None:
    version = _installed_openssh()
    lists = ssh_preferences().clients[version]
    with servers.sshd_server(tmp_path, config, host_keys) as port:
        real = _real_client_negotiation(port)
        result = probe_command([f"ssh://127.0.0.1:{port}"], timeout=10)
    assert result.exit_code == 0, result.summary
    uses = _uses(result.text)
    offer = ServerOffer(
        kex=tuple(_by(uses, "key-establishment")), host_key=tuple(_by(uses, "authentication")),
        ciphers_client_to_server=tuple(_by(uses, "encryption")),
        ciphers_server_to_client=tuple(_by(uses, "encryption")),
        macs_client_to_server=tuple(_by(uses, "integrity")),
        macs_server_to_client=tuple(_by(uses, "integrity")),
    )  # fmt: skip
    ours = negotiate(lists.kex, lists.host_key, lists.ciphers, lists.macs, offer,
                     ssh_preferences().authenticated_ciphers)
    assert (ours.kex, ours.host_key, ours.cipher_server_to_client) == (
        real["kex"], real["hostkey"], real["cipher"],
    )  # fmt: skip
    assert (ours.mac_server_to_client or "<implicit>") == real["mac"]


@pytest.mark.sshd
@needs_sshd
def test_default_openssh_in_use_offered_and_host_keys(tmp_path: Path) -> None:
    with servers.sshd_server(tmp_path, host_keys=("ed25519", "ecdsa", "rsa:3072")) as port:
        result = probe_command([f"ssh://127.0.0.1:{port}"], timeout=10)
    assert result.exit_code == 0, result.summary
    uses = _uses(result.text)
    # What a current OpenSSH client negotiates is in use, one per category (chacha20-poly1305
    # carries its own tag: no MAC is in use); everything else the server lists is offered.
    assert _by(uses, "key-establishment", "in-use") == ["sntrup761x25519-sha512"]
    assert "curve25519-sha256" in _by(uses, "key-establishment", "offered")
    assert _by(uses, "authentication", "in-use") == ["ssh-ed25519"]
    assert _by(uses, "encryption", "in-use") == ["chacha20-poly1305@openssh.com"]
    assert _by(uses, "integrity", "in-use") == []
    assert "umac-64@openssh.com" in _by(uses, "integrity", "offered")
    assert not {"ext-info-s", "kex-strict-s-v00@openssh.com"} & set(_by(uses, "key-establishment"))
    # The RSA host key was read (a second exchange asking for it): its size is on every RSA
    # host key algorithm; ssh-keygen made it 3072 bits.
    rsa = [u for u in uses if u["algorithm"] in ("rsa-sha2-512", "rsa-sha2-256")]
    assert [u["key_size"] for u in rsa] == [3072, 3072]
    assert all("host key read from the key exchange reply: ssh-rsa, 3072 bits" in u["notes"] for u in rsa)
    assert any("hybrid post-quantum key exchange in use (sntrup761x25519-sha512)" in line
               for line in result.summary)
    assert any("OpenSSH_9" in line for line in result.summary)
    # Triage: no name a default OpenSSH offers is unassessed, and the system is not rated on
    # the X25519 it merely offers.
    assessed = triage_text(result.text, tmp_path)
    (system,) = assessed.items
    assert [u.use.algorithm for u in system.uses if u.verdict == Verdict.UNASSESSED] == []
    kex = next(u for u in system.uses if u.use.algorithm == "sntrup761x25519-sha512")
    assert kex.use.role == "in-use" and kex.verdict == Verdict.QUANTUM_RESISTANT


def _moduli_sizes() -> set[int]:
    """Prime sizes sshd may pick (moduli(5): the fifth field is the size minus one); the RFC
    3526 / RFC 8268 groups sshd falls back to when the file is missing."""
    sizes = {2048, 3072, 4096, 6144, 8192}
    path = Path("/etc/ssh/moduli")
    if path.exists():
        for line in path.read_text().splitlines():
            fields = line.split()
            if len(fields) == 7 and fields[4].isdigit():
                sizes.add(int(fields[4]) + 1)
    return sizes


@pytest.mark.sshd
@needs_sshd
def test_restricted_openssh_group_exchange_and_rsa_host_key(tmp_path: Path) -> None:
    config = (
        "KexAlgorithms diffie-hellman-group-exchange-sha256,diffie-hellman-group14-sha1\n"
        "HostKeyAlgorithms rsa-sha2-512,ssh-rsa\nCiphers aes128-ctr,aes256-cbc\n"
        "MACs hmac-sha2-256,hmac-sha1\n"
    )
    with servers.sshd_server(tmp_path, config, ("rsa:2048",)) as port:
        result = probe_command([f"ssh://127.0.0.1:{port}"], timeout=10)
    uses = {u["algorithm"]: u for u in _uses(result.text)}
    gex = uses["diffie-hellman-group-exchange-sha256"]
    assert gex.get("role", "in-use") == "in-use"
    assert gex["key_size"] in _moduli_sizes()
    assert "chosen by the server for a request of min 2048, preferred 8192, max 8192" in gex["notes"]
    assert uses["diffie-hellman-group14-sha1"]["role"] == "offered"
    assert (uses["rsa-sha2-512"].get("role", "in-use"), uses["rsa-sha2-512"]["key_size"]) == ("in-use", 2048)
    assert (uses["ssh-rsa"]["role"], uses["ssh-rsa"]["key_size"]) == ("offered", 2048)
    assert uses["aes256-cbc"]["role"] == "offered" and uses["hmac-sha1"]["role"] == "offered"
    assert any("no post-quantum key exchange offered" in line for line in result.summary)
    # One fact, one answer: the probed in-use host key algorithm and a hand-written one agree;
    # the offered ssh-rsa signs with SHA-1 (NIST SP 800-131A Rev. 2, section 9): broken today.
    probed = uses_by_source(triage_text(result.text, tmp_path))
    hand = uses_by_source(triage_text(one_use_inventory(
        "{purpose: authentication, algorithm: rsa-sha2-512, key_size: 2048, source: hand}"
    ), tmp_path, "hand.yaml"))["hand"]  # fmt: skip
    in_use_host_key = next(u for k, u in probed.items() if k.endswith("#hostkey.rsa-sha2-512"))
    assert in_use_host_key.verdict == hand.verdict
    offered_sha1 = next(u for k, u in probed.items() if k.endswith("#hostkey.ssh-rsa"))
    assert offered_sha1.verdict == Verdict.CLASSICALLY_BROKEN


@pytest.mark.sshd
@needs_sshd
@pytest.mark.skipif(shutil.which("ssh-keyscan") is None, reason="ssh-keyscan is absent (openssh-client)")
def test_host_key_read_with_ssh_keyscan_when_the_probe_cannot_run_the_exchange(tmp_path: Path) -> None:
    # The probe does not run sntrup761 itself; with only that offered it asks ssh-keyscan.
    config = "KexAlgorithms sntrup761x25519-sha512@openssh.com\n"
    with servers.sshd_server(tmp_path, config, ("ed25519", "rsa:2048")) as port:
        result = probe_command([f"ssh://127.0.0.1:{port}"], timeout=10)
    uses = {u["algorithm"]: u for u in _uses(result.text)}
    assert "host key read from ssh-keyscan: ssh-ed25519" in uses["ssh-ed25519"]["notes"]
    assert uses["rsa-sha2-512"]["key_size"] == 2048


@pytest.mark.sshd
@needs_sshd
def test_a_server_a_current_client_cannot_use_has_nothing_in_use(tmp_path: Path) -> None:
    # OpenSSH clients since 8.8 do not accept ssh-rsa (SHA-1) host keys by default.
    config = "HostKeyAlgorithms ssh-rsa\nKexAlgorithms curve25519-sha256\n"
    with servers.sshd_server(tmp_path, config, ("rsa:2048",)) as port:
        result = probe_command([f"ssh://127.0.0.1:{port}"], timeout=10)
    uses = _uses(result.text)
    assert {u.get("role") for u in uses} == {"offered"}
    ssh_rsa = next(u for u in uses if u["algorithm"] == "ssh-rsa")
    assert ssh_rsa["key_size"] == 2048
    assert any("cannot connect (no host key algorithm in common)" in line for line in result.summary)


def test_closed_port_and_non_ssh_server() -> None:
    overlap = servers.Overlap()
    with (
        servers.closed_port() as closed,
        servers.banner_server(b"HTTP/1.1 400 Bad Request\r\n\r\n") as http,
        servers.banner_server(b"", linger=30.0, overlap=overlap) as silent,
        servers.banner_server(b"", linger=30.0, overlap=overlap) as quiet,
    ):
        result = probe_command(
            [f"ssh://127.0.0.1:{closed}", f"ssh://127.0.0.1:{http}", f"ssh://127.0.0.1:{silent}",
             f"ssh://127.0.0.1:{quiet}"],
            timeout=1.0,
        )
    # Bounded: the silent servers would hold their connections for 30 s; the probe gave up on
    # its own timeout (the "timed out" lines). Concurrent: both silent connections were open at
    # once, which one-after-another probing cannot produce (servers.Overlap).
    assert overlap.most == 2
    assert result.exit_code == 1
    lines = "\n".join(result.summary)
    assert f"ssh://127.0.0.1:{closed}: unreachable: refused" in lines
    assert f"ssh://127.0.0.1:{http}: unreachable: not SSH" in lines
    assert f"ssh://127.0.0.1:{silent}: unreachable: timed out" in lines
    assert f"ssh://127.0.0.1:{quiet}: unreachable: timed out" in lines


def test_pseudo_algorithms_are_ignored_and_roles_follow_the_negotiation() -> None:
    lists = [
        ["curve25519-sha256", "mlkem768x25519-sha256", "ext-info-s", "kex-strict-s-v00@openssh.com"],
        ["rsa-sha2-512"], ["aes256-gcm@openssh.com"], ["aes256-gcm@openssh.com"],
        ["hmac-sha2-512"], ["hmac-sha2-512"], ["none"], ["none"], [], [],
    ]  # fmt: skip
    # The default client is OpenSSH 10.0, whose list puts mlkem768x25519-sha256 first (the
    # shipped list's source says so; from memory).
    outcome = describe_kexinit("ssh://h:22", "SSH-2.0-Fictional", lists)
    assert [(f.algorithm, f.role) for f in outcome.findings] == [
        ("curve25519-sha256", "offered"), ("mlkem768x25519-sha256", "in-use"),
        ("rsa-sha2-512", "in-use"), ("aes256-gcm@openssh.com", "in-use"),
        ("hmac-sha2-512", "offered"),
    ]  # fmt: skip
    assert "hybrid post-quantum" in outcome.findings[1].notes
    assert "no MAC is used with aes256-gcm@openssh.com (the cipher's own tag)" in outcome.findings[4].notes
