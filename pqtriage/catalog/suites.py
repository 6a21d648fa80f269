"""TLS cipher suites: the grammar that splits a suite name into its parts.

IANA spelling (RFC 5246 Appendix A.5, RFC 8446 §B.4):
``TLS_<key exchange>_WITH_<cipher>[_<hash>]`` for TLS 1.2 and earlier,
``TLS_<cipher>_<hash>`` for TLS 1.3 (no key exchange: the group decides).
OpenSSL spelling (openssl-ciphers(1)): ``[<kx>-]<cipher>[-<hash>]`` with no
prefix meaning RSA key transport; it is rewritten to the IANA name and parsed
the same way, so both spellings of one suite give the same spec.

Parts and their purposes: key exchange -> key-establishment, authentication
-> authentication, bulk cipher -> encryption, record MAC / PRF hash ->
integrity. Sizes come from the use: ``key_size`` sizes every RSA, DSA and
finite-field DH part (the certificate key and the DH group), ``curve`` names
the ECDHE group and the ECDSA certificate curve (or an FFDH group such as
ffdhe2048). A suite whose public-key part lacks its size is unassessed, with
the reason and the quantum attack class (Shor) still reported.
"""

from __future__ import annotations

from typing import Any, Protocol, cast

from pqtriage.catalog.spec import (
    QUANTUM_ATTACKS,
    AlgorithmSpec,
    ClassicalStatus,
    Component,
    QuantumAttack,
    Resolution,
)
from pqtriage.catalog.strength import cap_status, join_notes, worst_status

TLS13_NOTE = (
    "TLS 1.3 suite: the name carries no key exchange; the negotiated group decides "
    "(list the group as its own use)"
)
DEFAULT_PRF_HASH = "SHA256"
"""Suites without a hash token (CCM) use the SHA-256 PRF (RFC 5246 §5; RFC 6655 §3)."""


class SuiteParts(Protocol):
    """What the suite grammar asks of the catalog (pqtriage.catalog.resolve.Catalog has it)."""

    def fixed(self, name: str) -> AlgorithmSpec:
        """A fixed spec by catalog name or alias."""
        ...

    def family_part(
        self, family: str, key_size: int | None, curve: str | None, purpose: str
    ) -> Resolution:
        """Resolve a family (RSA, FFDH, ECDH ...) with a use's parameters, for a composite."""
        ...

    def suite_replacements(self) -> dict[str, str]:
        """Replacement texts for a whole cipher suite."""
        ...


class SuiteParser:
    """Decomposes TLS cipher suite names using the catalog's token tables."""

    def __init__(self, tokens: dict[str, Any], catalog: SuiteParts, path: str) -> None:
        # Suite names are matched in upper case (TLS_DH_anon_... is written with a lower-case part).
        self.tokens = {
            key: (
                {str(k).upper(): v for k, v in value.items()} if isinstance(value, dict) else value
            )
            for key, value in tokens.items()
        }
        self.catalog = catalog
        self.path = path
        self._kx_spelling = {str(token).upper(): str(token) for token in tokens["key_exchange"]}
        self._ciphers = sorted(self.tokens["ciphers"], key=len, reverse=True)
        self._openssl_kx = sorted(self.tokens["openssl_key_exchange"], key=len, reverse=True)
        self._openssl_ciphers = sorted(self.tokens["openssl_ciphers"], key=len, reverse=True)
        # Every referenced entry must exist: a broken token table is a packaging bug.
        for name in (*tokens["ciphers"].values(), *tokens["hashes"].values()):
            catalog.fixed(name)

    def resolve(self, text: str, *, key_size: int | None, curve: str | None) -> Resolution | None:
        """Resolution of a suite name, or None when ``text`` is not a suite name."""
        upper = text.strip().upper()
        iana = upper if upper.startswith(("TLS_", "SSL_")) else self.openssl_to_iana(upper)
        if iana is None:
            return None
        parts = self.split(iana)
        if parts is None:
            return None
        return self._compose(iana, *parts, key_size=key_size, curve=curve)

    def split(self, iana: str) -> tuple[str | None, str, str] | None:
        """(key exchange token or None for TLS 1.3, cipher token, hash token) of an IANA name."""
        body = iana[4:]
        kx: str | None = None
        if "_WITH_" in body:
            kx, body = body.split("_WITH_", 1)
            if kx not in self.tokens["key_exchange"]:
                return None
        for cipher in self._ciphers:
            if body == cipher and kx is not None:
                return kx, cipher, DEFAULT_PRF_HASH
            if body.startswith(cipher + "_"):
                digest = body[len(cipher) + 1 :]
                if digest in self.tokens["hashes"]:
                    return kx, cipher, digest
        return None

    def openssl_to_iana(self, name: str) -> str | None:
        """IANA name of an OpenSSL suite spelling, or None if it does not parse."""
        for prefix in (*self._openssl_kx, ""):
            if prefix and not name.startswith(prefix + "-"):
                continue
            rest = name[len(prefix) + 1 :] if prefix else name
            kx = self.tokens["openssl_key_exchange"][prefix] if prefix else "RSA"
            for cipher in self._openssl_ciphers:
                row = self.tokens["openssl_ciphers"][cipher]
                if rest == cipher and row.get("hash"):
                    digest, in_name = row["hash"], row.get("hash_in_name", True)
                elif (
                    rest.startswith(cipher + "-")
                    and rest[len(cipher) + 1 :] in self.tokens["hashes"]
                ):
                    digest, in_name = rest[len(cipher) + 1 :], True
                else:
                    continue
                name_hash = f"_{digest}" if in_name else ""
                return f"TLS_{kx}_WITH_{row['iana']}{name_hash}".upper()
        return None

    def _compose(
        self,
        iana: str,
        kx: str | None,
        cipher: str,
        digest: str,
        *,
        key_size: int | None,
        curve: str | None,
    ) -> Resolution:
        name = "TLS_" + iana[4:]
        if kx:  # the registry's own spelling of the key exchange (TLS_DH_anon_...)
            name = name.replace(f"TLS_{kx}_WITH_", f"TLS_{self._kx_spelling[kx]}_WITH_", 1)
        parts: list[Component] = []
        missing: list[str] = []
        quantum: list[str] = []
        token: dict[str, Any] = self.tokens["key_exchange"].get(kx, {}) if kx else {}
        for role, purpose in (("kx", "key-establishment"), ("auth", "authentication")):
            family = token.get(role)
            if not family:
                continue
            found = self.catalog.family_part(family, key_size, curve, purpose)
            if found.spec is None:
                label = "key exchange" if role == "kx" else "authentication"
                missing.append(f"{label} {found.reason}")
                quantum.append(found.quantum_attack or "shor")
            else:
                parts.append(Component(purpose=purpose, spec=found.spec))
        parts.append(Component("encryption", self.catalog.fixed(self.tokens["ciphers"][cipher])))
        parts.append(Component("integrity", self.catalog.fixed(self.tokens["hashes"][digest])))
        quantum += [part.spec.quantum_attack for part in parts]
        worst_quantum = min(quantum, key=QUANTUM_ATTACKS.index)  # shor > grover > none
        if missing:
            return Resolution(
                None,
                reason=f"{name}: " + "; ".join(missing),
                family="TLS cipher suite",
                quantum_attack=cast(QuantumAttack, worst_quantum),
            )
        status = cap_status(
            worst_status(*(p.spec.classical_status for p in parts)), token.get("status_at_best")
        )
        bits = [p.spec.classical_bits for p in parts if p.spec.classical_bits is not None]
        shor = next((p.spec for p in parts if p.spec.quantum_attack == "shor"), None)
        return Resolution(
            AlgorithmSpec(
                name=name,
                family="TLS cipher suite",
                primitive="cipher-suite",
                classical_bits=min(bits) if bits else None,
                classical_status=cast(ClassicalStatus, status),
                quantum_attack=cast(QuantumAttack, worst_quantum),
                source=str(self.tokens["source"]),
                shor_problem=shor.shor_problem if shor else None,
                problem_bits=shor.problem_bits if shor else None,
                replacements=self.catalog.suite_replacements(),
                components=tuple(parts),
                notes=join_notes(TLS13_NOTE if kx is None else "", token.get("notes")),
                identifiers={"iana": name},
            )
        )
