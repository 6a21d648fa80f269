"""Java keystores: JKS, JCEKS (pyjks), BKS and UBER (pyjks's Bouncy Castle readers).

PKCS#12 keystores are read by the key and certificate finder (the cryptography library).
Each password given is tried in turn; with none that opens the store, a JKS or JCEKS store is
still parsed without its integrity check, so its trusted certificates are reported, and every
protected entry is reported present and unread (type unknown), never dropped. Key bytes,
passwords and secret values never reach a finding; an entry's alias is kept as its locator.

Magic numbers: JKS 0xFEEDFEED, JCEKS 0xCECECECE (the JDK's sun.security.provider.JavaKeyStore
and com.sun.crypto.provider.JceKeyStore, as pyjks documents them); BKS and UBER by name
(``.bks``, ``.ubr``) since their header is a bare version number.
"""

from __future__ import annotations

import warnings
from typing import Any

from cryptography import x509
from cryptography.exceptions import UnsupportedAlgorithm
from cryptography.hazmat.primitives import serialization
from pyasn1.error import PyAsn1Error

from pqtriage.model.inventory import Purpose, SourceRef
from pqtriage.sources.scan.certificates import describe_certificate, describe_key
from pqtriage.sources.scan.finders.interface import (
    NOT_MINE,
    Finder,
    FinderContext,
    FinderResult,
    not_understood,
)
from pqtriage.sources.scan.findings import Finding, FindingKind

JKS_MAGIC = bytes.fromhex("feedfeed")
JCEKS_MAGIC = bytes.fromhex("cececece")
_BC_SUFFIXES = (".bks", ".ubr", ".uber", ".bcfks")
#: JCEKS secret key algorithm names (JCA standard names) -> catalog names.
_SECRET_NAMES = {"AES": "AES", "DESEDE": "3TDEA", "DES": "DES", "HMACSHA256": "HMAC-SHA256",
                 "HMACSHA1": "HMAC-SHA1", "BLOWFISH": "Blowfish", "RC4": "RC4",
                 "ARCFOUR": "RC4"}  # fmt: skip


def _jks() -> Any:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        import jks  # pyjks

    return jks


class KeystoreFinder(Finder):
    """Reads JKS, JCEKS, BKS and UBER keystores."""

    name = "keystore"

    def wants(self, path: str, head: bytes) -> bool:
        return head[:4] in (JKS_MAGIC, JCEKS_MAGIC) or path.lower().endswith(_BC_SUFFIXES)

    def read(self, data: bytes, path: str, context: FinderContext) -> FinderResult:
        jks = _jks()
        kind = "JKS" if data[:4] == JKS_MAGIC else "JCEKS" if data[:4] == JCEKS_MAGIC else "BKS"
        loader = jks.KeyStore if kind != "BKS" else None
        candidates: list[Any] = [loader] if loader else [jks.bks.BksKeyStore, jks.bks.UberKeyStore]
        errors = (jks.util.KeystoreException, ValueError, TypeError, IndexError, EOFError,
                  UnicodeDecodeError, OverflowError, AssertionError, KeyError,
                  PyAsn1Error)  # fmt: skip
        wrong_password = False
        for password in context.passwords:
            text = password.decode("utf-8", "replace")
            for candidate in candidates:
                try:
                    if candidate is jks.KeyStore:
                        # Integrity first, then each entry on its own: one entry that the
                        # library cannot decrypt must not hide the others.
                        store = candidate.loads(data, text, try_decrypt_keys=False)
                        _open_entries(jks, store, text)
                    else:
                        store = candidate.loads(data, text)
                except jks.util.KeystoreSignatureException:
                    wrong_password = True
                    continue
                except errors:
                    continue
                return FinderResult(claimed=True, findings=tuple(_describe(store, path, kind, True)))
        if kind == "BKS":
            why = "BKS/UBER keystore: no password given opened it" if context.passwords else (
                "BKS/UBER keystore is protected as a whole: give its password")
            return FinderResult(claimed=True, findings=(_unread(path, "store", why),),
                                not_understood=why)  # fmt: skip
        try:
            store = jks.KeyStore.loads(data, None, try_decrypt_keys=False)
        except errors as error:
            return not_understood(path, f"{kind} keystore does not parse ({type(error).__name__})")
        why = (
            f"{kind} keystore: the password given did not open it"
            if wrong_password
            else f"{kind} keystore: no password given (--keystore-password)"
        )
        findings = _describe(store, path, kind, False)
        protected = sum(1 for f in findings if f.kind is FindingKind.KEYSTORE_ENCRYPTED)
        if protected:
            return FinderResult(claimed=True, findings=tuple(findings),
                                not_understood=f"{why}; {protected} protected entries unread")  # fmt: skip
        return FinderResult(claimed=True, findings=tuple(findings))


def _open_entries(jks: Any, store: Any, password: str) -> None:
    """Decrypts each protected entry with the store password, one entry at a time.

    pyjks reads the key-protection AlgorithmIdentifier's parameters unconditionally; keytool of
    newer JDKs (seen with JDK 25) omits them for the JKS algorithm, which RFC 5280 §4.1.1.2 allows
    (parameters are OPTIONAL), and recent pyasn1 refuses to read an absent value. For that
    algorithm (no parameters needed) the key is decrypted here with pyjks's own JKS routine; an
    entry still not opened stays protected and is reported unread, never dropped.
    """
    for entry in store.entries.values():
        if not hasattr(entry, "decrypt") or entry.is_decrypted():
            continue
        try:
            entry.decrypt(password)
        except PyAsn1Error:
            _decrypt_without_parameters(jks, entry, password)
        except (jks.util.KeystoreException, ValueError, TypeError, IndexError):
            continue


def _decrypt_without_parameters(jks: Any, entry: Any, password: str) -> None:
    from pyasn1.codec.der import decoder

    try:
        info = decoder.decode(entry._encrypted, asn1Spec=jks.rfc5208.EncryptedPrivateKeyInfo())[0]
        if info["encryptionAlgorithm"]["algorithm"].asTuple() != jks.sun_crypto.SUN_JKS_ALGO_ID:
            return
        plain = jks.sun_crypto.jks_pkey_decrypt(info["encryptedData"].asOctets(), password)
        key_info = decoder.decode(plain, asn1Spec=jks.rfc5208.PrivateKeyInfo())[0]
        entry._pkey = key_info["privateKey"].asOctets()
        entry._pkey_pkcs8 = bytes(plain)
        entry._algorithm_oid = key_info["privateKeyAlgorithm"]["algorithm"].asTuple()
        entry._encrypted = None
    except (PyAsn1Error, jks.util.KeystoreException, ValueError, TypeError, IndexError):
        return


def _describe(store: Any, path: str, kind: str, opened: bool) -> list[Finding]:
    findings: list[Finding] = []
    note = (f"{kind} keystore", "opened with the password" if opened else "integrity not checked")
    for alias, entry in sorted(store.entries.items()):
        findings += _entry(entry, path, str(alias), note)
    return findings


def _entry(entry: Any, path: str, alias: str, note: tuple[str, ...]) -> list[Finding]:
    """Findings of one entry, whichever store type it comes from (JKS/JCEKS or BKS/UBER)."""
    name = type(entry).__name__
    if name == "BksSealedKeyEntry":  # BKS: a key sealed with its own password
        if not entry.is_decrypted():
            return [_unread(path, f"{alias}.key", "sealed key entry, protected")]
        inner = _entry(entry.nested, path, alias, note)
        if getattr(entry.nested, "cert_chain", None):
            return inner  # the chain travels with the nested key entry
        return inner + _chain(entry, path, alias, note)
    if name in ("PrivateKeyEntry",) or name == "BksKeyEntry" and entry.type == 0:
        return _private_entry(entry, path, alias, note)
    if name == "BksKeyEntry" and entry.type == 1:
        try:
            key = serialization.load_der_public_key(bytes(entry.encoded))
        except (ValueError, TypeError, UnsupportedAlgorithm):
            return [_unread(path, f"{alias}.key", "public key entry in an unknown format")]
        return describe_key(key, SourceRef(path, detail=f"{alias}.key"), False, note)
    if name in ("TrustedCertEntry", "BksTrustedCertEntry"):
        return _certificate(entry.cert, path, alias, note)
    if name in ("SecretKeyEntry", "BksKeyEntry"):
        if not entry.is_decrypted():
            return [_unread(path, alias, "secret key entry, protected")]
        algorithm = str(getattr(entry, "algorithm", "unknown"))
        spelled = _SECRET_NAMES.get(algorithm.upper().replace("-", ""), algorithm)
        size = getattr(entry, "key_size", None) or 8 * len(getattr(entry, "encoded", b"") or b"") or None
        return [Finding(
            source=SourceRef(path, detail=alias), kind=FindingKind.PRIVATE_KEY, algorithm=spelled,
            purpose=Purpose.ENCRYPTION if "HMAC" not in spelled else Purpose.INTEGRITY,
            key_size=int(size) if size else None,
            notes=note + ("secret key entry: algorithm and size only",),
        )]  # fmt: skip
    return [_unread(path, alias, f"entry of an unknown kind ({name})")]


def _chain(entry: Any, path: str, alias: str, note: tuple[str, ...]) -> list[Finding]:
    found: list[Finding] = []
    for index, item in enumerate(getattr(entry, "cert_chain", ()) or (), 1):
        der = item.cert if hasattr(item, "cert") else item[1]  # BKS entries or JKS (type, der)
        found += _certificate(der, path, f"{alias}.chain{index}", note)
    return found


def _private_entry(entry: Any, path: str, alias: str, note: tuple[str, ...]) -> list[Finding]:
    found: list[Finding] = []
    if entry.is_decrypted():
        try:
            key = serialization.load_der_private_key(bytes(entry.pkey_pkcs8), None)
            found += describe_key(key, SourceRef(path, detail=f"{alias}.key"), True, note)
        except (ValueError, TypeError, UnsupportedAlgorithm):
            found.append(_unread(path, f"{alias}.key", "private key entry in an unknown format"))
    else:
        found.append(_unread(path, f"{alias}.key", "private key entry, protected"))
    return found + _chain(entry, path, alias, note)


def _certificate(der: bytes, path: str, detail: str, note: tuple[str, ...]) -> list[Finding]:
    try:
        cert = x509.load_der_x509_certificate(bytes(der))
        described = describe_certificate(cert, SourceRef(path, detail=detail))
    except (ValueError, TypeError, x509.InvalidVersion):
        return [_unread(path, detail, "certificate entry does not parse")]
    return [_with_notes(f, note) for f in described]


def _with_notes(finding: Finding, note: tuple[str, ...]) -> Finding:
    import dataclasses

    return dataclasses.replace(finding, notes=finding.notes + note)


def _unread(path: str, detail: str, why: str) -> Finding:
    return Finding(
        source=SourceRef(path, detail=detail),
        kind=FindingKind.KEYSTORE_ENCRYPTED,
        algorithm="unknown",
        purpose=Purpose.AUTHENTICATION,
        notes=("present, not read", why),
    )


__all__ = ["KeystoreFinder", "NOT_MINE"]
