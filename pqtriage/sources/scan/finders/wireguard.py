"""WireGuard (``wg0.conf``, wg-quick(8) and wg(8) format): every interface and peer uses the
Noise IK handshake with Curve25519, ChaCha20-Poly1305 and BLAKE2s (WireGuard whitepaper,
Donenfeld, NDSS 2017, section 5); BLAKE2s, which the catalog does not list, is named in
the notes only. Curve25519 falls to Shor's algorithm: a recorded handshake
can be decrypted later. A ``PresharedKey`` per peer is mixed into the handshake (whitepaper
section 5.2) and is the documented interim protection against that; the replacement is a
post-quantum key exchange (ML-KEM) for the tunnel. Key values are never reported.
"""

from __future__ import annotations

import re

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.finders.interface import NOT_MINE, Finder, FinderContext, FinderResult
from pqtriage.sources.scan.findings import Finding, FindingKind

_SNIFF = re.compile(rb"^\s*\[(Interface|Peer)\]", re.M | re.I)
PROTOCOL = "WireGuard"
REPLACEMENT = (
    "quantum-vulnerable key exchange (Curve25519, Shor): set a PresharedKey per peer now "
    "(mixed into the Noise handshake), plan a move to a post-quantum (ML-KEM) tunnel"
)


class WireguardFinder(Finder):
    """Reads WireGuard interface files."""

    name = "wireguard"

    def wants(self, path: str, head: bytes) -> bool:
        return bool(_SNIFF.search(head)) and (b"PrivateKey" in head or b"PublicKey" in head)

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        text = data.decode("utf-8", "replace")
        if not _SNIFF.search(data):
            return NOT_MINE
        findings: list[Finding] = []
        section, section_line, keys = "", 0, set[str]()
        blocks: list[tuple[str, int, set[str]]] = []
        for number, raw in enumerate(text.splitlines(), 1):
            line = raw.split("#", 1)[0].strip()
            if line.startswith("[") and line.endswith("]"):
                if section:
                    blocks.append((section, section_line, keys))
                section, section_line, keys = line[1:-1].strip().lower(), number, set()
                continue
            key = line.split("=", 1)[0].strip().lower()
            if key:
                keys.add(key)
        if section:
            blocks.append((section, section_line, keys))
        for kind, at, names in blocks:
            if kind == "interface" and "privatekey" in names or kind == "peer":
                notes = [REPLACEMENT, "Noise IK handshake; hash and key derivation BLAKE2s"]
                if kind == "peer":
                    has_psk = "presharedkey" in names
                    notes.append("PresharedKey set for this peer" if has_psk else "no PresharedKey")
                findings.append(_use(path, at, kind, "X25519", Purpose.KEY_ESTABLISHMENT, notes))
        interface = next((at for kind, at, _ in blocks if kind == "interface"), None)
        if interface is not None:
            findings.append(_use(path, interface, "interface", "ChaCha20-Poly1305",
                                 Purpose.ENCRYPTION, ["transport data (whitepaper section 5.4.6)"]))  # fmt: skip
        return FinderResult(claimed=True, findings=tuple(findings))


def _use(path: str, line: int, section: str, name: str, purpose: Purpose, notes: list[str]) -> Finding:
    return Finding(
        source=SourceRef(path, line=line, detail=f"line{line}:{section}:{name}"),
        kind=FindingKind.CONFIG_SETTING,
        algorithm=name,
        purpose=purpose,
        protocol=PROTOCOL,
        notes=tuple(notes),
    )
