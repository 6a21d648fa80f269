"""Generate keys, certificates and key files at test time with the cryptography library.

Nothing here is checked-in key material: every test builds what it needs into tmp_path.
"""

from __future__ import annotations

import base64
import datetime
from pathlib import Path
from typing import Any

from cryptography import x509
from cryptography.hazmat.primitives import hashes, serialization
from cryptography.hazmat.primitives.asymmetric import dsa, ec, ed448, ed25519, mldsa, padding, rsa
from cryptography.hazmat.primitives.serialization import pkcs7, pkcs12
from cryptography.x509.oid import ExtendedKeyUsageOID, NameOID

NOW = datetime.datetime(2025, 1, 1, tzinfo=datetime.UTC)
_RSA_CACHE: dict[int, rsa.RSAPrivateKey] = {}


def rsa_key(bits: int) -> rsa.RSAPrivateKey:
    """An RSA key (cached per size within one test run: generation is slow)."""
    if bits not in _RSA_CACHE:
        _RSA_CACHE[bits] = rsa.generate_private_key(65537, bits)
    return _RSA_CACHE[bits]


def ec_key(curve: ec.EllipticCurve) -> ec.EllipticCurvePrivateKey:
    """A key on a NIST curve."""
    return ec.generate_private_key(curve)


def dsa_key(bits: int = 2048) -> dsa.DSAPrivateKey:
    """A DSA key."""
    return dsa.generate_private_key(bits)


def mldsa_key(parameter_set: int) -> Any:
    """An ML-DSA key (FIPS 204) of parameter set 44, 65 or 87."""
    return {
        44: mldsa.MLDSA44PrivateKey,
        65: mldsa.MLDSA65PrivateKey,
        87: mldsa.MLDSA87PrivateKey,
    }[parameter_set].generate()


def _hash_for(key: Any) -> hashes.HashAlgorithm | None:
    if isinstance(key, ed25519.Ed25519PrivateKey | ed448.Ed448PrivateKey):
        return None
    if type(key).__name__.startswith("MLDSA"):
        return None
    return hashes.SHA256()


#: DER AlgorithmIdentifier of sha256WithRSAEncryption (RFC 8017, Appendix C: 1.2.840.113549.1.1.11,
#: NULL parameters). md5WithRSAEncryption (.1.1.4) and sha1WithRSAEncryption (.1.1.5) have the
#: same encoded length and differ only in the OID's last byte.
_SHA256_WITH_RSA = bytes.fromhex("300d06092a864886f70d01010b0500")
_RSA_OID_LAST_BYTE = {"md5": 0x04, "sha1": 0x05}
_LEGACY_HASHES = {"md5": hashes.MD5, "sha1": hashes.SHA1}


def _resign_rsa(cert: x509.Certificate, signer: rsa.RSAPrivateKey, hash_name: str) -> x509.Certificate:
    """The same certificate signed with MD5 or SHA-1 instead of SHA-256 (RSA PKCS #1 v1.5).

    The cryptography library refuses to *build* MD5- and SHA-1-signed certificates, but its
    hazmat RSA API still signs with those hashes: the SHA-256 certificate's two signature
    AlgorithmIdentifiers (inside the to-be-signed part and after it, RFC 5280 section 4.1) are
    rewritten to the legacy OID, and the new to-be-signed bytes are signed again. The
    signature keeps its length (the modulus length), so no DER length changes.
    """
    legacy = _SHA256_WITH_RSA[:-3] + bytes([_RSA_OID_LAST_BYTE[hash_name]]) + _SHA256_WITH_RSA[-2:]
    der = cert.public_bytes(serialization.Encoding.DER)
    assert der.count(_SHA256_WITH_RSA) == 2 and der.count(cert.signature) == 1
    tbs = cert.tbs_certificate_bytes.replace(_SHA256_WITH_RSA, legacy)
    signature = signer.sign(tbs, padding.PKCS1v15(), _LEGACY_HASHES[hash_name]())
    rebuilt = der.replace(_SHA256_WITH_RSA, legacy).replace(cert.signature, signature)
    return x509.load_der_x509_certificate(rebuilt)


def _key_identifier(key: Any) -> x509.SubjectKeyIdentifier | None:
    try:
        return x509.SubjectKeyIdentifier.from_public_key(key.public_key())
    except (TypeError, ValueError):  # key types the helper does not know (ML-DSA ...)
        return None


def certificate(
    key: Any,
    common_name: str,
    issuer_key: Any | None = None,
    issuer: x509.Certificate | None = None,
    ca: bool = False,
    dns: tuple[str, ...] = (),
    code_signing: bool = False,
    hash_name: str = "sha256",
    not_before: datetime.datetime = NOW,
    days: int = 365,
    key_identifiers: bool = True,
) -> x509.Certificate:
    """A certificate for key; self-signed unless an issuer key and certificate are given.

    ``hash_name`` md5 or sha1 gives a legacy RSA signature (see _resign_rsa). With
    ``key_identifiers`` the certificate has a subject key identifier and, when issued, an
    authority key identifier naming the issuer's key (RFC 5280, sections 4.2.1.1-2).
    """
    subject = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, common_name)])
    signer = issuer_key or key
    builder = (
        x509.CertificateBuilder()
        .subject_name(subject)
        .issuer_name(issuer.subject if issuer else subject)
        .public_key(key.public_key())
        .serial_number(x509.random_serial_number())
        .not_valid_before(not_before)
        .not_valid_after(not_before + datetime.timedelta(days=days))
        .add_extension(x509.BasicConstraints(ca=ca, path_length=None), critical=True)
    )
    if ca:
        builder = builder.add_extension(
            x509.KeyUsage(True, False, False, False, False, True, True, False, False), True
        )
    else:
        builder = builder.add_extension(
            x509.KeyUsage(True, False, True, False, False, False, False, False, False), True
        )
        eku = (
            [ExtendedKeyUsageOID.CODE_SIGNING]
            if code_signing
            else [ExtendedKeyUsageOID.SERVER_AUTH]
        )
        builder = builder.add_extension(x509.ExtendedKeyUsage(eku), False)
    if dns:
        builder = builder.add_extension(
            x509.SubjectAlternativeName([x509.DNSName(name) for name in dns]), False
        )
    if key_identifiers:
        own = _key_identifier(key)
        if own is not None:
            builder = builder.add_extension(own, False)
        issuer_id = _key_identifier(signer)
        if issuer_key is not None and issuer_id is not None:
            builder = builder.add_extension(
                x509.AuthorityKeyIdentifier(issuer_id.digest, None, None), False
            )
    cert = builder.sign(signer, _hash_for(signer))
    if hash_name != "sha256":
        if not isinstance(signer, rsa.RSAPrivateKey):
            raise ValueError("legacy hashes are built for RSA signers only")
        cert = _resign_rsa(cert, signer, hash_name)
    return cert


def csr(key: Any, common_name: str) -> x509.CertificateSigningRequest:
    """A certificate signing request."""
    subject = x509.Name([x509.NameAttribute(NameOID.COMMON_NAME, common_name)])
    return x509.CertificateSigningRequestBuilder().subject_name(subject).sign(key, _hash_for(key))


def cert_pem(cert: x509.Certificate) -> bytes:
    """PEM of a certificate."""
    return cert.public_bytes(serialization.Encoding.PEM)


def private_pem(
    key: Any,
    password: bytes | None = None,
    private_format: serialization.PrivateFormat = serialization.PrivateFormat.PKCS8,
) -> bytes:
    """PEM of a private key, encrypted with password when given."""
    encryption: serialization.KeySerializationEncryption = (
        serialization.BestAvailableEncryption(password)
        if password
        else serialization.NoEncryption()
    )
    return key.private_bytes(serialization.Encoding.PEM, private_format, encryption)


def private_der(key: Any, password: bytes | None = None) -> bytes:
    """PKCS#8 DER of a private key."""
    encryption: serialization.KeySerializationEncryption = (
        serialization.BestAvailableEncryption(password)
        if password
        else serialization.NoEncryption()
    )
    return key.private_bytes(
        serialization.Encoding.DER, serialization.PrivateFormat.PKCS8, encryption
    )


def public_pem(key: Any) -> bytes:
    """SubjectPublicKeyInfo PEM of a key's public half."""
    return key.public_key().public_bytes(
        serialization.Encoding.PEM, serialization.PublicFormat.SubjectPublicKeyInfo
    )


def ssh_public_line(key: Any, comment: str = "") -> str:
    """OpenSSH one-line public key."""
    line = (
        key.public_key()
        .public_bytes(serialization.Encoding.OpenSSH, serialization.PublicFormat.OpenSSH)
        .decode()
    )
    return f"{line} {comment}".rstrip()


def ssh_certificate_line(key: Any, ca_key: Any, key_id: str, host: bool = True) -> str:
    """An OpenSSH certificate for key, signed by ca_key (PROTOCOL.certkeys)."""
    certificate_type = (
        serialization.SSHCertificateType.HOST if host else serialization.SSHCertificateType.USER
    )
    builder = (
        serialization.SSHCertificateBuilder()
        .public_key(key.public_key())
        .serial(1)
        .type(certificate_type)
        .key_id(key_id.encode())
        .valid_principals([b"web.example.test"])
        .valid_after(int(NOW.timestamp()))
        .valid_before(int(NOW.timestamp()) + 86400)
    )
    cert = builder.sign(ca_key)
    return cert.public_bytes().decode()


def pkcs12_bundle(
    key: Any, cert: x509.Certificate, cas: list[x509.Certificate], password: bytes | None
) -> bytes:
    """A PKCS#12 bundle (RFC 7292), encrypted when a password is given."""
    encryption: serialization.KeySerializationEncryption = (
        serialization.BestAvailableEncryption(password)
        if password
        else serialization.NoEncryption()
    )
    return pkcs12.serialize_key_and_certificates(b"bundle", key, cert, cas, encryption)


def pkcs7_pem(certs: list[x509.Certificate]) -> bytes:
    """A PKCS#7 certificate bundle in PEM."""
    return pkcs7.serialize_certificates(certs, serialization.Encoding.PEM)


def secret_fragments(key: Any) -> list[str]:
    """Strings that would betray a private key if they appeared in any output.

    The PKCS#8 DER in base64 and hex, each 64-character line of its PEM, and the key's
    secret number or raw private bytes.
    """
    der = private_der(key)
    fragments = [base64.b64encode(der).decode()[:40], der.hex()[:40]]
    pem_lines = private_pem(key).decode().splitlines()[1:-1]
    fragments += [line for line in pem_lines if len(line) >= 32]
    if isinstance(key, rsa.RSAPrivateKey):
        fragments.append(str(key.private_numbers().d)[:40])
    elif isinstance(key, ec.EllipticCurvePrivateKey | dsa.DSAPrivateKey):
        value = key.private_numbers().private_value
        fragments += [str(value)[:30], format(value, "x")[:30]]
    elif isinstance(key, ed25519.Ed25519PrivateKey | ed448.Ed448PrivateKey):
        raw = key.private_bytes(
            serialization.Encoding.Raw,
            serialization.PrivateFormat.Raw,
            serialization.NoEncryption(),
        )
        fragments += [raw.hex(), base64.b64encode(raw).decode()[:20]]
    return fragments


def write(path: Path, data: bytes | str) -> Path:
    """Write bytes or text, creating folders."""
    path.parent.mkdir(parents=True, exist_ok=True)
    if isinstance(data, str):
        path.write_text(data, encoding="utf-8")
    else:
        path.write_bytes(data)
    return path


def certificate_with_serial(key: Any, common_name: str, serial_byte: int) -> bytes:
    """PEM of a self-signed certificate whose serial number is one DER byte: 0x00 (zero) or
    0x80..0xFF (negative). RFC 5280 section 4.1.2.2 requires a positive serial, so the
    builder refuses these: the certificate is built with serial 1 and its DER INTEGER (ITU-T
    X.690 section 8.3) is patched in place; the signature no longer verifies, which a scan
    never checks."""
    der = certificate(key, common_name).public_bytes(serialization.Encoding.DER)
    marker = b"\xa0\x03\x02\x01\x02"  # [0] EXPLICIT version v3, right before the serial
    at = der.index(marker) + len(marker)
    # serial_number(1) is not used by certificate(); patch whatever serial it has instead.
    assert der[at] == 0x02, "serial INTEGER follows the version"
    length = der[at + 1]
    patched = der[: at + 1] + b"\x01" + bytes([serial_byte]) + der[at + 2 + length:]
    # Keep every enclosing DER length right: the tbsCertificate and the certificate shrink.
    shrink = length - 1
    return _pem(_shrink(patched, shrink))


def _shrink(der: bytes, shrink: int) -> bytes:
    """Reduce the two outer SEQUENCE lengths (certificate, tbsCertificate) by ``shrink``."""
    def fix(data: bytes, offset: int) -> bytes:
        assert data[offset] == 0x30
        first = data[offset + 1]
        if first < 0x80:
            return data[: offset + 1] + bytes([first - shrink]) + data[offset + 2:]
        count = first & 0x7F
        value = int.from_bytes(data[offset + 2: offset + 2 + count], "big") - shrink
        return data[: offset + 2] + value.to_bytes(count, "big") + data[offset + 2 + count:]

    outer = fix(der, 0)
    count = outer[1] & 0x7F if outer[1] >= 0x80 else 0
    return fix(outer, 2 + count)


def _pem(der: bytes) -> bytes:
    body = base64.encodebytes(der).replace(b"\n", b"")
    lines = [body[i: i + 64] for i in range(0, len(body), 64)]
    return b"-----BEGIN CERTIFICATE-----\n" + b"\n".join(lines) + b"\n-----END CERTIFICATE-----\n"
